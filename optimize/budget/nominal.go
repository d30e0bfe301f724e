package budget

import (
	"errors"
	"fmt"
	"math"
	"strings"

	"plumb/optimize/circuit"
	"plumb/optimize/spec"
)

// corners lists the signal and common-mode extremes the stress and
// headroom checks solve at.
func (e *Evaluator) corners(buf *[4][2]float64) [][2]float64 {
	c := buf[:0]
	cms := [2]float64{e.cmBase, e.cmBase}
	if e.differential {
		cms = [2]float64{e.s.CommonMode.Min, e.s.CommonMode.Max}
	}
	for _, sig := range [2]float64{e.s.Input.Min, e.s.Input.Max} {
		for i, cm := range cms {
			if i == 1 && cms[0] == cms[1] {
				break
			}
			c = append(c, [2]float64{sig, cm})
		}
	}
	return c
}

// stress solves the stage at nominal values at every input and
// common-mode corner and records each resistor's worst voltage and
// dissipation and the least headroom of any amplifier pin or output:
// inputs against V- + CMNeg .. V+ - CMPos, outputs against V- + SwingNeg ..
// V+ - SwingPos (catalog.Amplifier). It then sets each resistor's
// self-heating rise ΔT = P θ (domain notes §3).
func (e *Evaluator) stress() error {
	clear(e.pmax)
	clear(e.vmax)
	clear(e.heat)
	e.headroom, e.headAmp, e.headPin = math.Inf(1), -1, 0
	var buf [4][2]float64
	corners := e.corners(&buf)
	vneg, vpos := e.s.Supply.Min, e.s.Supply.Max
	a := &e.amp
	e.headOut = math.Inf(1)
	check := func(v, lo, hi float64, amp, pin int) {
		m := math.Min(v-lo, hi-v)
		if m < e.headroom {
			e.headroom, e.headAmp, e.headPin = m, amp, pin
		}
		if pin == pinOut && amp == e.outAmp {
			e.headOut = math.Min(e.headOut, m)
		}
	}
	if e.matched {
		g := e.c.MatchedGain
		ref := 0.0
		if e.s.Reference != nil {
			ref = e.s.Reference.V
		}
		for _, c := range corners {
			for _, vin := range [2]float64{c[1] + c[0]/2, c[1] - c[0]/2} {
				check(vin, vneg+a.InNegV, vpos-a.InPosV, 0, pinInput)
			}
			check(c[1]*g/(1+g)+ref/(1+g), vneg+a.CMNegV, vpos-a.CMPosV, 0, pinInternal)
			check(g*c[0]+ref, vneg+a.SwingNegV, vpos-a.SwingPosV, 0, pinOut)
		}
		return nil
	}
	if _, err := e.factorAt(e.x, e.s.TempRef, false); err != nil {
		return err
	}
	n := e.net
	for _, c := range corners {
		e.quiet()
		e.driveSignal(c[0])
		e.driveCM(c[1])
		if e.refSrc >= 0 && e.s.Reference != nil {
			n.Sources[e.refSrc].V = e.s.Reference.V
		}
		if e.leak >= 0 {
			n.Currents[e.leak].A = e.s.LeakageA
		}
		e.solve()
		for k, idx := range e.resIdx {
			r := &n.Resistors[idx]
			v := math.Abs(e.v[r.A] - e.v[r.B])
			e.vmax[k] = math.Max(e.vmax[k], v)
			e.pmax[k] = math.Max(e.pmax[k], v*v/r.Ohm)
		}
		for ai, i := range e.amps {
			op := &n.OpAmps[i]
			check(e.v[op.Plus], vneg+a.CMNegV, vpos-a.CMPosV, ai, pinPlus)
			check(e.v[op.Minus], vneg+a.CMNegV, vpos-a.CMPosV, ai, pinMinus)
			check(e.v[op.Out], vneg+a.SwingNegV, vpos-a.SwingPosV, ai, pinOut)
		}
	}
	for k := range e.heat {
		e.heat[k] = e.pmax[k] * e.c.Figs[k].ThermalResistance
	}
	return nil
}

// outputHeadroom lowers m.HeadroomV, the nominal parts' least headroom,
// to what the stage's output keeps once its worst-case errors move it (see
// outputMove). The pins inside the stage move with the tolerances only by
// their fraction of these.
func (e *Evaluator) outputHeadroom(w *agg, p0 *point, m *Metrics) {
	if math.IsInf(e.headOut, 1) {
		return
	}
	if moved := e.headOut - e.outputMove(p0, w.gainErr, w.offset, w.cmrr); moved < m.HeadroomV {
		m.HeadroomV, e.headAmp, e.headPin = moved, e.outAmp, pinOut
	}
}

// outputMove is how far errors move the stage's output from its nominal
// value at the range corners: the gain error on the full-scale signal, the
// output offset, and for a differential input the common mode's share at
// the largest |Vcm|, |Adm| |Vcm|/CMRR (cmrr linear). p0 is the nominal
// point.
func (e *Evaluator) outputMove(p0 *point, gainErr, offset, cmrr float64) float64 {
	s := e.s
	move := gainErr*math.Max(math.Abs(s.Input.Min), math.Abs(s.Input.Max))*math.Abs(p0.gain) + offset
	if e.differential {
		move += math.Max(math.Abs(s.CommonMode.Min), math.Abs(s.CommonMode.Max)) * math.Abs(p0.adm) / cmrr
	}
	return move
}

// derating is the spec's fraction of rated power a resistor may dissipate;
// the zero value of a spec built in code means spec.DefaultDerating (50 %,
// a common practice for film resistors; ECSS-Q-ST-30-11, from memory).
func (e *Evaluator) derating() float64 {
	if e.s.Derating > 0 {
		return e.s.Derating
	}
	return spec.DefaultDerating
}

// ratings returns the worst resistor dissipation over its derated power
// and the worst voltage over its rated voltage min(sqrt(P R), limiting
// element voltage) (IEC 60115-1, from memory), with the positions.
func (e *Evaluator) ratings() (pr float64, pAt int, vr float64, vAt int) {
	pAt, vAt = -1, -1
	for k, f := range e.c.Figs {
		if f.PowerW > 0 {
			if r := e.pmax[k] / (e.derating() * f.PowerW); r > pr {
				pr, pAt = r, k
			}
			rated := math.Sqrt(f.PowerW * f.Ohm)
			if f.MaxVoltageV > 0 {
				rated = math.Min(rated, f.MaxVoltageV)
			}
			if r := e.vmax[k] / rated; r > vr {
				vr, vAt = r, k
			}
		} else if f.MaxVoltageV > 0 {
			if r := e.vmax[k] / f.MaxVoltageV; r > vr {
				vr, vAt = r, k
			}
		}
	}
	return pr, pAt, vr, vAt
}

// noiseTerm is one source of output noise density, V/√Hz at the output.
type noiseTerm struct {
	res  int // netlist resistor, or -1
	amp  int // amplifier index for amplifier terms
	kind int // 0 resistor, 1 voltage noise, 2 current noise
	v    float64
}

// nominal computes the figures that do not vary with tolerances: noise
// gain, bandwidth GBW/NG, output noise density and RMS, input impedance,
// headroom and ratings. terms, when not nil, receives the noise terms.
//
// Noise: each resistor's thermal current sqrt(4kT/R) is injected across it
// and carried to the output by the solved transfer; the amplifier's
// voltage noise goes through the Vos transfer and its current noise through
// the two bias-current transfers; all add in power. T is the top of the
// temperature range (the worst case for thermal noise). RMS is the density
// over the brick-wall equivalent bandwidth π/2 x f-3dB of a single pole
// (white noise assumed; 1/f noise is not modelled).
func (e *Evaluator) nominal(m *Metrics, terms *[]noiseTerm) error {
	kelvin := e.s.Temp.Max + 273.15
	pr, _, vr, _ := e.ratings()
	m.PowerRatio, m.VoltageRatio = pr, vr
	m.HeadroomV = e.headroom
	if math.IsInf(m.HeadroomV, 1) || m.HeadroomV == 0 {
		m.HeadroomV = 0 // also turns a -0 (a pin exactly at its limit) into 0
	}
	a := &e.amp
	if e.matched {
		g := e.c.MatchedGain
		m.NoiseGain = 1 + g
		m.BandwidthHz = a.GBWHz / m.NoiseGain
		// Internal resistors R (inputs) and G R (feedback and reference): the
		// thermal noise of R || GR at each input, through the noise gain.
		rpar := a.InternalOhm * g / (1 + g)
		en2 := a.NoiseVHz * a.NoiseVHz * m.NoiseGain * m.NoiseGain
		rn2 := 2 * 4 * Boltzmann * kelvin * rpar * m.NoiseGain * m.NoiseGain
		m.NoiseDensity = math.Sqrt(en2 + rn2)
		if terms != nil {
			*terms = append(*terms, noiseTerm{res: -1, kind: 1, v: math.Sqrt(en2)}, noiseTerm{res: -2, v: math.Sqrt(rn2)})
		}
		m.NoiseRMSV = m.NoiseDensity * math.Sqrt(NoiseBandwidthFactor*m.BandwidthHz)
		m.InputImpedanceOhm = a.InternalOhm
		return nil
	}
	if _, err := e.factorAt(e.x, e.s.TempRef, false); err != nil {
		return err
	}
	// One adjoint solve gives every noise source's transfer to the output:
	// each resistor's thermal noise current across it, each op-amp's
	// voltage noise (as its Vos) and current noise (as its bias currents).
	n := e.net
	e.sol.Adjoint()
	var d2 float64
	for i := range n.Resistors {
		t := e.sol.CurrentTransfer(e.noiseIdx[i]) * math.Sqrt(4*Boltzmann*kelvin/n.Resistors[i].Ohm)
		d2 += t * t
		if terms != nil {
			*terms = append(*terms, noiseTerm{res: i, v: math.Abs(t)})
		}
	}
	for ai, i := range e.amps {
		if ai == 0 {
			m.NoiseGain = e.ampT.ng[ai]
		}
		tv, tp, tm := e.sol.AmpTransfers(i)
		vn := a.NoiseVHz * tv
		in2 := a.NoiseAHz * a.NoiseAHz * (tp*tp + tm*tm)
		d2 += vn*vn + in2
		if terms != nil {
			*terms = append(*terms, noiseTerm{res: -1, amp: ai, kind: 1, v: math.Abs(vn)}, noiseTerm{res: -1, amp: ai, kind: 2, v: math.Sqrt(in2)})
		}
	}
	if err := e.bandwidth(m); err != nil {
		return err
	}
	m.NoiseDensity = math.Sqrt(d2)
	m.NoiseRMSV = m.NoiseDensity * math.Sqrt(NoiseBandwidthFactor*m.BandwidthHz)
	if e.passive() {
		// No amplifier sets a bandwidth: the noise is integrated over the
		// bandwidth the spec asks for, brick-wall (the filter or ADC after
		// the divider sets the real one); without one it is not known.
		m.NoiseRMSV = m.NoiseDensity * math.Sqrt(e.s.Limits.BandwidthHz)
	}
	m.InputImpedanceOhm = e.inputImpedance()
	return nil
}

// bandwidth sets the closed-loop -3 dB bandwidth of the signal path at
// nominal values from the exact AC solve with every op-amp a single pole at
// its GBW (circuit.Solver.Bandwidth): GBW/NG for one op-amp, and for the
// in-amp the differential mode's 1 + 2Rf/Rg, where both input amplifiers
// roll off together, which no single loop's noise gain gives. The noise
// gain reported is then GBW over that bandwidth, the loop gain the signal
// sees. Without a GBW figure the bandwidth is 0 (unknown).
func (e *Evaluator) bandwidth(m *Metrics) error {
	m.BandwidthHz = 0
	if e.passive() || !(e.amp.GBWHz > 0) {
		return nil
	}
	for i := range e.gbw {
		e.gbw[i] = e.amp.GBWHz
	}
	e.quiet()
	e.driveSignal(1)
	bw, err := e.sol.Bandwidth(e.gbw)
	e.driveSignal(-1)
	if errors.Is(err, circuit.ErrNoResponse) {
		return nil // no signal reaches the output: the gain checks say so
	}
	if err != nil {
		return fmt.Errorf("budget: %s bandwidth: %w", e.family, err)
	}
	m.BandwidthHz = bw
	if len(e.amps) > 1 && bw > 0 && !math.IsInf(bw, 1) {
		m.NoiseGain = e.amp.GBWHz / bw
	}
	return nil
}

// noiseBandKnown reports whether there is a bandwidth to integrate the
// noise over: the stage's own, or for a passive divider the spec's.
func (e *Evaluator) noiseBandKnown(m *Metrics) bool {
	if e.passive() {
		return e.s.Limits.BandwidthHz > 0
	}
	return m.BandwidthHz > 0 && !math.IsInf(m.BandwidthHz, 1)
}

// passive reports a stage without an amplifier (an unbuffered divider).
func (e *Evaluator) passive() bool { return !e.matched && len(e.amps) == 0 }

// inputImpedance drives the unit signal at nominal values and returns the
// smallest V/I the stage presents at an input (the current found from the
// resistors meeting the source node; the voltage past the source's own
// resistance), capped at zinCap.
func (e *Evaluator) inputImpedance() float64 {
	if e.sigSrc < 0 {
		return 0 // current input: the shunt is the impedance, not a limit
	}
	n := e.net
	e.quiet()
	e.driveSignal(1)
	e.solve()
	z := zinCap
	for _, si := range [2]int{e.sigSrc, e.sigNeg} {
		if si < 0 {
			continue
		}
		node := n.Sources[si].Node
		cur := 0.0
		for _, r := range n.Resistors {
			switch node {
			case r.A:
				cur += (e.v[r.A] - e.v[r.B]) / r.Ohm
			case r.B:
				cur += (e.v[r.B] - e.v[r.A]) / r.Ohm
			}
		}
		// The stage's own input is past the source's resistance, if the
		// spec gives one: the same current, at the far end's voltage.
		at := node
		for _, r := range n.Resistors {
			if strings.HasPrefix(r.Name, "Rsrc") && (r.A == node || r.B == node) {
				at = r.A + r.B - node
			}
		}
		if cur != 0 {
			z = math.Min(z, math.Abs(e.v[at]/cur))
		}
	}
	return z
}

// Pins named by headroom checks.
const (
	pinPlus = iota
	pinMinus
	pinOut
	pinInput
	pinInternal
)

// headWhere names the pin with the least headroom.
func (e *Evaluator) headWhere() string {
	if e.headAmp < 0 {
		return "no amplifier pin"
	}
	name := e.ampName(e.headAmp)
	return name + [...]string{" + input", " - input", " output", " input", " internal input"}[e.headPin]
}

// worstInputImpedance is the input impedance at its worst corner: at each
// temperature point (tpoints, load life included), the sign of each resistor
// parameter (tolerance, tempco, load life) that lowers V/I is found by
// moving that parameter alone to ±1, and the impedance is solved at the
// corner of those signs (the sensitivity-guided vertex of the tolerance box;
// exact when the impedance is monotonic in each value, as a driving-point
// resistance of a resistive network is, Rayleigh's monotonicity law). The
// lowest of these, and of the nominal value, is returned. It leaves the
// netlist factored at nominal values.
func (e *Evaluator) worstInputImpedance(nominal float64) (float64, error) {
	if e.matched || e.sigSrc < 0 {
		return nominal, nil
	}
	x := make([]float64, len(e.params))
	corner := make([]float64, len(e.params))
	var buf [4]tpoint
	worst := nominal
	at := func(x []float64, tp tpoint) (float64, error) {
		if _, err := e.factorAt(x, tp.t, tp.life); err != nil {
			return 0, err
		}
		return e.inputImpedance(), nil
	}
	for _, tp := range e.tpoints(&buf) {
		clear(corner)
		for j := range e.params {
			switch e.params[j].kind {
			case pDev, pTC, pLife:
			default:
				continue
			}
			clear(x)
			x[j] = 1
			up, err := at(x, tp)
			if err != nil {
				return 0, err
			}
			x[j] = -1
			down, err := at(x, tp)
			if err != nil {
				return 0, err
			}
			corner[j] = 1
			if down < up {
				corner[j] = -1
			}
		}
		z, err := at(corner, tp)
		if err != nil {
			return 0, err
		}
		worst = math.Min(worst, z)
	}
	clear(x)
	if _, err := e.factorAt(x, e.s.TempRef, false); err != nil {
		return 0, err
	}
	return worst, nil
}
