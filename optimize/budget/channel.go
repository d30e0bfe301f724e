package budget

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"

	"plumb/optimize/assume"
	"plumb/optimize/family"
	"plumb/optimize/spec"
)

// Limit names of the channel into an ADC.
const (
	LimitTotalError = assume.LimitTotalError
	LimitTotalDrift = assume.LimitTotalDrift
	LimitADCRange   = assume.LimitADCRange
)

// Units of the channel's figures in Limit.Unit: LSB, or a fraction of the
// ADC's full-scale range.
const (
	UnitLSB = "LSB"
	UnitFS  = "FS"
)

// Channel is the error of the whole channel as the ADC reads it, at full
// scale: the stage's errors, the reference's and the ADC's own, each as a
// fraction of the ADC's full-scale range FSR (and in LSB, FSR/2^N).
//
// The code is proportional to Vout/Vref (any ADC textbook): with the
// stage's output Vout = S + R + E (S the signal's share G·Vin, R the share
// the reference sets, E the stage's errors) and the ADC's reference
// Vref(1 + δ), the code's error as a fraction of FSR is
//
//	E/(FSR (1 + δ)) + Vout/FSR · (1/(1 + δ) - 1)    (own reference),
//	E/(FSR (1 + δ)) + S/FSR · (1/(1 + δ) - 1)       (the stage's reference),
//
// the second because a reference feeding both the stage's offset and the
// ADC cancels ratiometrically from R (R(1 + δ)/(Vref(1 + δ)) is R/Vref).
// δ reaches its tolerance plus its drift over the worst excursion;
// worst case takes 1/(1 - |δ|) - 1, its larger side. The ADC's own gain,
// offset and INL errors and their drifts add as datasheet maximums (domain
// notes §8). Worst case adds every term, RSS adds them in quadrature (each
// at its tolerance end, as the stage's RSS figures are), Monte Carlo draws
// the reference and the ADC per trial beside the stage's own trials and
// reports the p99.865 point. The stage's noise counts at analysis.sigmas
// times its RMS value. A calibration of gain (offset) at the reference
// temperature removes the reference's initial tolerance and the ADC's gain
// error (its offset error) with the stage's; drifts and INL remain.
type Channel struct {
	Bits       int     `json:"bits"`
	FullScaleV float64 `json:"full_scale_v"`
	LSBV       float64 `json:"lsb_v"`
	RangeMinV  float64 `json:"range_min_v"`
	RangeMaxV  float64 `json:"range_max_v"`
	// Reference says which reference the ADC uses: "channel" (the spec's,
	// which also feeds the stage: ratiometric) or "own".
	Reference string `json:"reference"`
	// TotalErrorFS is the worst total error at either end of the input
	// range, a fraction of full scale; TotalErrorLSB the same in LSB.
	TotalErrorFS  float64 `json:"total_error_fs"`
	TotalErrorLSB float64 `json:"total_error_lsb"`
	// TotalDriftFS is the part of the total error the temperature range
	// adds (the worst excursion from the reference temperature).
	TotalDriftFS  float64 `json:"total_drift_fs"`
	TotalDriftLSB float64 `json:"total_drift_lsb"`
	// AtInput is the end of the input range where the total error is worst.
	AtInput float64 `json:"at_input"`
	// RangeMarginV is the least distance, V, of the stage's output from
	// either end of the ADC's input range over the input range's ends with
	// every error of the stage and the reference at its worst (negative:
	// outside the range).
	RangeMarginV float64 `json:"range_margin_v"`
	// Error and Drift are the terms of the total error and of its drift at
	// AtInput, fractions of full scale.
	Error []Contribution `json:"error"`
	Drift []Contribution `json:"drift"`

	inputUnit string // of AtInput: V, or A for a current-sense input
}

// chanTerm is one term of the channel's error at one end of the input
// range: its size at the end of its tolerance and its temperature part,
// fractions of full scale. col names the stage's Monte Carlo column it
// comes from (colNone: an independent term, drawn on its own).
type chanTerm struct {
	name       string
	err, drift float64
	col        int
	// code is true for the ADC's own errors, which act on the code and not
	// on the voltage its input sees.
	code bool
}

// Stage columns a channel term reads under Monte Carlo.
const (
	colNone = iota
	colGain
	colOffset
	colCM
	numCols
)

// stageFigures are the stage's figures the channel budget rests on.
type stageFigures struct {
	gain     float64 // target transfer
	zero     float64 // R, the ideal output at zero signal (set by the reference)
	gainErr  float64 // fraction, over the temperature range
	offset   float64 // V, over the temperature range
	cmErr    float64 // V, the common-mode range's error at the output
	noiseRMS float64 // V
	drift    float64 // gain drift, per K
	offDrift float64 // V/K
	// refInStage is true when the stage's budget carries the spec's
	// reference's tolerance and drift (through its offset).
	refInStage bool
}

// adcFigures turns the spec's ADC block into figures with every unknown
// one at its documented default (package assume), and the assumptions.
func adcFigures(a *spec.ADC) (assume.ADCFigures, []assume.Assumption) {
	v := func(f spec.ADCFigure) float64 {
		if f.Given {
			return f.V
		}
		return math.NaN()
	}
	f := assume.ADCFigures{GainError: v(a.GainError), OffsetError: v(a.OffsetError), INL: v(a.INL),
		GainDrift: v(a.GainDrift), OffsetDrift: v(a.OffsetDrift), RefTolerance: v(a.Own.Tolerance), RefDrift: v(a.Own.Drift)}
	if a.SharedRef {
		f.RefTolerance, f.RefDrift = 0, 0
	}
	return f, assume.ADC(&f, a.Bits)
}

// channelTerms lists the terms of the channel's error when the input sits
// at vin (see Channel for the equations).
func channelTerms(s *spec.Spec, f *assume.ADCFigures, st *stageFigures) func(vin float64) []chanTerm {
	a := s.ADC
	fsr := a.FullScale()
	dT := s.WorstExcursion()
	cal := s.Calibrate
	// The reference the ADC divides by, and what of the output it scales.
	tol, drift := f.RefTolerance, f.RefDrift
	if a.SharedRef && s.Reference != nil {
		tol, drift = s.Reference.Tolerance, s.Reference.Drift
	}
	initTol := tol
	if cal.Gain {
		initTol = 0 // trimmed with the channel's gain
	}
	ref := func(x float64) float64 { return 1/(1-x) - 1 }
	return func(vin float64) []chanTerm {
		sig := st.gain * vin
		scaled := math.Abs(sig + st.zero) // own reference: the whole output
		if a.SharedRef {
			scaled = math.Abs(sig) // the reference's share cancels
		}
		u := 1 / (1 - initTol - drift*dT) // the stage's errors read against the lowest reference
		tolT := scaled / fsr * ref(initTol)
		driftT := scaled/fsr*ref(initTol+drift*dT) - tolT
		name := "ADC reference"
		if a.SharedRef {
			name = "reference (ratiometric: the signal's share)"
		}
		terms := []chanTerm{
			{"stage gain error", st.gainErr * math.Abs(sig) / fsr * u, st.drift * dT * math.Abs(sig) / fsr * u, colGain, false},
			{"stage offset", st.offset / fsr * u, st.offDrift * dT / fsr * u, colOffset, false},
			{"stage common-mode error", st.cmErr / fsr * u, 0, colCM, false},
			{fmt.Sprintf("stage noise (%g sigma)", s.Analysis.Sigmas), s.Analysis.Sigmas * st.noiseRMS / fsr * u, 0, colNone, false},
			{name + " tolerance", tolT, 0, colNone, false},
			{name + " drift", driftT, driftT, colNone, false},
		}
		if !a.SharedRef && s.Reference != nil && !st.refInStage && st.zero != 0 {
			// The stage's budget leaves the spec's reference ideal: its
			// errors move R, read against the ADC's own reference.
			rt := s.Reference.Tolerance
			if cal.Offset {
				rt = 0
			}
			terms = append(terms,
				chanTerm{"stage reference tolerance", math.Abs(st.zero) * rt / fsr * u, 0, colNone, false},
				chanTerm{"stage reference drift", math.Abs(st.zero) * s.Reference.Drift * dT / fsr * u, math.Abs(st.zero) * s.Reference.Drift * dT / fsr * u, colNone, false})
		}
		gainErr, offErr := f.GainError, f.OffsetError
		if cal.Gain {
			gainErr = 0
		}
		if cal.Offset {
			offErr = 0
		}
		gs := adcGainShare(a, sig+st.zero)
		return append(terms,
			chanTerm{"ADC gain error", gainErr * gs, 0, colNone, true},
			chanTerm{"ADC offset error", offErr, 0, colNone, true},
			chanTerm{"ADC INL", f.INL, 0, colNone, true},
			chanTerm{"ADC gain drift", f.GainDrift * dT * gs, f.GainDrift * dT * gs, colNone, true},
			chanTerm{"ADC offset drift", f.OffsetDrift * dT, f.OffsetDrift * dT, colNone, true})
	}
}

// adcGainShare is the part of the ADC's gain error (and gain drift) that
// acts on an input of v volts. A converter's gain error is specified with
// its offset error removed, as the deviation of the last code transition
// from ideal (common practice: the data-sheet definition of ADC gain
// error): the transfer is pinned at zero, or at the end of the range
// nearest zero when the range does not span it, and a gain error moves a
// code in proportion to its distance from there, reaching the full figure
// at the farthest end of the range:
//
//	share = |v − v0| / max(|Vmax − v0|, |Vmin − v0|)
//
// (a bipolar ±FS/2 converter: |v|/(FS/2); a unipolar 0..FS one: v/FS).
func adcGainShare(a *spec.ADC, v float64) float64 {
	lo, hi := a.Range.Min, a.Range.Max
	v0 := 0.0
	switch {
	case lo > 0:
		v0 = lo
	case hi < 0:
		v0 = hi
	}
	span := math.Max(math.Abs(hi-v0), math.Abs(lo-v0))
	if !(span > 0) {
		return 1
	}
	return math.Abs(v-v0) / span
}

// combine adds terms by the method: linearly for worst case, in
// quadrature otherwise.
func combine(terms []chanTerm, worst bool) (errFS, driftFS float64) {
	for _, t := range terms {
		if worst {
			errFS += t.err
			driftFS += t.drift
		} else {
			errFS += t.err * t.err
			driftFS += t.drift * t.drift
		}
	}
	if !worst {
		errFS, driftFS = math.Sqrt(errFS), math.Sqrt(driftFS)
	}
	return errFS, driftFS
}

// rangeMargin is the least distance, as a fraction of full scale, of the
// output from either end of the ADC's range at the input vin, with the
// stage's and the reference's terms (not the ADC's own, which act on the
// code) added at their worst.
func rangeMargin(s *spec.Spec, st *stageFigures, terms []chanTerm, vin float64) float64 {
	a := s.ADC
	c0 := (st.gain*vin + st.zero - a.Range.Min) / a.FullScale()
	e := 0.0
	for _, t := range terms {
		if !t.code {
			e += t.err
		}
	}
	return math.Min(c0-e, 1-c0-e)
}

// channel computes the channel's budget of candidate c against s.ADC into
// res (res.Channel, its metrics, its limits) and returns the assumptions
// about the ADC's figures it rests on. stage is the stage's budget with an
// ideal reference when the ADC shares a reference the stage's budget
// carries (so its ratiometric share is counted once, here), else res.
func (e *Evaluator) channel(ctx context.Context, c *Candidate, res *Result, progress func(done, total int)) ([]assume.Assumption, error) {
	s := e.s
	a := s.ADC
	stage := res
	refInStage := e.refSrc >= 0 && s.Reference != nil
	if a.SharedRef && refInStage && (s.Reference.Tolerance > 0 || s.Reference.Drift > 0) {
		s2 := *s
		r2 := *s.Reference
		r2.Tolerance, r2.Drift = 0, 0
		s2.Reference, s2.ADC = &r2, nil
		e2, err := NewEvaluator(&s2, e.family, e.opts)
		if err != nil {
			return nil, err
		}
		e2.Watch(ctx, progress)
		if stage, err = e2.Evaluate(c); err != nil {
			return nil, err
		}
	}
	m := &stage.Metrics
	st := stageFigures{gain: s.Gain, zero: e.target, gainErr: m.GainError, offset: m.OutputOffsetV, cmErr: m.CommonModeErrorV,
		noiseRMS: m.NoiseRMSV, drift: m.DriftPPMPerK * 1e-6, offDrift: m.OffsetDriftVPerK, refInStage: refInStage}
	return e.channelFrom(&st, stage, res, stage != res), nil
}

// channelFrom is the channel's budget from the stage's figures st into
// res; stage is the result whose Monte Carlo trials it reads, and idealRef
// says the figures come from a budget with an ideal reference.
func (e *Evaluator) channelFrom(st *stageFigures, stage, res *Result, idealRef bool) []assume.Assumption {
	s := e.s
	a := s.ADC
	f, as := adcFigures(a)
	termsAt := channelTerms(s, &f, st)
	ch := &Channel{Bits: a.Bits, FullScaleV: a.FullScale(), LSBV: a.LSB(), RangeMinV: a.Range.Min, RangeMaxV: a.Range.Max, Reference: spec.ADCRefOwn,
		inputUnit: inputUnit(s)}
	if a.SharedRef {
		ch.Reference = spec.ADCRefChannel
	}
	worst := s.Analysis.Method == spec.WorstCase
	var at []chanTerm
	ch.RangeMarginV = math.Inf(1)
	for i, vin := range []float64{s.Input.Min, s.Input.Max} {
		terms := termsAt(vin)
		errFS, driftFS := combine(terms, worst)
		if s.Analysis.Method == spec.MonteCarlo && stage.MonteCarlo != nil {
			errFS, driftFS = e.channelMC(stage, terms)
		}
		if i == 0 || errFS > ch.TotalErrorFS {
			ch.TotalErrorFS, ch.AtInput, at = errFS, vin, terms
		}
		ch.TotalDriftFS = math.Max(ch.TotalDriftFS, driftFS)
		ch.RangeMarginV = math.Min(ch.RangeMarginV, rangeMargin(s, st, terms, vin)*a.FullScale())
	}
	codes := a.Codes()
	ch.TotalErrorLSB, ch.TotalDriftLSB = ch.TotalErrorFS*codes, ch.TotalDriftFS*codes
	for _, t := range at {
		ch.Error = append(ch.Error, Contribution{Name: t.name, Value: t.err})
		if t.drift > 0 {
			ch.Drift = append(ch.Drift, Contribution{Name: t.name, Value: t.drift})
		}
	}
	ch.Error, ch.Drift = e.sorted(ch.Error), e.sorted(ch.Drift)
	res.Channel = ch
	res.Metrics.TotalErrorFS, res.Metrics.TotalErrorLSB = ch.TotalErrorFS, ch.TotalErrorLSB
	res.Metrics.TotalDriftFS, res.Metrics.TotalDriftLSB = ch.TotalDriftFS, ch.TotalDriftLSB
	res.Metrics.ADCRangeMarginV = ch.RangeMarginV
	e.channelLimits(ch, res)
	e.channelNotes(ch, res, idealRef)
	return as
}

// channelLimits adds the channel's limits to res: total error and total
// drift where the spec sets them, and the ADC's input range always.
func (e *Evaluator) channelLimits(ch *Channel, res *Result) {
	l := &e.s.Limits
	codes := e.s.ADC.Codes()
	add := func(name string, value, limit float64, inLSB bool, terms []Contribution) {
		unit, scale := UnitFS, 1.0
		if inLSB {
			unit, scale = UnitLSB, codes
		}
		lim := Limit{Name: name, Value: value * scale, Limit: limit * scale, Max: true, Unit: unit}
		margin := math.Inf(1)
		if value > 0 {
			margin = limit / value
		}
		lim.Margin, lim.Pass = finite(margin), margin >= 1
		lim.MarginText = marginText(lim, margin)
		for _, t := range terms {
			lim.Contributors = append(lim.Contributors, Contribution{Name: t.Name, Value: t.Value * scale, Share: t.Share})
		}
		res.Limits = append(res.Limits, lim)
	}
	if l.TotalError > 0 {
		add(LimitTotalError, ch.TotalErrorFS, l.TotalError, l.TotalErrorInLSB, ch.Error)
	}
	if l.TotalDrift > 0 {
		add(LimitTotalDrift, ch.TotalDriftFS, l.TotalDrift, l.TotalDriftInLSB, ch.Drift)
	}
	rl := Limit{Name: LimitADCRange, Value: ch.RangeMarginV, Unit: "V", Margin: 1 + ch.RangeMarginV/NearPinV, Pass: ch.RangeMarginV >= 0}
	rl.MarginText = marginText(rl, rl.Margin)
	res.Limits = append(res.Limits, rl)
	for i := len(res.Limits) - 3; i < len(res.Limits); i++ {
		if i < 0 {
			continue
		}
		nl := res.Limits[i]
		if nl.Name != LimitTotalError && nl.Name != LimitTotalDrift && nl.Name != LimitADCRange {
			continue
		}
		res.Pass = res.Pass && nl.Pass
		if b, ok := limitNamed(res.Limits, res.Binding); !ok || nl.Margin < b.Margin {
			res.Binding = nl.Name
		}
	}
}

func limitNamed(ls []Limit, name string) (Limit, bool) {
	for _, l := range ls {
		if l.Name == name && name != "" {
			return l, true
		}
	}
	return Limit{}, false
}

// channelNotes says how the channel's figures were reached.
func (e *Evaluator) channelNotes(ch *Channel, res *Result, idealRef bool) {
	s := e.s
	a := s.ADC
	res.Notes = append(res.Notes, fmt.Sprintf("ADC: %d bits over %s..%s, 1 LSB = %s; total error at full scale (input %s, the worse end) %s = %s, of which the temperature range adds %s = %s",
		a.Bits, FormatFigure(a.Range.Min, "V"), FormatFigure(a.Range.Max, "V"), FormatFigure(ch.LSBV, "V"), FormatFigure(ch.AtInput, inputUnit(s)),
		FormatFigure(ch.TotalErrorFS, UnitFS), FormatFigure(ch.TotalErrorLSB, UnitLSB), FormatFigure(ch.TotalDriftFS, UnitFS), FormatFigure(ch.TotalDriftLSB, UnitLSB)))
	if a.SharedRef {
		why := "the reference's tolerance and drift cancel from the share of the output it sets and remain on the signal's share (code ∝ Vout/Vref)"
		if idealRef {
			why += "; the stage's own figures in it come from its budget with an ideal reference, so that share is counted once"
		}
		res.Notes = append(res.Notes, "ADC on the channel's reference (ratiometric): "+why)
	}
	switch s.Analysis.Method {
	case spec.WorstCase:
		res.Notes = append(res.Notes, "total error: worst case, every term added at its worst (the stage's figures are each its worst over the corners and the temperature range)")
	case spec.RSS:
		res.Notes = append(res.Notes, "total error: root-sum-square of the stage's RSS figures and the reference's and ADC's figures at their datasheet maximums")
	case spec.MonteCarlo:
		res.Notes = append(res.Notes, "total error: p99.865 point over the Monte Carlo trials, the stage's own errors per trial (magnitudes added) with the reference and the ADC drawn beside them")
	}
	if s.Calibrate.Gain || s.Calibrate.Offset {
		res.Notes = append(res.Notes, "total error: the one-time calibration trims the whole channel, so the reference's initial tolerance and the ADC's gain error (gain calibration) and offset error (offset calibration) drop out with the stage's")
	}
	res.Notes = append(res.Notes, "ADC input range: checked at both ends of the input range with the stage's and the reference's errors added at their worst; quantization (±½ LSB) is not counted in the total error")
}

// inputUnit is the unit of the spec's input range.
func inputUnit(s *spec.Spec) string {
	if s.CurrentInput() {
		return "A"
	}
	return "V"
}

// channelMC draws the reference's and the ADC's terms per trial beside the
// stage's own Monte Carlo trials (their gain error, offset and CMRR, as
// magnitudes) and returns the p99.865 points of the total error and of its
// temperature part.
func (e *Evaluator) channelMC(stage *Result, terms []chanTerm) (errFS, driftFS float64) {
	s := e.s
	mc := stage.MonteCarlo
	g, off, cmrr := mc.Samples[MetricGainError], mc.Samples[MetricOffset], mc.Samples[MetricCMRR]
	dr, odr := mc.Samples[MetricDrift], mc.Samples[MetricOffsetDrift]
	n := len(g)
	if n == 0 || len(off) != n {
		return combine(terms, false)
	}
	m := &stage.Metrics
	// Per trial each stage term scales with the trial's own figure.
	var base, baseDrift [numCols]float64
	base[colGain], base[colOffset], base[colCM] = m.GainError, m.OutputOffsetV, m.CommonModeErrorV
	baseDrift[colGain], baseDrift[colOffset] = m.DriftPPMPerK, m.OffsetDriftVPerK
	drifts := len(dr) == n && len(odr) == n
	r := rand.New(rand.NewPCG(s.Analysis.Seed, s.Analysis.Seed^0xadc))
	normal := s.Analysis.Distribution != spec.Uniform
	errs, drs := make([]float64, n), make([]float64, n)
	x := make([]float64, len(terms))
	for t := 0; t < n; t++ {
		drawAll(r, x, normal, s.Analysis.Sigmas)
		var trial, trialDrift [numCols]float64
		trial[colGain], trial[colOffset] = math.Abs(g[t]), off[t]
		if drifts {
			trialDrift[colGain], trialDrift[colOffset] = dr[t], odr[t]
		}
		if len(cmrr) == n {
			trial[colCM] = m.CommonModeErrorV * math.Pow(10, (m.CMRRdB-cmrr[t])/20)
		}
		var sumE, sumD float64
		for k, tm := range terms {
			if tm.col == colNone {
				sumE += x[k] * tm.err
				sumD += x[k] * tm.drift
				continue
			}
			if b := base[tm.col]; b > 0 {
				sumE += tm.err * trial[tm.col] / b
			}
			if b := baseDrift[tm.col]; b > 0 {
				sumD += tm.drift * trialDrift[tm.col] / b
			}
		}
		errs[t], drs[t] = math.Abs(sumE), math.Abs(sumD)
	}
	return percentiles(errs, true).P99865, percentiles(drs, true).P99865
}

// Allowance is what the channel's limits leave for the stage: the largest
// gain error (over the temperature range), output offset, gain drift (per
// K) and offset drift (V/K) a stage may have for the channel to meet
// total_error and total_drift with every other term of the channel at its
// worst. Each is a necessary condition, not a sufficient one (the stage's
// terms share one limit), so a search may prune with them and never lose
// a design the channel's budget passes. Zero means no allowance applies;
// a negative one that nothing passes. Offsets are left open when the ADC
// shares a reference the stage's offset carries (its share cancels there,
// and a stage's own offset figure still holds it). ok is false when the
// spec has no ADC or no channel limit. Monte Carlo specs are screened in
// the root-sum-square form, as the search screens their stages.
type Allowance struct {
	GainError, OffsetV, DriftPerK, OffsetDriftVK float64
	// ResOffsetV is the room for the offset the stage's resistors make,
	// which no shared reference cancels: OffsetV's figure whether or not
	// the ADC shares the reference.
	ResOffsetV float64
}

// ChannelAllowance computes the stage's Allowance under s's channel limits
// (see Allowance).
func ChannelAllowance(s *spec.Spec) (al Allowance, ok bool) {
	a := s.ADC
	if a == nil || (s.Limits.TotalError <= 0 && s.Limits.TotalDrift <= 0) {
		return al, false
	}
	f, _ := adcFigures(a)
	st := stageFigures{gain: s.Gain, zero: specZero(s), refInStage: true}
	termsAt := channelTerms(s, &f, &st)
	worst := s.Analysis.Method == spec.WorstCase
	fsr, dT := a.FullScale(), s.WorstExcursion()
	sharedOffset := a.SharedRef && s.Reference != nil
	// The room a limit leaves a stage term: L - Σ fixed (worst case) or
	// sqrt(L² - Σ fixed²) (RSS).
	room := func(limit, fixed float64) float64 {
		if worst {
			return limit - fixed
		}
		if fixed > limit {
			return limit - fixed // negative: nothing passes
		}
		return math.Sqrt(limit*limit - fixed*fixed)
	}
	tighten := func(dst *float64, v float64) {
		if *dst == 0 || v < *dst {
			*dst = v
		}
	}
	for _, vin := range []float64{s.Input.Min, s.Input.Max} {
		terms := termsAt(vin)
		fixedE, fixedD := combine(terms, worst) // the stage's own terms are zero here
		// The stage's terms are read against the lowest reference, a factor
		// 1/(1-δ) >= 1 that is left out here, so the allowance stays loose.
		const u = 1.0
		sig := math.Abs(s.Gain * vin)
		if l := s.Limits.TotalError; l > 0 {
			r := room(l, fixedE) * fsr / u
			if sig > 0 {
				tighten(&al.GainError, r/sig)
			}
			tighten(&al.ResOffsetV, r)
			if !sharedOffset {
				tighten(&al.OffsetV, r)
			}
		}
		if l := s.Limits.TotalDrift; l > 0 && dT > 0 {
			r := room(l, fixedD) * fsr / u / dT
			if sig > 0 {
				tighten(&al.DriftPerK, r/sig)
			}
			if !sharedOffset {
				tighten(&al.OffsetDriftVK, r)
			}
		}
	}
	return al, true
}

// specZero is the ideal output at zero signal the spec asks for: the
// level shift's offset, or the reference a referred stage sits on.
func specZero(s *spec.Spec) float64 {
	uses := map[family.RefUse]bool{}
	for _, name := range s.Families {
		if f := family.Lookup(name); f != nil {
			uses[f.Reference] = true
		}
	}
	switch {
	case uses[family.RefShift]:
		return s.Offset
	case s.Reference != nil && !uses[family.RefNone]:
		return s.Reference.V
	}
	return 0
}

// ChannelScreen is the channel's total error as a search screens it from
// a stage's own figures: the fixed terms (reference, ADC) at each end of
// the input range and what the stage's terms weigh there. It is optimistic
// where it cannot be exact (the common-mode term is left out, and a
// reference share the stage's offset may hold is taken off it), so it
// prunes only designs the channel's budget fails.
type ChannelScreen struct {
	worst bool
	// Per end of the input range: the signal's share |S|/FSR, and the
	// fixed terms of the error and of the drift (sum, or root-sum-square).
	sig, fixedE, fixedD [2]float64
	fsr, dT, sigmas     float64
	limitE, limitD      float64
	// stageScale multiplies the stage's figures (1 - the slack; see
	// WithSlack).
	stageScale float64
	// refShare and refShareDrift are the largest share of the stage's
	// offset (V) and offset drift (V/K) the spec's reference can hold when
	// the ADC shares it, which cancels at the ADC.
	refShare, refShareDrift float64
	// Per end of the input range, for the ADC's input range (a hard
	// limit, rangeMargin): the nominal output as a fraction of the range
	// from its bottom, and the sum of the fixed terms that move the
	// voltage (not the code).
	c0, fixedR [2]float64
}

// NewChannelScreen prepares the screening of s's channel limits (nil: the
// spec has none). Monte Carlo specs are screened in the root-sum-square
// form, as the search screens their stages.
func NewChannelScreen(s *spec.Spec) *ChannelScreen {
	a := s.ADC
	if a == nil {
		return nil
	}
	f, _ := adcFigures(a)
	st := stageFigures{gain: s.Gain, zero: specZero(s), refInStage: true}
	termsAt := channelTerms(s, &f, &st)
	cs := &ChannelScreen{worst: s.Analysis.Method == spec.WorstCase, fsr: a.FullScale(), dT: s.WorstExcursion(), stageScale: 1,
		sigmas: s.Analysis.Sigmas, limitE: s.Limits.TotalError, limitD: s.Limits.TotalDrift}
	for i, vin := range []float64{s.Input.Min, s.Input.Max} {
		cs.sig[i] = math.Abs(s.Gain*vin) / cs.fsr
		terms := termsAt(vin)
		cs.fixedE[i], cs.fixedD[i] = combine(terms, cs.worst)
		cs.c0[i] = (s.Gain*vin + st.zero - a.Range.Min) / cs.fsr
		for _, t := range terms {
			if !t.code {
				cs.fixedR[i] += t.err
			}
		}
	}
	if a.SharedRef && s.Reference != nil {
		cs.refShare = math.Abs(st.zero) * (s.Reference.Tolerance + s.Reference.Drift*cs.dT)
		cs.refShareDrift = math.Abs(st.zero) * s.Reference.Drift
	}
	return cs
}

// WithSlack makes the screen take the stage's figures a fraction slack
// low, for figures that come from a model of the stage that may read a
// little above the exact budget's: a screen must never fail a design the
// exact budget passes. It returns cs.
func (cs *ChannelScreen) WithSlack(slack float64) *ChannelScreen {
	if cs != nil {
		cs.stageScale = 1 - slack
	}
	return cs
}

// Pass reports whether a stage of gain error gainErr (fraction, over the
// temperature range), output offset offsetV, gain drift driftPPM (ppm/K),
// offset drift offDriftVK and output noise noiseRMS may meet the channel's
// limits. A nil screen passes everything; NaN figures pass nothing.
func (cs *ChannelScreen) Pass(gainErr, offsetV, driftPPM, offDriftVK, noiseRMS float64) bool {
	if cs == nil {
		return true
	}
	e, dr := cs.Totals(gainErr, offsetV, driftPPM, offDriftVK, noiseRMS)
	if (cs.limitE > 0 && !(e <= cs.limitE)) || (cs.limitD > 0 && !(dr <= cs.limitD)) {
		return false
	}
	return cs.rangeOK(gainErr, offsetV, noiseRMS)
}

// rangeOK screens the ADC's input range as rangeMargin judges it: the
// nominal output at each end of the input range, less the sum of the
// terms that move the voltage, must stay inside the range.
func (cs *ChannelScreen) rangeOK(gainErr, offsetV, noiseRMS float64) bool {
	k := cs.stageScale
	stage := k * (math.Max(0, math.Abs(offsetV)-cs.refShare) + cs.sigmas*noiseRMS) / cs.fsr
	for i := range cs.sig {
		e := stage + k*math.Abs(gainErr)*cs.sig[i] + cs.fixedR[i]
		if !(math.Min(cs.c0[i]-e, 1-cs.c0[i]-e) >= 0) {
			return false
		}
	}
	return true
}

// Limits returns the channel's total error and total drift limits the
// screen judges against, fractions of full scale (0: none).
func (cs *ChannelScreen) Limits() (errFS, driftFS float64) { return cs.limitE, cs.limitD }

// Totals returns the screened total error and total drift, fractions of
// full scale, at the worse end of the input range, for the stage figures
// Pass takes.
func (cs *ChannelScreen) Totals(gainErr, offsetV, driftPPM, offDriftVK, noiseRMS float64) (errFS, driftFS float64) {
	k := cs.stageScale
	off := k * math.Max(0, math.Abs(offsetV)-cs.refShare) / cs.fsr
	offD := k * math.Max(0, math.Abs(offDriftVK)-cs.refShareDrift) * cs.dT / cs.fsr
	noise := k * cs.sigmas * noiseRMS / cs.fsr
	for i := range cs.sig {
		g := k * math.Abs(gainErr) * cs.sig[i]
		d := k * math.Abs(driftPPM) * 1e-6 * cs.dT * cs.sig[i]
		var e, dr float64
		if cs.worst {
			e, dr = g+off+noise+cs.fixedE[i], d+offD+cs.fixedD[i]
		} else {
			e = math.Sqrt(g*g + off*off + noise*noise + cs.fixedE[i]*cs.fixedE[i])
			dr = math.Sqrt(d*d + offD*offD + cs.fixedD[i]*cs.fixedD[i])
		}
		errFS, driftFS = math.Max(errFS, e), math.Max(driftFS, dr) // NaN stays NaN
	}
	return errFS, driftFS
}

// Summary says in one line what the ADC reads and how wrong it can be:
// its resolution and range, its reference, the total error and the part
// the temperature range adds, and the output's margin to the ADC's range.
func (c *Channel) Summary() string {
	ref := "its own reference"
	if c.Reference == spec.ADCRefChannel {
		ref = "the channel's reference (ratiometric)"
	}
	return fmt.Sprintf("ADC %d bits over %s..%s (1 LSB = %s) on %s: total error %s (%s) at input %s, of which the temperature range adds %s (%s); output inside the ADC's range by %s",
		c.Bits, FormatFigure(c.RangeMinV, "V"), FormatFigure(c.RangeMaxV, "V"), FormatFigure(c.LSBV, "V"), ref,
		FormatFigure(c.TotalErrorLSB, UnitLSB), FormatFigure(c.TotalErrorFS, UnitFS), FormatFigure(c.AtInput, c.inputUnit),
		FormatFigure(c.TotalDriftLSB, UnitLSB), FormatFigure(c.TotalDriftFS, UnitFS), FormatFigure(c.RangeMarginV, "V"))
}
