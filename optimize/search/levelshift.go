package search

import (
	"fmt"
	"math"
	"sort"
)

// Level shift, reference into the non-inverting node (optimize/circuit's
// LevelShift topology):
//
//	Vout = NG·(Vin/R1 + Vref/R2)/(1/R1 + 1/R2 + 1/R3),  NG = 1 + Rf/Rg
//
// (superposition at the non-inverting node, S. Franco, "Design with
// Operational Amplifiers and Analog Integrated Circuits", summing
// amplifier, from memory). With a1, a2, a3 the conductance shares of R1,
// R2, R3 the slope is m = NG·a1 and the offset b = NG·a2·Vref. The search
// sets Rg = Rf (one value of one grade), so NG = 2 exactly and no feedback
// ratio is quantized; the input network then needs R2/R1 = a1/a2 =
// m·Vref/b and R3/R1 = a1/a3 with a3 = 1 - (m + b/Vref)/2, so it reaches
// every shift with m > 0, b > 0 and m + b/Vref < 2 (mapping a signal onto
// an ADC range inside [0, Vref] always has m + b/Vref <= 1).

// lsNoiseGain is NG of the level shift (Rg = Rf).
const lsNoiseGain = 2

// lsRatios returns the target ratios R2/R1 and R3/R1.
func (p *Problem) lsRatios() (q2, q3 float64) {
	m, b := p.Gain, p.Shift
	a1, a2 := m/lsNoiseGain, b/(p.Ref*lsNoiseGain)
	return a1 / a2, a1 / (1 - a1 - a2)
}

// lsCheck refuses shifts the search does not build.
func (p *Problem) lsCheck() error {
	switch {
	case !(p.Ref > 0):
		return fmt.Errorf("%w: level shift needs a positive reference voltage, got %g V", ErrProblem, p.Ref)
	case !(p.Shift > 0):
		return fmt.Errorf("%w: level shift with offset %g V: the search builds positive offsets (reference into the non-inverting node); a negative offset needs the reference at the inverting input, not searched yet", ErrProblem, p.Shift)
	case p.Gain+p.Shift/p.Ref >= lsNoiseGain:
		return fmt.Errorf("%w: level shift with gain %g and offset %g V: gain + offset/Vref = %.3g must stay below %d with Rg = Rf", ErrProblem, p.Gain, p.Shift, p.Gain+p.Shift/p.Ref, lsNoiseGain)
	}
	return nil
}

// lsValues are the values of one level-shift option.
type lsValues struct{ r1, r2, r3, rfb float64 }

// lsShares returns NG·a1 (slope) and NG·a2 (offset per volt of reference)
// with each resistor multiplied by its factor (source resistance in series
// with R1).
func (s *space) lsShares(v *lsValues, f *[5]float64) (slope, refGain float64) {
	g1 := 1 / (v.r1*f[0] + s.p.SourceOhm)
	g2, g3 := 1/(v.r2*f[1]), 1/(v.r3*f[2])
	ng := 1 + f[4]/f[3] // Rf/Rg with Rg = Rf nominal
	sum := g1 + g2 + g3
	return ng * g1 / sum, ng * g2 / sum
}

// lsCorners returns the worst relative slope error and the worst absolute
// offset error (V) over the 32 corners of the five resistors, each at
// 1 ± e[i] (e from the grade: tolerance, life, tempco over the excursion),
// for slope and offset scaled by rho and the reference at its own worst
// relative error refErr. Both are monotonic in each resistor, so the
// corners hold the extremes.
func (s *space) lsCorners(v *lsValues, e *[5]float64, rho, refErr float64) (slopeErr, offErr float64) {
	p := s.p
	var f [5]float64
	for c := 0; c < 32; c++ {
		for i := range f {
			f[i] = 1 + e[i]
			if c&(1<<i) != 0 {
				f[i] = 1 - e[i]
			}
		}
		sl, rg := s.lsShares(v, &f)
		slopeErr = math.Max(slopeErr, math.Abs(rho*sl/p.Gain-1))
		for _, r := range [2]float64{1 + refErr, 1 - refErr} {
			offErr = math.Max(offErr, math.Abs(rho*rg*p.Ref*r-p.Shift))
		}
	}
	return slopeErr, offErr
}

// evalLevelShift computes the screening figures of a level-shift option:
// exact corners of the slope and offset under worst case, sensitivities
// in quadrature under RSS; the amplifier's offset NG·(Vos + bias) with the
// bias currents through the resistance each input sees; noise and
// bandwidth at NG = 2.
func (s *space) evalLevelShift(c *config, o *option, a *amp, m *metrics) {
	p := s.p
	gi, gf := s.groups[c.ga], s.groups[c.gb]
	v := s.lsOptionValues(c, o)
	am := a.a
	ng := float64(lsNoiseGain)
	fAol := 1.0
	if am.AolVV > 0 {
		fAol = 1 / (1 + ng/am.AolVV)
	}
	var ones [5]float64
	for i := range ones {
		ones[i] = 1
	}
	sl0, rg0 := s.lsShares(&v, &ones)
	rho := fAol
	sys := sl0*rho/p.Gain - 1
	dT := s.dT
	ti, tf := gi.grade.Tolerance, gf.grade.Tolerance
	li, lf := gi.grade.LoadLife, gf.grade.LoadLife
	ci, cf := gi.grade.TCR*1e-6, gf.grade.TCR*1e-6
	tol := [5]float64{ti, ti, ti, tf, tf}
	all := [5]float64{}
	drift := [5]float64{}
	for i := range all {
		l, c := li, ci
		if i >= 3 {
			l, c = lf, cf
		}
		all[i] = (1+tol[i])*(1+l)*(1+c*dT) - 1
		drift[i] = c * dT
	}
	refDT := p.RefDrift * dT
	// Sensitivities of ln(slope) and ln(offset) to ln R (R1, R2, R3, Rg, Rf).
	a1, a2 := sl0/ng, rg0/ng
	a3 := 1 - a1 - a2
	sSl := [5]float64{-(a2 + a3), a2, a3, -0.5, 0.5}
	sOf := [5]float64{a1, -(a1 + a3), a3, -0.5, 0.5}
	if s.rss {
		q := func(sens, e *[5]float64) float64 {
			t := 0.0
			for i := range e {
				t += sens[i] * sens[i] * e[i] * e[i]
			}
			return math.Sqrt(t)
		}
		dr := q(&sSl, &drift)
		m.drift = dr / dT * 1e6
		m.gainErr = math.Abs(sys) + q(&sSl, &tol)
		m.totalErr = math.Abs(sys) + q(&sSl, &all)
		if p.CalGain {
			var lifeDrift [5]float64
			for i := range lifeDrift {
				lifeDrift[i] = all[i] - tol[i]
			}
			m.gainErr, m.totalErr = 0, q(&sSl, &lifeDrift)
		}
		bOff := math.Abs(rg0*rho*p.Ref - p.Shift)
		resOff := p.Shift * math.Sqrt(sq(q(&sOf, &all))+sq(p.RefTol)+sq(refDT))
		m.offset = bOff + resOff
	} else {
		e0, _ := s.lsCorners(&v, &tol, rho, 0)
		eT, offT := s.lsCorners(&v, &all, rho, (1+p.RefTol)*(1+refDT)-1)
		eD, _ := s.lsCorners(&v, &drift, 1, 0)
		m.gainErr, m.totalErr = e0, eT
		if dT > 0 {
			m.drift = eD / dT * 1e6
		}
		if p.CalGain {
			var lifeDrift [5]float64
			for i := range lifeDrift {
				lifeDrift[i] = (1+all[i])/(1+tol[i]) - 1
			}
			eL, _ := s.lsCorners(&v, &lifeDrift, 1, 0)
			m.gainErr, m.totalErr = 0, eL
		}
		m.offset = offT
	}
	// Amplifier: Ib+ through (R1 + Rs)∥R2∥R3, Ib- through Rg∥Rf.
	rPlus := 1 / (1/(v.r1+p.SourceOhm) + 1/v.r2 + 1/v.r3)
	rMinus := v.rfb / 2
	bias := am.IbA*math.Abs(rPlus-rMinus) + am.IosA*(rPlus+rMinus)/2
	if p.CalOffset {
		// A one-time trim removes the initial offset: what moves with
		// temperature and life remains.
		var moved [5]float64
		for i := range moved {
			moved[i] = (1+all[i])/(1+tol[i]) - 1
		}
		_, m.offset = s.lsCorners(&v, &moved, rg0*p.Ref/p.Shift, refDT)
	}
	var amo metrics
	s.offset(&amo, ng, am.VosV, bias, am.VosDriftVK)
	if s.rss {
		m.offset = math.Hypot(m.offset, amo.offset)
	} else {
		m.offset += amo.offset
	}
	m.offDrift = amo.offDrift
	m.cmrrDB = noiseFloorDB
	kt4 := 4 * boltzmann * s.tempK
	m.noise = ng * math.Sqrt(am.NoiseVHz*am.NoiseVHz+kt4*(rPlus+rMinus)+sq(am.NoiseAHz)*(rPlus*rPlus+rMinus*rMinus))
	m.gain = sl0 * fAol
	m.bw = am.GBWHz / ng
	m.noiseRMS = rmsNoise(m.noise, m.bw)
}

func sq(x float64) float64 { return x * x }

// boundLevelShift fills m with optimistic figures for every option of a
// level-shift class: the amplifier's own offset, drift and noise at NG = 2
// (the resistor terms only add to them); gain error and drift 0.
func (s *space) boundLevelShift(a *amp, m *metrics) {
	*m = metrics{cmrrDB: noiseFloorDB}
	if a == nil {
		return
	}
	am := a.a
	ng := float64(lsNoiseGain)
	s.offset(m, ng, am.VosV, 0, am.VosDriftVK)
	m.noise = ng * am.NoiseVHz
	m.noiseRMS = rmsNoise(m.noise, am.GBWHz/ng)
}

// lsOptionValues returns the values of a level-shift option.
func (s *space) lsOptionValues(c *config, o *option) lsValues {
	gi, gf := s.groups[c.ga], s.groups[c.gb]
	return lsValues{r1: gi.values[o.rg], r2: gi.values[o.rf], r3: gi.values[o.rf2], rfb: gf.values[c.fbv]}
}

// lsVoltages returns the largest voltage across R1, R2, R3 and Rg = Rf
// over the input range (the non-inverting node sits at Vout/2).
func (p *Problem) lsVoltages() (v1, v2, v3, vf float64) {
	for _, vin := range []float64{p.InMin, p.InMax} {
		out := p.Gain*vin + p.Shift
		vp := out / lsNoiseGain
		v1 = math.Max(v1, math.Abs(vin-vp))
		v2 = math.Max(v2, math.Abs(p.Ref-vp))
		v3 = math.Max(v3, math.Abs(vp))
		vf = math.Max(vf, math.Abs(out-vp))
	}
	return v1, v2, v3, vf
}

// levelShiftConfigs builds one configuration per (input-network group,
// feedback group): R1, R2, R3 from the first, Rg = Rf one value of the
// second (the one nearest the middle of the resistor window).
func (s *space) levelShiftConfigs() {
	_, _, _, vf := s.p.lsVoltages()
	for b, gf := range s.groups {
		fv := -1
		mid := math.Sqrt(s.p.RMinOhm * s.p.RMaxOhm)
		for i, v := range gf.values {
			if s.ratingOK(gf.grade.PowerW, gf.grade.MaxVoltageV, v, vf) && (fv < 0 || math.Abs(math.Log(v/mid)) < math.Abs(math.Log(gf.values[fv]/mid))) {
				fv = i
			}
		}
		if fv < 0 {
			continue
		}
		for a, gi := range s.groups {
			c := config{fam: DiscreteLevelShift, ga: a, gb: b, net: -1, fbv: int32(fv),
				g: discreteGrades(gi.grade.Tolerance, gi.grade.TCR, gi.grade.LoadLife, gf.grade.Tolerance, gf.grade.TCR, gf.grade.LoadLife, s.dT)}
			if c.costLB = linesLB(s, []*group{gi, gi, gi, gf}, []int{1, 1, 1, 2}, 0); !math.IsNaN(c.costLB) {
				s.cfgs = append(s.cfgs, c)
			}
		}
	}
}

// levelShiftOptions lists the value options of a level-shift
// configuration: per R1 value, R2 and R3 the values either side of their
// targets, kept when both ratios are inside the window and every resistor
// inside its rating.
func (s *space) levelShiftOptions(c *config) {
	gi, gf := s.groups[c.ga], s.groups[c.gb]
	q2, q3 := s.p.lsRatios()
	v1, v2, v3, _ := s.p.lsVoltages()
	pw, mv := gi.grade.PowerW, gi.grade.MaxVoltageV
	near := func(t float64) [2]int {
		j := sort.SearchFloat64s(gi.values, t)
		return [2]int{j - 1, j}
	}
	for i, r1 := range gi.values {
		if !s.ratingOK(pw, mv, r1, v1) {
			continue
		}
		for _, j := range near(q2 * r1) {
			if j < 0 || j >= len(gi.values) || math.Abs(gi.values[j]/r1/q2-1) > s.w || !s.ratingOK(pw, mv, gi.values[j], v2) {
				continue
			}
			for _, k := range near(q3 * r1) {
				if k < 0 || k >= len(gi.values) || math.Abs(gi.values[k]/r1/q3-1) > s.w || !s.ratingOK(pw, mv, gi.values[k], v3) {
					continue
				}
				o := option{rg: int32(i), rf: int32(j), rf2: int32(k), k0: gi.values[j] / r1, rp: gi.values[k] / r1}
				lines := [4]line{{gi, i, 1}, {gi, j, 1}, {gi, k, 1}, {gf, int(c.fbv), 2}}
				if s.priceLines(&o, lines[:]) {
					c.opts = append(c.opts, o)
				}
			}
		}
	}
}

// evalOpt computes the screening figures of option o of configuration c
// with op-amp a.
func (s *space) evalOpt(c *config, o *option, a *amp, m *metrics) {
	if s.p.Circuit == LevelShift {
		s.evalLevelShift(c, o, a, m)
		return
	}
	s.eval(&c.g, o.k0, o.rp, a, m)
}

// lsDominant names the largest contributor to a level shift's limit from
// first-order shares: the slope moves by Σ|∂ln m/∂ln R|·t (2·(a2+a3) for
// the input network of one grade, 1 for Rg = Rf), the offset by
// b·(2·(a1+a3)·t + reference tolerance and drift) and NG·(Vos + drift·ΔT).
func (s *space) lsDominant(b *classBest, limit string) (string, float64) {
	p := s.p
	c := &s.cfgs[b.cfg]
	o := &c.opts[b.opt]
	gi, gf := s.groups[c.ga].grade, s.groups[c.gb].grade
	v := s.lsOptionValues(c, o)
	ones := [5]float64{1, 1, 1, 1, 1}
	sl, rg := s.lsShares(&v, &ones)
	a1, a2 := sl/lsNoiseGain, rg/lsNoiseGain
	a3 := 1 - a1 - a2
	am := s.amps[b.amp].a
	type term struct {
		name string
		v    float64
	}
	var ts []term
	switch limit {
	case limGain, limGainInitial:
		ts = []term{{"ratio quantization", math.Abs(sl/p.Gain - 1)}, {"R1, R2, R3 tolerance", 2 * (a2 + a3) * gi.Tolerance}, {"Rg, Rf tolerance", gf.Tolerance}}
		if limit == limGain {
			ts = append(ts, term{"resistor tempco over temperature", (2*(a2+a3)*gi.TCR + gf.TCR) * 1e-6 * s.dT})
		}
	case limDrift:
		ts = []term{{"R1, R2, R3 tempco", 2 * (a2 + a3) * gi.TCR}, {"Rg, Rf tempco", gf.TCR}}
	case limOffset, limOffDrift:
		ts = []term{{"the reference's tolerance and drift", p.Shift * (p.RefTol + p.RefDrift*s.dT)},
			{"resistor ratios in the offset path", p.Shift * (2*(a1+a3)*gi.Tolerance + gf.Tolerance)},
			{"amplifier offset voltage and drift", lsNoiseGain * (am.VosV + am.VosDriftVK*s.dT)}}
	default:
		return "the amplifier", 1
	}
	best, sum := term{"", -1}, 0.0
	for _, t := range ts {
		sum += t.v
		if t.v > best.v {
			best = t
		}
	}
	if sum == 0 {
		return best.name, 1
	}
	return best.name, best.v / sum
}
