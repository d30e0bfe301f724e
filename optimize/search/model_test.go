package search

import (
	"math"
	"math/rand/v2"
	"testing"

	"plumb/catalog"
)

func TestCMRRCheckValues(t *testing.T) {
	tests := []struct {
		name    string
		g       grades
		k       float64
		want    float64 // CMRR, V/V
		relTol  float64
		comment string
	}{
		// S. Franco, "Design with Operational Amplifiers and Analog
		// Integrated Circuits", difference-amplifier chapter (from memory):
		// worst case (1+G)/(4t).
		{"unity gain 1 % resistors", discreteGrades(0.01, 0, 0, 0.01, 0, 0, 0), 1, 50, 0.01, "Franco: 50, about 34 dB"},
		{"gain 10 with 0.1 % resistors", discreteGrades(0.001, 0, 0, 0.001, 0, 0, 0), 10, 2750, 0.005, "Franco: 2750, about 68.8 dB"},
		// Matched network, ratios each within r: (1+G)/(2r) (domain notes §2).
		{"network 0.01 % ratio, gain 1", networkGrades(0.0001, 0, 0), 1, 10000, 0.001, "(1+G)/(2r)"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got := 1 / cmWorst(tc.k, tc.g.hi, tc.g.lo)
			if math.Abs(got/tc.want-1) > tc.relTol {
				t.Errorf("CMRR %.1f, want %.1f (%s)", got, tc.want, tc.comment)
			}
		})
	}
}

// Common practice rule of thumb: a unity-gain difference amplifier whose
// ratios differ by 2 % turns 10 V of common mode into about 100 mV.
func TestCommonModeRuleOfThumb(t *testing.T) {
	k1, k2 := 1.0, 1.02
	acm := (k2 - k1) / (1 + k2)
	if v := 10 * acm; math.Abs(v-0.1) > 0.002 {
		t.Errorf("common-mode error %.4f V, want about 0.100 V", v)
	}
	// Four independent 1 % resistors at their worst corners: about 200 mV.
	g := discreteGrades(0.01, 0, 0, 0.01, 0, 0, 0)
	if v := 10 * cmWorst(1, g.hi, g.lo); math.Abs(v-0.2) > 0.005 {
		t.Errorf("four-resistor worst case %.4f V, want about 0.200 V", v)
	}
}

func testSpace(c Circuit, gain float64, m Method) *space {
	p := &Problem{Circuit: c, Gain: gain, SupplyNeg: -15, SupplyPos: 15, TMin: -40, TMax: 85, TRef: 25, Method: m}
	if err := p.normalize(); err != nil {
		panic(err)
	}
	return &space{p: p, rss: m != WorstCase, k: p.ratio(), w: p.window(), dT: p.deltaT(), tempK: 300}
}

func TestEvalCheckValues(t *testing.T) {
	ideal := &amp{a: &catalog.Amplifier{AolVV: 1e5}}
	var m metrics
	// Franco, first chapter (from memory): noise gain 10 with A = 1e5 gives
	// a gain error of about 100 ppm.
	s := testSpace(NonInverting, 10, WorstCase)
	s.eval(&grades{hi: 1, lo: 1, hiT: 1, loT: 1, hiL: 1, loL: 1, hiS: 1, loS: 1}, 9, 1e3, ideal, &m)
	if math.Abs(m.gainErr-1e-4) > 1e-6 {
		t.Errorf("open-loop gain error %.3g, want about 1e-4", m.gainErr)
	}
	// Common practice arithmetic: two 25 ppm/K resistors of opposite sign
	// over a 60 K excursion move a ratio by 2 x 25 x 60 = 3000 ppm.
	s = testSpace(Difference, 1, WorstCase)
	s.dT = 60
	s.eval(&grades{hi: 1, lo: 1, hiT: 1, loT: 1, hiL: 1, loL: 1, hiS: 1, loS: 1, drift: 50}, 1, 1e3, &amp{a: &catalog.Amplifier{}}, &m)
	if math.Abs(m.totalErr-m.gainErr-3000e-6) > 1e-12 || m.drift != 50 {
		t.Errorf("tempco error %.6g, drift %g; want 3000 ppm and 50 ppm/K", m.totalErr-m.gainErr, m.drift)
	}
	// Horowitz and Hill, The Art of Electronics, 3rd ed., noise chapter
	// (from memory): 1 kOhm at 300 K is about 4.07 nV/sqrt(Hz).
	if n := noiseDensity(1, 0, 0, 1e3, 300, 1); math.Abs(n-4.07e-9) > 0.01e-9 {
		t.Errorf("thermal noise %.4g, want 4.07e-9", n)
	}
}

func TestDividerCheckValues(t *testing.T) {
	s := testSpace(Divider, 0.125, WorstCase)
	var m metrics
	// 210 k over 30 k is exactly 0.125 (common practice arithmetic).
	s.eval(&grades{hi: 1, lo: 1, hiT: 1, loT: 1, hiL: 1, loL: 1, hiS: 1, loS: 1}, 210e3/30e3, 210e3*30e3/240e3, &amp{a: &catalog.Amplifier{}}, &m)
	if math.Abs(m.gain-0.125) > 1e-15 || m.gainErr > 1e-15 {
		t.Errorf("gain %.17g, error %g; want 0.125 exactly", m.gain, m.gainErr)
	}
	// Two 100 ppm/K resistors of opposite sign move the ratio 200 ppm/K;
	// the divider's gain moves k/(1+k) of that, 7/8 x 200 = 175 ppm/K
	// (first-order sensitivity of 1/(1+k), common practice).
	s.eval(&grades{hi: 1, lo: 1, hiT: 1, loT: 1, hiL: 1, loL: 1, hiS: 1, loS: 1, drift: 200}, 7, 26.25e3, &amp{a: &catalog.Amplifier{}}, &m)
	if math.Abs(m.drift-175) > 1e-9 {
		t.Errorf("drift %.6g, want 175 ppm/K", m.drift)
	}
	// 1 % resistors: exact worst gain 1/(1 + 7 x 0.99/1.01) = 0.12719..., +1.75 %.
	g := discreteGrades(0.01, 0, 0, 0.01, 0, 0, 0)
	s.eval(&g, 7, 26.25e3, &amp{a: &catalog.Amplifier{}}, &m)
	want := (1/(1+7*0.99/1.01))/0.125 - 1
	if math.Abs(m.gainErr-want) > 1e-12 {
		t.Errorf("worst gain error %.6g, want %.6g", m.gainErr, want)
	}
}

func TestEffectiveRatio(t *testing.T) {
	tests := []struct {
		name            string
		c               Circuit
		gain, src, load float64
		rg, rf          float64
		k0              float64
	}{
		// 50 ohm of source in series with 1 k: 10 k / 1.05 k (common practice arithmetic).
		{"difference with source", Difference, 10, 50, 0, 1e3, 10e3, 10e3 / 1050},
		{"non-inverting ignores source", NonInverting, 11, 50, 0, 1e3, 10e3, 10},
		// Rbot 30 k in parallel with a 300 k load is 27.27 k; Rtop 210 k + 1 k of source.
		{"loaded divider", Divider, 0.125, 1e3, 300e3, 30e3, 210e3, 211e3 / (30e3 * 300e3 / 330e3)},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s := testSpace(tc.c, tc.gain, WorstCase)
			s.p.SourceOhm, s.p.LoadOhm = tc.src, tc.load
			k0, _ := s.effective(tc.rg, tc.rf)
			if math.Abs(k0/tc.k0-1) > 1e-12 {
				t.Errorf("k0 %.9g, want %.9g", k0, tc.k0)
			}
			// target inverts effective: at Rf = target(Rg) the ratio is exact.
			if k, _ := s.effective(tc.rg, s.target(tc.rg)); math.Abs(k/s.k-1) > 1e-12 {
				t.Errorf("target gives ratio %.9g, want %.9g", k, s.k)
			}
		})
	}
}

// TestBoundIsLowerBound checks on random classes that the error bound the
// search prunes with is never worse than any design of the class (the
// property the exactness of the search rests on).
func TestBoundIsLowerBound(t *testing.T) {
	r := rand.New(rand.NewPCG(3, 3))
	tols := []float64{0.0001, 0.001, 0.01, 0.05}
	for i := 0; i < 5000; i++ {
		c := []Circuit{Difference, NonInverting, Inverting, Divider}[r.IntN(4)]
		gain := 1.5 + 30*r.Float64()
		if c == Divider {
			gain = 1 / gain
		}
		s := testSpace(c, gain, []Method{WorstCase, RSS}[r.IntN(2)])
		s.p.CalGain, s.p.CalOffset = r.IntN(4) == 0, r.IntN(4) == 0
		var g grades
		if r.IntN(2) == 0 {
			g = discreteGrades(tols[r.IntN(4)], 100*r.Float64(), 0.002*r.Float64(), tols[r.IntN(4)], 100*r.Float64(), 0.002*r.Float64(), s.dT)
		} else {
			g = networkGrades(tols[r.IntN(4)], 10*r.Float64(), s.dT)
		}
		a := &amp{a: &catalog.Amplifier{AolVV: math.Pow(10, 3+4*r.Float64()), VosV: 1e-3 * r.Float64(), VosDriftVK: 1e-5 * r.Float64(),
			IbA: 1e-7 * r.Float64(), IosA: 1e-8 * r.Float64(), NoiseVHz: 1e-8 * r.Float64(), GBWHz: 1e6}, ainv: 1e-4 * r.Float64()}
		k0 := s.k * (1 + s.w*(2*r.Float64()-1))
		rp := 1e3 + 1e5*r.Float64()
		var m, lb metrics
		s.eval(&g, k0, rp, a, &m)
		s.bound(&g, a, &lb)
		if !below(&lb, &m) {
			t.Fatalf("case %d (%s, G %.3f, k0 %.5f): bound %+v is not below design %+v", i, c, gain, k0, lb, m)
		}
	}
}

// below reports whether bound lb is nowhere worse than design m.
func below(lb, m *metrics) bool {
	return lb.gainErr <= m.gainErr && lb.totalErr <= m.totalErr && lb.drift <= m.drift && lb.cmrrDB >= m.cmrrDB &&
		lb.offset <= m.offset && lb.offDrift <= m.offDrift && lb.noise <= m.noise && lb.noiseRMS <= m.noiseRMS
}
