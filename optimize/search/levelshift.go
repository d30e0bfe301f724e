package search

import (
	"fmt"
	"math"
	"sort"

	"plumb/catalog"
	"plumb/optimize/family"
)

// The level shift's walk: its equations and design model are in its
// family's file (family.Shift); the functions here read them for the
// problem's slope p.Gain, offset p.Shift and reference p.Ref.

// shift is the design model of the problem's level shift.
func (p *Problem) shift() *family.Shift { return p.family().Search.Shift }

// lsNoiseGain is NG of the equal feedback pair.
func (p *Problem) lsNoiseGain() float64 { return p.shift().FeedbackNG }

// lsInv reports whether the reference enters the inverting node (a
// negative offset).
func (p *Problem) lsInv() bool { return p.Shift < 0 }

// lsNG is the target noise gain.
func (p *Problem) lsNG() float64 { return p.shift().NoiseGain(p.Gain, p.Shift, p.Ref) }

// lsRatios returns the target ratios R2/R1 and R3/R1.
func (p *Problem) lsRatios() (q2, q3 float64) { return p.shift().Ratios(p.Gain, p.Shift, p.Ref) }

// lsDivider is R3/R1 = a/(1-a) of a divider of ratio a = R3/(R1+R3).
func lsDivider(a float64) float64 { return a / (1 - a) }

// lsNode is the voltage at the amplifier's inputs for input vin.
func (p *Problem) lsNode(vin float64) float64 { return p.shift().Node(p.Gain, p.Shift, p.Ref, vin) }

// lsCheck refuses shifts the search does not build.
func (p *Problem) lsCheck() error {
	if msg := p.shift().Problem(p.Gain, p.Shift, p.Ref); msg != "" {
		return fmt.Errorf("%w: %s", ErrProblem, msg)
	}
	return nil
}

// lsValues are the values of one level-shift option.
type lsValues struct{ r1, r2, r3, rfb float64 }

// lsShares returns NG·a1 (slope) and NG·a2 (offset per volt of reference)
// with each resistor multiplied by its factor (source resistance in series
// with R1); with the reference into the inverting node, a·NG and -Rf/R2.
func (s *space) lsShares(v *lsValues, f *[5]float64) (slope, refGain float64) {
	if s.p.lsInv() {
		r1, r3 := v.r1*f[0]+s.p.SourceOhm, v.r3*f[2]
		rf, beta := v.rfb*f[4], v.rfb*f[4]/(v.r2*f[1])
		return r3 / (r1 + r3) * (1 + rf/(v.rfb*f[3]) + beta), -beta
	}
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
// relative error refErr.
//
// Slope and offset share are each monotonic in every resistor with a sign
// that does not change (lsSlopeUp, lsOffsetUp), so the largest and the
// smallest of each over the 32 corners lie at the two corners that move
// every resistor the way that raises it and the way that lowers it; and
// |x - target| is convex in x, so its largest value over the corners (and
// both reference corners) is at one of those extremes. Two evaluations of
// the shares per figure therefore give the 32-corner worst case exactly
// (TestLevelShiftCornersMatchEnumeration compares with all 32).
func (s *space) lsCorners(v *lsValues, e *[5]float64, rho, refErr float64) (slopeErr, offErr float64) {
	p := s.p
	slUp, ofUp := lsSlopeUp, lsOffsetUp
	if p.lsInv() {
		slUp, ofUp = lsInvSlopeUp, lsInvOffsetUp
	}
	// corner returns the factors that move every resistor the way up[i]
	// says raises the figure (hi) or lowers it (!hi).
	corner := func(up *[5]int8, hi bool) (f [5]float64) {
		for i := range f {
			d := math.Abs(e[i])
			switch {
			case up[i] == 0:
				f[i] = 1 + e[i]
			case (up[i] > 0) == hi:
				f[i] = 1 + d
			default:
				f[i] = 1 - d
			}
		}
		return f
	}
	fHi, fLo := corner(&slUp, true), corner(&slUp, false)
	slHi, _ := s.lsShares(v, &fHi)
	slLo, _ := s.lsShares(v, &fLo)
	slopeErr = math.Max(math.Abs(rho*slHi/p.Gain-1), math.Abs(rho*slLo/p.Gain-1))
	fHi, fLo = corner(&ofUp, true), corner(&ofUp, false)
	_, rgHi := s.lsShares(v, &fHi)
	_, rgLo := s.lsShares(v, &fLo)
	for _, rg := range [2]float64{rgHi, rgLo} {
		for _, r := range [2]float64{1 + refErr, 1 - refErr} {
			offErr = math.Max(offErr, math.Abs(rho*rg*p.Ref*r-p.Shift))
		}
	}
	return slopeErr, offErr
}

// The signs of ∂/∂R of the slope and of the offset share (lsShares) for
// R1, R2, R3, Rg, Rf: +1 rises with the resistor, -1 falls, 0 does not
// depend on it. Non-inverting summing, slope NG·g1/Σg and offset share
// NG·g2/Σg with NG = 1 + Rf/Rg: a larger R1 lowers g1 (slope down, offset
// up), a larger R2 lowers g2 (slope up, offset down), a larger R3 lowers
// g3 (both up). Reference into the inverting node, slope
// R3/(R1+Rs+R3)·(1 + Rf/Rg + Rf/R2) and offset share -Rf/R2.
var (
	lsSlopeUp     = [5]int8{-1, +1, +1, -1, +1}
	lsOffsetUp    = [5]int8{+1, -1, +1, -1, +1}
	lsInvSlopeUp  = [5]int8{-1, -1, +1, -1, +1}
	lsInvOffsetUp = [5]int8{0, +1, 0, 0, -1}
)

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
	inv := p.lsInv()
	ng := s.p.lsNoiseGain()
	if inv {
		ng += v.rfb / v.r2
	}
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
	fb := s.lsFeedbackGrade()
	tol := [5]float64{}
	all := [5]float64{}
	drift := [5]float64{}
	life := [5]float64{}
	for i := range all {
		l, c := li, ci
		tol[i] = ti
		if fb[i] {
			l, c, tol[i] = lf, cf, tf
		}
		// The exact budget's resistor, Rnom·(1 + δ + life)·(1 + α·(t - Tref)).
		all[i] = (1+tol[i]+l)*(1+c*dT) - 1
		drift[i] = c * dT
		life[i] = l
	}
	// Drift is the slope's change from its own value at the reference
	// temperature, not from the target: the ratio quantization is no drift.
	rhoD := p.Gain / sl0
	refDT := p.RefDrift * dT
	sSl, sOf := s.lsSensitivities(&v)
	q := func(sens, e *[5]float64) float64 {
		t := 0.0
		for i := range e {
			t += sens[i] * sens[i] * e[i] * e[i]
		}
		return math.Sqrt(t)
	}
	m.nomOff = rg0*rho*p.Ref - p.Shift
	if s.rss {
		// Tolerance, load life and tempco are independent terms of the
		// exact RSS budget, each in quadrature.
		var rssAll, rssMoved [5]float64
		for i := range rssAll {
			rssAll[i] = math.Sqrt(tol[i]*tol[i] + life[i]*life[i] + drift[i]*drift[i])
			rssMoved[i] = math.Hypot(life[i], drift[i])
		}
		dr := q(&sSl, &drift)
		m.drift = dr / dT * 1e6
		m.gainErr = math.Abs(sys) + q(&sSl, &tol)
		m.totalErr = math.Abs(sys) + q(&sSl, &rssAll)
		if p.CalGain {
			m.gainErr, m.totalErr = 0, q(&sSl, &rssMoved)
		}
		bOff := math.Abs(rg0*rho*p.Ref - p.Shift)
		resOff := math.Abs(p.Shift) * math.Sqrt(sq(q(&sOf, &rssAll))+sq(p.RefTol)+sq(refDT))
		m.offset = bOff + resOff
	} else {
		e0, _ := s.lsCorners(&v, &tol, rho, 0)
		eT, offT := s.lsCorners(&v, &all, rho, (1+p.RefTol)*(1+refDT)-1)
		eD, _ := s.lsCorners(&v, &drift, rhoD, 0)
		m.gainErr, m.totalErr = e0, eT
		if dT > 0 {
			m.drift = eD / dT * 1e6
		}
		if p.CalGain {
			var lifeDrift [5]float64
			for i := range lifeDrift {
				lifeDrift[i] = (1+all[i])/(1+tol[i]) - 1
			}
			eL, _ := s.lsCorners(&v, &lifeDrift, rhoD, 0)
			m.gainErr, m.totalErr = 0, eL
		}
		m.offset = offT
	}
	// Amplifier: Ib+ through (R1 + Rs)∥R2∥R3, Ib- through Rg∥Rf (with the
	// reference into the inverting node: (R1 + Rs)∥R3 and Rg∥Rf∥R2).
	rPlus := 1 / (1/(v.r1+p.SourceOhm) + 1/v.r2 + 1/v.r3)
	rMinus := v.rfb / 2
	if inv {
		rPlus = 1 / (1/(v.r1+p.SourceOhm) + 1/v.r3)
		rMinus = 1 / (2/v.rfb + 1/v.r2)
	}
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
	if dT > 0 && p.Shift != 0 {
		// The shift moves with the resistors' tempcos and the reference's
		// drift: its change from its own value at the reference
		// temperature (rho scales the nominal share onto the target, so
		// the ratio rounding counts as offset, not drift), per kelvin.
		rhoS := p.Shift / (rg0 * p.Ref)
		var shiftD float64
		if s.rss {
			shiftD = math.Abs(p.Shift) * math.Hypot(q(&sOf, &drift), refDT)
			m.offDrift = math.Hypot(m.offDrift, shiftD/dT)
		} else {
			_, shiftD = s.lsCorners(&v, &drift, rhoS, refDT)
			m.offDrift += shiftD / dT
		}
	}
	m.cmrrDB = noiseFloorDB
	kt4 := 4 * boltzmann * s.tempK
	m.noise = ng * math.Sqrt(am.NoiseVHz*am.NoiseVHz+kt4*(rPlus+rMinus)+sq(am.NoiseAHz)*(rPlus*rPlus+rMinus*rMinus))
	m.gain = sl0 * fAol
	m.bw = am.GBWHz / ng
	m.noiseRMS = rmsNoise(m.noise, m.bw)
}

func sq(x float64) float64 { return x * x }

// lsFeedbackGrade says which of R1, R2, R3, Rg, Rf take the feedback
// grade: Rg and Rf, and R2 with the reference into the inverting node.
func (s *space) lsFeedbackGrade() [5]bool {
	return [5]bool{false, s.p.lsInv(), false, true, true}
}

// lsSensitivities returns the sensitivities of ln(slope) and ln|offset|
// to ln R for R1, R2, R3, Rg, Rf (Rg = Rf nominal). Non-inverting summing,
// with a1, a2, a3 the conductance shares: slope (-(a2+a3), a2, a3, -1/2,
// 1/2), offset (a1, -(a1+a3), a3, -1/2, 1/2). Inverting reference, with
// a = R3/(R1+Rs+R3) and NG = 2 + β: slope (-(1-a)·R1/(R1+Rs), -β/NG, 1-a,
// -1/NG, (NG-1)/NG), offset Rf/R2: (0, -1, 0, 0, 1).
func (s *space) lsSensitivities(v *lsValues) (sSl, sOf [5]float64) {
	if s.p.lsInv() {
		r1 := v.r1 + s.p.SourceOhm
		a := v.r3 / (r1 + v.r3)
		beta := v.rfb / v.r2
		ng := s.p.lsNoiseGain() + beta
		return [5]float64{-(1 - a) * v.r1 / r1, -beta / ng, 1 - a, -1 / ng, (ng - 1) / ng}, [5]float64{0, -1, 0, 0, 1}
	}
	ones := [5]float64{1, 1, 1, 1, 1}
	sl, rg := s.lsShares(v, &ones)
	a1, a2 := sl/s.p.lsNoiseGain(), rg/s.p.lsNoiseGain()
	a3 := 1 - a1 - a2
	return [5]float64{-(a2 + a3), a2, a3, -0.5, 0.5}, [5]float64{a1, -(a1 + a3), a3, -0.5, 0.5}
}

// boundLevelShift fills m with optimistic figures for every option of a
// level-shift class: the amplifier's own offset, drift and noise at NG = 2
// (the resistor terms only add to them) and the least offset the
// reference's error leaves; gain error and drift 0.
func (s *space) boundLevelShift(a *amp, m *metrics) {
	*m = metrics{cmrrDB: noiseFloorDB}
	if a == nil {
		return
	}
	am := a.a
	ng := s.p.lsNoiseGain()
	s.offset(m, ng, am.VosV, 0, am.VosDriftVK)
	if p := s.p; !p.CalOffset {
		// The reference's own error moves the shift whatever the
		// resistors: the corners' worst offset max over r = 1 ± e of
		// |x·r - S| is at least |S|·e/(1 + e) for any resistor factor x
		// (the two values lie 2|x|·e apart, one of them at least |x|·e
		// from S, and |x - S| grows as |x| falls below S/(1 + e)); under
		// RSS the term is |S|·sqrt(tol² + drift²) itself (evalLevelShift).
		refDT := p.RefDrift * s.dT
		if s.rss {
			m.offset = math.Hypot(m.offset, math.Abs(p.Shift)*math.Hypot(p.RefTol, refDT))
		} else {
			e := (1+p.RefTol)*(1+refDT) - 1
			m.offset += math.Abs(p.Shift) * e / (1 + e)
		}
	}
	m.noise = ng * am.NoiseVHz
	m.noiseRMS = rmsNoise(m.noise, am.GBWHz/ng)
}

// lsOptionValues returns the values of a level-shift option.
func (s *space) lsOptionValues(c *config, o *option) lsValues {
	gi, gf := s.groups[c.ga], s.groups[c.gb]
	g2 := gi
	if s.p.lsInv() {
		g2 = gf
	}
	return lsValues{r1: gi.values[o.rg], r2: g2.values[o.rf], r3: gi.values[o.rf2], rfb: gf.values[c.fbv]}
}

// lsVoltages returns the largest voltage across R1, R2, R3 and Rg = Rf
// over the input range (both amplifier inputs sit at lsNode; R2 runs from
// the reference to one of them, Rg from one of them to ground).
func (p *Problem) lsVoltages() (v1, v2, v3, vf float64) {
	for _, vin := range []float64{p.InMin, p.InMax} {
		out := p.Gain*vin + p.Shift
		vp := p.lsNode(vin)
		v1 = math.Max(v1, math.Abs(vin-vp))
		v2 = math.Max(v2, math.Abs(p.Ref-vp))
		v3 = math.Max(v3, math.Abs(vp))
		vf = math.Max(vf, math.Max(math.Abs(out-vp), math.Abs(vp)))
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
			c := config{fam: variant(s.fam(), buildDiscrete), ga: a, gb: b, net: -1, fbv: int32(fv),
				g: discreteGrades(gi.grade.Tolerance, gi.grade.TCR, gi.grade.LoadLife, gf.grade.Tolerance, gf.grade.TCR, gf.grade.LoadLife, s.dT)}
			g2 := gi
			if s.p.lsInv() {
				g2 = gf
			}
			if c.costLB = linesLB(s, []lineElem{{gi, -1, 1}, {g2, -1, 1}, {gi, -1, 1}, {gf, fv, 2}}, 0); !math.IsNaN(c.costLB) {
				s.cfgs = append(s.cfgs, c)
			}
		}
	}
}

// lsWindows returns the windows of the level shift's two ratios: how far
// R2 (R2/R1, or Rf/R2 with the reference into the inverting node) and
// R3/R1 may sit from their targets in a design that can pass. Each is
// at least the space's window s.w and at most quantWindow. The slope's
// and the offset's relative errors move with the ratios' relative errors
// e2, e3 to first order as δg = a2·e2 + a3·e3 and δo = -(a1+a3)·e2 +
// a3·e3 (lsSensitivities, a the conductance shares, Σa = 1), so e2 =
// δg - δo and e3 = ((1-a2)·δg + a2·δo)/a3: a ratio may stray further than
// the gain limit where the two errors cancel in the slope. With the
// reference into the inverting node, δo = -e2, and R3/R1 is sized for the
// R2 chosen, so δg = (1-a)·e3 with a = R3/(R1+R3). δg is bounded by the
// gain error limits, δo by the offset limit (or the channel's room for
// it) over |Shift|; lsWindowCurvature covers the second-order terms.
func (s *space) lsWindows() (w2, w3 float64) {
	p := s.p
	lg, lo := quantWindow, quantWindow
	for _, l := range []float64{p.Limits.GainError, p.Limits.TotalGainError} {
		if l > 0 && !p.CalGain {
			lg = math.Min(lg, l)
		}
	}
	for _, l := range []float64{p.Limits.OffsetV, p.ResOffsetV} {
		if l > 0 && !p.CalOffset && p.Shift != 0 {
			lo = math.Min(lo, l/math.Abs(p.Shift))
		}
	}
	q2, q3 := p.lsRatios()
	if p.lsInv() {
		a := q3 / (1 + q3)
		w2, w3 = lo, lg/(1-a)
	} else {
		g1, g2, g3 := 1.0, 1/q2, 1/q3
		a2, a3 := g2/(g1+g2+g3), g3/(g1+g2+g3)
		w2, w3 = lg+lo, ((1-a2)*lg+a2*lo)/a3
	}
	clamp := func(w float64) float64 {
		w *= lsWindowCurvature
		if !(w < quantWindow) {
			return quantWindow
		}
		return math.Max(w, s.w)
	}
	return clamp(w2), clamp(w3)
}

// lsWindowCurvature widens the first-order windows of lsWindows for the
// curvature of the slope and offset in the ratios.
const lsWindowCurvature = 1.25

// levelShiftOptions lists the value options of a level-shift
// configuration: per R1 value, R2 and R3 the values either side of their
// targets, kept when both ratios are inside the window and every resistor
// inside its rating. With the reference into the inverting node R2 is a
// feedback-grade value either side of Rf/β, and R3's target is the
// divider a/(1-a) at the NG = 2 + Rf/R2 of that R2.
func (s *space) levelShiftOptions(c *config) {
	gi, gf := s.groups[c.ga], s.groups[c.gb]
	q2, q3 := s.p.lsRatios()
	v1, v2, v3, _ := s.p.lsVoltages()
	pw, mv := gi.grade.PowerW, gi.grade.MaxVoltageV
	inv := s.p.lsInv()
	g2, pw2, mv2 := gi, pw, mv
	if inv {
		g2, pw2, mv2 = gf, gf.grade.PowerW, gf.grade.MaxVoltageV
	}
	// near lists the values of g inside the window about t: the two
	// either side of t first (far false), then the farther ones, since
	// values are priced part by part and a farther one can be cheaper.
	type cand struct {
		j   int
		far bool
	}
	w2, w3 := s.lsWindows()
	near := func(g *group, t, w float64) []cand {
		j := sort.SearchFloat64s(g.values, t)
		out := []cand{{j - 1, false}, {j, false}}
		lo, hi := sort.SearchFloat64s(g.values, t*(1-w)), sort.SearchFloat64s(g.values, t*(1+w))
		for x := max(lo-1, 0); x <= min(hi, len(g.values)-1); x++ {
			if x != j-1 && x != j {
				out = append(out, cand{x, true})
			}
		}
		return out
	}
	rfb := gf.values[c.fbv]
	for i, r1 := range gi.values {
		if !s.ratingOK(pw, mv, r1, v1) {
			continue
		}
		base := r1
		if inv {
			base = rfb
		}
		for _, cj := range near(g2, q2*base, w2) {
			j := cj.j
			if j < 0 || j >= len(g2.values) || math.Abs(g2.values[j]/base/q2-1) > w2 || !s.ratingOK(pw2, mv2, g2.values[j], v2) {
				continue
			}
			q3 := q3
			if inv {
				q3 = lsDivider(s.p.Gain / (s.p.lsNoiseGain() + rfb/g2.values[j]))
			}
			for _, ck := range near(gi, q3*r1, w3) {
				k := ck.j
				if k < 0 || k >= len(gi.values) || math.Abs(gi.values[k]/r1/q3-1) > w3 || !s.ratingOK(pw, mv, gi.values[k], v3) {
					continue
				}
				o := option{rg: int32(i), rf: int32(j), rf2: int32(k), k0: g2.values[j] / r1, rp: gi.values[k] / r1, far: cj.far || ck.far}
				lines := [4]line{{gi, i, 1}, {g2, j, 1}, {gi, k, 1}, {gf, int(c.fbv), 2}}
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
	if s.strategy() == family.ShiftNetwork {
		s.evalLevelShift(c, o, a, m)
	} else {
		var buf grades
		s.eval(s.optGrades(c, o, &buf), o.k0, o.rp, a, m)
	}
	m.lowHead = false
	if a.a.Type == catalog.OpAmp && s.strategy() != family.TwoStage {
		m.lowHead = !(s.movedHeadroom(a, m) >= 0)
	}
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
	sl, _ := s.lsShares(&v, &ones)
	// First-order shares of each grade in the slope and in the offset:
	// Σ|sensitivity| over the positions of the grade.
	sSl, sOf := s.lsSensitivities(&v)
	fb := s.lsFeedbackGrade()
	var slIn, slFb, ofIn, ofFb float64
	for i := range sSl {
		if fb[i] {
			slFb, ofFb = slFb+math.Abs(sSl[i]), ofFb+math.Abs(sOf[i])
		} else {
			slIn, ofIn = slIn+math.Abs(sSl[i]), ofIn+math.Abs(sOf[i])
		}
	}
	am := s.amps[b.amp].a
	ng := s.p.lsNG()
	type term struct {
		name string
		v    float64
	}
	var ts []term
	inNames, fbNames := "R1, R2, R3", "Rg, Rf"
	if p.lsInv() {
		inNames, fbNames = "R1, R3", "R2, Rg, Rf"
	}
	switch limit {
	case limGain, limGainInitial:
		ts = []term{{"ratio quantization", math.Abs(sl/p.Gain - 1)}, {inNames + " tolerance", slIn * gi.Tolerance}, {fbNames + " tolerance", slFb * gf.Tolerance}}
		if limit == limGain {
			ts = append(ts, term{"resistor tempco over temperature", (slIn*gi.TCR + slFb*gf.TCR) * 1e-6 * s.dT})
		}
	case limDrift:
		ts = []term{{inNames + " tempco", slIn * gi.TCR}, {fbNames + " tempco", slFb * gf.TCR}}
	case limOffset, limOffDrift:
		b := math.Abs(p.Shift)
		ts = []term{{"the reference's tolerance and drift", b * (p.RefTol + p.RefDrift*s.dT)},
			{"resistor ratios in the offset path", b * (ofIn*gi.Tolerance + ofFb*gf.Tolerance)},
			{"amplifier offset voltage and drift", ng * (am.VosV + am.VosDriftVK*s.dT)}}
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
