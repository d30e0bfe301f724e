package budget

import (
	"math"
	"testing"

	"plumb/optimize/spec"
)

// TestCascadeByHand checks the chain's figures of an in-amp (gain 100)
// followed by a difference stage (gain 1.8) against the textbook cascade
// of two gain stages, worked by hand (common practice; any amplifier
// error-budget text gives the same products):
//
//	stage 1: e1 = 0.3 %, d1 = 15 ppm/K, o1 = 2 mV, c1 = 2 mV, n1 = 1.5 µV/√Hz, f1 = 6 kHz, CMRR1 = 100 dB
//	stage 2: e2 = 0.1 %, d2 = 7 ppm/K, o2 = 1.5 mV, c2 = 0.5 mV, n2 = 0.15 µV/√Hz, f2 = 700 kHz, CMRR2 = 60 dB
//
// worst case: e = (1.003)(1.001) - 1 = 0.004003; d = 22 ppm/K;
// offset = 1.8 × 1.001 × 2 mV + 1.5 mV = 5.1036 mV; CM error the same
// way, 4.1036 mV; noise √((1.8 × 1.5)² + 0.15²) µV/√Hz = 2.70416 µV/√Hz;
// CMRR = 100 dB - 20 log10(1 + 1/(2 × 1000)) = 99.99566 dB; bandwidth of
// two real poles from (1 + (f/f1)²)(1 + (f/f2)²) = 2, 5.99956 kHz.
// RSS: e = √(0.003² + 0.001²) = 0.0031623, offset = √(3.6² + 1.5²) mV = 3.9 mV.
func TestCascadeByHand(t *testing.T) {
	st1 := &Result{Pass: true, Metrics: Metrics{Gain: 100, GainTarget: 100, GainError: 0.003, DriftPPMPerK: 15, OutputOffsetV: 2e-3,
		CommonModeErrorV: 2e-3, NoiseDensity: 1.5e-6, BandwidthHz: 6e3, CMRRdB: 100, InputImpedanceOhm: 1e9}}
	st2 := &Result{Pass: true, Metrics: Metrics{Gain: 1.8, GainTarget: 1.8, GainError: 0.001, DriftPPMPerK: 7, OutputOffsetV: 1.5e-3,
		CommonModeErrorV: 0.5e-3, NoiseDensity: 0.15e-6, BandwidthHz: 700e3, CMRRdB: 60}}
	s := &spec.Spec{Gain: 180, Differential: true, Analysis: spec.Analysis{Method: spec.WorstCase},
		Stages: []spec.Stage{{Families: []string{"inamp"}, Gain: 100}, {Families: []string{"difference"}, Gain: 1.8}}}
	cb, err := Cascade(s, []*Result{st1, st2})
	if err != nil {
		t.Fatal(err)
	}
	m := cb.Metrics
	for _, c := range []struct {
		name      string
		got, want float64
	}{
		{"gain", m.Gain, 180},
		{"gain error", m.GainError, 0.004003},
		{"drift", m.DriftPPMPerK, 22},
		{"offset", m.OutputOffsetV, 5.1036e-3},
		{"CM error", m.CommonModeErrorV, 4.1036e-3},
		{"noise density", m.NoiseDensity, 2.70416e-6},
		{"CMRR", m.CMRRdB, 99.99566},
		{"bandwidth", m.BandwidthHz, 5999.56},
		{"input impedance", m.InputImpedanceOhm, 1e9},
	} {
		if math.Abs(c.got-c.want) > 1e-5*math.Abs(c.want) {
			t.Errorf("%s = %.7g, want %.7g", c.name, c.got, c.want)
		}
	}
	s.Analysis.Method = spec.RSS
	cb, err = Cascade(s, []*Result{st1, st2})
	if err != nil {
		t.Fatal(err)
	}
	if got := cb.Metrics.GainError; math.Abs(got-0.0031623) > 1e-6 {
		t.Errorf("RSS gain error = %.7g, want 0.0031623", got)
	}
	if got := cb.Metrics.OutputOffsetV; math.Abs(got-3.9e-3) > 1e-9 {
		t.Errorf("RSS offset = %.7g, want 3.9 mV", got)
	}
}

// TestCascadeBandwidth: n identical single-pole stages in cascade have a
// -3 dB frequency of f √(2^(1/n) - 1), 0.6436 f for two (the bandwidth
// shrinkage of cascaded stages; Sedra and Smith, "Microelectronic
// Circuits", frequency response chapter, from memory); one pole far above
// the other leaves the lower.
func TestCascadeBandwidth(t *testing.T) {
	if got, want := CascadeBandwidth(1e3, 1e3), 1e3*math.Sqrt(math.Sqrt2-1); math.Abs(got-want) > 1e-9*want {
		t.Errorf("two equal poles: %.6g, want %.6g", got, want)
	}
	if got := CascadeBandwidth(1e3, 1e9); math.Abs(got-1e3) > 1e-3 {
		t.Errorf("far pole: %.6g, want 1 kHz", got)
	}
	if got := CascadeBandwidth(0, 5e3); got != 5e3 {
		t.Errorf("unknown pole: %g, want the other", got)
	}
}

// TestCascadeLoad: the second stage's input resistance loads the first
// stage's output, and the current it draws at the output's peak is Ohm's
// law (a fact of the trade): a ±10 mV input at a first-stage gain of 100
// swings ±1 V, into at least 24 kΩ that is 41.67 µA.
func TestCascadeLoad(t *testing.T) {
	st1 := &Result{Pass: true, Metrics: Metrics{Gain: 100, GainTarget: 100, InputImpedanceOhm: 1e9, BandwidthHz: 1e4}}
	st2 := &Result{Pass: true, Metrics: Metrics{Gain: 1.8, GainTarget: 1.8, InputImpedanceOhm: 24e3, BandwidthHz: 1e5}}
	s := &spec.Spec{Gain: 180, Differential: true, Input: spec.Range{Min: -0.01, Max: 0.01}, Analysis: spec.Analysis{Method: spec.WorstCase},
		Stages: []spec.Stage{{Families: []string{"inamp"}, Gain: 100}, {Families: []string{"difference"}, Gain: 1.8}}}
	cb, err := Cascade(s, []*Result{st1, st2})
	if err != nil {
		t.Fatal(err)
	}
	if len(cb.Loads) != 1 {
		t.Fatalf("loads %+v, want one", cb.Loads)
	}
	l := cb.Loads[0]
	if l.Stage != 2 || math.Abs(l.PeakV-1) > 1e-12 || math.Abs(l.CurrentA-1/24e3) > 1e-15 {
		t.Errorf("load %+v, want stage 2, 1 V peak, 41.67 µA", l)
	}
}
