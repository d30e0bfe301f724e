package budget

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/bits"
	"slices"

	"plumb/catalog"
	"plumb/optimize/assume"
	"plumb/optimize/circuit"
	"plumb/optimize/family"
	"plumb/optimize/spec"
)

// Sentinel errors.
var (
	// ErrCandidate is returned for a candidate that does not fit the
	// evaluator: wrong number of positions, a non-positive value, a missing
	// amplifier.
	ErrCandidate = errors.New("budget: candidate does not fit the stage")
	// ErrFamily is returned for a family the spec does not allow.
	ErrFamily = errors.New("budget: family not allowed by the spec")
)

// maxAmps is the largest number of op-amps in a family (the in-amp's three).
const maxAmps = 3

// Solve-quality guard: a transfer below this is treated as zero when a
// ratio of two transfers is formed (CMRR of a perfectly matched stage).
const tinyTransfer = 1e-300

// openLoopIdeal stands for the ideal amplifier when ratio quantization is
// separated from the open-loop gain error.
var openLoopIdeal = math.Inf(1)

// paramKind says what one varying parameter moves.
type paramKind uint8

const (
	pDev      paramKind = iota // resistor value, x * scale of nominal
	pTC                        // resistor tempco, x * scale per K
	pLife                      // resistor load-life shift
	pRefTol                    // reference initial tolerance
	pRefDrift                  // reference drift per K
	pMGain                     // matched amplifier gain error
	pMDrift                    // matched amplifier gain drift per K
	pMAbs                      // matched amplifier's internal resistors, absolute value
	pMAbsTC                    // matched amplifier's internal resistors, absolute tempco per K
	// Amplifier terms below are linear in the output and handled in closed
	// form by the worst-case and RSS methods; Monte Carlo draws them.
	pVos
	pVosDrift
	pIb
	pIos
	pCMRR
)

func (k paramKind) amplifierTerm() bool { return k >= pVos }

// param is one parameter that varies within x ∈ [-1, 1].
type param struct {
	kind  paramKind
	mask  uint64 // positions moved (pDev, pTC, pLife)
	scale float64
	amp   int // op-amp index for amplifier terms
	pos   int // position for naming (-1: a whole network)
	group int // network number for naming
}

// point is what one exact solve at one parameter point and one temperature
// yields.
type point struct {
	gain   float64 // signal transfer (V/V, or V/A for current sense)
	adm    float64 // differential transfer in V/V (gain, or gain/Rs)
	acm    float64 // common-mode transfer, V/V (resistor-limited, solved)
	pinCM  [maxAmps]float64
	base   float64 // output at zero signal with the reference applied
	tvos   [maxAmps]float64
	tibp   [maxAmps]float64
	tibm   [maxAmps]float64
	ng     [maxAmps]float64 // own-loop noise gain of each op-amp
	refOut float64          // part of base that comes from the reference
}

// Evaluator scores designs of one family against one spec. It owns a
// netlist and solver, so it is not safe for concurrent use; make one per
// goroutine. After NewEvaluator, SetCandidate and the scoring methods do not
// allocate.
type Evaluator struct {
	s      *spec.Spec
	family string
	fam    *family.Family
	opts   spec.Options

	net       *circuit.Netlist
	sol       *circuit.Solver
	gbw       []float64 // per op-amp GBW for the AC solve (see bandwidth)
	v         []float64
	positions []string
	resIdx    []int // netlist resistor per position
	fixedOhm  []float64
	fixedIdx  []int
	noiseIdx  []int // current source across each netlist resistor

	sigSrc, sigNeg int // signal voltage source(s): single-ended vin, or vp and vn
	sigCur         int // signal current source (current sense)
	cmSrcs         [2]int
	refSrc         int
	shunt          int // position index of the shunt, -1
	raPos, rbPos   int // positions of a reference divider's Ra and Rb, -1
	leak           int // current source of the load's leakage, -1
	amps           []int
	matched        bool
	differential   bool
	cmBase         float64 // common mode of the stress corners of a single-ended input
	target         float64 // target output at zero signal
	temps          [3]float64
	ntemps         int

	// Per-candidate state.
	c       Candidate
	amp     catalog.Amplifier
	aol     float64
	cmrrAmp float64 // linear
	params  []param
	nom     []float64
	dev     []float64
	tc      []float64
	// devNet and tcNet are the common shift and common tempco of the
	// network a position sits in (zero for a discrete part); they scale
	// the element's own deviation and tracking (see applyValues).
	devNet  []float64
	tcNet   []float64
	life    []float64
	heat    []float64
	x       []float64
	hasLife bool
	// Reference factors of the last spread: 1 + x ε and x β.
	refTol, refDrift float64
	ampIdx           [maxAmps][5]int // parameter index of Vos, Vos drift, Ib, Ios, CMRR

	// Stress at the range corners, nominal values (see stress).
	pmax, vmax []float64
	headroom   float64
	headOut    float64 // least headroom of the stage's output pin (see outputHeadroom)
	outAmp     int     // the amplifier that drives the stage's output
	headAmp    int     // amplifier and pin of the least headroom
	headPin    int
	sens       []sensRow
	ampT       point     // pin common mode and noise gains at nominal values
	mcBuf      []float64 // Monte Carlo sample columns kept between runs without samples

	// Set by Watch: what stops a long run and hears how far it is.
	ctx      context.Context
	progress func(done, total int)
}

// Watch makes the evaluator's Monte Carlo runs stop when ctx is done
// (returning its error) and report their trials to progress (nil: no
// report) every mcCheckEvery trials.
func (e *Evaluator) Watch(ctx context.Context, progress func(done, total int)) {
	e.ctx, e.progress = ctx, progress
}

// NewEvaluator prepares an evaluator for designs of family (one of the
// spec's families) with the given circuit options.
func NewEvaluator(s *spec.Spec, name string, opts spec.Options) (*Evaluator, error) {
	fam := family.Lookup(name)
	if !s.HasFamily(name) || fam == nil {
		return nil, fmt.Errorf("%w: %s (spec %s allows %v): add %s to the spec's families, or check the design against a spec for its family",
			ErrFamily, name, s.Name, s.Families, name)
	}
	e := &Evaluator{s: s, family: name, fam: fam, opts: opts, shunt: -1, raPos: -1, rbPos: -1, leak: -1, sigSrc: -1, sigNeg: -1, sigCur: -1, refSrc: -1, cmSrcs: [2]int{-1, -1}}
	e.differential = s.Differential || fam.Input == family.Current
	e.temps[0], e.ntemps = s.TempRef, 1
	for _, t := range []float64{s.Temp.Min, s.Temp.Max} {
		if t != s.TempRef && (e.ntemps == 1 || t != e.temps[1]) {
			e.temps[e.ntemps] = t
			e.ntemps++
		}
	}
	e.cmBase = math.Max(s.CommonMode.Min, math.Min(s.CommonMode.Max, 0))
	switch {
	case fam.Reference == family.RefShift:
		e.target = s.Offset
	case s.Reference != nil && fam.Reference == family.RefOutput:
		e.target = s.Reference.V
	}
	if fam.Search.Strappings && opts.Part == nil {
		return nil, fmt.Errorf("%w: a %s design needs its amplifier's strapping (amplifier.strapping)", ErrCandidate, name)
	}
	if fam.Datasheet() {
		e.matched = true
		e.positions = nil
	} else if err := e.buildNetlist(); err != nil {
		return nil, err
	}
	n := len(e.positions)
	e.nom, e.dev, e.tc, e.life, e.heat = make([]float64, n), make([]float64, n), make([]float64, n), make([]float64, n), make([]float64, n)
	e.devNet, e.tcNet = make([]float64, n), make([]float64, n)
	e.params = make([]param, 0, 6*n+5*maxAmps+4)
	e.x = make([]float64, 0, cap(e.params))
	e.c.Figs = make([]Fig, n)
	e.pmax, e.vmax = make([]float64, n), make([]float64, n)
	e.sens = make([]sensRow, cap(e.params))
	return e, nil
}

// Positions lists the resistor positions a candidate fills, in order.
func (e *Evaluator) Positions() []string { return slices.Clone(e.positions) }

// Family returns the evaluator's family.
func (e *Evaluator) Family() string { return e.family }

func (e *Evaluator) buildNetlist() error {
	net, err := circuit.New(circuit.Family(e.family), e.circuitOptions())
	if err != nil {
		return fmt.Errorf("budget: %s: %w", e.family, err)
	}
	// A current source across every resistor carries its thermal noise.
	for _, r := range net.Resistors {
		net.Currents = append(net.Currents, circuit.CurrentSource{Name: "noise_" + r.Name, From: r.A, To: r.B})
	}
	e.net = net
	for i, r := range net.Resistors {
		if family.SpecResistor(r.Name) {
			ohm := e.s.SourceOhm
			switch r.Name {
			case "Rload":
				ohm = e.s.LoadOhm
			case "Rref":
				ohm = e.s.Reference.SourceOhm
			}
			e.fixedIdx = append(e.fixedIdx, i)
			e.fixedOhm = append(e.fixedOhm, ohm)
			continue
		}
		e.positions = append(e.positions, r.Name)
		e.resIdx = append(e.resIdx, i)
		switch {
		case r.Name == e.fam.Shunt:
			e.shunt = len(e.positions) - 1
		case r.Name == "Ra" && e.opts.RefDivider:
			e.raPos = len(e.positions) - 1
		case r.Name == "Rb" && e.opts.RefDivider:
			e.rbPos = len(e.positions) - 1
		}
	}
	if len(e.positions) > 64 {
		return fmt.Errorf("budget: %s has %d positions, more than 64", e.family, len(e.positions))
	}
	for i := range net.Resistors {
		e.noiseIdx = append(e.noiseIdx, net.CurrentIndex("noise_"+net.Resistors[i].Name))
	}
	for i := range net.OpAmps {
		e.amps = append(e.amps, i)
		if net.OpAmps[i].Out == net.Out {
			e.outAmp = len(e.amps) - 1
		}
	}
	if len(e.amps) > maxAmps {
		return fmt.Errorf("budget: %s has %d op-amps, more than %d", e.family, len(e.amps), maxAmps)
	}
	switch {
	case e.fam.Input == family.Current:
		e.sigCur = net.CurrentIndex("isense")
		e.cmSrcs[0] = net.SourceIndex("vbus")
	case net.SourceIndex("vp") >= 0:
		e.sigSrc, e.sigNeg = net.SourceIndex("vp"), net.SourceIndex("vn")
		e.cmSrcs = [2]int{e.sigSrc, e.sigNeg}
	default:
		e.sigSrc = net.SourceIndex("vin")
	}
	if e.refDriven() {
		e.refSrc = net.SourceIndex("vref")
		if e.opts.RefDivider {
			e.refSrc = net.SourceIndex("vrefsrc")
		}
	}
	e.leak = net.CurrentIndex("iload")
	if e.sigSrc < 0 && e.sigCur < 0 {
		return fmt.Errorf("budget: %s netlist has no signal source", e.family)
	}
	e.sol = circuit.NewSolver(net)
	e.gbw = make([]float64, len(net.OpAmps))
	e.v = make([]float64, len(net.Nodes))
	return nil
}

// Amplifier index helpers.
func (e *Evaluator) nAmps() int {
	if e.matched {
		return 1
	}
	return len(e.amps)
}

// SetCandidate loads a candidate: its figures, its varying parameters and
// its self-heating. It does not allocate once the evaluator has seen a
// candidate of the same size.
func (e *Evaluator) SetCandidate(c *Candidate) error {
	if len(c.Figs) != len(e.positions) {
		return fmt.Errorf("%w: %d figures for %d positions %v", ErrCandidate, len(c.Figs), len(e.positions), e.positions)
	}
	if c.Amp == nil && (e.matched || len(e.amps) > 0) {
		return fmt.Errorf("%w: no amplifier", ErrCandidate)
	}
	for k, f := range c.Figs {
		if !(f.Ohm > 0) || math.IsInf(f.Ohm, 0) || f.Tolerance < 0 || f.TCR < 0 {
			return fmt.Errorf("%w: %s: value %g ohm, tolerance %g, TCR %g", ErrCandidate, e.positions[k], f.Ohm, f.Tolerance, f.TCR)
		}
	}
	copy(e.c.Figs, c.Figs)
	e.c.Amp, e.c.MatchedGain = c.Amp, c.MatchedGain
	if c.Amp != nil {
		e.amp = *c.Amp
	} else {
		e.amp = catalog.Amplifier{}
	}
	e.aol = e.amp.AolVV
	if !(e.aol > 0) {
		e.aol = openLoopIdeal
	}
	e.cmrrAmp = math.Inf(1)
	if e.amp.CMRRdB > 0 {
		e.cmrrAmp = math.Pow(10, e.amp.CMRRdB/20)
	}
	if e.matched && !(c.MatchedGain > 0) {
		return fmt.Errorf("%w: matched amplifier without a chosen gain", ErrCandidate)
	}
	e.buildParams()
	for k := range e.nom {
		e.nom[k] = e.c.Figs[k].Ohm
		e.heat[k] = 0
	}
	if e.raPos >= 0 && e.rbPos >= 0 && e.s.Reference != nil {
		// The reference feeds a divider: the ideal output at zero input is
		// the reference times the divider's nominal ratio Rb/(Ra+Rb).
		ra, rb := e.nom[e.raPos], e.nom[e.rbPos]
		e.target = e.s.Reference.V * rb / (ra + rb)
	}
	if err := e.stress(); err != nil {
		return err
	}
	// A resistance must stay positive at every corner: 1 - tolerance - load
	// life and 1 - TCR x (excursion + self-heating) both above zero. The
	// stress solve above is at nominal values, so it is safe to run first.
	dt := e.s.WorstExcursion()
	for k, f := range e.c.Figs {
		switch {
		case e.heat[k] > 0 && f.TCR*(dt+e.heat[k]) >= 1:
			return fmt.Errorf("%w: %s: its self-heating of %.3g K on top of the %g K excursion, at TCR %g ppm/K, takes its value to zero or below; check its thermal resistance and TCR",
				ErrCandidate, e.positions[k], e.heat[k], dt, 1e6*f.TCR)
		case f.Tolerance+f.LoadLife >= 1 || f.TCR*dt >= 1:
			return fmt.Errorf("%w: %s: tolerance %g %%, load life %g %% and TCR %g ppm/K over the %g K excursion take its value to zero or below; check those figures",
				ErrCandidate, e.positions[k], 100*f.Tolerance, 100*f.LoadLife, 1e6*f.TCR, dt)
		}
	}
	return e.ampTransfers()
}

func (e *Evaluator) addParam(p param) {
	if p.scale != 0 {
		e.params = append(e.params, p)
	}
}

// buildParams lists the varying parameters of the loaded candidate.
func (e *Evaluator) buildParams() {
	e.params = e.params[:0]
	e.hasLife = false
	figs := e.c.Figs
	var seen uint64
	for k, f := range figs {
		if f.Network == 0 {
			e.addParam(param{kind: pDev, mask: 1 << k, scale: f.Tolerance, pos: k})
			e.addParam(param{kind: pTC, mask: 1 << k, scale: f.TCR, pos: k})
		} else if seen&(1<<k) == 0 {
			// One common shift per network, drawn once for all its elements.
			var mask uint64
			for j := k; j < len(figs); j++ {
				if figs[j].Network == f.Network {
					mask |= 1 << j
				}
			}
			seen |= mask
			e.addParam(param{kind: pDev, mask: mask, scale: math.Max(f.Tolerance-f.RatioTolerance/2, 0), pos: -1, group: f.Network})
			e.addParam(param{kind: pTC, mask: mask, scale: math.Max(f.TCR-f.TCRTracking/2, 0), pos: -1, group: f.Network})
		}
		if f.Network != 0 {
			e.addParam(param{kind: pDev, mask: 1 << k, scale: f.RatioTolerance / 2, pos: k})
			e.addParam(param{kind: pTC, mask: 1 << k, scale: f.TCRTracking / 2, pos: k})
		}
		if f.LoadLife > 0 {
			e.addParam(param{kind: pLife, mask: 1 << k, scale: f.LoadLife, pos: k})
			e.hasLife = true
		}
	}
	if r := e.s.Reference; r != nil && e.refSrc >= 0 {
		e.addParam(param{kind: pRefTol, scale: r.Tolerance, pos: -1})
		e.addParam(param{kind: pRefDrift, scale: r.Drift, pos: -1})
	}
	if e.matched {
		e.addParam(param{kind: pMGain, scale: e.amp.GainErrorMax, pos: -1})
		e.addParam(param{kind: pMDrift, scale: e.amp.GainDriftPPM * 1e-6, pos: -1})
		if e.s.SourceOhm > 0 || e.refOhm() > 0 {
			// Only resistances outside the part see the internal ones'
			// absolute values.
			tol, _ := assume.MatchedAbsTolerance(&e.amp)
			tcr, _ := assume.StrappedTCR(e.amp.Part)
			e.addParam(param{kind: pMAbs, scale: tol, pos: -1})
			e.addParam(param{kind: pMAbsTC, scale: tcr, pos: -1})
		}
	}
	for i := 0; i < e.nAmps(); i++ {
		e.addParam(param{kind: pVos, scale: e.amp.VosV, amp: i, pos: -1})
		e.addParam(param{kind: pVosDrift, scale: e.amp.VosDriftVK, amp: i, pos: -1})
		e.addParam(param{kind: pIb, scale: e.amp.IbA, amp: i, pos: -1})
		e.addParam(param{kind: pIos, scale: e.amp.IosA / 2, amp: i, pos: -1})
		if e.differential {
			e.addParam(param{kind: pCMRR, scale: 1 / e.cmrrAmp, amp: i, pos: -1})
		}
	}
	e.x = e.x[:len(e.params)]
	clear(e.x)
	for i := range e.ampIdx {
		for k, kind := range ampKinds {
			e.ampIdx[i][k] = e.ampX(i, kind)
		}
	}
}

// paramName names parameter j for budgets ("R2 tolerance"); it allocates
// and is used only when results are built.
func (e *Evaluator) paramName(j int) string {
	p := e.params[j]
	who := "network"
	if p.pos >= 0 {
		who = e.positions[p.pos]
	} else if p.group > 0 {
		who = fmt.Sprintf("network %d (%s)", p.group, e.groupMembers(p.mask))
	}
	if p.kind.amplifierTerm() {
		return e.ampName(p.amp) + ampTermNames[p.kind-pVos]
	}
	switch p.kind {
	case pDev, pTC:
		variant := 0 // a discrete part
		switch {
		case p.pos >= 0 && e.c.Figs[p.pos].Network != 0:
			variant = 1 // an element's scatter within its network
		case p.pos < 0:
			variant = 2 // a whole network's common shift
		}
		return who + resistorTermNames[p.kind][variant]
	case pLife:
		return who + " load life"
	case pRefTol:
		return "reference tolerance"
	case pRefDrift:
		return "reference drift"
	case pMGain:
		return "amplifier gain error"
	case pMDrift:
		return "amplifier gain drift"
	case pMAbs:
		return "amplifier internal resistors' absolute tolerance"
	case pMAbsTC:
		return "amplifier internal resistors' absolute tempco"
	}
	return "?"
}

// Names of the resistor terms (discrete, network element, whole network)
// and of the amplifier terms, in paramKind order.
var (
	resistorTermNames = [2][3]string{
		pDev: {" tolerance", " ratio tolerance", " absolute tolerance"},
		pTC:  {" TCR", " TCR tracking", " absolute TCR"},
	}
	ampTermNames = [...]string{" Vos", " Vos drift", " Ib", " Ios", " CMRR"}
)

func (e *Evaluator) groupMembers(mask uint64) string {
	s := ""
	for m := mask; m != 0; m &= m - 1 {
		if s != "" {
			s += ","
		}
		s += e.positions[bits.TrailingZeros64(m)]
	}
	return s
}

// setValues writes every resistor's value at parameter point x and
// temperature t (°C) into the netlist: R = Rnom (1 + δ + life)(1 + α (t -
// Tref + ΔT_self)) for a discrete part, and for an element of a network
// R = Rnom (1 + δn)(1 + δ + life)(1 + αn Θ)(1 + α Θ), Θ = t - Tref +
// ΔT_self, with δn, αn the network's common shift and tempco and δ, α the
// element's own scatter and tracking about them. The product keeps a ratio
// of two elements of one network independent of the common shift, as a
// ratio tolerance is specified (the ratio of any two elements within ± the
// ratio tolerance of nominal, whatever their absolute values); a sum
// 1 + δn + δ would scale each element's scatter by 1/(1 + δn), 1.25 at a
// -20 % absolute tolerance. It returns the reference scale factor. It is
// spread followed by applyValues.
func (e *Evaluator) setValues(x []float64, t float64, life bool) float64 {
	e.spread(x)
	return e.applyValues(t, life)
}

// spread sums, at parameter point x, the part of the values that does not
// depend on temperature: each position's deviation δ, tempco α and
// load-life shift, and the reference's initial factor (1 + x ε) and drift
// coefficient x β. One trial of Monte Carlo spreads once and applies the
// result at each temperature point.
func (e *Evaluator) spread(x []float64) {
	clear(e.dev)
	clear(e.tc)
	clear(e.devNet)
	clear(e.tcNet)
	clear(e.life)
	e.refTol, e.refDrift = 1, 0
	for j := range e.params {
		xv := x[j]
		if xv == 0 {
			continue
		}
		p := &e.params[j]
		switch p.kind {
		case pDev, pTC, pLife:
			dst := e.dev
			switch {
			case p.kind == pLife:
				dst = e.life
			case p.kind == pTC && p.pos < 0:
				dst = e.tcNet
			case p.kind == pTC:
				dst = e.tc
			case p.pos < 0:
				dst = e.devNet
			}
			for m := p.mask; m != 0; m &= m - 1 {
				dst[bits.TrailingZeros64(m)] += xv * p.scale
			}
		case pRefTol:
			e.refTol *= 1 + xv*p.scale
		case pRefDrift:
			e.refDrift += xv * p.scale
		}
	}
}

// applyValues writes the resistor values of the last spread at temperature
// t, with the load-life shift when life, and returns the reference scale
// factor (1 + x ε)(1 + x β (t - Tref)).
func (e *Evaluator) applyValues(t float64, life bool) float64 {
	dt := t - e.s.TempRef
	ref := e.refTol
	if e.refDrift != 0 {
		ref *= 1 + e.refDrift*dt
	}
	if e.net != nil {
		for k, idx := range e.resIdx {
			lf := 0.0
			if life {
				lf = e.life[k]
			}
			dth := dt + e.heat[k]
			e.net.Resistors[idx].Ohm = e.nom[k] * (1 + e.devNet[k]) * (1 + e.dev[k] + lf) * (1 + e.tcNet[k]*dth) * (1 + e.tc[k]*dth)
		}
		for i, idx := range e.fixedIdx {
			e.net.Resistors[idx].Ohm = e.fixedOhm[i]
		}
	}
	return ref
}

// quiet sets every source, current and amplifier error source to zero.
func (e *Evaluator) quiet() {
	n := e.net
	for i := range n.Sources {
		n.Sources[i].V = 0
	}
	for i := range n.Currents {
		n.Currents[i].A = 0
	}
	for i := range n.OpAmps {
		n.OpAmps[i].Vos, n.OpAmps[i].IbPlus, n.OpAmps[i].IbMinus = 0, 0, 0
	}
}

// driveSignal applies a unit signal: 1 V single-ended, ±0.5 V
// differential, or 1 A through the shunt.
func (e *Evaluator) driveSignal(scale float64) {
	switch {
	case e.sigCur >= 0:
		e.net.Currents[e.sigCur].A += scale
	case e.sigNeg >= 0:
		e.net.Sources[e.sigSrc].V += scale / 2
		e.net.Sources[e.sigNeg].V -= scale / 2
	default:
		e.net.Sources[e.sigSrc].V += scale
	}
}

// driveCM applies common-mode voltage vcm to the inputs (or the shunt).
func (e *Evaluator) driveCM(vcm float64) {
	for _, i := range e.cmSrcs {
		if i >= 0 {
			e.net.Sources[i].V += vcm
		}
	}
}

func (e *Evaluator) solve() float64 {
	e.sol.Solve(e.v)
	return e.v[e.net.Out]
}

// eval solves the stage at parameter point x and temperature t: the
// signal transfer, the common-mode transfer, the base output with the
// reference applied and the transfers of every op-amp's Vos and bias
// currents to the output, each exactly, from one factorization and one
// adjoint solve (circuit.Solver.Adjoint). Each op-amp's pin common mode
// per volt of input common mode and its noise gain are solved once per
// candidate at nominal values (see ampTransfers) and reused: they move with
// the resistor tolerances only by the tolerance fraction itself, a
// second-order change of terms that are already small (the amplifier's
// share of CMRR; noise and bandwidth).
func (e *Evaluator) eval(x []float64, t float64, life bool, p *point) error {
	e.spread(x)
	return e.evalSpread(x, t, life, p)
}

// evalSpread is eval at the parameter point of the last spread, which must
// be x.
func (e *Evaluator) evalSpread(x []float64, t float64, life bool, p *point) error {
	if e.matched {
		e.evalMatched(x, t, e.applyValues(t, life), p)
		return nil
	}
	ref, err := e.factorSpread(t, life)
	if err != nil {
		return err
	}
	sol := e.sol
	sol.Adjoint()
	p.gain, p.acm = e.inputTransfers()
	p.adm = p.gain
	if e.shunt >= 0 {
		p.adm = p.gain / e.net.Resistors[e.resIdx[e.shunt]].Ohm
	}
	// The output at zero signal and zero common mode: the reference and the
	// load's leakage. The common mode's own share is CMRR's (see
	// Metrics.CommonModeErrorV), so the offset does not depend on where the
	// common-mode range lies.
	p.base = 0
	if e.refSrc >= 0 && e.s.Reference != nil {
		p.base += sol.SourceTransfer(e.refSrc) * (e.s.Reference.V * ref)
	}
	if e.leak >= 0 {
		p.base += sol.CurrentTransfer(e.leak) * e.s.LeakageA
	}
	if !e.differential {
		p.acm = 0
	}
	for a, i := range e.amps {
		p.tvos[a], p.tibp[a], p.tibm[a] = sol.AmpTransfers(i)
	}
	p.pinCM, p.ng = e.ampT.pinCM, e.ampT.ng
	return nil
}

// inputTransfers returns, from the last Adjoint, the transfer of a unit
// signal (1 V single-ended, ±0.5 V differential, or 1 A through the shunt,
// as driveSignal applies it) and of a unit common mode on the inputs (or
// the shunt), as driveCM applies it.
func (e *Evaluator) inputTransfers() (gain, acm float64) {
	var tcm [2]float64
	for k, i := range e.cmSrcs {
		if i >= 0 {
			tcm[k] = e.sol.SourceTransfer(i)
		}
	}
	switch {
	case e.sigCur >= 0:
		gain = e.sol.CurrentTransfer(e.sigCur)
	case e.sigNeg >= 0: // the common-mode sources are vp and vn
		gain = (tcm[0] - tcm[1]) / 2
	default:
		gain = e.sol.SourceTransfer(e.sigSrc)
	}
	return gain, tcm[0] + tcm[1]
}

// gainAt solves only the signal transfer at parameter point x and
// temperature t (see eval), for the searches that need nothing else.
func (e *Evaluator) gainAt(x []float64, t float64, life bool) (float64, error) {
	if e.matched {
		var p point
		e.evalMatched(x, t, e.setValues(x, t, life), &p)
		return p.gain, nil
	}
	if _, err := e.factorAt(x, t, life); err != nil {
		return 0, err
	}
	e.sol.Adjoint()
	g, _ := e.inputTransfers()
	return g, nil
}

// ampTransfers solves, at nominal values and the reference temperature,
// each amplifier's pin common mode per volt of input common mode and its
// own-loop noise gain (|V(Out)| of the op-amp itself per volt of its Vos).
// The transfers to the output come from every point's own adjoint solve
// (see evalSpread).
func (e *Evaluator) ampTransfers() error {
	if e.matched {
		return nil
	}
	if _, err := e.factorAt(e.x, e.s.TempRef, false); err != nil {
		return err
	}
	n := e.net
	p := &e.ampT
	*p = point{}
	if e.differential {
		e.quiet()
		e.driveCM(1)
		e.sol.Solve(e.v)
		for a, i := range e.amps {
			op := &n.OpAmps[i]
			p.pinCM[a] = (e.v[op.Plus] + e.v[op.Minus]) / 2
		}
	}
	for a, i := range e.amps {
		op := &n.OpAmps[i]
		e.quiet()
		op.Vos = 1
		e.sol.Solve(e.v)
		p.ng[a] = math.Abs(e.v[op.Out])
		op.Vos = 0
	}
	return nil
}

// factorAt writes the resistor values at parameter point x and
// temperature t, sets every op-amp's open-loop gain and factors the stage;
// it returns the reference scale factor.
func (e *Evaluator) factorAt(x []float64, t float64, life bool) (float64, error) {
	e.spread(x)
	return e.factorSpread(t, life)
}

// factorSpread is factorAt at the parameter point of the last spread.
func (e *Evaluator) factorSpread(t float64, life bool) (float64, error) {
	ref := e.applyValues(t, life)
	for _, i := range e.amps {
		e.net.OpAmps[i].Gain = e.aol
	}
	if err := e.sol.Factor(); err != nil {
		return 0, fmt.Errorf("budget: %s: %w", e.family, err)
	}
	return ref, nil
}

// evalMatched models an amplifier with matched resistors inside from its
// datasheet figures: gain G (1 + x ε)(1 + x' α ΔT); the offset referred to
// the output through the noise gain 1 + G; CMRR from the datasheet.
//
// The spec's source resistance Rs (in series with each input) and the
// reference's own resistance Rref (in series with the reference pin) act on
// the part as on the classic difference amplifier whose input resistor R1
// is the part's internal resistor and whose feedback resistor is R2 = G·R1
// (R3 = R1, R4 = R2: the datasheet's gain error and CMRR stand for their
// mismatch). With R1' = R1 + Rs the transfers are (domain notes §2)
//
//	Gn = −R2/R1',  Gp = (R2 + Rref)/(R1' + R2 + Rref)·(1 + R2/R1'),
//	Gr = (R1' + R2)/(R1' + R2 + Rref),
//
// so the gain is (Gp − Gn)/2 = G·R1/(R1 + Rs) without Rref, the common-mode
// gain Gp + Gn = Rref/(R1' + R2 + Rref) (equal source resistances keep the
// balance, a reference resistance spoils it) and the output at zero input
// Vref·Gr. R1's absolute value (tolerance and tempco, which no ratio
// cancels) moves each of them.
func (e *Evaluator) evalMatched(x []float64, t float64, ref float64, p *point) {
	g := e.c.MatchedGain
	abs := 1.0
	for j := range e.params {
		switch e.params[j].kind {
		case pMGain:
			g *= 1 + x[j]*e.params[j].scale
		case pMDrift:
			g *= 1 + x[j]*e.params[j].scale*(t-e.s.TempRef)
		case pMAbs:
			abs *= 1 + x[j]*e.params[j].scale
		case pMAbsTC:
			abs *= 1 + x[j]*e.params[j].scale*(t-e.s.TempRef)
		}
	}
	// In terms of u = Rs/R1 and v = Rref/R1 the transfers above are
	// Acm = v/(1 + u + G + v), Adm = G/(1 + u) + Acm/2 and Gr = 1 − Acm,
	// the forms that give the part's own figures exactly (no rounding
	// residue) when u = v = 0.
	var u, v float64
	if r1 := e.amp.InternalOhm * abs; r1 > 0 {
		// (No internal resistance, as in a part package assume has not
		// filled: the part alone, unloaded.)
		u, v = e.s.SourceOhm/r1, e.refOhm()/r1
	}
	acm := v / (1 + u + g + v)
	gr := 1 - acm
	p.gain = g/(1+u) + acm/2
	p.adm, p.acm = p.gain, acm
	// The op-amp's pins and noise gain at the nominal ratio, as the
	// other families take them (see eval).
	g0 := e.c.MatchedGain
	p.pinCM[0] = (g0 + v) / (1 + u + g0 + v)
	p.base = 0
	if e.s.Reference != nil {
		p.base = e.s.Reference.V * ref * gr
	}
	ng := 1 + g0/(1+u)
	p.tvos[0], p.ng[0] = ng, ng
	p.tibp[0], p.tibm[0] = 0, 0
}

// refOhm is the reference source's own resistance where the spec's
// reference drives the stage (0: none).
func (e *Evaluator) refOhm() float64 {
	if e.refDriven() && e.s.Reference != nil {
		return e.s.Reference.SourceOhm
	}
	return 0
}

// ampKinds orders the amplifier terms of ampIdx.
var ampKinds = [5]paramKind{pVos, pVosDrift, pIb, pIos, pCMRR}

// circuitOptions maps the design's options and the spec's source and load
// onto the netlist's options.
func (e *Evaluator) circuitOptions() circuit.Options {
	o := e.opts.Netlist()
	o.Load = e.s.LoadOhm > 0
	o.SourceImpedance = e.s.SourceOhm > 0 && e.fam.Input != family.Current
	o.RefImpedance = e.refDriven() && e.s.Reference != nil && e.s.Reference.SourceOhm > 0
	return o
}

// refDriven reports whether the spec's reference drives the family's
// reference input: the stages that pass it to the output or shift by it
// (family.RefUse); the others keep theirs at 0 or have none.
func (e *Evaluator) refDriven() bool {
	return e.fam.Reference != family.RefNone
}
