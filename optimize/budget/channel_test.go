package budget

import (
	"math"
	"strings"
	"testing"

	"plumb/data"
	"plumb/optimize/assume"
	"plumb/optimize/spec"
)

// adcSpec is a spec of a stage of gain 1.024 on a 0..4 V input into a
// 12-bit 0..4.096 V ADC with its own 4.096 V reference of 0.1 %, at one
// temperature, so that no drift enters; extra adds lines to the adc block.
func adcSpec(t testing.TB, method, extra string) *spec.Spec {
	return mustSpec(t, `name: hand
about: hand-worked channel
family: noninverting
gain: 1.024
input: {single_ended: 0..4V}
supply: ±15V
temperature: {range: 25..25C}
adc:
  bits: 12
  range: 0..4.096V
  own_reference: {voltage: 4.096V, tolerance: 0.1%, drift: 0ppm/K}
  gain_error: 0LSB
  offset_error: 0LSB
  inl: 0LSB
  gain_drift: 0ppm/K
  offset_drift: 0uV/K
`+extra+`limits: {total_error: 8LSB}
analysis: {method: `+method+`}
`)
}

// sumTerms is the worst-case total of a list of terms at one input.
func sumTerms(terms []chanTerm) (e float64) {
	for _, t := range terms {
		e += t.err
	}
	return e
}

// TestLSBSize: one LSB is the full-scale range over 2^N (common practice;
// any ADC textbook): 4.096 V over 12 bits is 1 mV, ±10 V over 16 bits is
// 20/65536 = 305.176 µV, 2.5 V over 24 bits 149.0 nV.
func TestLSBSize(t *testing.T) {
	for _, c := range []struct {
		name string
		a    spec.ADC
		want float64
	}{
		{"12 bits over 4.096 V", spec.ADC{Bits: 12, Range: spec.Range{Min: 0, Max: 4.096}}, 1e-3},
		{"16 bits over ±10 V", spec.ADC{Bits: 16, Range: spec.Range{Min: -10, Max: 10}}, 305.17578125e-6},
		{"24 bits over 2.5 V", spec.ADC{Bits: 24, Range: spec.Range{Min: 0, Max: 2.5}}, 2.5 / 16777216},
	} {
		if got := c.a.LSB(); math.Abs(got-c.want) > 1e-12*c.want {
			t.Errorf("%s: LSB %.9g V, want %.9g V", c.name, got, c.want)
		}
	}
}

// TestChannelHandWorked: a 12-bit ADC on a 4.096 V reference of 0.1 %,
// after a stage whose gain error is 0.05 % and nothing else, at full scale
// (4.096 V at the ADC). Worked by hand (domain notes §8: the code is
// Vout/Vref; a reference's tolerance is a gain error of the same size):
//
//	1 LSB = 4.096 V / 4096 = 1 mV
//	stage: 0.05 % of 4.096 V = 2.048 mV = 2.048 LSB, read against the
//	       lowest reference 4.096 (1 - 0.001): 2.048/0.999 = 2.0500 LSB
//	reference: the code is 4096 Vout/Vref, so at 1/(1 - 0.001) - 1 =
//	       0.1001 % of full scale: 4.1001 LSB (first order 4.096)
//	worst case: 2.0500 + 4.1001 = 6.1501 LSB (first order 6.144)
//	RSS: sqrt(2.0500² + 4.1001²) = 4.5840 LSB
func TestChannelHandWorked(t *testing.T) {
	for _, c := range []struct {
		method string
		want   float64 // LSB
	}{
		{spec.WorstCase, 2.048/0.999 + 4096*(1/0.999-1)},
		{spec.RSS, math.Hypot(2.048/0.999, 4096*(1/0.999-1))},
	} {
		t.Run(c.method, func(t *testing.T) {
			s := adcSpec(t, c.method, "")
			f, as := adcFigures(s.ADC)
			if len(as) != 0 {
				t.Fatalf("every figure was given, yet assumed: %v", as)
			}
			st := stageFigures{gain: s.Gain, gainErr: 0.0005}
			terms := channelTerms(s, &f, &st)(4)
			e, _ := combine(terms, c.method == spec.WorstCase)
			if got := e * s.ADC.Codes(); math.Abs(got-c.want) > 1e-9 {
				t.Errorf("total error %.6f LSB, want %.6f LSB (hand-worked)", got, c.want)
			}
			if c.method == spec.WorstCase && math.Abs(e*4096-6.1501) > 1e-4 {
				t.Errorf("total error %.5f LSB, want 6.1501 LSB", e*4096)
			}
		})
	}
}

// TestChannelRSSNeverAboveWorstCase: the root-sum-square of terms never
// exceeds their sum (the triangle inequality; the trade's reason to quote
// both), and equals it for a single term.
func TestChannelRSSNeverAboveWorstCase(t *testing.T) {
	s := adcSpec(t, spec.WorstCase, "")
	f, _ := adcFigures(s.ADC)
	f.GainError, f.OffsetError, f.INL = 2.0/4096, 1.0/4096, 1.0/4096
	for _, g := range []float64{0, 1e-4, 5e-4, 3e-3} {
		st := stageFigures{gain: s.Gain, gainErr: g, offset: 1e-3, noiseRMS: 50e-6}
		terms := channelTerms(s, &f, &st)(4)
		wc, _ := combine(terms, true)
		rss, _ := combine(terms, false)
		if rss > wc*(1+1e-12) || rss <= 0 {
			t.Errorf("gain error %g: RSS %g above worst case %g", g, rss, wc)
		}
		if math.Abs(wc-sumTerms(terms)) > 1e-15 {
			t.Errorf("worst case %g is not the sum of its terms %g", wc, sumTerms(terms))
		}
	}
	one := []chanTerm{{"one", 3e-4, 0, colNone, false}}
	if wc, _ := combine(one, true); wc != 3e-4 {
		t.Errorf("single term worst case %g", wc)
	}
	if rss, _ := combine(one, false); rss != 3e-4 {
		t.Errorf("single term RSS %g", rss)
	}
}

// TestChannelRatiometric: a stage that sets its output at zero signal
// from the reference (a level shift: R = 2.048 V of a 4.096 V reference)
// with a ±2.048 V signal share. When the ADC runs on the same reference,
// the reference's error cancels from R (R(1+ε)/(Vref(1+ε)) = R/Vref, the
// ratiometric measurement of any instrumentation textbook) and remains on
// the signal's share only: at full scale 2.048 V/4.096 V x (1/(1-0.001) -
// 1) = 0.05005 % FS = 2.05 LSB. With a separate reference of the same
// tolerance at the ADC, the stage's R moves by 0.1 % (2.048 mV, 2.05 LSB
// read against the lowest reference) and the ADC's reference acts on the
// whole 4.096 V output (4.1 LSB).
func TestChannelRatiometric(t *testing.T) {
	shared := mustSpec(t, `name: ratio
about: ratiometric level shift
family: level-shift
input: {single_ended: ±10V}
output: 0..4.096V
supply: 0..5V
reference: {voltage: 4.096V, tolerance: 0.1%, drift: 0ppm/K}
temperature: {range: 25..25C}
adc: {bits: 12, range: 0..1 x ref, reference: channel, gain_error: 0LSB, offset_error: 0LSB, inl: 0LSB, gain_drift: 0ppm/K, offset_drift: 0uV/K}
limits: {total_error: 8LSB}
`)
	own := *shared
	a := *shared.ADC
	a.SharedRef = false
	a.Own = spec.ADCReference{V: 4.096, Tolerance: spec.ADCFigure{V: 0.001, Given: true}, Drift: spec.ADCFigure{V: 0, Given: true}}
	own.ADC = &a
	st := stageFigures{gain: shared.Gain, zero: shared.Offset}
	if math.Abs(st.zero-2.048) > 1e-12 || math.Abs(st.gain-0.2048) > 1e-12 {
		t.Fatalf("spec: zero %g V, gain %g", st.zero, st.gain)
	}
	lsb := func(s *spec.Spec, st stageFigures) float64 {
		f, _ := adcFigures(s.ADC)
		e, _ := combine(channelTerms(s, &f, &st)(10), true)
		return e * 4096
	}
	if got, want := lsb(shared, st), 2048*(1/0.999-1); math.Abs(got-want) > 1e-9 {
		t.Errorf("shared reference: %.6f LSB, want %.6f LSB (the signal's share only)", got, want)
	}
	// The stage's budget leaves the reference ideal (refInStage false):
	// the channel adds R's move itself.
	if got, want := lsb(&own, st), 2.048/0.999+4096*(1/0.999-1); math.Abs(got-want) > 1e-9 {
		t.Errorf("own reference: %.6f LSB, want %.6f LSB (R's move plus the whole output)", got, want)
	}
	// A stage whose budget already holds the reference's move in its
	// offset: the channel does not count it twice.
	st.refInStage, st.offset = true, 2.048e-3
	if got, want := lsb(&own, st), 2.048/0.999+4096*(1/0.999-1); math.Abs(got-want) > 1e-9 {
		t.Errorf("own reference, offset in the stage: %.6f LSB, want %.6f LSB", got, want)
	}
}

// TestChannelExampleDesign checks the example design of adc-channel.yaml
// against hand arithmetic: every term of the reference and the ADC from
// the spec's figures and the demo catalog's TP-R41B (4.096 V, 0.05 %,
// 5 ppm/K): 1 LSB = 1 mV; ±2 + ±2 + ±1 LSB; 1 ppm/K of full scale over the
// 45 K excursion = 0.18432 LSB; 2 µV/K over 45 K = 90 µV = 0.09 LSB; the
// shared reference's 0.05 % on the signal's 1.95 V share: 1950 (1/(1 -
// 0.0005) - 1) = 0.97549 LSB, and its 5 ppm/K over 45 K on top: 1950 (1/(1
// - 0.000725) - 1/(1 - 0.0005)) = 0.43929 LSB; the stage's from its own
// budget with an ideal reference, scaled by |S|/FSR and read against the
// lowest reference; and the total their sum.
func TestChannelExampleDesign(t *testing.T) {
	s, d, res := evaluateExample(t, "adc-channel.yaml", "adc-channel-design.yaml")
	ch := res.Channel
	if ch == nil || !res.Pass {
		t.Fatalf("no channel, or the design fails: %+v", res.Limits)
	}
	term := func(prefix string) float64 {
		for _, c := range ch.Error {
			if strings.HasPrefix(c.Name, prefix) {
				return c.Value * 4096
			}
		}
		return 0
	}
	const tol, drift = 0.0005, 5e-6 // TP-R41B
	u := 1 / (1 - tol - drift*45)
	if d.Reference == nil || d.Reference.Tolerance != tol || math.Abs(d.Reference.Drift-drift) > 1e-18 {
		t.Fatalf("design's reference %+v, want TP-R41B's 0.05 %% and 5 ppm/K", d.Reference)
	}
	ideal := *s
	r := *s.Reference
	r.Part, r.Tolerance, r.Drift = "", 0, 0
	ideal.Reference, ideal.ADC = &r, nil
	bare := *d
	bare.Reference = nil
	stage, err := Evaluate(&ideal, &bare)
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		name string
		want float64 // LSB
	}{
		// The ADC's gain error acts in proportion to the code's distance
		// from zero (data-sheet definition, offset removed; common
		// practice): the worse end is input +10 V, output 4.0 V of the
		// 0..4.096 V range, so 4.0/4.096 of the 2 LSB and of the drift.
		{"ADC gain error", 2 * 4.0 / 4.096}, {"ADC offset error", 2}, {"ADC INL", 1},
		{"ADC gain drift", 4096 * 1e-6 * 45 * 4.0 / 4.096}, {"ADC offset drift", 2e-6 * 45 / 1e-3},
		{"reference (ratiometric: the signal's share) tolerance", 1950 * (1/(1-tol) - 1)},
		{"reference (ratiometric: the signal's share) drift", 1950 * (u - 1/(1-tol))},
		{"stage gain error", stage.Metrics.GainError * 1950 * u},
		{"stage offset", stage.Metrics.OutputOffsetV / 1e-3 * u},
		{"stage noise", 3 * stage.Metrics.NoiseRMSV / 1e-3 * u},
	} {
		if got := term(c.name); math.Abs(got-c.want) > 1e-9*math.Max(1, c.want) {
			t.Errorf("%s: %.6f LSB, want %.6f LSB", c.name, got, c.want)
		}
	}
	sum := 0.0
	for _, c := range ch.Error {
		sum += c.Value
	}
	if math.Abs(sum-ch.TotalErrorFS) > 1e-12 || math.Abs(ch.TotalErrorLSB-4096*ch.TotalErrorFS) > 1e-9 {
		t.Errorf("total %g FS, %g LSB; the terms sum to %g FS", ch.TotalErrorFS, ch.TotalErrorLSB, sum)
	}
	if ch.AtInput != -10 && ch.AtInput != 10 {
		t.Errorf("worst at input %g V, want an end of ±10 V", ch.AtInput)
	}
	// The stage's budget with the real reference holds the reference's
	// move of the 2.05 V offset; the channel's does not.
	if res.Metrics.OutputOffsetV <= stage.Metrics.OutputOffsetV {
		t.Errorf("stage offset with the reference %g V not above the ideal-reference %g V", res.Metrics.OutputOffsetV, stage.Metrics.OutputOffsetV)
	}
	// Output range: 0.1..4 V nominal on 0..4.096 V, so at most 96 mV of
	// margin, less the stage's and reference's errors.
	if !(ch.RangeMarginV > 0 && ch.RangeMarginV < 0.096) {
		t.Errorf("ADC input range margin %g V, want between 0 and 96 mV", ch.RangeMarginV)
	}
	// The search's allowance holds for the passing design (it prunes only
	// failing ones), with the reference's figures as the search has them.
	withRef := *s
	fr := *s.Reference
	fr.Part, fr.Tolerance, fr.Drift = "", tol, drift
	withRef.Reference = &fr
	s = &withRef
	al, ok := ChannelAllowance(s)
	if !ok || stage.Metrics.GainError > al.GainError || stage.Metrics.DriftPPMPerK*1e-6 > al.DriftPerK {
		t.Errorf("allowance %+v (ok %v) excludes the passing design (gain error %g, drift %g/K)", al, ok, stage.Metrics.GainError, stage.Metrics.DriftPPMPerK*1e-6)
	}
	if !NewChannelScreen(s).Pass(stage.Metrics.GainError, res.Metrics.OutputOffsetV, stage.Metrics.DriftPPMPerK, res.Metrics.OffsetDriftVPerK, stage.Metrics.NoiseRMSV) {
		t.Error("the channel screen refuses the passing design")
	}
}

// TestChannelAssumptions: an ADC figure the spec does not give is unknown,
// never zero: it is taken at its documented default and listed; under
// assumptions: strict the total error resting on it is not called met.
func TestChannelAssumptions(t *testing.T) {
	src := `name: unknown
about: ADC without its INL
family: noninverting
gain: 1.024
input: {single_ended: 0..4V}
supply: ±15V
temperature: {range: 25..25C}
adc: {bits: 12, range: 0..4.096V, own_reference: {voltage: 4.096V, tolerance: 0.1%, drift: 5ppm/K}, gain_error: 1LSB, offset_error: 1LSB, gain_drift: 1ppm/K, offset_drift: 1uV/K}
limits: {total_error: 100LSB}
`
	d := mustDesign(t, `family: noninverting
positions:
  Rf: {value: 24, tolerance: 0.1%, tcr: 25ppm/K}
  Rg: {value: 1k, tolerance: 0.1%, tcr: 25ppm/K}
amplifier: {vos: 0V, vos_drift: 0uV/K, ib: 0A, ios: 0A, aol: 1e12, gbw: 10MHz, noise: 0nV/rtHz, current_noise: 0pA/rtHz, cm_neg: 0V, cm_pos: 0V, swing_neg: 0V, swing_pos: 0V}
`)
	for _, strict := range []bool{false, true} {
		text := src
		if strict {
			text += "assumptions: strict\n"
		}
		res, err := Evaluate(mustSpec(t, text), d)
		if err != nil {
			t.Fatal(err)
		}
		var inl *assume.Assumption
		for i, a := range res.Assumptions {
			if a.Part == assume.ADCPart && a.Figure == "adc_inl" {
				inl = &res.Assumptions[i]
			}
		}
		if inl == nil || math.Abs(inl.Value-assume.ADCINLCodes/4096.0) > 1e-15 {
			t.Fatalf("INL not assumed at %d LSB: %+v", assume.ADCINLCodes, res.Assumptions)
		}
		for _, l := range res.Limits {
			if l.Name != LimitTotalError {
				continue
			}
			if l.Pass == strict {
				t.Errorf("strict %v: total error pass %v (%s)", strict, l.Pass, l.MarginText)
			}
		}
	}
}

// TestChannelMonteCarlo: under Monte Carlo the channel's total error is
// the p99.865 point of per-trial totals, each within the box every term's
// worst end spans, so it never exceeds the worst-case total of the same
// design (the triangle inequality) and stays positive; the same seed gives
// the same figure.
func TestChannelMonteCarlo(t *testing.T) {
	snap, err := data.DemoSnapshot()
	if err != nil {
		t.Fatal(err)
	}
	lookup, err := spec.SnapshotLookup(snap)
	if err != nil {
		t.Fatal(err)
	}
	d := loadExampleDesign(t, "adc-channel-design.yaml")
	if err := d.Resolve(lookup); err != nil {
		t.Fatal(err)
	}
	total := func(method string) float64 {
		s := loadExample(t, "adc-channel.yaml")
		s.Analysis.Method, s.Analysis.Trials = method, 2000
		res, err := Evaluate(s, d)
		if err != nil {
			t.Fatal(err)
		}
		return res.Channel.TotalErrorLSB
	}
	wc, mc := total(spec.WorstCase), total(spec.MonteCarlo)
	if !(mc > 0 && mc <= wc) {
		t.Errorf("Monte Carlo total %.4g LSB, worst case %.4g LSB: want 0 < MC <= WC", mc, wc)
	}
	if again := total(spec.MonteCarlo); again != mc {
		t.Errorf("seeded Monte Carlo gave %.9g then %.9g LSB", mc, again)
	}
}

// BenchmarkChannelEvaluate is the exact budget of the adc-channel example
// design, worst case: the stage's budget, its budget again with an ideal
// reference (the ADC shares the reference), and the channel's terms.
func BenchmarkChannelEvaluate(b *testing.B) {
	snap, err := data.DemoSnapshot()
	if err != nil {
		b.Fatal(err)
	}
	lookup, err := spec.SnapshotLookup(snap)
	if err != nil {
		b.Fatal(err)
	}
	s, err := spec.Load("../../data/examples/adc-channel.yaml")
	if err != nil {
		b.Fatal(err)
	}
	d, err := spec.LoadDesign("../../data/examples/adc-channel-design.yaml")
	if err != nil {
		b.Fatal(err)
	}
	if err := d.Resolve(lookup); err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	for b.Loop() {
		if _, err := Evaluate(s, d); err != nil {
			b.Fatal(err)
		}
	}
}

// TestADCGainShare checks the share of an ADC's gain error at a code:
// proportional to the distance from the point the transfer is pinned at
// (zero, or the range's end nearest zero), whole at the farthest end
// (common practice: the data-sheet definition of gain error, measured at
// the last transition with the offset error removed).
func TestADCGainShare(t *testing.T) {
	for _, c := range []struct {
		lo, hi, v, want float64
	}{
		{-5, 5, 2.5, 0.5},            // bipolar: |v|/(FS/2)
		{-5, 5, -5, 1},               // either end carries the whole figure
		{0, 4.096, 0.1, 0.1 / 4.096}, // unipolar: v/FS, near nothing at the bottom
		{0, 4.096, 4.096, 1},
		{1, 5, 3, 0.5},    // a range above zero is pinned at its bottom
		{-5, -1, -3, 0.5}, // below zero, at its top
		{-1, 4, 4, 1},     // spanning zero unevenly: the farther end is whole
		{-1, 4, -1, 0.25},
	} {
		a := &spec.ADC{Range: spec.Range{Min: c.lo, Max: c.hi}}
		if got := adcGainShare(a, c.v); math.Abs(got-c.want) > 1e-15 {
			t.Errorf("range %g..%g V at %g V: share %g, want %g", c.lo, c.hi, c.v, got, c.want)
		}
	}
}
