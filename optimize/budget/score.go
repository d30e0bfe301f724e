package budget

import (
	"math"

	"plumb/optimize/spec"
)

// Limit indices of Score's arrays, in the order of LimitNames.
const (
	IGainError = iota
	ICMRR
	IGainDrift
	IOutputOffset
	IOffsetDrift
	INoiseRMS
	INoiseDensity
	IBandwidth
	IInputImpedance
	IHeadroom
	IPower
	IVoltage
	NumLimits
)

// LimitNames are the limit names by index.
var LimitNames = [NumLimits]string{LimitGainError, LimitCMRR, LimitGainDrift, LimitOutputOffset, LimitOffsetDrift,
	LimitNoiseRMS, LimitNoiseDensity, LimitBandwidth, LimitInputImpedance, LimitHeadroom, LimitPower, LimitVoltage}

// LimitUnits are the units of each limit's figures by index, in the words
// of Limit.Unit ("" is a bare fraction: gain error, and resistor power and
// voltage as fractions of their derated ratings).
var LimitUnits = [NumLimits]string{"", "dB", "ppm/K", "V", "V/K", "V", "V/rtHz", "Hz", "ohm", "V", "", ""}

// UnitOf returns the unit of the limit named name, as LimitUnits holds it;
// "" for a name that is not a limit.
func UnitOf(name string) string {
	for i, n := range LimitNames {
		if n == name {
			return LimitUnits[i]
		}
	}
	return ""
}

// Score is the allocation-free outcome of Evaluator.Score.
type Score struct {
	Metrics Metrics
	// Checked[i] is true when limit i applies (the spec sets it, or it is
	// one of the always-checked headroom and rating limits with known
	// figures); Pass and Margin are meaningful only then.
	Checked [NumLimits]bool
	Pass    [NumLimits]bool
	Margin  [NumLimits]float64
	AllPass bool
	// Binding is the checked limit with the least margin (-1: none).
	Binding int
}

// sensRow holds one parameter's half-range sensitivities, (q(x=+1) -
// q(x=-1))/2, of gain, common-mode gain and base output at each
// temperature point.
type sensRow struct {
	g, a, b [4]float64
}

// sensitivities solves the nominal point and every non-amplifier parameter
// at ±1 at each temperature point. pn receives the nominal points.
func (e *Evaluator) sensitivities(pn *[4]point) (int, error) {
	var buf [4]tpoint
	pts := e.tpoints(&buf)
	for ti, tp := range pts {
		if err := e.eval(e.x, tp.t, tp.life, &pn[ti]); err != nil {
			return 0, err
		}
	}
	var hi, lo point
	for j := range e.params {
		row := &e.sens[j]
		*row = sensRow{}
		if e.params[j].kind.amplifierTerm() {
			continue
		}
		for ti, tp := range pts {
			e.x[j] = 1
			err := e.eval(e.x, tp.t, tp.life, &hi)
			e.x[j] = -1
			if err == nil {
				err = e.eval(e.x, tp.t, tp.life, &lo)
			}
			e.x[j] = 0
			if err != nil {
				return 0, err
			}
			row.g[ti], row.a[ti], row.b[ti] = (hi.gain-lo.gain)/2, (hi.acm-lo.acm)/2, (hi.base-lo.base)/2
		}
	}
	return len(pts), nil
}

// quantity selectors for the sign-guided corners.
const (
	qGain = iota
	qRatio
	qCM
	qBase
	qBaseChange
	qDrift
	numQ
	// qBaseDrift, the base output's change from the drift reference point
	// (after load life), is not guided: its corners are qBaseChange's but
	// for the load-life signs, which it does not see.
	qBaseDrift = numQ
)

// sens returns the sensitivity of quantity q at temperature point ti to
// parameter j.
func (e *Evaluator) sensOf(q, ti, j int, pn *[4]point) float64 {
	r := &e.sens[j]
	switch q {
	case qGain:
		return r.g[ti]
	case qRatio:
		return r.g[ti]/pn[0].gain - pn[ti].gain*r.g[0]/(pn[0].gain*pn[0].gain)
	case qCM:
		return r.a[ti]
	case qBase:
		return r.b[ti]
	case qDrift:
		rl := e.lifeRef()
		return r.g[ti]/pn[rl].gain - pn[ti].gain*r.g[rl]/(pn[rl].gain*pn[rl].gain)
	case qBaseDrift:
		return r.b[ti] - r.b[e.lifeRef()]
	default:
		return r.b[ti] - r.b[0]
	}
}

// lifeRef is the temperature point drift is measured from: the reference
// temperature after load life (index 1) when any part has a load-life
// figure, else the calibration point.
func (e *Evaluator) lifeRef() int {
	if e.hasLife {
		return 1
	}
	return 0
}

func (w *agg) merge(a *agg) {
	if a.gainErr > w.gainErr {
		w.gainErr, w.gainSigned, w.worstT = a.gainErr, a.gainSigned, a.worstT
	}
	w.gainErrInit = math.Max(w.gainErrInit, a.gainErrInit)
	w.drift = math.Max(w.drift, a.drift)
	w.offset = math.Max(w.offset, a.offset)
	w.offsetDrift = math.Max(w.offsetDrift, a.offsetDrift)
	w.cmrr = math.Min(w.cmrr, a.cmrr)
	w.cmrrRes = math.Min(w.cmrrRes, a.cmrrRes)
}

// worstGuided finds the worst case of every metric from the corners the
// sensitivities point to: for each quantity (gain, gain ratio to Tref,
// common-mode gain, base output and its change, at each temperature point)
// the corner with every parameter at the end that raises it and the
// corner with every one at the end that lowers it. Exact at those corners;
// it is the true worst case when every metric is monotonic in each
// parameter, which the full enumeration of Evaluate checks. Gain error and
// CMRR match the enumeration; for the drift, whose tolerance x tempco cross
// terms first-order sensitivities do not see, the guided corners are
// refined by climbDrift.
func (e *Evaluator) worstGuided(npts int, pn *[4]point, w *agg) error {
	*w = agg{cmrr: math.Inf(1), cmrrRes: math.Inf(1)}
	var a agg
	if err := e.metricsAt(e.x, false, &a); err != nil {
		return err
	}
	w.merge(&a)
	// Corners already visited, as bit patterns of x (+1 set, -1 in neg),
	// when the parameters fit in 64 bits.
	var seen [2 * numQ * 4][2]uint64
	nseen := 0
	for q := 0; q < numQ; q++ {
		if q == qCM && !e.differential {
			continue
		}
		for ti := 0; ti < npts; ti++ {
			if (q == qRatio || q == qBaseChange || q == qDrift) && ti == 0 {
				continue
			}
			for _, sign := range [2]float64{1, -1} {
				moved := false
				for j := range e.params {
					if e.params[j].kind.amplifierTerm() {
						continue
					}
					s := e.sensOf(q, ti, j, pn)
					switch {
					case s > 0:
						e.x[j], moved = sign, true
					case s < 0:
						e.x[j], moved = -sign, true
					}
				}
				if moved && len(e.x) <= 64 {
					var key [2]uint64
					for j, v := range e.x {
						if v > 0 {
							key[0] |= 1 << j
						} else if v < 0 {
							key[1] |= 1 << j
						}
					}
					for _, k := range seen[:nseen] {
						if k == key {
							moved = false
							break
						}
					}
					if moved {
						seen[nseen] = key
						nseen++
					} else {
						clear(e.x)
					}
				}
				if moved {
					err := e.metricsAt(e.x, false, &a)
					clear(e.x)
					if err != nil {
						return err
					}
					w.merge(&a)
				}
			}
		}
	}
	return e.climbDrift(npts, pn, w)
}

// maxClimbPasses bounds the passes of climbDrift over the parameters; a
// pass that flips nothing ends it earlier (two passes suffice in the
// property test).
const maxClimbPasses = 4

// climbDrift raises the worst-case gain drift to the best corner a
// one-flip climb reaches at each temperature point. The drift's
// sensitivities at nominal values see the tempcos but not the tolerance x
// tempco cross terms (the drift's derivative in a tolerance is zero when
// every tempco is zero), so the sign-guided corner can leave a tolerance
// at the end that lowers the drift. From the guided corner of each sign,
// climbDrift flips one parameter at a time and keeps every flip that makes
// the drift |G(T)/G(Tr) - 1|/|T - Tref| larger, until a pass flips
// nothing: a corner no single flip improves. The package's property test
// finds it equal to the full enumeration.
func (e *Evaluator) climbDrift(npts int, pn *[4]point, w *agg) error {
	var buf [4]tpoint
	pts := e.tpoints(&buf)
	rl := pts[e.lifeRef()]
	driftAt := func(tp tpoint) (float64, error) {
		g, err := e.gainAt(e.x, tp.t, tp.life)
		if err != nil {
			return 0, err
		}
		gr, err := e.gainAt(e.x, rl.t, rl.life)
		if err != nil {
			return 0, err
		}
		return math.Abs(g/gr-1) / math.Abs(tp.t-e.s.TempRef), nil
	}
	defer clear(e.x)
	for ti := 1; ti < npts; ti++ {
		tp := pts[ti]
		if tp.t == e.s.TempRef {
			continue
		}
		for _, sign := range [2]float64{1, -1} {
			for j := range e.params {
				e.x[j] = 0
				if e.params[j].kind.amplifierTerm() {
					continue
				}
				e.x[j] = sign
				if e.sensOf(qDrift, ti, j, pn) < 0 {
					e.x[j] = -sign
				}
			}
			best, err := driftAt(tp)
			if err != nil {
				return err
			}
			for pass := 0; pass < maxClimbPasses; pass++ {
				flipped := false
				for j := range e.params {
					if e.params[j].kind.amplifierTerm() {
						continue
					}
					e.x[j] = -e.x[j]
					d, err := driftAt(tp)
					if err != nil {
						return err
					}
					if d > best {
						best, flipped = d, true
					} else {
						e.x[j] = -e.x[j]
					}
				}
				if !flipped {
					break
				}
			}
			w.drift = math.Max(w.drift, best)
		}
	}
	return nil
}

// rssAgg combines the sensitivities in quadrature on top of the nominal
// error, with the amplifier's Vos, drift, bias and offset currents and CMRR
// as further independent terms. Each parameter's tolerance stands for
// spec.Analysis.Sigmas = N standard deviations, so the root-sum-square of
// the tolerance-scaled terms is N sigma of the total; it is scaled by 3/N
// to the 3 sigma figure, the coverage of Monte Carlo's p99.865 points, so
// that the two methods report the same thing whatever N is.
func (e *Evaluator) rssAgg(npts int, pn *[4]point, w *agg) {
	gt := e.s.Gain
	k := 3 / e.s.Analysis.Sigmas
	root := func(v float64) float64 { return k * math.Sqrt(v) }
	*w = agg{cmrr: math.Inf(1), cmrrRes: math.Inf(1)}
	cal, calOff := e.s.Calibrate.Gain, e.s.Calibrate.Offset
	a := &e.amp
	var buf [4]tpoint
	pts := e.tpoints(&buf)
	for ti := 0; ti < npts; ti++ {
		p := &pn[ti]
		t := pts[ti].t
		var sg, sr, sa, sb, sbc, sd, sbd float64
		for j := range e.params {
			if e.params[j].kind.amplifierTerm() {
				continue
			}
			g, r, c, b, bc, d := e.sensOf(qGain, ti, j, pn), e.sensOf(qRatio, ti, j, pn), e.sensOf(qCM, ti, j, pn), e.sensOf(qBase, ti, j, pn), e.sensOf(qBaseChange, ti, j, pn), e.sensOf(qDrift, ti, j, pn)
			bd := e.sensOf(qBaseDrift, ti, j, pn)
			sg, sr, sa, sb, sbc, sd, sbd = sg+g*g, sr+r*r, sa+c*c, sb+b*b, sbc+bc*bc, sd+d*d, sbd+bd*bd
		}
		dt := math.Abs(t - e.s.TempRef)
		var amp2, drift2, cm2 float64
		for i := 0; i < e.nAmps(); i++ {
			tv, ts, td := p.tvos[i], p.tibp[i]+p.tibm[i], p.tibp[i]-p.tibm[i]
			d := a.VosDriftVK * dt * tv
			drift2 += d * d
			amp2 += d*d + sq(a.VosV*tv) + sq(a.IbA*ts) + sq(a.IosA/2*td)
			cm2 += sq(p.pinCM[i] * tv / e.cmrrAmp)
		}
		init := math.Abs(p.gain/gt-1) + root(sg)/math.Abs(gt)
		if ti == 0 {
			w.gainErrInit = init
		}
		ratio := math.Abs(p.gain/pn[0].gain-1) + root(sr)
		switch {
		case !cal:
			w.gainErr = math.Max(w.gainErr, init)
		case ti > 0:
			w.gainErr = math.Max(w.gainErr, ratio)
		}
		if w.gainErr == init || w.gainErr == ratio {
			w.worstT = t
		}
		off := math.Abs(p.base-e.target) + root(sb+amp2)
		change := math.Abs(p.base-pn[0].base) + root(sbc+drift2)
		drift := math.Abs(p.gain/pn[e.lifeRef()].gain-1) + root(sd)
		// Offset drift, like gain drift, from the point after load life.
		offDrift := math.Abs(p.base-pn[e.lifeRef()].base) + root(sbd+drift2)
		if calOff {
			if ti > 0 {
				w.offset = math.Max(w.offset, change)
			}
		} else {
			w.offset = math.Max(w.offset, off)
		}
		if dt > 0 {
			w.drift = math.Max(w.drift, drift/dt)
			w.offsetDrift = math.Max(w.offsetDrift, offDrift/dt)
		}
		if e.differential {
			res := math.Min(capLin, math.Abs(p.adm)/(math.Abs(p.acm)+root(sa)+tinyTransfer))
			tot := math.Min(capLin, math.Abs(p.adm)/(math.Abs(p.acm)+root(sa+cm2)+tinyTransfer))
			w.cmrr, w.cmrrRes = math.Min(w.cmrr, tot), math.Min(w.cmrrRes, res)
		}
	}
}

func sq(x float64) float64 { return x * x }

// Score evaluates candidate c under the spec's method without allocating
// (after the first candidate of a size) and fills out. Worst case uses the
// sign-guided corners (see worstGuided); RSS and Monte Carlo use the
// root-sum-square combination (a Monte Carlo run per candidate is left to
// Evaluate).
func (e *Evaluator) Score(c *Candidate, out *Score) error {
	if err := e.SetCandidate(c); err != nil {
		return err
	}
	*out = Score{Binding: -1}
	var pn [4]point
	npts, err := e.sensitivities(&pn)
	if err != nil {
		return err
	}
	var w agg
	if e.s.Analysis.Method == spec.WorstCase {
		err = e.worstGuided(npts, &pn, &w)
	} else {
		e.rssAgg(npts, &pn, &w)
	}
	if err != nil {
		return err
	}
	if err := e.fillMetrics(&w, &pn[0], &out.Metrics); err != nil {
		return err
	}
	e.judge(&out.Metrics, out)
	return nil
}

// Corner is one exact evaluation at parameter point x (one value in [-1,
// 1] per parameter of the loaded candidate, see NumParams) and temperature
// t: it factors the stage once and solves gain, common-mode gain, the
// reference-driven base output and each amplifier's Vos and bias-current
// transfers, and returns gain, CMRR (dB, worst amplifier sign) and the
// worst output offset at that point. It does not allocate.
func (e *Evaluator) Corner(x []float64, t float64) (gain, cmrrDB, offsetV float64, err error) {
	var p point
	if err := e.eval(x, t, true, &p); err != nil {
		return 0, 0, 0, err
	}
	c, _ := e.cmrrAt(x, &p, false)
	return p.gain, 20 * math.Log10(c), math.Abs(p.base-e.target) + e.ampOffset(x, &p, t, false, false), nil
}

// NumParams is the number of varying parameters of the loaded candidate.
func (e *Evaluator) NumParams() int { return len(e.params) }

// fillMetrics turns an aggregate and the nominal point into Metrics.
func (e *Evaluator) fillMetrics(w *agg, p0 *point, m *Metrics) error {
	if err := e.nominal(m, nil); err != nil {
		return err
	}
	m.Gain, m.GainTarget = p0.gain, e.s.Gain
	m.GainNominalError = p0.gain/e.s.Gain - 1
	m.GainError, m.GainErrorInitial = w.gainErr, w.gainErrInit
	m.DriftPPMPerK = w.drift * 1e6
	m.OutputOffsetV, m.OffsetDriftVPerK = w.offset, w.offsetDrift
	if e.differential {
		m.CMRRdB, m.CMRRResistorsdB = 20*math.Log10(w.cmrr), 20*math.Log10(w.cmrrRes)
		m.CommonModeErrorV = e.outputMove(p0, 0, 0, w.cmrr)
	}
	e.outputHeadroom(w, p0, m)
	return nil
}

// judge checks every applicable limit and fills margins: limit/value for a
// maximum, value/limit for a minimum (ratios of linear values for dB), so
// 1 sits on the limit and above 1 passes. Headroom's margin is 1 +
// headroom/NearPinV (0.1 V of headroom gives 2).
func (e *Evaluator) judge(m *Metrics, out *Score) {
	l := &e.s.Limits
	set := func(i int, value, limit float64, max bool) {
		out.Checked[i] = true
		var margin float64
		switch {
		case max && value <= 0:
			margin = math.Inf(1)
		case max:
			margin = limit / value
		default:
			margin = value / limit
		}
		out.Margin[i], out.Pass[i] = margin, margin >= 1
	}
	if l.GainError > 0 {
		set(IGainError, m.GainError, l.GainError, true)
	}
	if l.CMRRdB > 0 && e.differential {
		out.Checked[ICMRR] = true
		out.Margin[ICMRR] = math.Pow(10, (m.CMRRdB-l.CMRRdB)/20)
		out.Pass[ICMRR] = m.CMRRdB >= l.CMRRdB
	}
	if l.GainDrift > 0 {
		set(IGainDrift, m.DriftPPMPerK*1e-6, l.GainDrift, true)
	}
	if l.OutputOffsetV > 0 {
		set(IOutputOffset, m.OutputOffsetV, l.OutputOffsetV, true)
	}
	if l.OffsetDriftVK > 0 {
		set(IOffsetDrift, m.OffsetDriftVPerK, l.OffsetDriftVK, true)
	}
	if l.NoiseRMSV > 0 && e.noiseBandKnown(m) {
		set(INoiseRMS, m.NoiseRMSV, l.NoiseRMSV, true)
	}
	if l.NoiseDensity > 0 {
		set(INoiseDensity, m.NoiseDensity, l.NoiseDensity, true)
	}
	if l.BandwidthHz > 0 && m.BandwidthHz > 0 {
		set(IBandwidth, m.BandwidthHz, l.BandwidthHz, false)
	}
	if l.InputImpedance > 0 && m.InputImpedanceOhm > 0 {
		set(IInputImpedance, m.InputImpedanceOhm, l.InputImpedance, false)
	}
	if e.matched || len(e.amps) > 0 {
		out.Checked[IHeadroom] = true
		out.Margin[IHeadroom] = 1 + m.HeadroomV/NearPinV
		out.Pass[IHeadroom] = m.HeadroomV >= 0
	}
	if m.PowerRatio > 0 {
		set(IPower, m.PowerRatio, 1, true)
	}
	if m.VoltageRatio > 0 {
		set(IVoltage, m.VoltageRatio, 1, true)
	}
	out.AllPass = true
	for i := 0; i < NumLimits; i++ {
		if !out.Checked[i] {
			continue
		}
		out.AllPass = out.AllPass && out.Pass[i]
		if out.Binding < 0 || out.Margin[i] < out.Margin[out.Binding] {
			out.Binding = i
		}
	}
}
