package strap

import (
	"errors"
	"fmt"
	"math"
	"strconv"

	"plumb/catalog"
	"plumb/optimize/circuit"
)

// Thresholds of usability. The nominal figures come from exact solves of
// element values given to four or more figures, so a balanced strapping's
// common-mode gain is rounding residue (about 1e-16 of the differential
// gain) and an unbalanced one's is at least about 1e-4 of it; a zero gain
// is likewise rounding residue.
const (
	// balanceTol is the largest |Acm|/|Adm| of a differential strapping.
	balanceTol = 1e-9
	// zeroGain is the smallest |gain| a strapping may have.
	zeroGain = 1e-9
	// roundoff is the size below which a sensitivity, or a figure compared
	// between strappings, is rounding residue of an exact zero (an element
	// carrying no current leaves about 1e-17).
	roundoff = 1e-12
)

// circuitFamily labels the netlists of strapped amplifiers (SPICE decks
// print it as a comment).
const circuitFamily circuit.Family = "strapping"

// stage is a strapping's netlist with the indices the figures need. One
// stage serves a whole enumeration: build rewrites the netlist in place and
// resets the solver, so the walk over the classes allocates nothing until
// a strapping proves usable.
type stage struct {
	net     circuit.Netlist
	solver  *circuit.Solver
	src     [Tie1]int    // source index of vp, vn, ref; -1 when not connected
	plus    int          // node of the op-amp's non-inverting input
	elems   []int        // network element index of each netlist resistor
	current []int        // current source index of each netlist resistor
	node    [maxNets]int // net id -> node index + 1, 0 when not yet placed

	// Set by check.
	ng, ibPlus, ibMinus float64
	g                   [Tie1]float64 // transfers of vp, vn, ref
	err                 error         // the solver's error, for a singular circuit
}

// netNames are the node names of the tie and internal nets, by canonical
// number.
var netNames = func() (s [maxNets]string) {
	for k := range s {
		s[k] = "n" + strconv.Itoa(k)
	}
	return s
}()

// newStage returns a stage for the networks of m.
func newStage(m *model) *stage {
	st := &stage{}
	st.solver = circuit.NewSolver(&st.net)
	return st
}

// build writes the netlist of a resolved strapping into st and resets the
// solver: the live elements, an ideal op-amp, a voltage source (0 V) on
// each connected input and the reference, and a zero current source across
// each element for its sensitivity (see the package comment).
func (st *stage) build(m *model, r *resolved) {
	n := &st.net
	n.Family = circuitFamily
	n.Nodes = append(n.Nodes[:0], "0")
	n.Resistors, n.Sources, n.Currents, n.OpAmps = n.Resistors[:0], n.Sources[:0], n.Currents[:0], n.OpAmps[:0]
	st.elems, st.current = st.elems[:0], st.current[:0]
	clear(st.node[:])
	at := func(x uint8) int {
		if k := st.node[x]; k > 0 {
			return k - 1
		}
		name := netNames[r.can[x]]
		if x < uint8(Tie1) {
			name = Terminal(x).String()
		}
		n.Nodes = append(n.Nodes, name)
		st.node[x] = len(n.Nodes)
		return len(n.Nodes) - 1
	}
	for t := InPlus; t < Output; t++ {
		st.src[t] = -1
		if r.used[t] {
			st.src[t] = len(n.Sources)
			n.Sources = append(n.Sources, circuit.Source{Name: sourceName(t, r), Node: at(uint8(t))})
		}
	}
	for i := range m.ea {
		if !r.live[i] {
			continue
		}
		a, b := at(r.net[m.ea[i]]), at(r.net[m.eb[i]])
		st.elems = append(st.elems, i)
		st.current = append(st.current, len(n.Currents))
		n.Resistors = append(n.Resistors, circuit.Resistor{Name: m.names[i], A: a, B: b, Ohm: m.ohm[i]})
		n.Currents = append(n.Currents, circuit.CurrentSource{Name: m.sensNames[i], From: a, To: b})
	}
	st.plus = at(r.net[m.ninv])
	out := at(uint8(Output))
	n.OpAmps = append(n.OpAmps, circuit.OpAmp{Name: "A1", Plus: st.plus, Minus: at(r.net[m.inv]), Out: out, Gain: math.Inf(1)})
	n.Out = out
	st.solver.Reset()
}

// sourceName names the source on terminal t as package family's netlists
// do, so that a budget reads a strapped netlist like any other: "vp" and
// "vn" for a differential input, "vin" for a single-ended one, "vref" for
// the reference.
func sourceName(t Terminal, r *resolved) string {
	switch {
	case t == Ref:
		return "vref"
	case r.used[InPlus] != r.used[InMinus]:
		return "vin"
	}
	return t.String()
}

// Verdicts of check.
type verdict int

const (
	usable verdict = iota
	noPath
	singular
	undetermined
	positiveFeedback
	unbalanced
	zeroTransfer
)

// check builds and solves the resolved strapping and says whether it is a
// usable amplifier, with the transfers it found in st. It allocates
// nothing unless the solver fails.
func (st *stage) check(m *model, r *resolved) verdict {
	if !r.candidate(m) {
		return noPath
	}
	st.build(m, r)
	if st.err = st.solver.Factor(); st.err != nil {
		return singular
	}
	st.solver.Adjoint()
	st.ng, st.ibPlus, st.ibMinus = st.solver.AmpTransfers(0)
	switch {
	case math.IsNaN(st.ng) || math.IsInf(st.ng, 0):
		return undetermined
	case st.ng < 0:
		return positiveFeedback
	}
	st.g = [Tie1]float64{}
	for t := InPlus; t < Output; t++ {
		if k := st.src[t]; k >= 0 {
			st.g[t] = st.solver.SourceTransfer(k)
		}
	}
	gain := st.gain(r)
	if r.used[InPlus] && r.used[InMinus] && !(math.Abs(st.g[InPlus]+st.g[InMinus]) <= balanceTol*math.Abs(gain)) {
		return unbalanced
	}
	if !(math.Abs(gain) >= zeroGain) || math.IsInf(gain, 0) {
		return zeroTransfer
	}
	return usable
}

// gain returns the strapping's gain from the transfers: Adm with both
// inputs, else the one input's transfer.
func (st *stage) gain(r *resolved) float64 {
	switch {
	case r.used[InPlus] && r.used[InMinus]:
		return (st.g[InPlus] - st.g[InMinus]) / 2
	case r.used[InPlus]:
		return st.g[InPlus]
	}
	return st.g[InMinus]
}

// reason turns a verdict into an error wrapping ErrUnusable.
func (st *stage) reason(v verdict, r *resolved) error {
	switch v {
	case noPath:
		return unusable("no input reaches the amplifier through the elements, or nothing feeds back from the output")
	case singular:
		if !errors.Is(st.err, circuit.ErrSingular) {
			return fmt.Errorf("strap: building the strapped circuit: %w", st.err)
		}
		return unusable("the circuit has no unique DC solution (%v)", st.err)
	case undetermined:
		return unusable("the op-amp's loop is undetermined")
	case positiveFeedback:
		return unusable("the op-amp is in positive feedback (noise gain %.4g)", st.ng)
	case unbalanced:
		return unusable("nominal common-mode gain %.4g against a differential gain of %.4g: not a balanced difference amplifier", st.g[InPlus]+st.g[InMinus], st.gain(r))
	case zeroTransfer:
		return unusable("gain %.4g: no signal reaches the output", st.gain(r))
	}
	return nil
}

// excite sets the source voltages of vp, vn and ref (unconnected ones are
// skipped) and solves every node voltage into v.
func (st *stage) excite(v []float64, vp, vn, ref float64) {
	for t, x := range [...]float64{InPlus: vp, InMinus: vn, Ref: ref} {
		if k := st.src[t]; t >= int(InPlus) && k >= 0 {
			st.net.Sources[k].V = x
		}
	}
	st.solver.Solve(v)
}

// sourceOhm returns the impedance the source on node k sees in the
// solution v where it alone is at 1 V: 1 V over the current it drives into
// the resistors on its node; +Inf when it drives none (currents that cancel
// to rounding residue of their sum count as none).
func (st *stage) sourceOhm(k int, v []float64) float64 {
	i, sum := 0.0, 0.0
	for _, r := range st.net.Resistors {
		var x float64
		switch k {
		case r.A:
			x = (v[r.A] - v[r.B]) / r.Ohm
		case r.B:
			x = (v[r.B] - v[r.A]) / r.Ohm
		}
		i += x
		sum += math.Abs(x)
	}
	if math.Abs(i) <= roundoff*sum {
		return math.Inf(1)
	}
	return v[k] / i
}

// sensitivities returns ∂Vout/∂ln Ri of every live element in the solution
// v: −Ii·Ti, the element's current from A to B times the transfer of a
// current injected from A to B (needs Adjoint).
func (st *stage) sensitivities(v []float64) []float64 {
	out := make([]float64, len(st.net.Resistors))
	for j, r := range st.net.Resistors {
		out[j] = -(v[r.A] - v[r.B]) / r.Ohm * st.solver.CurrentTransfer(st.current[j])
		if math.Abs(out[j]) < roundoff {
			out[j] = 0
		}
	}
	return out
}

// unusable wraps ErrUnusable with the reason.
func unusable(format string, a ...any) error {
	return fmt.Errorf("%w: "+format, append([]any{ErrUnusable}, a...)...)
}

// evaluate computes every figure of the strapping c (canonical, the output
// pin at Output) of m, or an error wrapping ErrUnusable saying why it is
// not an amplifier.
func (m *model) evaluate(c Connections) (*Strapping, error) {
	var r resolved
	m.resolve(c, &r)
	st := newStage(m)
	if v := st.check(m, &r); v != usable {
		return nil, st.reason(v, &r)
	}
	return st.figures(m, &r, c), nil
}

// figures computes every figure of a strapping that check found usable.
func (st *stage) figures(m *model, r *resolved, c Connections) *Strapping {
	ng, g := st.ng, st.g
	s := &Strapping{
		Connections: c, Text: c.Text(m.pins), NoiseGain: ng, Gain: st.gain(r),
		GainPlus: g[InPlus], GainMinus: g[InMinus], GainRef: g[Ref],
		SourcePlusOhm: math.Abs(st.ibPlus) / ng, SourceMinusOhm: math.Abs(st.ibMinus) / ng,
		InputPlusOhm: math.NaN(), InputMinusOhm: math.NaN(), RefOhm: math.NaN(),
		CommonModeGain: math.NaN(), CMRRWorst: math.NaN(),
	}
	switch {
	case r.used[InPlus] && r.used[InMinus]:
		s.Kind, s.CommonModeGain = Differential, g[InPlus]+g[InMinus]
	case r.used[InPlus]:
		s.Kind = FromPlus
	default:
		s.Kind = FromMinus
	}

	v := make([]float64, len(st.net.Nodes))
	for t, zin := range [...]*float64{InPlus: &s.InputPlusOhm, InMinus: &s.InputMinusOhm, Ref: &s.RefOhm} {
		k := st.src[t]
		if zin == nil || k < 0 {
			continue
		}
		var x [Tie1]float64
		x[t] = 1
		st.excite(v, x[InPlus], x[InMinus], x[Ref])
		*zin = st.sourceOhm(st.net.Sources[k].Node, v)
		s.plusPin[t-int(InPlus)] = v[st.plus]
	}

	switch s.Kind {
	case Differential:
		st.excite(v, 0.5, -0.5, 0)
	case FromPlus:
		st.excite(v, 1, 0, 0)
	default:
		st.excite(v, 0, 1, 0)
	}
	dv := st.sensitivities(v)
	s.Sensitivity = make([]float64, len(dv))
	for j, d := range dv {
		s.Sensitivity[j] = d / s.Gain
		s.Elements = append(s.Elements, m.names[st.elems[j]])
	}
	if s.Kind == Differential {
		st.excite(v, 1, 1, 0)
		s.CMSensitivity = st.sensitivities(v)
	}
	s.setErrors(m.net)
	return s
}

// setErrors sets the gain error, drift and CMRR from the sensitivities and
// the network's ratio tolerance and tracking (see the package comment).
func (s *Strapping) setErrors(n *catalog.MatchedNetwork) {
	half := n.RatioTolerance / 2
	sumAbs, sumSq := 0.0, 0.0
	for _, x := range s.Sensitivity {
		sumAbs += math.Abs(x)
		sumSq += x * x
	}
	s.GainErrorWorst = sumAbs * half
	s.GainErrorRSS = math.Sqrt(sumSq) * half
	s.GainDriftPPM = sumAbs * n.RatioDriftPPM / 2
	if s.Kind != Differential {
		return
	}
	acm := math.Abs(s.CommonModeGain)
	for _, x := range s.CMSensitivity {
		acm += math.Abs(x) * half
	}
	s.CMRRWorst = math.Abs(s.Gain) / acm
}

// Netlist returns the circuit of strapping s of network n as package
// circuit solves it: the elements that carry current, named as in the
// network, between nodes "vp", "vn", "ref", "out" and tie or internal nodes
// "nK"; an ideal op-amp "A1" (Gain +Inf; set a finite one to model it);
// sources at 0 V named as package family's netlists name them ("vp" and
// "vn", or "vin" for a single-ended strapping, and "vref"). A budget fills
// the element values with their deviations, adds its source, load and
// noise elements, and solves it.
func (s *Strapping) Netlist(n *catalog.MatchedNetwork) (*circuit.Netlist, error) {
	m, err := prepare(n)
	if err != nil {
		return nil, err
	}
	if len(s.Connections) != len(m.pins) {
		return nil, fmt.Errorf("%w: %d pin terminals for a network of %d pins", ErrText, len(s.Connections), len(m.pins))
	}
	var r resolved
	m.resolve(s.Connections, &r)
	st := newStage(m)
	if v := st.check(m, &r); v != usable {
		return nil, st.reason(v, &r)
	}
	c := st.net.Clone()
	c.Currents = nil
	return c, nil
}

// OpAmpInputV returns the voltage at the internal op-amp's inputs (equal,
// by the virtual short) for inputs vp and vn and reference vref; an
// unconnected input's voltage is ignored.
func (s *Strapping) OpAmpInputV(vp, vn, vref float64) float64 {
	return s.plusPin[0]*vp + s.plusPin[1]*vn + s.plusPin[2]*vref
}
