package budget

import (
	"math"
	"strconv"
	"strings"
	"testing"

	"plumb/catalog"

	"plumb/optimize/family"
	"plumb/optimize/spec"
)

// mustSpec parses an inline spec for tests.
func mustSpec(t testing.TB, src string) *spec.Spec {
	t.Helper()
	s, err := spec.Parse([]byte(src), "test-spec.yaml")
	if err != nil {
		t.Fatal(err)
	}
	return s
}

func mustDesign(t testing.TB, src string) *spec.Design {
	t.Helper()
	d, err := spec.ParseDesign([]byte(src), "test-design.yaml")
	if err != nil {
		t.Fatal(err)
	}
	return d
}

// diffSpec is a difference-amplifier spec of gain g, ±1 V differential and
// ±10 V common mode, on ±15 V.
func diffSpec(g float64, method string) string {
	return strings.NewReplacer("GAIN", ftoa(g), "METHOD", method).Replace(`name: t
about: test difference amplifier
family: difference
gain: GAIN
input: {differential: ±0.5V, common_mode: -10..10V}
supply: ±15V
temperature: {range: 25..25C}
limits: {cmrr: 20dB, gain_error: 50%}
analysis: {method: METHOD, trials: 20000, seed: 1}
`)
}

func ftoa(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

func idealAmpFigures() catalog.Amplifier {
	return catalog.Amplifier{Part: "ideal", Type: catalog.OpAmp, AolVV: 1e12, GBWHz: 1e8, CMNegV: -1, CMPosV: -1, SwingNegV: -1, SwingPosV: -1}
}

// idealAmp is an op-amp good enough to leave the resistors alone in the
// budget: 1e12 open-loop gain, no offsets, no CMRR limit.
const idealAmp = `amplifier: {aol: 1e12, gbw: 100MHz, cm_neg: -1V, cm_pos: -1V, swing_neg: -1V, swing_pos: -1V}
`

// diffDesign fills a difference amplifier of gain g: R1 = R3 = 10k,
// R2 = R4 = g x 10k, every resistor of tolerance tol.
func diffDesign(g float64, tol string) string {
	r2 := ftoa(g * 10e3)
	return "family: difference\npositions:\n" +
		"  R1: {value: 10k, tolerance: " + tol + ", tcr: 0ppm/K}\n" +
		"  R2: {value: " + r2 + ", tolerance: " + tol + ", tcr: 0ppm/K}\n" +
		"  R3: {value: 10k, tolerance: " + tol + ", tcr: 0ppm/K}\n" +
		"  R4: {value: " + r2 + ", tolerance: " + tol + ", tcr: 0ppm/K}\n" + idealAmp
}

// TestDifferenceCMRRWorstCase checks the worst-case corner enumeration of
// the exact circuit against the first-order formula CMRR = (1+G)/(4t)
// (S. Franco, Design with Operational Amplifiers and Analog Integrated
// Circuits, difference-amplifier chapter, from memory): unity gain with 1 %
// resistors gives 50 (34 dB), gain 10 with 0.1 % gives 2750 (68.8 dB).
// The exact solve and the first-order formula differ slightly: at unity
// gain the worst corner gives exactly 1/(2t) = 50 (the (1±t) factors
// cancel), at gain 10 with 0.1 % it gives 2749.998 (finite open-loop gain
// and second-order terms); the check allows 2t relative.
func TestDifferenceCMRRWorstCase(t *testing.T) {
	cases := []struct {
		name string
		gain float64
		tol  string
		t    float64
		want float64 // linear CMRR, Franco
	}{
		{"unity gain 1%", 1, "1%", 0.01, 50},
		{"gain 10 0.1%", 10, "0.1%", 0.001, 2750},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			res, err := Evaluate(mustSpec(t, diffSpec(c.gain, "worst-case")), mustDesign(t, diffDesign(c.gain, c.tol)))
			if err != nil {
				t.Fatal(err)
			}
			got := math.Pow(10, res.Metrics.CMRRdB/20)
			t.Logf("exact worst corner %.9g, first order %.9g", got, c.want)
			if rel := math.Abs(got/c.want - 1); rel > 2*c.t {
				t.Errorf("worst-case CMRR %.4g (%.2f dB), Franco first order %.4g (%.2f dB): off by %.2g", got, res.Metrics.CMRRdB, c.want, 20*math.Log10(c.want), rel)
			}
			if !strings.Contains(strings.Join(res.Notes, "\n"), "corners of 4 varying parameters enumerated") {
				t.Errorf("notes do not report the enumeration: %q", res.Notes)
			}
		})
	}
}

// TestCommonModeErrorRuleOfThumb: a unity-gain difference amplifier whose
// two ratios differ by 2 % turns 10 V of common mode into about 100 mV at
// the output; with four independent 1 % resistors at their worst corner it
// is about 200 mV (common practice).
func TestCommonModeErrorRuleOfThumb(t *testing.T) {
	s := mustSpec(t, diffSpec(1, "worst-case"))
	e, err := NewEvaluator(s, family.Difference.Name, spec.Options{})
	if err != nil {
		t.Fatal(err)
	}
	fig := func(ohm, tol float64) Fig { return Fig{Label: "t", Ohm: ohm, Tolerance: tol} }
	amp := idealAmpFigures()
	// R4/R3 = 1.02 with R2/R1 = 1: ratios 2 % apart.
	c := &Candidate{Figs: []Fig{fig(10e3, 0), fig(10e3, 0), fig(10e3, 0), fig(10.2e3, 0)}, Amp: &amp}
	if err := e.SetCandidate(c); err != nil {
		t.Fatal(err)
	}
	var p point
	if err := e.eval(e.x, s.TempRef, false, &p); err != nil {
		t.Fatal(err)
	}
	if got := math.Abs(p.acm * 10); math.Abs(got-0.1) > 0.005 {
		t.Errorf("2 %% ratio mismatch, 10 V CM: %.4g V at the output, want about 0.1 V", got)
	}
	// Four 1 % resistors, worst corner (R1 and R4 high, R2 and R3 low or the reverse).
	c = &Candidate{Figs: []Fig{fig(10e3, 0.01), fig(10e3, 0.01), fig(10e3, 0.01), fig(10e3, 0.01)}, Amp: &amp}
	if err := e.SetCandidate(c); err != nil {
		t.Fatal(err)
	}
	worst := 0.0
	for mask := 0; mask < 16; mask++ {
		for j := 0; j < 4; j++ {
			e.x[e.devParam(j)] = float64(2*((mask>>j)&1) - 1)
		}
		if err := e.eval(e.x, s.TempRef, false, &p); err != nil {
			t.Fatal(err)
		}
		worst = math.Max(worst, math.Abs(p.acm*10))
	}
	clear(e.x)
	if math.Abs(worst-0.2) > 0.01 {
		t.Errorf("four 1 %% resistors, worst corner, 10 V CM: %.4g V, want about 0.2 V", worst)
	}
}

// devParam finds the tolerance parameter of position k.
func (e *Evaluator) devParam(k int) int {
	for j, p := range e.params {
		if p.kind == pDev && p.pos == k {
			return j
		}
	}
	panic("no tolerance parameter")
}

func TestThermalNoise(t *testing.T) {
	// 1 kΩ at 300 K: 4.07 nV/√Hz (Horowitz and Hill, The Art of Electronics,
	// 3rd ed., noise chapter, about 4 nV/√Hz; from memory).
	if got := ThermalNoise(1e3, 300); math.Abs(got-4.07e-9) > 0.005e-9 {
		t.Errorf("ThermalNoise(1k, 300 K) = %.4g, want 4.07e-9", got)
	}
}

// TestOpenLoopGainError: noise gain 10 with A = 1e5 gives a gain error of
// about NG/A = 100 ppm (Franco, first chapter; from memory). The exact
// closed-loop gain is G/(1 + NG/A), so the error is -99.9 ppm.
func TestOpenLoopGainError(t *testing.T) {
	s := mustSpec(t, `name: t
about: non-inverting gain 10
family: noninverting
gain: 10
input: {single_ended: 0..1V}
supply: ±15V
temperature: {range: 25..25C}
limits: {gain_error: 1%}
`)
	d := mustDesign(t, `family: noninverting
positions:
  Rf: {value: 9k, tolerance: 0%, tcr: 0ppm/K}
  Rg: {value: 1k, tolerance: 0%, tcr: 0ppm/K}
amplifier: {aol: 1e5, gbw: 1MHz}
`)
	res, err := Evaluate(s, d)
	if err != nil {
		t.Fatal(err)
	}
	if got := res.Metrics.GainNominalError; math.Abs(got+1e-4) > 0.02e-4 {
		t.Errorf("gain error %.4g, want about -100 ppm", got)
	}
	if ng := res.Metrics.NoiseGain; math.Abs(ng-10) > 0.01 {
		t.Errorf("noise gain %.4g, want 10", ng)
	}
	// Bandwidth GBW/NG = 1 MHz/10 = 100 kHz (domain notes §3).
	if bw := res.Metrics.BandwidthHz; math.Abs(bw-1e5) > 100 {
		t.Errorf("bandwidth %.4g, want 1e5", bw)
	}
}

// inverting returns a spec and design of an inverting amplifier of gain -1
// with two resistors of tempco tcr and tolerance tol over range.
func inverting(t testing.TB, tol, tcr, rng, extra string) (*spec.Spec, *spec.Design) {
	s := mustSpec(t, `name: t
about: inverting unity gain
family: inverting
gain: -1
input: {single_ended: ±1V}
supply: ±15V
temperature: {range: `+rng+`}
limits: {gain_error: 1%, gain_drift: 100ppm/K}
`+extra)
	d := mustDesign(t, `family: inverting
positions:
  Rf: {value: 10k, tolerance: `+tol+`, tcr: `+tcr+`}
  Rg: {value: 10k, tolerance: `+tol+`, tcr: `+tcr+`}
`+idealAmp)
	return s, d
}

// TestTempcoOverRange: two 25 ppm/K resistors of opposite sign move a ratio
// by 2 x 25 x ΔT ppm over the worst excursion ΔT = max(|Tmax-25|,
// |Tmin-25|) from the 25 C reference (common practice arithmetic; domain
// notes §3). Over -40..85 C that is 65 K (from 25 C down to -40 C), not
// the 60 K of the 85 C end alone: 3250 ppm, exactly (1 + 1.625e-3)/(1 -
// 1.625e-3) - 1 = 3255.3 ppm.
func TestTempcoOverRange(t *testing.T) {
	cases := []struct {
		name   string
		rng    string
		dt     float64 // worst excursion, K
		approx float64 // 2 x 25 ppm/K x dt
	}{
		{"85 C end only: 60 K", "25..85C", 60, 3000e-6},
		{"-40..85 C: 65 K at -40 C", "-40..85C", 65, 3250e-6},
		{"-40 C end only: 65 K", "-40..25C", 65, 3250e-6},
		{"-20..85 C: 60 K at 85 C", "-20..85C", 60, 3000e-6},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			s, d := inverting(t, "0%", "25ppm/K", c.rng, "")
			if got := s.WorstExcursion(); got != c.dt {
				t.Fatalf("worst excursion %g K, want %g", got, c.dt)
			}
			res, err := Evaluate(s, d)
			if err != nil {
				t.Fatal(err)
			}
			a := 25e-6 * c.dt
			exact := (1+a)/(1-a) - 1
			if got := res.Metrics.GainError; math.Abs(got-exact) > 1e-9 || math.Abs(got-c.approx) > 10e-6 {
				t.Errorf("gain error over %g K = %.6g, want %.6g (about %.4g)", c.dt, got, exact, c.approx)
			}
			if got, want := res.Metrics.DriftPPMPerK, 1e6*exact/c.dt; math.Abs(got-want) > 1e-6 {
				t.Errorf("drift %.6g ppm/K, want %.6g (about 50)", got, want)
			}
		})
	}
}

// TestCalibrationRemovesInitialErrorOnly: calibration at 25 C takes out the
// 1 % tolerances but leaves the tempco drift.
func TestCalibrationRemovesInitialErrorOnly(t *testing.T) {
	s, d := inverting(t, "1%", "25ppm/K", "25..85C", "")
	sc, _ := inverting(t, "1%", "25ppm/K", "25..85C", "calibration: {gain: true}\n")
	plain, err := Evaluate(s, d)
	if err != nil {
		t.Fatal(err)
	}
	cal, err := Evaluate(sc, d)
	if err != nil {
		t.Fatal(err)
	}
	if plain.Metrics.GainError < 0.02 {
		t.Errorf("uncalibrated gain error %.4g, want above 2 %% (two 1 %% resistors)", plain.Metrics.GainError)
	}
	// Left: the tempco, about 3000 ppm over 60 K (common practice arithmetic).
	if math.Abs(cal.Metrics.GainError-3000e-6) > 20e-6 {
		t.Errorf("calibrated gain error %.4g, want about 3000 ppm (drift only)", cal.Metrics.GainError)
	}
	if math.Abs(cal.Metrics.DriftPPMPerK-plain.Metrics.DriftPPMPerK) > 0.5 {
		t.Errorf("calibration changed the drift: %.4g vs %.4g ppm/K", cal.Metrics.DriftPPMPerK, plain.Metrics.DriftPPMPerK)
	}
}
