package budget

import (
	"math"
	"strings"
	"testing"

	"plumb/catalog"
	"plumb/optimize/family"
	"plumb/optimize/spec"
)

// TestCMRRCombination: the amplifier's CMRR adds to the resistors' as
// 1/CMRR_total = 1/CMRR_res + 1/CMRR_amp in the worst case (domain notes
// §2): unity gain with 1 % resistors (50) and a 60 dB amplifier (1000)
// give 1/(1/50 + 1/1000) = 47.62.
func TestCMRRCombination(t *testing.T) {
	s := mustSpec(t, diffSpec(1, "worst-case"))
	d := mustDesign(t, diffDesign(1, "1%"))
	d.Amplifier.Amp.CMRRdB = 60
	res, err := Evaluate(s, d)
	if err != nil {
		t.Fatal(err)
	}
	got := math.Pow(10, res.Metrics.CMRRdB/20)
	if want := 1 / (1.0/50 + 1.0/1000); math.Abs(got/want-1) > 1e-3 {
		t.Errorf("combined CMRR %.5g, want %.5g", got, want)
	}
	if c := res.Limits[0]; c.Name != LimitCMRR && res.Limits[1].Name != LimitCMRR {
		t.Fatalf("limits %+v", res.Limits)
	}
}

// TestRSSGainError: the differential gain of a difference amplifier is
// Adm = ((R4/(R3+R4))(1+R2/R1) + R2/R1)/2 (domain notes §2, Franco); at
// unity gain its relative sensitivities are ±3/4 to R2 and R1 and ±1/4 to
// R4 and R3, so four tolerances t give sqrt(2 (3/4)² + 2 (1/4)²) t =
// 1.118 t by root-sum-square and 2t in the worst case (RSS and EVA as in
// ECSS-Q-HB-30-01A, from memory).
func TestRSSGainError(t *testing.T) {
	s := mustSpec(t, diffSpec(1, "rss"))
	res, err := Evaluate(s, mustDesign(t, diffDesign(1, "0.1%")))
	if err != nil {
		t.Fatal(err)
	}
	if got, want := res.Metrics.GainError, math.Sqrt(2*0.75*0.75+2*0.25*0.25)*0.001; math.Abs(got-want) > 3e-6 {
		t.Errorf("RSS gain error %.6g, want %.6g", got, want)
	}
	s.Analysis.Method = spec.WorstCase
	wc, err := Evaluate(s, mustDesign(t, diffDesign(1, "0.1%")))
	if err != nil {
		t.Fatal(err)
	}
	// Worst case adds them: 4 x t/2 = 2t.
	if got := wc.Metrics.GainError; math.Abs(got-0.002) > 4e-6 {
		t.Errorf("worst-case gain error %.6g, want 0.002", got)
	}
}

// TestMatchedAmplifier: a stage on an amplifier with matched resistors
// inside takes its gain error, drift and CMRR from the datasheet figures.
func TestMatchedAmplifier(t *testing.T) {
	s := mustSpec(t, `name: t
about: matched amplifier
family: matched
gain: 2
input: {differential: ±1V, common_mode: -2..2V}
supply: ±15V
temperature: {range: -40..85C}
limits: {gain_error: 1%, cmrr: 60dB}
`)
	e, err := NewEvaluator(s, family.Matched.Name, spec.Options{})
	if err != nil {
		t.Fatal(err)
	}
	amp := catalog.Amplifier{Part: "M", Type: catalog.MatchedAmp, GainErrorMax: 0.0005, GainDriftPPM: 5, CMRRdB: 86,
		GBWHz: 1e6, VosV: 100e-6, CMNegV: 1.5, CMPosV: 1.5, SwingNegV: 0.1, SwingPosV: 0.1, InNegV: -20, InPosV: -20, Gains: []float64{1, 2}}
	res, err := e.Evaluate(&Candidate{Amp: &amp, MatchedGain: 2})
	if err != nil {
		t.Fatal(err)
	}
	// Worst: (1 + 0.0005)(1 + 5e-6 x 65) - 1.
	if want := (1+0.0005)*(1+5e-6*65) - 1; math.Abs(res.Metrics.GainError-want) > 1e-9 {
		t.Errorf("gain error %.6g, want %.6g", res.Metrics.GainError, want)
	}
	// The datasheet's 86 dB, less the 0.05 % gain error's effect on Adm
	// at the worst point (-0.004 dB).
	if math.Abs(res.Metrics.CMRRdB-86) > 0.02 {
		t.Errorf("CMRR %.4g dB, want the datasheet's 86", res.Metrics.CMRRdB)
	}
	// Bandwidth GBW/(1+G) (domain notes §3).
	if math.Abs(res.Metrics.BandwidthHz-1e6/3) > 1 {
		t.Errorf("bandwidth %.4g, want %.4g", res.Metrics.BandwidthHz, 1e6/3)
	}
}

// TestOffsetContributorsAddUp: under worst case the output offset is the
// sum of its terms at the worst temperature, so its contributors must add
// up to it. An amplifier with matched resistors inside has no resistor
// terms: Vos (1 + G) plus the Vos drift (1 + G) over the 65 K from 25 C
// to -40 C (domain notes §3, arithmetic). The table once took its
// temperature from the resistor terms alone and left the drift out.
func TestOffsetContributorsAddUp(t *testing.T) {
	s := mustSpec(t, `name: t
about: matched amplifier offset
family: matched
gain: 2
input: {differential: ±1V, common_mode: -2..2V}
supply: ±15V
temperature: {range: -40..85C}
limits: {output_offset: 10mV}
`)
	e, err := NewEvaluator(s, family.Matched.Name, spec.Options{})
	if err != nil {
		t.Fatal(err)
	}
	amp := catalog.Amplifier{Part: "M", Type: catalog.MatchedAmp, GainErrorMax: 0.0005, GainDriftPPM: 5, CMRRdB: 86,
		GBWHz: 1e6, VosV: 100e-6, VosDriftVK: 1e-6, CMNegV: 1.5, CMPosV: 1.5, SwingNegV: 0.1, SwingPosV: 0.1, InNegV: -20, InPosV: -20, Gains: []float64{1, 2}}
	res, err := e.Evaluate(&Candidate{Amp: &amp, MatchedGain: 2})
	if err != nil {
		t.Fatal(err)
	}
	want := 3 * (100e-6 + 1e-6*65)
	if got := res.Metrics.OutputOffsetV; math.Abs(got-want) > 1e-12 {
		t.Errorf("output offset %.9g V, want %.9g V", got, want)
	}
	if cs, sum := contributorSum(res, LimitOutputOffset); math.Abs(sum-want) > 1e-12 {
		t.Errorf("offset contributors add up to %.9g V, the offset is %.9g V: %+v", sum, want, cs)
	}
}

// TestGainErrorVsTemperature: two 25 ppm/K resistors of an inverting
// amplifier, worst signs opposite, spread the gain by about ±3000 ppm at
// 85 C (60 K from 25 C, common practice arithmetic) and by zero at 25 C.
func TestGainErrorVsTemperature(t *testing.T) {
	s, d := inverting(t, "0%", "25ppm/K", "-35..85C", "")
	e, err := NewEvaluator(s, family.Inverting.Name, spec.Options{})
	if err != nil {
		t.Fatal(err)
	}
	c, err := CandidateOf(e, d)
	if err != nil {
		t.Fatal(err)
	}
	tc, err := e.GainErrorVsTemperature(c, 13)
	if err != nil {
		t.Fatal(err)
	}
	last := len(tc.TempC) - 1
	if tc.TempC[last] != 85 || math.Abs(tc.High[last]-3000e-6) > 20e-6 || math.Abs(tc.Low[last]+3000e-6) > 20e-6 {
		t.Errorf("at %g C: %g..%g, want about ±3000 ppm", tc.TempC[last], tc.Low[last], tc.High[last])
	}
	if i := 6; tc.TempC[i] != 25 || math.Abs(tc.High[i]) > 1e-9 {
		t.Errorf("at %g C spread %g, want 0", tc.TempC[i], tc.High[i])
	}
}

// TestLoadLife: load-life shift counts in the gain error, calibrated or
// not, but is not drift: two parts of 0.1 % load life and no tempco move
// an inverting gain by up to (1.001/0.999 - 1) = 0.2 % (common practice
// arithmetic) under worst case, with zero drift under every method.
func TestLoadLife(t *testing.T) {
	for _, method := range []string{spec.WorstCase, spec.RSS, spec.MonteCarlo} {
		for _, cal := range []string{"", "calibration: {gain: true}\n"} {
			t.Run(method+"/"+cal, func(t *testing.T) {
				s, _ := inverting(t, "0%", "0ppm/K", "-40..85C", cal)
				s.Analysis.Method, s.Analysis.Trials = method, 500
				d := mustDesign(t, `family: inverting
positions:
  Rf: {value: 10k, tolerance: 0%, tcr: 0ppm/K, load_life: 0.1%}
  Rg: {value: 10k, tolerance: 0%, tcr: 0ppm/K, load_life: 0.1%}
`+idealAmp)
				res, err := Evaluate(s, d)
				if err != nil {
					t.Fatal(err)
				}
				if res.Metrics.DriftPPMPerK > 1e-6 {
					t.Errorf("drift %.4g ppm/K from load life alone", res.Metrics.DriftPPMPerK)
				}
				if method == spec.WorstCase && math.Abs(res.Metrics.GainError-(1.001/0.999-1)) > 1e-9 {
					t.Errorf("gain error %.6g, want %.6g", res.Metrics.GainError, 1.001/0.999-1)
				}
				if res.Metrics.GainError < 0.001 {
					t.Errorf("load life missing from the gain error: %.4g", res.Metrics.GainError)
				}
			})
		}
	}
}

// TestSelfHeating: a resistor dissipating P with thermal resistance θ runs
// P θ above ambient and shifts by TCR x P θ (domain notes §3). A 1k/1k
// divider at 10 V puts 25 mW in Rtop; at 500 K/W it warms 12.5 K, and at
// ±100 ppm/K the ratio moves to 1k/(2k ± 1.25 ohm).
func TestSelfHeating(t *testing.T) {
	s := mustSpec(t, `name: t
about: self-heating
family: divider
gain: 0.5
input: {single_ended: 0..10V}
supply: ±15V
temperature: {range: 25..25C}
limits: {gain_error: 1%}
`)
	d := mustDesign(t, `family: divider
positions:
  Rtop: {value: 1k, tolerance: 0%, tcr: 100ppm/K, power: 0.25W, thermal_resistance: 500K/W}
  Rbot: {value: 1k, tolerance: 0%, tcr: 0ppm/K, power: 0.25W}
`)
	res, err := Evaluate(s, d)
	if err != nil {
		t.Fatal(err)
	}
	want := 1 - 1e3/(2e3-1e3*100e-6*12.5)/0.5 // the worse sign: Rtop lower, gain higher
	if math.Abs(res.Metrics.GainError-math.Abs(want)) > 1e-9 {
		t.Errorf("self-heating gain error %.6g, want %.6g", res.Metrics.GainError, math.Abs(want))
	}
}

// TestInvertingNoise: the output noise of an inverting amplifier is
// e² = 4kT Rf + 4kT Rg (Rf/Rg)² + en² (1 + Rf/Rg)² + (in Rf)² (standard
// noise analysis, Horowitz and Hill, The Art of Electronics, 3rd ed.,
// noise chapter; from memory), and the RMS is that density over π/2 x
// GBW/NG.
func TestInvertingNoise(t *testing.T) {
	s := mustSpec(t, `name: t
about: noise
family: inverting
gain: -10
input: {single_ended: ±0.1V}
supply: ±15V
temperature: {range: 27..27C, reference: 27C}
limits: {noise_density: 1uV/rtHz}
`)
	d := mustDesign(t, `family: inverting
positions:
  Rf: {value: 100k, tolerance: 0%, tcr: 0ppm/K}
  Rg: {value: 10k, tolerance: 0%, tcr: 0ppm/K}
amplifier: {aol: 1e12, gbw: 1MHz, noise: 10nV/rtHz, current_noise: 1pA/rtHz}
`)
	res, err := Evaluate(s, d)
	if err != nil {
		t.Fatal(err)
	}
	kt4 := 4 * Boltzmann * 300.15
	want := math.Sqrt(kt4*100e3 + kt4*10e3*100 + 1e-16*121 + 1e-24*1e10)
	if got := res.Metrics.NoiseDensity; math.Abs(got/want-1) > 1e-6 {
		t.Errorf("noise density %.6g, want %.6g", got, want)
	}
	if got, w := res.Metrics.NoiseRMSV, want*math.Sqrt(math.Pi/2*1e6/11); math.Abs(got/w-1) > 1e-6 {
		t.Errorf("noise RMS %.6g, want %.6g", got, w)
	}
}

// TestHeadroom: a non-inverting input at 4 V on ±5 V rails with an input
// range ending 1.5 V below V+ is 0.5 V out of range; the limit fails and a
// caution names the pin.
func TestHeadroom(t *testing.T) {
	s := mustSpec(t, `name: t
about: headroom
family: noninverting
gain: 1
input: {single_ended: 0..4V}
supply: ±5V
temperature: {range: 25..25C}
limits: {gain_error: 1%}
`)
	d := mustDesign(t, `family: noninverting
positions:
  Rf: {value: 10, tolerance: 0%, tcr: 0ppm/K}
  Rg: {value: 1G, tolerance: 0%, tcr: 0ppm/K}
amplifier: {aol: 1e9, gbw: 1MHz, cm_neg: 1.5V, cm_pos: 1.5V, swing_neg: 0.1V, swing_pos: 0.1V}
`)
	res, err := Evaluate(s, d)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(res.Metrics.HeadroomV+0.5) > 1e-6 {
		t.Errorf("headroom %.6g V, want -0.5", res.Metrics.HeadroomV)
	}
	if res.Pass || !strings.Contains(strings.Join(res.Cautions, " "), "A1 + input comes beyond") {
		t.Errorf("pass %v, cautions %q", res.Pass, res.Cautions)
	}
}

// TestLevelShiftReference: the reference's tolerance and drift enter a level
// shift like any other error: with exact resistors mapping ±5 V onto
// 0..2.5 V from 2.5 V, the 1.25 V offset taken from the reference moves by
// 0.1 % (1.25 mV) at 25 C and by a further 20 ppm/K x 60 K at 85 C.
func TestLevelShiftReference(t *testing.T) {
	s := mustSpec(t, `name: t
about: level shift reference
family: level-shift
input: {single_ended: ±5V}
output: 0..2.5V
supply: ±15V
reference: {voltage: 2.5V, tolerance: 0.1%, drift: 20ppm/K}
temperature: {range: 25..85C}
limits: {output_offset: 10mV}
`)
	ex := "{tolerance: 0%, tcr: 0ppm/K, value: "
	d := mustDesign(t, "family: level-shift\npositions:\n  R1: "+ex+"80k}\n  R2: "+ex+"40k}\n  R3: "+ex+"40k}\n  Rg: "+ex+"40k}\n  Rf: "+ex+"10k}\n"+idealAmp)
	res, err := Evaluate(s, d)
	if err != nil {
		t.Fatal(err)
	}
	want := 1.25 * ((1+0.001)*(1+20e-6*60) - 1)
	if math.Abs(res.Metrics.OutputOffsetV-want) > 1e-9 {
		t.Errorf("offset %.6g V, want %.6g", res.Metrics.OutputOffsetV, want)
	}
	var names []string
	for _, l := range res.Limits {
		if l.Name == LimitOutputOffset {
			for _, c := range l.Contributors {
				names = append(names, c.Name)
			}
		}
	}
	// 1.25 V x 20 ppm/K x 60 K = 1.5 mV outweighs 1.25 V x 0.1 % = 1.25 mV.
	if len(names) < 2 || names[0] != "reference drift" || names[1] != "reference tolerance" {
		t.Errorf("offset contributors %v, want the reference drift then its tolerance first", names)
	}
}

// TestOffsetDriftWithoutLoadLife: load life is a shift at the reference
// temperature, not a drift, so the offset drift (like the gain drift) is
// measured from the point after load life under every method: adding a
// load-life figure to every resistor leaves the RSS and worst-case offset
// drift as they were, to second order (domain notes §3: drift is a change
// with temperature). RSS once measured it from the point as built, which
// put the whole 0.5 % life shift of the ratios into the drift.
func TestOffsetDriftWithoutLoadLife(t *testing.T) {
	for _, method := range []string{"rss", "worst-case"} {
		src := strings.Replace(diffSpec(1, method), "25..25C", "-40..85C", 1)
		src = strings.Replace(src, "limits:", "reference: {voltage: 2.5V}\nlimits:", 1)
		src = strings.Replace(src, "limits: {", "limits: {offset_drift: 1mV/K, ", 1)
		s := mustSpec(t, src)
		drift := func(life string) float64 {
			d := strings.ReplaceAll(diffDesign(1, "0.1%"), "tcr: 0ppm/K", "tcr: 25ppm/K"+life)
			res, err := Evaluate(s, mustDesign(t, d))
			if err != nil {
				t.Fatal(err)
			}
			return res.Metrics.OffsetDriftVPerK
		}
		plain, aged := drift(""), drift(", load_life: 0.5%")
		// Second order: the life shifts scale the ratios the tempcos move,
		// by up to 2 x 0.5 % at the worst corner.
		if plain <= 0 || math.Abs(aged-plain) > 0.011*plain {
			t.Errorf("%s: offset drift %.4g V/K with load life, %.4g V/K without", method, aged, plain)
		}
	}
}
