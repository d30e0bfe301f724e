package circuit

import (
	"fmt"
	"math"
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
	var x mat.VecDense
	if err := x.SolveVec(G, rhs); err != nil {
		return nil, fmt.Errorf("gonum solve: %w", err)
	}
	v := make([]float64, len(n.Nodes))
	for k := 1; k < len(n.Nodes); k++ {
		v[k] = x.AtVec(k - 1)
	}
	return v, nil
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
				n := mustNew(f, vs[c%len(vs)])
				randomize(n, r)
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
