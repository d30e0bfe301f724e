package circuit

import (
	"fmt"
	"math"
)

// MaxUnknowns is the largest number of free nodes (nodes neither ground nor
// driven by a source) a Solver handles; the in-amp with source impedances
// has 9.
const MaxUnknowns = 16

// singularTol is the size, relative to the largest entry of its column
// before elimination (see Factor), below which an LU pivot counts as zero. A floating
// node leaves an exactly zero column; a floating sub-network leaves rounding
// residue of about 1e-16 of its conductances; a legitimate pivot, such as a
// gigaohm path behind a milliohm shunt, is 1e-12 of its column or more.
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

	// Precompiled stamps, so that Factor and Solve only do arithmetic.
	rStamps  []resStamp  // per resistor
	aStamps  []ampStamp  // per op-amp
	drives   []drive     // resistor couplings to source-driven nodes
	cRows    []pinRows   // per current source: rows of To and From
	ibRows   []pinRows   // per op-amp: current-law rows of Plus and Minus
	aRHS     []ampSource // per op-amp: its row and driven inputs
	nSources int

	lu  [MaxUnknowns * MaxUnknowns]float64
	piv [MaxUnknowns]int
	inv [MaxUnknowns]float64 // reciprocals of U's diagonal
	x   [MaxUnknowns]float64
	y   [MaxUnknowns]float64 // adjoint solution, see Adjoint

	// Per source, the drives and op-amp rows it enters (see SourceTransfer):
	// source k's are srcDrives[srcDriveAt[k]:srcDriveAt[k+1]], likewise
	// srcAmps.
	srcDrives  []drive
	srcDriveAt []int
	srcAmps    []ampRowTerm
	srcAmpAt   []int
}

// ampRowTerm is a source's entry into an op-amp row: sign x the row scale.
type ampRowTerm struct {
	row  int
	sign float64
}

// resStamp holds the matrix offsets a resistor's conductance is added to
// (aa, bb) and subtracted from (ab, ba); -1 for none.
type resStamp struct{ aa, ab, ba, bb int }

// ampStamp holds the matrix offsets of an op-amp row: its own output's
// column and its two inputs' columns; -1 for none.
type ampStamp struct{ diag, plus, minus int }

// drive adds g[res] * V(source src) to row.
type drive struct{ row, res, src int }

// pinRows are two current-law rows (-1 for none): To/From of a current
// source, Plus/Minus of an op-amp.
type pinRows struct{ a, b int }

// ampSource is an op-amp's constraint row and the sources fixing its
// inputs (-1 for a free or grounded input).
type ampSource struct{ row, plusSrc, minusSrc int }

// NewSolver returns a solver bound to n. Topology errors (see ErrTopology)
// are reported by Factor. Add every element (test or noise current sources
// too) before NewSolver: Factor reports ErrTopology, and Solve panics, if
// elements or nodes were added or removed since. Changing an element's node
// indices also needs a new Solver (this is not detected); changing values
// does not.
func NewSolver(n *Netlist) *Solver {
	s := &Solver{n: n}
	s.topoErr = s.resolve()
	return s
}

// Reset binds s again to its netlist after elements or nodes were added,
// removed or moved, as NewSolver would, but reusing s's storage: once it
// has grown to the largest netlist seen, Reset does not allocate (a caller
// that solves many topologies one after another, such as the strapping
// enumeration, rebuilds one netlist in place and resets one Solver).
func (s *Solver) Reset() {
	s.factored = false
	s.topoErr = s.resolve()
}

// resize returns x with length n, reusing its storage when it can.
func resize[T any](x []T, n int) []T {
	if cap(x) >= n {
		return x[:n]
	}
	return make([]T, n)
}

func (s *Solver) resolve() error {
	n := s.n
	nn := len(n.Nodes)
	s.m = 0
	s.unkNode = s.unkNode[:0]
	s.rStamps, s.aStamps, s.drives = s.rStamps[:0], s.aStamps[:0], s.drives[:0]
	s.cRows, s.ibRows, s.aRHS = s.cRows[:0], s.ibRows[:0], s.aRHS[:0]
	s.srcDrives, s.srcDriveAt, s.srcAmps, s.srcAmpAt = s.srcDrives[:0], s.srcDriveAt[:0], s.srcAmps[:0], s.srcAmpAt[:0]
	s.unk = resize(s.unk, nn)
	s.src = resize(s.src, nn)
	s.g = resize(s.g, len(n.Resistors))
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
	// The output node, when free, is the last unknown: back substitution
	// finds it first, so SolveOut can stop there.
	for k := range s.unk {
		s.unk[k] = -1
	}
	free := func(k int) {
		if k != 0 && s.src[k] < 0 && s.unk[k] < 0 {
			s.unk[k] = s.m
			s.unkNode = append(s.unkNode, k)
			s.m++
		}
	}
	for k := range nn {
		if k != n.Out {
			free(k)
		}
	}
	free(n.Out)
	if s.m > MaxUnknowns {
		return bad("%d free nodes, more than the solver's %d", s.m, MaxUnknowns)
	}
	s.ampRow = resize(s.ampRow, s.m)
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
	s.compile()
	return nil
}

// changed reports whether the netlist's element or node counts differ from
// those NewSolver compiled.
func (s *Solver) changed() bool {
	n := s.n
	return len(n.Nodes) != len(s.unk) || len(n.Resistors) != len(s.rStamps) ||
		len(n.Sources) != s.nSources || len(n.Currents) != len(s.cRows) || len(n.OpAmps) != len(s.aStamps)
}

// compile precomputes the stamp tables from the resolved topology.
func (s *Solver) compile() {
	n, m := s.n, s.m
	s.nSources = len(n.Sources)
	kclRow := func(node int) int {
		if u := s.unk[node]; u >= 0 && s.ampRow[u] < 0 {
			return u
		}
		return -1
	}
	off := func(row, node int) int {
		if row < 0 || s.unk[node] < 0 {
			return -1
		}
		return row*m + s.unk[node]
	}
	for i, r := range n.Resistors {
		ra, rb := kclRow(r.A), kclRow(r.B)
		s.rStamps = append(s.rStamps, resStamp{aa: off(ra, r.A), ab: off(ra, r.B), ba: off(rb, r.A), bb: off(rb, r.B)})
		if ra >= 0 && s.src[r.B] >= 0 {
			s.drives = append(s.drives, drive{row: ra, res: i, src: s.src[r.B]})
		}
		if rb >= 0 && s.src[r.A] >= 0 {
			s.drives = append(s.drives, drive{row: rb, res: i, src: s.src[r.A]})
		}
	}
	for _, c := range n.Currents {
		s.cRows = append(s.cRows, pinRows{a: kclRow(c.To), b: kclRow(c.From)})
	}
	for _, a := range n.OpAmps {
		row := s.unk[a.Out]
		s.aStamps = append(s.aStamps, ampStamp{diag: row*m + row, plus: off(row, a.Plus), minus: off(row, a.Minus)})
		s.ibRows = append(s.ibRows, pinRows{a: kclRow(a.Plus), b: kclRow(a.Minus)})
		s.aRHS = append(s.aRHS, ampSource{row: row, plusSrc: s.src[a.Plus], minusSrc: s.src[a.Minus]})
	}
	for k := range n.Sources {
		s.srcDriveAt = append(s.srcDriveAt, len(s.srcDrives))
		s.srcAmpAt = append(s.srcAmpAt, len(s.srcAmps))
		for _, d := range s.drives {
			if d.src == k {
				s.srcDrives = append(s.srcDrives, d)
			}
		}
		for _, as := range s.aRHS {
			if as.plusSrc == k {
				s.srcAmps = append(s.srcAmps, ampRowTerm{row: as.row, sign: 1})
			}
			if as.minusSrc == k {
				s.srcAmps = append(s.srcAmps, ampRowTerm{row: as.row, sign: -1})
			}
		}
	}
	s.srcDriveAt = append(s.srcDriveAt, len(s.srcDrives))
	s.srcAmpAt = append(s.srcAmpAt, len(s.srcAmps))
}

// Factor builds the reduced nodal matrix from the current resistor values
// and op-amp gains and factors it by LU decomposition with partial
// pivoting. Each free node that is not an op-amp output contributes the
// current-law row sum_j (V(k)-V(j))/R_kj = I_k; each op-amp output node
// the constraint row V(Out)/Gain - V(Plus) + V(Minus) = Vos (exact for
// Gain = +Inf). It returns an error wrapping ErrSingular, naming the
// resistor or node, for a resistance that is zero, negative or NaN, a gain
// that is not positive (zero, negative or NaN), or a node without a DC
// path. +Inf ohm is an open circuit. Factor does not allocate unless it
// fails.
func (s *Solver) Factor() error {
	s.factored = false
	if s.topoErr != nil {
		return s.topoErr
	}
	if s.changed() {
		return fmt.Errorf("%w: elements or nodes were added or removed after NewSolver; make a new Solver", ErrTopology)
	}
	m := s.m
	a := s.lu[:m*m]
	clear(a)
	gmax := 0.0
	rs, gs := s.n.Resistors, s.g[:len(s.n.Resistors)]
	for i := range gs {
		ohm := rs[i].Ohm
		if !(ohm > 0) {
			return fmt.Errorf("%w: resistor %q is %g ohm; a resistance must be positive (use +Inf for an open)", ErrSingular, rs[i].Name, ohm)
		}
		g := 1 / ohm
		gs[i] = g
		if g > gmax {
			gmax = g
		}
		st := s.rStamps[i]
		if st.aa >= 0 {
			a[st.aa] += g
		}
		if st.ab >= 0 {
			a[st.ab] -= g
		}
		if st.ba >= 0 {
			a[st.ba] -= g
		}
		if st.bb >= 0 {
			a[st.bb] += g
		}
	}
	if gmax == 0 {
		gmax = 1
	}
	s.scale = gmax
	ops := s.n.OpAmps
	for k := range ops {
		gain := ops[k].Gain
		if !(gain > 0) {
			// Zero or NaN leaves no constraint; a negative gain is positive
			// feedback, a latch, not an amplifier.
			return fmt.Errorf("%w: op-amp %q has open-loop gain %g; it must be positive (use +Inf for an ideal amplifier)", ErrSingular, ops[k].Name, gain)
		}
		st := s.aStamps[k]
		a[st.diag] += gmax / gain
		if st.plus >= 0 {
			a[st.plus] -= gmax
		}
		if st.minus >= 0 {
			a[st.minus] += gmax
		}
	}
	// A pivot is zero when it is below singularTol times the largest entry
	// its column had before elimination (row swaps keep columns). For a
	// node with a current-law row that is its diagonal, the node's total
	// conductance, which no off-diagonal -1/R in the column exceeds; a
	// column an op-amp row touches holds the row scale gmax, which bounds
	// every entry.
	var tiny [MaxUnknowns]float64
	for j := range m {
		if s.ampRow[j] < 0 {
			tiny[j] = a[j*m+j]
		} else {
			tiny[j] = gmax
		}
	}
	for k := range ops {
		if u := s.unk[ops[k].Plus]; u >= 0 {
			tiny[u] = max(tiny[u], gmax)
		}
		if u := s.unk[ops[k].Minus]; u >= 0 {
			tiny[u] = max(tiny[u], gmax)
		}
	}
	for j := range m {
		tiny[j] *= singularTol
	}
	for k := 0; k < m; k++ {
		p, pv := k, math.Abs(a[k*m+k])
		for i := k + 1; i < m; i++ {
			if v := math.Abs(a[i*m+k]); v > pv {
				p, pv = i, v
			}
		}
		if !(pv > tiny[k]) {
			return fmt.Errorf("%w: node %q has no DC path that fixes its voltage (check for open resistors, a floating input or a loop of op-amps)", ErrSingular, s.n.Nodes[s.unkNode[k]])
		}
		s.piv[k] = p
		if p != k {
			// Only the columns from k on are swapped; the multipliers of
			// earlier columns stay where they were computed and forward
			// applies the swaps in step (LINPACK's dgefa/dgesl scheme;
			// Golub and Van Loan §3.4, from memory).
			rk, rp := a[k*m+k:k*m+m], a[p*m+k:p*m+m]
			rp = rp[:len(rk)]
			for j := range rk {
				rk[j], rp[j] = rp[j], rk[j]
			}
		}
		inv := 1 / a[k*m+k]
		s.inv[k] = inv
		tail := a[k*m+k+1 : k*m+m] // U's row k right of the pivot
		for i := k + 1; i < m; i++ {
			l := a[i*m+k] * inv
			if l == 0 {
				continue
			}
			a[i*m+k] = l
			ri := a[i*m+k+1 : i*m+m]
			ri = ri[:len(tail)]
			for j, u := range tail {
				ri[j] -= l * u
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
// needing a voltage slice, and skips the back substitution of the other
// nodes. It does not allocate.
func (s *Solver) SolveOut() float64 {
	if u := s.unk[s.n.Out]; u >= 0 && u == s.m-1 {
		s.forward()
		return s.x[u] * s.inv[u]
	}
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

// solve computes every unknown into s.x.
func (s *Solver) solve() {
	s.forward()
	m := s.m
	a, b := s.lu[:m*m], s.x[:m]
	for i := m - 1; i >= 0; i-- {
		row := a[i*m : i*m+m]
		sum := b[i]
		for j := i + 1; j < m; j++ {
			sum -= row[j] * b[j]
		}
		b[i] = sum * s.inv[i]
	}
}

// forward builds the right-hand side in s.x and applies the row
// permutation and L's forward substitution, leaving U x = s.x to solve.
func (s *Solver) forward() {
	if !s.factored {
		panic("circuit: Solve called without a successful Factor")
	}
	if s.changed() {
		panic("circuit: Solve: elements or nodes were added or removed after NewSolver; make a new Solver")
	}
	m, n := s.m, s.n
	b := s.x[:m]
	clear(b)
	src := n.Sources
	for _, d := range s.drives {
		b[d.row] += s.g[d.res] * src[d.src].V
	}
	for k, c := range n.Currents {
		if r := s.cRows[k]; r.a >= 0 {
			b[r.a] += c.A
		}
		if r := s.cRows[k]; r.b >= 0 {
			b[r.b] -= c.A
		}
	}
	for k, op := range n.OpAmps {
		if r := s.ibRows[k]; r.a >= 0 {
			b[r.a] -= op.IbPlus
		}
		if r := s.ibRows[k]; r.b >= 0 {
			b[r.b] -= op.IbMinus
		}
		as := s.aRHS[k]
		v := op.Vos
		if as.plusSrc >= 0 {
			v += src[as.plusSrc].V
		}
		if as.minusSrc >= 0 {
			v -= src[as.minusSrc].V
		}
		b[as.row] += s.scale * v
	}
	a := s.lu[:m*m]
	for k := 0; k < m-1; k++ {
		p := s.piv[k]
		t := b[p]
		b[p] = b[k]
		b[k] = t
		if t == 0 {
			continue
		}
		for i := k + 1; i < m; i++ {
			b[i] -= a[i*m+k] * t
		}
	}
}

// Adjoint solves the transposed system for the output, at the resistor
// values and gains of the last Factor, so that SourceTransfer,
// CurrentTransfer and AmpTransfers can read every excitation's transfer to
// the output: with A x = b the factored system and c the unit vector that
// picks V(Out) from x, V(Out) = cᵀ A⁻¹ b = yᵀ b where Aᵀ y = c, so each
// excitation's transfer is y dotted with the column it adds to b (the
// adjoint network; the transposed solve with the LU factors as in LINPACK's
// dgesl, Golub and Van Loan §3.4, from memory). The circuit is linear, so
// V(Out) = Σ SourceTransfer(k) V_k + Σ CurrentTransfer(k) A_k + Σ (Tvos
// Vos + Tib+ Ib+ + Tib- Ib-) exactly. One call costs about one Solve and
// replaces one Solve per excitation. It panics as Solve does, and does not
// allocate.
func (s *Solver) Adjoint() {
	if !s.factored {
		panic("circuit: Adjoint called without a successful Factor")
	}
	if s.changed() {
		panic("circuit: Adjoint: elements or nodes were added or removed after NewSolver; make a new Solver")
	}
	m := s.m
	y := s.y[:m]
	clear(y)
	out := s.unk[s.n.Out]
	if out < 0 {
		// Ground, or a node a source fixes: only that source reaches it
		// (see SourceTransfer), and y stays zero.
		return
	}
	a := s.lu[:m*m]
	y[out] = 1
	// Uᵀ z = c, then Lᵀ w = z with the row swaps undone in reverse order.
	for k := 0; k < m; k++ {
		sum := y[k]
		for i := 0; i < k; i++ {
			sum -= a[i*m+k] * y[i]
		}
		y[k] = sum * s.inv[k]
	}
	for k := m - 2; k >= 0; k-- {
		sum := y[k]
		for i := k + 1; i < m; i++ {
			sum -= a[i*m+k] * y[i]
		}
		y[k] = sum
		if p := s.piv[k]; p != k {
			y[k], y[p] = y[p], y[k]
		}
	}
}

// SourceTransfer returns dV(Out)/dV of voltage source k from the last
// Adjoint: the source's conductances into free nodes and the op-amp rows
// whose inputs it drives, weighted by the adjoint solution.
func (s *Solver) SourceTransfer(k int) float64 {
	if s.src[s.n.Out] == k {
		return 1
	}
	sum := 0.0
	for _, d := range s.srcDrives[s.srcDriveAt[k]:s.srcDriveAt[k+1]] {
		sum += s.g[d.res] * s.y[d.row]
	}
	for _, r := range s.srcAmps[s.srcAmpAt[k]:s.srcAmpAt[k+1]] {
		sum += r.sign * s.scale * s.y[r.row]
	}
	return sum
}

// CurrentTransfer returns dV(Out)/dA of current source k (current into its
// To node) from the last Adjoint.
func (s *Solver) CurrentTransfer(k int) float64 {
	r := s.cRows[k]
	sum := 0.0
	if r.a >= 0 {
		sum += s.y[r.a]
	}
	if r.b >= 0 {
		sum -= s.y[r.b]
	}
	return sum
}

// AmpTransfers returns the transfers to the output of op-amp k's offset
// voltage (V/V) and of its non-inverting and inverting bias currents (V/A)
// from the last Adjoint.
func (s *Solver) AmpTransfers(k int) (vos, ibPlus, ibMinus float64) {
	if r := s.ibRows[k]; r.a >= 0 {
		ibPlus = -s.y[r.a]
	}
	if r := s.ibRows[k]; r.b >= 0 {
		ibMinus = -s.y[r.b]
	}
	return s.scale * s.y[s.aRHS[k].row], ibPlus, ibMinus
}
