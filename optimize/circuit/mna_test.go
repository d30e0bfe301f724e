package circuit

import (
	"fmt"
	"math"
	"math/big"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// fullMNA solves n by textbook modified nodal analysis with gonum's dense
// solver, independently of the reduced formulation: every non-ground node
// is an unknown (plus one internal node per op-amp for its offset source),
// and every voltage source, offset source and VCVS has its branch current
// as an unknown. Stamps as in C.-W. Ho, A. E. Ruehli, P. A. Brennan, "The
// modified nodal approach to network analysis", IEEE Trans. CAS-22, 1975
// (from memory). A finite-gain VCVS row is V(out) - A (V(c+) - V(c-)) = 0;
// an ideal one is the nullor row V(c+) - V(c-) = 0. The finite-gain row is
// divided by A, as V(out)/A - V(c+) + V(c-) = 0: undivided, a gain of 1e7
// in the matrix costs gonum's LU about eight digits on the in-amp.
func fullMNA(n *Netlist) ([]float64, error) {
	G, rhs := mnaSystem(n)
	var x mat.VecDense
	if err := x.SolveVec(G, rhs); err != nil {
		return nil, fmt.Errorf("gonum solve: %w", err)
	}
	// One step of iterative refinement, x += G^-1 (rhs - G x) (Golub and
	// Van Loan, "Matrix Computations", §3.5, from memory), so that the
	// reference is not less accurate than the solver it checks.
	var res, dx mat.VecDense
	res.MulVec(G, &x)
	res.SubVec(rhs, &res)
	if err := dx.SolveVec(G, &res); err != nil {
		return nil, fmt.Errorf("gonum refinement: %w", err)
	}
	x.AddVec(&x, &dx)
	v := make([]float64, len(n.Nodes))
	for k := 1; k < len(n.Nodes); k++ {
		v[k] = x.AtVec(k - 1)
	}
	return v, nil
}

// mnaSystem assembles the full MNA matrix and right-hand side of n; the
// unknowns are the node voltages of nodes 1.. in order, then the internal
// offset nodes, then the branch currents.
func mnaSystem(n *Netlist) (*mat.Dense, *mat.VecDense) {
	nn := len(n.Nodes) - 1 // node k>0 -> column k-1
	na := len(n.OpAmps)
	nodes := nn + na // internal node nn+i is op-amp i's plus+Vos
	nb := len(n.Sources) + 2*na
	dim := nodes + nb
	G := mat.NewDense(dim, dim, nil)
	rhs := mat.NewVecDense(dim, nil)
	col := func(k int) int { return k - 1 } // -1 for ground
	add := func(i, j int, v float64) {
		if i >= 0 && j >= 0 {
			G.Set(i, j, G.At(i, j)+v)
		}
	}
	addR := func(i int, v float64) {
		if i >= 0 {
			rhs.SetVec(i, rhs.AtVec(i)+v)
		}
	}
	for _, r := range n.Resistors {
		g := 1 / r.Ohm
		a, b := col(r.A), col(r.B)
		add(a, a, g)
		add(b, b, g)
		add(a, b, -g)
		add(b, a, -g)
	}
	for _, c := range n.Currents {
		addR(col(c.From), -c.A)
		addR(col(c.To), c.A)
	}
	br := nodes
	vsrc := func(p, q int, v float64) {
		add(p, br, 1)
		add(q, br, -1)
		add(br, p, 1)
		add(br, q, -1)
		rhs.SetVec(br, v)
		br++
	}
	for _, s := range n.Sources {
		vsrc(col(s.Node), -1, s.V)
	}
	for i, a := range n.OpAmps {
		internal := nn + i
		vsrc(internal, col(a.Plus), a.Vos)
		addR(col(a.Plus), -a.IbPlus)
		addR(col(a.Minus), -a.IbMinus)
		out := col(a.Out)
		add(out, br, 1)
		if math.IsInf(a.Gain, 1) {
			add(br, internal, 1)
			add(br, col(a.Minus), -1)
		} else {
			add(br, out, 1/a.Gain)
			add(br, internal, -1)
			add(br, col(a.Minus), 1)
		}
		br++
	}
	return G, rhs
}

// TestAgainstGonumMNA compares the reduced solver with the full MNA
// formulation solved by gonum (an independent implementation) on 300
// seeded random circuits per family, over every option combination.
func TestAgainstGonumMNA(t *testing.T) {
	const cases = 300
	const tol = 1e-9
	r := rand.New(rand.NewPCG(1, 1))
	for _, f := range Families() {
		t.Run(string(f), func(t *testing.T) {
			vs := variants(f)
			worst := 0.0
			for c := range cases {
				n := randomCase(f, c, r)
				got, err := solveAll(n)
				if err != nil {
					t.Fatalf("case %d: %v", c, err)
				}
				want, err := fullMNA(n)
				if err != nil {
					t.Fatalf("case %d: %v", c, err)
				}
				vmax := 0.0
				for _, w := range want {
					vmax = math.Max(vmax, math.Abs(w))
				}
				for k := range want {
					e := relErr(got[k], want[k], 1e-3*vmax)
					worst = math.Max(worst, e)
					if e > tol {
						t.Errorf("case %d %+v node %s: reduced %.15g, gonum full MNA %.15g (rel %.2g)", c, vs[c%len(vs)], n.Nodes[k], got[k], want[k], e)
					}
				}
			}
			t.Logf("worst relative difference %.3g over %d cases", worst, cases)
		})
	}
}

// exactSolve solves G x = rhs by Gaussian elimination in 300-bit
// arithmetic (math/big), about 90 digits, so that its answer is the exact
// solution of the float64 system to far below double rounding.
func exactSolve(G *mat.Dense, rhs *mat.VecDense) []float64 {
	n, _ := G.Dims()
	A := make([][]*big.Float, n)
	for i := range A {
		A[i] = make([]*big.Float, n+1)
		for j := 0; j < n; j++ {
			A[i][j] = new(big.Float).SetPrec(300).SetFloat64(G.At(i, j))
		}
		A[i][n] = new(big.Float).SetPrec(300).SetFloat64(rhs.AtVec(i))
	}
	for k := 0; k < n; k++ {
		p := k
		for i := k; i < n; i++ {
			if A[i][k].Sign() != 0 {
				p = i
				break
			}
		}
		A[k], A[p] = A[p], A[k]
		for i := k + 1; i < n; i++ {
			if A[i][k].Sign() == 0 {
				continue
			}
			l := new(big.Float).SetPrec(300).Quo(A[i][k], A[k][k])
			for j := k; j <= n; j++ {
				t := new(big.Float).SetPrec(300).Mul(l, A[k][j])
				A[i][j].Sub(A[i][j], t)
			}
		}
	}
	x := make([]*big.Float, n)
	for i := n - 1; i >= 0; i-- {
		s := new(big.Float).SetPrec(300).Set(A[i][n])
		for j := i + 1; j < n; j++ {
			s.Sub(s, new(big.Float).SetPrec(300).Mul(A[i][j], x[j]))
		}
		x[i] = s.Quo(s, A[i][i])
	}
	out := make([]float64, n)
	for i := range x {
		out[i], _ = x[i].Float64()
	}
	return out
}

// TestAgainstExactArithmetic checks the solver's accuracy against the full
// MNA system of the same netlist solved in 300-bit arithmetic: every node
// voltage within 1e-13 of the largest node voltage of the circuit (double
// rounding is 1.1e-16; the margin covers the conditioning of stages with
// a milliohm shunt beside kilohm resistors; about 1e-14 was the worst seen).
func TestAgainstExactArithmetic(t *testing.T) {
	const cases = 40
	r := rand.New(rand.NewPCG(8, 8))
	worst := 0.0
	for _, f := range Families() {
		for c := range cases {
			n := randomCase(f, c, r)
			got, err := solveAll(n)
			if err != nil {
				t.Fatal(err)
			}
			exact := exactSolve(mnaSystem(n))
			vmax := 0.0
			for _, v := range exact[:len(n.Nodes)-1] {
				vmax = math.Max(vmax, math.Abs(v))
			}
			for k := 1; k < len(n.Nodes); k++ {
				e := math.Abs(got[k]-exact[k-1]) / vmax
				worst = math.Max(worst, e)
				if e > 1e-13 {
					t.Errorf("%s case %d node %s: solver %.17g, exact %.17g", f, c, n.Nodes[k], got[k], exact[k-1])
				}
			}
		}
	}
	t.Logf("worst difference from exact arithmetic %.3g of the largest node voltage", worst)
}
