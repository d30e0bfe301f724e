package budget

import (
	"context"
	"errors"
	"fmt"
	"math"
	"plumb/optimize/assume"
	"slices"
	"sort"
	"strings"

	"plumb/catalog/units"
	"plumb/optimize/spec"
)

// ErrUnresolved is returned by Evaluate for a design with catalog parts
// whose figures have not been filled in (see spec.Design.Resolve).
var ErrUnresolved = errors.New("budget: design has parts without figures")

// MaxEnumerate is the largest number of varying parameters whose 2^n
// corners Evaluate enumerates for the worst case; above it the
// sensitivity-guided corners are used and the result says so.
const MaxEnumerate = 16

// monotonicSlack is the relative amount by which an interior point may
// exceed the worst corner before the metric is reported non-monotonic.
const monotonicSlack = 1e-9

// CandidateOf builds the evaluator's candidate from a resolved design.
func CandidateOf(e *Evaluator, d *spec.Design) (*Candidate, error) {
	if u := d.Unresolved(); len(u) > 0 {
		return nil, fmt.Errorf("%w: %s", ErrUnresolved, strings.Join(u, ", "))
	}
	c := &Candidate{MatchedGain: d.Amplifier.Gain}
	if d.Amplifier.Amp.Part != "" || d.Amplifier.Part != "" {
		amp := d.Amplifier.Amp
		c.Amp = &amp
	}
	if e.fam.Search.Strappings {
		figs, err := StrappedFigs(&d.Amplifier.Amp, e.positions)
		if err != nil {
			return nil, fmt.Errorf("%w: design %s: %w", ErrCandidate, d.SourceFile, err)
		}
		c.Figs = figs
		return c, nil
	}
	groups := map[string]int{}
	for _, name := range e.positions {
		pos := d.Position(name)
		if pos == nil {
			return nil, fmt.Errorf("%w: design %s: positions.%s: missing; family %s needs %s", ErrCandidate, d.SourceFile, name, e.family, strings.Join(e.positions, ", "))
		}
		f := FigOf(pos.Elements[0], groups)
		if len(pos.Elements) == 2 {
			f = FoldPair(pos.Pair, f, FigOf(pos.Elements[1], groups))
		}
		c.Figs = append(c.Figs, f)
	}
	for _, p := range d.Positions {
		if !slices.Contains(e.positions, p.Name) {
			return nil, fmt.Errorf("%w: design %s: positions.%s: family %s has no such position; its positions are %s", ErrCandidate, d.SourceFile, p.Name, e.family, strings.Join(e.positions, ", "))
		}
	}
	return c, nil
}

// Evaluate computes the error budget of a resolved design against s under
// the spec's method: worst case by enumerating every tolerance corner
// (2^n over the parameters that vary, at each temperature point, with the
// amplifier's linear terms at their worst sign), RSS from the solved
// sensitivities, or Monte Carlo.
func Evaluate(s *spec.Spec, d *spec.Design) (*Result, error) {
	return EvaluateContext(context.Background(), s, d, nil)
}

// EvaluateContext is Evaluate whose Monte Carlo run stops when ctx is done
// and reports its trials to progress (nil: no report); see
// Evaluator.Watch.
func EvaluateContext(ctx context.Context, s *spec.Spec, d *spec.Design, progress func(done, total int)) (*Result, error) {
	ref, err := spec.ReferenceFigures(s, d)
	if err != nil {
		return nil, err
	}
	if ref != s.Reference {
		// The reference the search picked for this design (reference.part:
		// auto): its figures are the design's part's.
		picked := *s
		picked.Reference = ref
		s = &picked
	}
	e, err := NewEvaluator(s, d.Family, d.Options)
	if err != nil {
		return nil, err
	}
	e.Watch(ctx, progress)
	c, err := CandidateOf(e, d)
	if err != nil {
		return nil, err
	}
	res, err := e.Evaluate(c)
	if err != nil {
		return nil, err
	}
	if d.Reference != nil && s.Reference != nil {
		res.Design = append(res.Design, Part{Position: "REF", Part: d.Reference.Part,
			Grade: fmt.Sprintf("reference %s %s %s", units.Format(s.Reference.V, "V"), units.FormatPercent(s.Reference.Tolerance), units.FormatPPM(1e6*s.Reference.Drift))})
	}
	as := d.Assumptions
	if e.fam.Integrated() && (s.SourceOhm > 0 || e.refOhm() > 0) && c.Amp != nil {
		// A resistance outside the part in series with its elements makes
		// the gain depend on their absolute values, and on the tempco (and
		// for a part without its network, the tolerance) the catalog does
		// not give.
		_, a := assume.StrappedTCR(c.Amp.Part)
		as = append(slices.Clone(as), a)
		if e.fam.Datasheet() {
			_, more := assume.MatchedAbsTolerance(c.Amp)
			as = append(as, more...)
		}
	}
	if s.ADC != nil {
		adc, err := e.channel(ctx, c, res, progress)
		if err != nil {
			return nil, err
		}
		as = append(slices.Clone(as), adc...)
		if err := CheckFinite("channel budget of "+e.family+" design", res); err != nil {
			return nil, err
		}
	}
	applyAssumptions(res, s, as)
	return res, nil
}

// applyAssumptions lists on the result the catalog figures it rests on
// that nobody gave (taken at their defaults by package assume), and under
// assumptions: strict refuses to call met a limit that depends on one.
func applyAssumptions(res *Result, s *spec.Spec, as []assume.Assumption) {
	if len(as) == 0 {
		return
	}
	res.Assumptions = as
	res.Notes = append(res.Notes, assume.Notes(as)...)
	if s.Assumptions != spec.AssumeStrict {
		return
	}
	for i := range res.Limits {
		l := &res.Limits[i]
		on := assume.Touching(as, l.Name)
		if !l.Pass || len(on) == 0 {
			continue
		}
		var what []string
		for _, a := range on {
			what = append(what, a.Part+" "+a.Figure)
		}
		l.Pass = false
		l.MarginText = "not proven: rests on assumed figures"
		res.Pass = false
		res.Notes = append(res.Notes, fmt.Sprintf("assumptions: strict: %s is not called met, it rests on figures the catalog does not give (%s); add them to the catalog", l.Name, strings.Join(what, ", ")))
	}
}

// Evaluate computes the full budget of candidate c (see the package
// function Evaluate). It allocates and is meant for reports, not the
// search's inner loop.
func (e *Evaluator) Evaluate(c *Candidate) (*Result, error) {
	if err := e.SetCandidate(c); err != nil {
		return nil, err
	}
	s := e.s
	res := &Result{Spec: s.Name, Family: e.family, Method: s.Analysis.Method, Cautions: []string{}, Notes: []string{}}
	res.Design = e.summary()
	var pn [4]point
	npts, err := e.sensitivities(&pn)
	if err != nil {
		return nil, err
	}
	var w agg
	switch s.Analysis.Method {
	case spec.WorstCase:
		if err := e.worstEnumerated(npts, &pn, &w, res); err != nil {
			return nil, err
		}
	case spec.RSS:
		e.rssAgg(npts, &pn, &w)
		res.Notes = append(res.Notes, fmt.Sprintf("RSS: each tolerance is taken as %g sigma; figures are the nominal error plus 3 sigma of the root-sum-square of the solved sensitivities (the coverage of Monte Carlo's p99.865 points); contributors are listed at their tolerances", s.Analysis.Sigmas))
	case spec.MonteCarlo:
		mc, err := e.MonteCarlo(s.Analysis.Trials, s.Analysis.Seed, true)
		if err != nil {
			return nil, err
		}
		res.MonteCarlo = mc
		w = mcAgg(mc, e.differential)
		dist := fmt.Sprintf("normal, tolerance = %g sigma, truncated at the tolerance", s.Analysis.Sigmas)
		if s.Analysis.Distribution == spec.Uniform {
			dist = "uniform over each tolerance"
		}
		res.Notes = append(res.Notes, fmt.Sprintf("Monte Carlo: %d trials, seed %d, %s; figures are the p99.865 points (p0.135 for CMRR)",
			mc.Trials, mc.Seed, dist))
	}
	if err := e.fillMetrics(&w, &pn[0], &res.Metrics); err != nil {
		return nil, err
	}
	if s.Analysis.Method == spec.WorstCase && s.Limits.InputImpedance > 0 {
		// Worst case is worst case for every limit, the input impedance too.
		z, err := e.worstInputImpedance(res.Metrics.InputImpedanceOhm)
		if err != nil {
			return nil, err
		}
		res.Metrics.InputImpedanceOhm = z
	}
	var sc Score
	sc.Binding = -1
	e.judge(&res.Metrics, &sc)
	e.limits(&sc, npts, &pn, res)
	res.Pass = sc.AllPass
	if mc := res.MonteCarlo; mc != nil && mc.YieldTarget > 0 && mc.Yield < mc.YieldTarget {
		res.Pass = false
		res.Notes = append(res.Notes, fmt.Sprintf("Monte Carlo yield %.2f %% is below the target %.2f %%", 100*mc.Yield, 100*mc.YieldTarget))
	}
	e.cautions(res)
	e.commonNotes(res)
	if err := CheckFinite("budget of "+e.family+" design", res); err != nil {
		return nil, err
	}
	return res, nil
}

// movesGain reports whether parameter j changes the gain at any of the
// npts temperature points of the last sensitivities.
func (e *Evaluator) movesGain(j, npts int) bool {
	for ti := 0; ti < npts; ti++ {
		if e.sens[j].g[ti] != 0 {
			return true
		}
	}
	return false
}

// mcAgg takes the ±3 sigma points of the Monte Carlo distributions as the
// method's figures.
func mcAgg(mc *MCSummary, diff bool) agg {
	g := mc.Percentiles[MetricGainError]
	w := agg{
		gainErr:     math.Max(math.Abs(g.P0135), math.Abs(g.P99865)),
		drift:       mc.Percentiles[MetricDrift].P99865 * 1e-6,
		offset:      mc.Percentiles[MetricOffset].P99865,
		offsetDrift: mc.Percentiles[MetricOffsetDrift].P99865,
		cmrr:        1, cmrrRes: 1,
	}
	gi := mc.Percentiles[MetricGainErrorInitial]
	w.gainErrInit = math.Max(math.Abs(gi.P0135), math.Abs(gi.P99865))
	if diff {
		w.cmrr = math.Pow(10, mc.Percentiles[MetricCMRR].P0135/20)
		w.cmrrRes = math.Pow(10, mc.Percentiles[MetricCMRRResistors].P0135/20)
	}
	return w
}

// worstEnumerated visits every corner of the non-amplifier parameters when
// there are at most MaxEnumerate of them, else the sensitivity-guided
// corners. It names the worst gain-error corner and checks monotonicity
// there: a metric that gets worse when one parameter moves from its end to
// the middle of its range is not monotonic in it, and the corner worst
// case may then miss an interior worst point.
func (e *Evaluator) worstEnumerated(npts int, pn *[4]point, w *agg, res *Result) error {
	var vary []int
	for j := range e.params {
		if !e.params[j].kind.amplifierTerm() {
			vary = append(vary, j)
		}
	}
	if len(vary) > MaxEnumerate {
		res.Notes = append(res.Notes, fmt.Sprintf("worst case: %d varying parameters, more than %d, so the corners were chosen from the signs of the solved sensitivities (exact at those corners; assumes each metric is monotonic in each parameter)", len(vary), MaxEnumerate))
		return e.worstGuided(npts, pn, w)
	}
	*w = agg{cmrr: math.Inf(1), cmrrRes: math.Inf(1)}
	best := make([]float64, len(e.x))
	var a agg
	for mask := 0; mask < 1<<len(vary); mask++ {
		for b, j := range vary {
			e.x[j] = -1
			if mask&(1<<b) != 0 {
				e.x[j] = 1
			}
		}
		if err := e.metricsAt(e.x, false, &a); err != nil {
			clear(e.x)
			return err
		}
		if a.gainErr > w.gainErr || mask == 0 {
			copy(best, e.x)
		}
		w.merge(&a)
	}
	clear(e.x)
	res.Notes = append(res.Notes, fmt.Sprintf("worst case: all %d corners of %d varying parameters enumerated at %d temperature points; amplifier offset, bias-current and CMRR terms added at their worst sign", 1<<len(vary), len(vary), npts))
	var corner []string
	for _, j := range vary {
		if !e.movesGain(j, npts) {
			continue // a reference term: it does not touch the gain
		}
		sign := "+"
		if best[j] < 0 {
			sign = "-"
		}
		corner = append(corner, e.paramName(j)+" "+sign)
	}
	res.WorstCorner = fmt.Sprintf("%s at %g C", strings.Join(corner, ", "), w.worstT)
	// Monotonicity: move each parameter of the worst corner to the middle;
	// a metric that gets worse there is not monotonic in that parameter.
	nonMono := map[string][]string{}
	copy(e.x, best)
	for _, j := range vary {
		e.x[j] = 0
		if err := e.metricsAt(e.x, false, &a); err != nil {
			clear(e.x)
			return err
		}
		e.x[j] = best[j]
		worse := func(v, worst float64) bool { return v > worst*(1+monotonicSlack)+1e-15 }
		for name, bad := range map[string]bool{
			"gain error": worse(a.gainErr, w.gainErr), "gain drift": worse(a.drift, w.drift),
			"output offset": worse(a.offset, w.offset), "CMRR": a.cmrr < w.cmrr*(1-monotonicSlack),
		} {
			if bad {
				nonMono[name] = append(nonMono[name], e.paramName(j))
			}
		}
	}
	clear(e.x)
	names := make([]string, 0, len(nonMono))
	for name := range nonMono {
		names = append(names, name)
	}
	sort.Strings(names)
	for _, name := range names {
		res.Notes = append(res.Notes, name+" is not monotonic in "+strings.Join(nonMono[name], ", ")+
			": a mid-range value is worse than the worst corner of that metric; treat the corner figure as a lower bound")
	}
	if len(names) == 0 && len(vary) > 0 {
		res.Notes = append(res.Notes, "monotonicity checked at the worst gain-error corner "+res.WorstCorner+": moving any parameter to mid-range made no metric worse than its worst corner")
	}
	return nil
}

// summary lists the design's parts.
func (e *Evaluator) summary() []Part {
	var out []Part
	for k, f := range e.c.Figs {
		g := fmt.Sprintf("%.3g%% %.3gppm/K", 100*f.Tolerance, 1e6*f.TCR)
		if f.Network != 0 {
			g += fmt.Sprintf(", network ratio %.3g%% tracking %.3gppm/K", 100*f.RatioTolerance, 1e6*f.TCRTracking)
		}
		out = append(out, Part{Position: e.positions[k], Part: f.Label, Ohm: f.Ohm, Grade: g})
	}
	if e.c.Amp != nil {
		name := "A1"
		if e.matched {
			name = fmt.Sprintf("amplifier (gain %g)", e.c.MatchedGain)
		}
		if st, ok := e.opts.Part.(fmt.Stringer); ok {
			name = "A1 (strapped " + st.String() + ")"
		}
		out = append(out, Part{Position: name, Part: e.c.Amp.Part, Grade: string(e.c.Amp.Type)})
	}
	return out
}

// limits fills Result.Limits with values, margins and contributors.
func (e *Evaluator) limits(sc *Score, npts int, pn *[4]point, res *Result) {
	m := &res.Metrics
	l := &e.s.Limits
	values := [NumLimits]float64{m.GainError, m.CMRRdB, m.DriftPPMPerK, m.OutputOffsetV, m.OffsetDriftVPerK, m.NoiseRMSV,
		m.NoiseDensity, m.BandwidthHz, m.InputImpedanceOhm, m.HeadroomV, m.PowerRatio, m.VoltageRatio}
	lims := [NumLimits]float64{l.GainError, l.CMRRdB, l.GainDrift * 1e6, l.OutputOffsetV, l.OffsetDriftVK, l.NoiseRMSV,
		l.NoiseDensity, l.BandwidthHz, l.InputImpedance, 0, 1, 1}
	isMax := [NumLimits]bool{true, false, true, true, true, true, true, false, false, false, true, true}
	contrib := e.contributors(npts, pn)
	if e.s.Analysis.Method == spec.WorstCase {
		contrib[IGainError] = e.withCurvature(contrib[IGainError], m.GainError)
		contrib[IGainDrift] = e.withCurvature(contrib[IGainDrift], m.DriftPPMPerK)
		if e.differential {
			contrib[ICMRR] = e.withCurvature(contrib[ICMRR], math.Pow(10, -m.CMRRdB/20))
		}
	}
	for i := 0; i < NumLimits; i++ {
		if !sc.Checked[i] {
			continue
		}
		lim := Limit{Name: LimitNames[i], Value: values[i], Limit: lims[i], Max: isMax[i], Margin: finite(sc.Margin[i]), Pass: sc.Pass[i], Unit: LimitUnits[i]}
		lim.MarginText = marginText(lim, sc.Margin[i])
		lim.Contributors = contrib[i]
		res.Limits = append(res.Limits, lim)
	}
	if sc.Binding >= 0 {
		res.Binding = LimitNames[sc.Binding]
	}
	if e.s.Limits.CMRRdB > 0 && !e.differential {
		res.Notes = append(res.Notes, "CMRR limit not checked: a single-ended stage has no common-mode input")
	}
}

// curvatureShare is the share of a worst-case total by which the sum of
// its first-order contributors may fall short before the rest is listed
// as a contributor of its own: below it the difference does not show in
// the four digits a figure is printed with, nor in a share.
const curvatureShare = 1e-3

// CurvatureTerm names the part of a worst-case total that its first-order
// contributors do not hold: the figures are each the change of the metric
// over one parameter's range with the others nominal, while the total is
// the exact solve at the worst corner, where terms compound (a source
// resistance in series with an element of loose absolute tolerance, a
// tolerance times a tempco).
const CurvatureTerm = "interaction of the terms at the worst corner"

// withCurvature adds to the worst-case contributors c of a metric whose
// total is total the part of it they do not hold (see CurvatureTerm), so
// that the listed terms add up to the total; c is returned as it is when
// they already do.
func (e *Evaluator) withCurvature(c []Contribution, total float64) []Contribution {
	if len(c) == 0 || !(total > 0) || math.IsInf(total, 0) {
		return c
	}
	sum := 0.0
	for _, x := range c {
		sum += x.Value
	}
	if rest := total - sum; rest > curvatureShare*total {
		c = e.sorted(append(c, Contribution{Name: CurvatureTerm, Value: rest}))
	}
	return c
}

// MaxMargin is the margin written for a limit with no error at all (a
// figure of zero against a maximum): large, but finite, so that every
// output can carry it.
const MaxMargin = 1e12

func finite(v float64) float64 {
	if math.IsInf(v, 1) || v > MaxMargin {
		return MaxMargin
	}
	return v
}

func marginText(l Limit, margin float64) string {
	switch {
	case l.Name == LimitHeadroom, l.Name == LimitADCRange:
		return fmt.Sprintf("%+.3g V", l.Value)
	case l.Unit == "dB":
		return fmt.Sprintf("%+.1f dB", l.Value-l.Limit)
	case math.IsInf(margin, 1) || margin > MaxMargin:
		return "no error"
	case margin >= 1.005:
		return fmt.Sprintf("%.2fx inside the limit", margin)
	case margin >= 1:
		return fmt.Sprintf("%.4fx inside the limit", margin) // on the limit: enough digits to see which side
	case margin > 1/1.005:
		return fmt.Sprintf("fails by %.4fx", 1/margin)
	default:
		return fmt.Sprintf("fails by %.2fx", 1/margin)
	}
}

// contributors builds each limit's budget from the solved sensitivities at
// the temperature point where the metric is worst, sorted by size.
func (e *Evaluator) contributors(npts int, pn *[4]point) [NumLimits][]Contribution {
	var out [NumLimits][]Contribution
	gt := math.Abs(e.s.Gain)
	var buf [4]tpoint
	pts := e.tpoints(&buf)
	worstTi := func(f func(ti int) float64) int {
		best, bi := -1.0, 0
		for ti := 0; ti < npts; ti++ {
			if v := f(ti); v > best {
				best, bi = v, ti
			}
		}
		return bi
	}
	cal, calOff := e.s.Calibrate.Gain, e.s.Calibrate.Offset
	// Gain error.
	tiG := worstTi(func(ti int) float64 {
		if cal {
			if ti == 0 {
				return -1
			}
			return e.sumAbs(qRatio, ti, pn)
		}
		return e.sumAbs(qGain, ti, pn) / gt
	})
	var gl []Contribution
	for j := range e.params {
		if e.params[j].kind.amplifierTerm() {
			continue
		}
		v := math.Abs(e.sensOf(qGain, tiG, j, pn)) / gt
		if cal {
			v = math.Abs(e.sensOf(qRatio, tiG, j, pn))
		}
		gl = append(gl, Contribution{Name: e.paramName(j), Value: v})
	}
	if !cal && !e.matched {
		ideal := e.idealGain()
		var with []string
		if e.shunt >= 0 {
			with = append(with, "the shunt in series with R3")
		}
		if e.s.SourceOhm > 0 {
			with = append(with, "source")
		}
		if e.s.LoadOhm > 0 {
			with = append(with, "load")
		}
		name := "ratio quantization"
		if len(with) > 0 {
			name = "nominal ratio with " + strings.Join(with, ", ")
		}
		gl = append(gl, Contribution{Name: name, Value: math.Abs(ideal/e.s.Gain - 1)})
		if len(e.amps) > 0 {
			name := e.net.OpAmps[e.amps[0]].Name + " open-loop gain"
			if len(e.amps) > 1 {
				name = "the amplifiers' open-loop gain"
			}
			gl = append(gl, Contribution{Name: name, Value: math.Abs(pn[0].gain/ideal - 1)})
		}
	}
	if !cal && e.matched {
		// The part's gain against the spec's, with the source and
		// reference resistances in series with its resistors.
		var with []string
		if e.s.SourceOhm > 0 {
			with = append(with, "source")
		}
		if e.refOhm() > 0 {
			with = append(with, "reference")
		}
		name := "nominal gain of the part"
		if len(with) > 0 {
			name = "nominal gain with " + strings.Join(with, ", ")
		}
		gl = append(gl, Contribution{Name: name, Value: math.Abs(pn[0].gain/e.s.Gain - 1)})
	}
	out[IGainError] = e.sorted(gl)
	// CMRR as common-mode gain over differential gain (1/CMRR), at the
	// temperature point where it is worst.
	if e.differential {
		var cl []Contribution
		tiC := worstTi(func(ti int) float64 { return e.sumAbs(qCM, ti, pn) + math.Abs(pn[ti].acm) })
		p := &pn[tiC]
		adm := math.Abs(p.adm)
		for j := range e.params {
			if !e.params[j].kind.amplifierTerm() {
				cl = append(cl, Contribution{Name: e.paramName(j), Value: math.Abs(e.sensOf(qCM, tiC, j, pn)) / adm})
			}
		}
		if math.Abs(p.acm) > 0 {
			cl = append(cl, Contribution{Name: "nominal ratio mismatch", Value: math.Abs(p.acm) / adm})
		}
		for i := 0; i < e.nAmps(); i++ {
			cl = append(cl, Contribution{Name: e.ampName(i) + " CMRR", Value: math.Abs(p.pinCM[i]*p.tvos[i]) / e.cmrrAmp / adm})
		}
		out[ICMRR] = e.sorted(cl)
	}
	// Gain drift, ppm/K.
	tiD := worstTi(func(ti int) float64 {
		if ti == 0 || pts[ti].t == e.s.TempRef {
			return -1
		}
		return e.sumAbs(qDrift, ti, pn) / math.Abs(pts[ti].t-e.s.TempRef)
	})
	if dt := math.Abs(pts[tiD].t - e.s.TempRef); dt > 0 {
		var dl []Contribution
		for j := range e.params {
			if !e.params[j].kind.amplifierTerm() {
				if v := math.Abs(e.sensOf(qDrift, tiD, j, pn)) / dt * 1e6; v > 0 {
					dl = append(dl, Contribution{Name: e.paramName(j), Value: v})
				}
			}
		}
		out[IGainDrift] = e.sorted(dl)
	}
	// Offset and offset drift.
	// The worst temperature points of the offset and of its drift, each
	// with the amplifier's terms at their worst sign.
	ampOff := func(ti int, driftOnly bool) float64 { return e.ampOffset(nil, &pn[ti], pts[ti].t, false, driftOnly) }
	tiO := worstTi(func(ti int) float64 {
		if calOff {
			if ti == 0 {
				return -1
			}
			return math.Abs(pn[ti].base-pn[0].base) + e.sumAbs(qBaseChange, ti, pn) + ampOff(ti, true)
		}
		return math.Abs(pn[ti].base-e.target) + e.sumAbs(qBase, ti, pn) + ampOff(ti, false)
	})
	rl := e.lifeRef()
	tiOD := worstTi(func(ti int) float64 {
		dt := math.Abs(pts[ti].t - e.s.TempRef)
		if dt == 0 {
			return -1
		}
		return (math.Abs(pn[ti].base-pn[rl].base) + e.sumAbs(qBaseDrift, ti, pn) + ampOff(ti, true)) / dt
	})
	var ol, odl []Contribution
	dtO := math.Abs(pts[tiO].t - e.s.TempRef)
	dtD := math.Abs(pts[tiOD].t - e.s.TempRef)
	for j := range e.params {
		if e.params[j].kind.amplifierTerm() {
			continue
		}
		q := qBase
		if calOff {
			q = qBaseChange
		}
		ol = append(ol, Contribution{Name: e.paramName(j), Value: math.Abs(e.sensOf(q, tiO, j, pn))})
		if dtD > 0 {
			odl = append(odl, Contribution{Name: e.paramName(j), Value: math.Abs(e.sensOf(qBaseDrift, tiOD, j, pn)) / dtD})
		}
	}
	if !calOff && math.Abs(pn[0].base-e.target) > 0 {
		var from []string
		if e.refSrc >= 0 && e.s.Reference != nil {
			from = append(from, "reference path")
		}
		if e.leak >= 0 && e.s.LeakageA != 0 {
			from = append(from, "load leakage")
		}
		if len(from) == 0 {
			from = append(from, "nominal values")
		}
		ol = append(ol, Contribution{Name: "nominal offset (" + strings.Join(from, ", ") + ")", Value: math.Abs(pn[0].base - e.target)})
	}
	a := &e.amp
	for i := 0; i < e.nAmps(); i++ {
		p := &pn[tiO]
		name := e.ampName(i)
		if !calOff {
			ol = append(ol,
				Contribution{Name: name + " Vos", Value: a.VosV * math.Abs(p.tvos[i])},
				Contribution{Name: name + " Ib", Value: a.IbA * math.Abs(p.tibp[i]+p.tibm[i])},
				Contribution{Name: name + " Ios", Value: a.IosA / 2 * math.Abs(p.tibp[i]-p.tibm[i])})
		}
		ol = append(ol, Contribution{Name: name + " Vos drift", Value: a.VosDriftVK * dtO * math.Abs(p.tvos[i])})
		if dtD > 0 {
			odl = append(odl, Contribution{Name: name + " Vos drift", Value: a.VosDriftVK * math.Abs(pn[tiOD].tvos[i])})
		}
	}
	out[IOutputOffset], out[IOffsetDrift] = e.sorted(ol), e.sorted(odl)
	// Noise.
	var m Metrics
	var terms []noiseTerm
	if err := e.nominal(&m, &terms); err == nil {
		var nl []Contribution
		for _, t := range terms {
			name := "internal resistors thermal noise"
			switch {
			case t.res >= 0:
				name = e.net.Resistors[t.res].Name + " thermal noise"
			case t.kind == 1:
				name = e.ampName(t.amp) + " voltage noise"
			case t.kind == 2:
				name = e.ampName(t.amp) + " current noise"
			}
			nl = append(nl, Contribution{Name: name, Value: t.v})
		}
		out[INoiseDensity] = e.sortedSquares(nl)
		rms := make([]Contribution, len(out[INoiseDensity]))
		for i, c := range out[INoiseDensity] {
			rms[i] = Contribution{Name: c.Name, Value: c.Value * math.Sqrt(NoiseBandwidthFactor*m.BandwidthHz), Share: c.Share}
		}
		out[INoiseRMS] = rms
	}
	return out
}

func (e *Evaluator) ampName(i int) string {
	if e.matched {
		return "amplifier"
	}
	return e.net.OpAmps[e.amps[i]].Name
}

// sumAbs is the linear worst-case sum of |sensitivity| of quantity q at ti.
func (e *Evaluator) sumAbs(q, ti int, pn *[4]point) float64 {
	s := 0.0
	for j := range e.params {
		if !e.params[j].kind.amplifierTerm() {
			s += math.Abs(e.sensOf(q, ti, j, pn))
		}
	}
	return s
}

// idealGain is the nominal gain with ideal amplifiers (infinite open-loop
// gain): what the resistor ratios alone give.
func (e *Evaluator) idealGain() float64 {
	aol := e.aol
	e.aol = openLoopIdeal
	var p point
	err := e.eval(e.x, e.s.TempRef, false, &p)
	e.aol = aol
	if err != nil {
		return math.NaN()
	}
	return p.gain
}

// sorted drops zero terms, sorts by size and sets shares: |v|/Σ|v| for
// worst case, v²/Σv² for the statistical methods.
func (e *Evaluator) sorted(c []Contribution) []Contribution {
	if e.s.Analysis.Method != spec.WorstCase {
		return e.sortedSquares(c)
	}
	c = dropNegligible(c)
	sum := 0.0
	for _, x := range c {
		sum += x.Value
	}
	for i := range c {
		c[i].Share = c[i].Value / sum
	}
	sort.SliceStable(c, func(i, j int) bool { return c[i].Value > c[j].Value })
	return c
}

func (e *Evaluator) sortedSquares(c []Contribution) []Contribution {
	c = dropNegligible(c)
	sum := 0.0
	for _, x := range c {
		sum += x.Value * x.Value
	}
	for i := range c {
		c[i].Share = c[i].Value * c[i].Value / sum
	}
	sort.SliceStable(c, func(i, j int) bool { return c[i].Value > c[j].Value })
	return c
}

// negligible is the share of the largest term below which a contribution
// is rounding residue of the finite differences and is dropped.
const negligible = 1e-9

func dropNegligible(c []Contribution) []Contribution {
	top := 0.0
	for _, x := range c {
		top = math.Max(top, x.Value)
	}
	return slices.DeleteFunc(c, func(x Contribution) bool { return !(x.Value > negligible*top) })
}
