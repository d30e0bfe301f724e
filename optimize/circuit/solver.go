package circuit

import (
	"fmt"
	"math"
)

// MaxUnknowns is the largest number of free nodes (nodes neither ground nor
// driven by a source) a Solver handles; the in-amp with source impedances
// has 9.
const MaxUnknowns = 16

// singularTol is the relative size, against the largest matrix entry, below
// which an LU pivot counts as zero. Real stages span conductances from a
// milliohm shunt to gigaohm leakage paths, about 1e12, so the threshold
// sits well below that and well above rounding residue of a floating
// sub-network (about 1e-16).
const singularTol = 1e-14

// Solver solves a Netlist by reduced modified nodal analysis (see the
// package comment). It reads the netlist's topology once, in NewSolver;
// Factor reads the resistor values and op-amp gains, Solve the sources,
// currents, offsets and bias currents. A Solver is not safe for concurrent
// use; give each goroutine a Clone of the netlist and its own Solver.
type Solver struct {
	n        *Netlist
	m        int   // number of unknowns
	unk      []int // node -> unknown index, -1 for ground and driven nodes
	src      []int // node -> index of the source driving it, or -1
	ampRow   []int // unknown index -> op-amp whose constraint is its row, or -1
	unkNode  []int // unknown index -> node
	g        []float64
	scale    float64 // op-amp rows are multiplied by it to match the conductances
	topoErr  error
	factored bool
	lu       [MaxUnknowns * MaxUnknowns]float64
	piv      [MaxUnknowns]int
	x        [MaxUnknowns]float64
}

// NewSolver returns a solver bound to n. Topology errors (see ErrTopology)
// are reported by Factor. Changing n's node indices after NewSolver needs a
// new Solver; changing values does not.
func NewSolver(n *Netlist) *Solver {
	s := &Solver{n: n}
	s.topoErr = s.resolve()
	return s
}

func (s *Solver) resolve() error {
	n := s.n
	nn := len(n.Nodes)
	s.unk = make([]int, nn)
	s.src = make([]int, nn)
	s.g = make([]float64, len(n.Resistors))
	for i := range s.src {
		s.src[i] = -1
	}
	bad := func(format string, a ...any) error {
		return fmt.Errorf("%w: "+format, append([]any{ErrTopology}, a...)...)
	}
	inRange := func(k int) bool { return k >= 0 && k < nn }
	if nn == 0 || n.Nodes[0] != "0" {
		return bad("node 0 must be ground, named \"0\"")
	}
	for k, v := range n.Sources {
		switch {
		case !inRange(v.Node) || v.Node == 0:
			return bad("source %q is on node %d: it must drive a node other than ground", v.Name, v.Node)
		case s.src[v.Node] >= 0:
			return bad("node %q is driven by both %q and %q", n.Nodes[v.Node], n.Sources[s.src[v.Node]].Name, v.Name)
		}
		s.src[v.Node] = k
	}
	for _, r := range n.Resistors {
		if !inRange(r.A) || !inRange(r.B) {
			return bad("resistor %q has a node index out of range", r.Name)
		}
	}
	for _, c := range n.Currents {
		if !inRange(c.From) || !inRange(c.To) {
			return bad("current source %q has a node index out of range", c.Name)
		}
	}
	for _, a := range n.OpAmps {
		if !inRange(a.Plus) || !inRange(a.Minus) || !inRange(a.Out) {
			return bad("op-amp %q has a node index out of range", a.Name)
		}
	}
	if !inRange(n.Out) {
		return bad("output node %d is out of range", n.Out)
	}
	for k := range s.unk {
		s.unk[k] = -1
		if k != 0 && s.src[k] < 0 {
			s.unk[k] = s.m
			s.unkNode = append(s.unkNode, k)
			s.m++
		}
	}
	if s.m > MaxUnknowns {
		return bad("%d free nodes, more than the solver's %d", s.m, MaxUnknowns)
	}
	s.ampRow = make([]int, s.m)
	for i := range s.ampRow {
		s.ampRow[i] = -1
	}
	for k, a := range n.OpAmps {
		row := s.unk[a.Out]
		switch {
		case row < 0:
			return bad("op-amp %q drives node %q, which is ground or driven by a source", a.Name, n.Nodes[a.Out])
		case s.ampRow[row] >= 0:
			return bad("node %q is driven by op-amps %q and %q", n.Nodes[a.Out], n.OpAmps[s.ampRow[row]].Name, a.Name)
		}
		s.ampRow[row] = k
	}
	return nil
}

// Factor builds the reduced nodal matrix from the current resistor values
// and op-amp gains and factors it by LU decomposition with partial
// pivoting. Each free node that is not an op-amp output contributes the
// current-law row sum_j (V(k)-V(j))/R_kj = I_k; each op-amp output node
// the constraint row V(Out)/Gain - V(Plus) + V(Minus) = Vos (exact for
// Gain = +Inf). It returns an error wrapping ErrSingular, naming the
// resistor or node, for a resistance that is zero, negative or NaN, a gain
// that is zero or NaN, or a node without a DC path. +Inf ohm is an open
// circuit. Factor does not allocate unless it fails.
func (s *Solver) Factor() error {
	s.factored = false
	if s.topoErr != nil {
		return s.topoErr
	}
	m := s.m
	a := s.lu[:m*m]
	clear(a)
	gmax := 0.0
	for i, r := range s.n.Resistors {
		if !(r.Ohm > 0) {
			return fmt.Errorf("%w: resistor %q is %g ohm; a resistance must be positive (use +Inf for an open)", ErrSingular, r.Name, r.Ohm)
		}
		g := 1 / r.Ohm
		s.g[i] = g
		gmax = math.Max(gmax, g)
		ua, ub := s.unk[r.A], s.unk[r.B]
		if ua >= 0 && s.ampRow[ua] < 0 {
			a[ua*m+ua] += g
			if ub >= 0 {
				a[ua*m+ub] -= g
			}
		}
		if ub >= 0 && s.ampRow[ub] < 0 {
			a[ub*m+ub] += g
			if ua >= 0 {
				a[ub*m+ua] -= g
			}
		}
	}
	if gmax == 0 {
		gmax = 1
	}
	s.scale = gmax
	for _, op := range s.n.OpAmps {
		if op.Gain == 0 || math.IsNaN(op.Gain) {
			return fmt.Errorf("%w: op-amp %q has open-loop gain %g; it must be non-zero (use +Inf for an ideal amplifier)", ErrSingular, op.Name, op.Gain)
		}
		row := s.unk[op.Out] * m
		a[row+s.unk[op.Out]] += gmax / op.Gain
		if up := s.unk[op.Plus]; up >= 0 {
			a[row+up] -= gmax
		}
		if um := s.unk[op.Minus]; um >= 0 {
			a[row+um] += gmax
		}
	}
	big := 0.0
	for _, v := range a {
		big = math.Max(big, math.Abs(v))
	}
	tiny := singularTol * big
	for k := 0; k < m; k++ {
		p, pv := k, math.Abs(a[k*m+k])
		for i := k + 1; i < m; i++ {
			if v := math.Abs(a[i*m+k]); v > pv {
				p, pv = i, v
			}
		}
		if !(pv > tiny) {
			return fmt.Errorf("%w: node %q has no DC path that fixes its voltage (check for open resistors, a floating input or a loop of op-amps)", ErrSingular, s.n.Nodes[s.unkNode[k]])
		}
		s.piv[k] = p
		if p != k {
			rk, rp := a[k*m:k*m+m], a[p*m:p*m+m]
			for j := range rk {
				rk[j], rp[j] = rp[j], rk[j]
			}
		}
		inv := 1 / a[k*m+k]
		rowk := a[k*m : k*m+m]
		for i := k + 1; i < m; i++ {
			rowi := a[i*m : i*m+m]
			l := rowi[k] * inv
			if l == 0 {
				continue
			}
			rowi[k] = l
			for j := k + 1; j < m; j++ {
				rowi[j] -= l * rowk[j]
			}
		}
	}
	s.factored = true
	return nil
}

// Solve writes the node voltages into v (len(n.Nodes), v[0] = 0) for the
// netlist's current source voltages, current sources, offset voltages and
// bias currents, using the matrix of the last successful Factor (resistor
// values and gains changed since then are not seen). It panics if Factor
// has not succeeded or v has the wrong length. It does not allocate.
func (s *Solver) Solve(v []float64) {
	if len(v) != len(s.n.Nodes) {
		panic(fmt.Sprintf("circuit: Solve: len(v) = %d, want %d nodes", len(v), len(s.n.Nodes)))
	}
	s.solve()
	for k := range v {
		v[k] = s.voltage(k)
	}
}

// SolveOut is Solve for the output node alone: it returns V(n.Out) without
// needing a voltage slice. It does not allocate.
func (s *Solver) SolveOut() float64 {
	s.solve()
	return s.voltage(s.n.Out)
}

// voltage returns node k's voltage from the last solve.
func (s *Solver) voltage(k int) float64 {
	switch {
	case k == 0:
		return 0
	case s.unk[k] >= 0:
		return s.x[s.unk[k]]
	default:
		return s.n.Sources[s.src[k]].V
	}
}

// driven returns the voltage of node k if it is fixed (ground or a source)
// and whether it is.
func (s *Solver) driven(k int) (float64, bool) {
	if k == 0 {
		return 0, true
	}
	if j := s.src[k]; j >= 0 {
		return s.n.Sources[j].V, true
	}
	return 0, false
}

// kcl reports whether unknown u has a current-law row.
func (s *Solver) kcl(u int) bool { return u >= 0 && s.ampRow[u] < 0 }

func (s *Solver) solve() {
	if !s.factored {
		panic("circuit: Solve called without a successful Factor")
	}
	m, n := s.m, s.n
	b := s.x[:m]
	clear(b)
	for i, r := range n.Resistors {
		ua, ub := s.unk[r.A], s.unk[r.B]
		if s.kcl(ua) {
			if vb, ok := s.driven(r.B); ok {
				b[ua] += s.g[i] * vb
			}
		}
		if s.kcl(ub) {
			if va, ok := s.driven(r.A); ok {
				b[ub] += s.g[i] * va
			}
		}
	}
	for _, c := range n.Currents {
		if u := s.unk[c.To]; s.kcl(u) {
			b[u] += c.A
		}
		if u := s.unk[c.From]; s.kcl(u) {
			b[u] -= c.A
		}
	}
	for _, op := range n.OpAmps {
		if u := s.unk[op.Plus]; s.kcl(u) {
			b[u] -= op.IbPlus
		}
		if u := s.unk[op.Minus]; s.kcl(u) {
			b[u] -= op.IbMinus
		}
		r := op.Vos
		if vp, ok := s.driven(op.Plus); ok {
			r += vp
		}
		if vm, ok := s.driven(op.Minus); ok {
			r -= vm
		}
		b[s.unk[op.Out]] += s.scale * r
	}
	a := s.lu[:m*m]
	for k := 0; k < m; k++ {
		if p := s.piv[k]; p != k {
			b[k], b[p] = b[p], b[k]
		}
	}
	for i := 1; i < m; i++ {
		row := a[i*m : i*m+i]
		sum := b[i]
		for j, l := range row {
			sum -= l * b[j]
		}
		b[i] = sum
	}
	for i := m - 1; i >= 0; i-- {
		row := a[i*m : i*m+m]
		sum := b[i]
		for j := i + 1; j < m; j++ {
			sum -= row[j] * b[j]
		}
		b[i] = sum / row[i]
	}
}
