package strap

import (
	"errors"
	"math"
	"strings"
	"testing"

	"plumb/catalog"
	"plumb/optimize/circuit"
)

// mustEval parses and evaluates one strapping text.
func mustEval(t *testing.T, n *catalog.MatchedNetwork, text string) *Strapping {
	t.Helper()
	c, err := Parse(n, text)
	if err != nil {
		t.Fatal(err)
	}
	s, err := Evaluate(n, c)
	if err != nil {
		t.Fatalf("%s: %v", text, err)
	}
	return s
}

// mustEnumerate is Enumerate for a network known to be valid.
func mustEnumerate(t *testing.T, n *catalog.MatchedNetwork) []Strapping {
	t.Helper()
	all, err := Enumerate(n)
	if err != nil {
		t.Fatal(err)
	}
	return all
}

func near(got, want, tol float64) bool {
	return math.Abs(got-want) <= tol*math.Max(1, math.Abs(want))
}

// TestClassicDifferenceAmplifier: four equal resistors make a difference
// amplifier of gain R2/R1 = 1 with zero common-mode gain; the inverting
// input sees R1, the non-inverting R3 + R4, the op-amp's offset a noise
// gain of 1 + R2/R1 and its bias currents R1‖R2 and R3‖R4 (domain notes §2;
// Franco, difference amplifier section, from memory).
func TestClassicDifferenceAmplifier(t *testing.T) {
	n := classicNet(10e3, 0.001)
	s := mustEval(t, n, "IN-=vn IN+=vp REF=ref SENSE=out")
	for _, c := range []struct {
		name      string
		got, want float64
	}{
		{"gain", s.Gain, 1},
		{"common-mode gain", s.CommonModeGain, 0},
		{"gain from ref", s.GainRef, 1},
		{"vn input impedance", s.InputMinusOhm, 10e3},
		{"vp input impedance", s.InputPlusOhm, 20e3},
		{"ref impedance", s.RefOhm, 20e3},
		{"noise gain", s.NoiseGain, 2},
		{"resistance at the inverting input", s.SourceMinusOhm, 5e3},
		{"resistance at the non-inverting input", s.SourcePlusOhm, 5e3},
	} {
		if !near(c.got, c.want, 1e-12) {
			t.Errorf("%s = %.15g, want %g", c.name, c.got, c.want)
		}
	}
	if s.Kind != Differential || s.Text != "IN-=vn IN+=vp REF=ref SENSE=out OUT=out" {
		t.Errorf("kind %s, text %q", s.Kind, s.Text)
	}
}

// TestRatioStrappings checks strappings of a difference amplifier whose
// inputs are Ra = 20 kΩ and whose feedback and reference elements are
// Rb = Rd = 10 kΩ, each derived by hand from the ideal op-amp equations:
func TestRatioStrappings(t *testing.T) {
	n := ratioNet(20e3, 10e3)
	tests := []struct {
		name, text string
		kind       Kind
		gain       float64
		zinPlus    float64 // NaN where not connected
		zinMinus   float64
	}{
		// As drawn: Adm = Rb/Ra = 1/2; vn sees Ra, vp sees Rc + Rd.
		{"as drawn", "IN-=vn IN+=vp FB=out REF=ref", Differential, 0.5, 30e3, 20e3},
		// Roles swapped: Rb in, Ra feedback, Rd in and Rc to ref: Adm =
		// Ra/Rb = 2; vn sees Rb, vp sees Rd + Rc.
		{"roles swapped", "IN-=out IN+=ref FB=vn REF=vp", Differential, 2, 30e3, 10e3},
		// Non-inverting, Ra to ground and Rb feedback: 1 + Rb/Ra = 3/2; the
		// input is the op-amp's pin through Rc, which carries no current.
		{"non-inverting 1+Rb/Ra", "IN-=ref IN+=vp FB=out", FromPlus, 1.5, math.Inf(1), math.NaN()},
		// Non-inverting, Rb to ground and Ra feedback: 1 + Ra/Rb = 3.
		{"non-inverting 1+Ra/Rb", "IN-=out IN+=vp FB=ref", FromPlus, 3, math.Inf(1), math.NaN()},
		// Inverting: −Rb/Ra = −1/2, input impedance Ra.
		{"inverting -Rb/Ra", "IN-=vp IN+=ref FB=out", FromPlus, -0.5, 20e3, math.NaN()},
		// Inverting: −Ra/Rb = −2, input impedance Rb.
		{"inverting -Ra/Rb", "IN-=out IN+=ref FB=vp", FromPlus, -2, 10e3, math.NaN()},
		// Attenuator: the follower after the divider Rc, Rd: Rd/(Rc+Rd) = 1/3.
		{"attenuator 1/3", "IN+=vp FB=out REF=ref", FromPlus, 1.0 / 3, 30e3, math.NaN()},
		// Attenuator the other way up: Rc/(Rc+Rd) = 2/3.
		{"attenuator 2/3", "IN+=ref FB=out REF=vp", FromPlus, 2.0 / 3, 30e3, math.NaN()},
		// Inputs tied (IN+ and REF both at vp, so Rc and Rd carry no
		// current) with Ra to ground: non-inverting 1 + Rb/Ra = 3/2.
		{"inputs tied", "IN-=ref IN+=vp FB=out REF=vp", FromPlus, 1.5, math.Inf(1), math.NaN()},
	}
	all := mustEnumerate(t, n)
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s := mustEval(t, n, tc.text)
			if s.Kind != tc.kind || !near(s.Gain, tc.gain, 1e-12) {
				t.Errorf("%s: %s gain %.15g, want %s %g", tc.text, s.Kind, s.Gain, tc.kind, tc.gain)
			}
			same := func(got, want float64) bool {
				return (math.IsNaN(got) && math.IsNaN(want)) || (math.IsInf(want, 1) && math.IsInf(got, 1)) || near(got, want, 1e-12)
			}
			if !same(s.InputPlusOhm, tc.zinPlus) || !same(s.InputMinusOhm, tc.zinMinus) {
				t.Errorf("%s: input impedances vp %g, vn %g; want %g, %g", tc.text, s.InputPlusOhm, s.InputMinusOhm, tc.zinPlus, tc.zinMinus)
			}
			// The enumeration offers this gain in this kind.
			found := false
			for _, e := range all {
				found = found || (e.Kind == tc.kind && near(e.Gain, tc.gain, 1e-12))
			}
			if !found {
				t.Errorf("Enumerate offers no %s strapping of gain %g", tc.kind, tc.gain)
			}
		})
	}
}

// TestWorstCaseCMRR: the worst-case CMRR of a difference amplifier from
// resistor mismatch is (1+G)/(4t) for elements each within ±t (Franco,
// difference amplifier section, from memory; domain notes §2 and §6); in
// this package's model t = δ/2 about the common scale, so (1+G)/(2δ). The
// first-order figure is also checked against the exact common-mode gain at
// every corner of the elements (2^4 solves).
func TestWorstCaseCMRR(t *testing.T) {
	tests := []struct {
		name  string
		n     *catalog.MatchedNetwork
		text  string
		gain  float64
		delta float64
	}{
		{"unity, 0.1 % ratio", classicNet(10e3, 0.001), "IN-=vn IN+=vp REF=ref SENSE=out", 1, 0.001},
		{"unity, 1 % ratio", classicNet(10e3, 0.01), "IN-=vn IN+=vp REF=ref SENSE=out", 1, 0.01},
		{"gain 1/2", ratioNet(20e3, 10e3), "IN-=vn IN+=vp FB=out REF=ref", 0.5, 0.0002},
		{"gain 2", ratioNet(20e3, 10e3), "IN-=out IN+=ref FB=vn REF=vp", 2, 0.0002},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s := mustEval(t, tc.n, tc.text)
			t4 := tc.delta / 2
			want := (1 + tc.gain) / (4 * t4)
			if !near(s.CMRRWorst, want, 1e-9) {
				t.Errorf("CMRR %.9g, textbook (1+G)/(4t) = %.9g", s.CMRRWorst, want)
			}
			worst := 0.0
			forCorners(t, tc.n, s, func(gp, gn, _ float64) {
				worst = math.Max(worst, math.Abs(gp+gn))
			})
			if first := s.Gain / s.CMRRWorst; math.Abs(worst-first) > 2*tc.delta*first {
				t.Errorf("exact worst-corner Acm %.6g, first order %.6g", worst, first)
			}
		})
	}
	// Unity gain, ratios within 1 %, 10 V common mode: about 100 mV at the
	// output (domain notes §6, common practice).
	s := mustEval(t, classicNet(10e3, 0.01), "IN-=vn IN+=vp REF=ref SENSE=out")
	if got := 10 * s.Gain / s.CMRRWorst; math.Abs(got-0.1) > 0.002 {
		t.Errorf("common-mode error at 10 V: %.4g V, want about 0.1 V", got)
	}
}

// forCorners calls f with the transfers of s solved at every corner of the
// elements it uses, each at (1 ± δ/2) of nominal.
func forCorners(t *testing.T, n *catalog.MatchedNetwork, s *Strapping, f func(gp, gn, gr float64)) {
	t.Helper()
	m, err := prepare(n)
	if err != nil {
		t.Fatal(err)
	}
	var r resolved
	m.resolve(s.Connections, &r)
	st := newStage(m)
	if v := st.check(m, &r); v != usable {
		t.Fatal(st.reason(v, &r))
	}
	nominal := make([]float64, len(st.net.Resistors))
	for j, res := range st.net.Resistors {
		nominal[j] = res.Ohm
	}
	for mask := range 1 << len(nominal) {
		for j := range nominal {
			sign := 1.0
			if mask>>j&1 == 1 {
				sign = -1
			}
			st.net.Resistors[j].Ohm = nominal[j] * (1 + sign*n.RatioTolerance/2)
		}
		if err := st.solver.Factor(); err != nil {
			t.Fatal(err)
		}
		st.solver.Adjoint()
		var g [Tie1]float64
		for k := InPlus; k < Output; k++ {
			if st.src[k] >= 0 {
				g[k] = st.solver.SourceTransfer(st.src[k])
			}
		}
		f(g[InPlus], g[InMinus], g[Ref])
	}
}

// TestGainErrorAgainstCorners: the first-order worst-case gain error
// Σ|Si|·δ/2 agrees with the exact worst corner to order δ, for every
// strapping of the ratio network.
func TestGainErrorAgainstCorners(t *testing.T) {
	n := ratioNet(20e3, 10e3)
	all := mustEnumerate(t, n)
	for i := range all {
		s := &all[i]
		worst := 0.0
		forCorners(t, n, s, func(gp, gn, _ float64) {
			g := gp
			if s.Kind == Differential {
				g = (gp - gn) / 2
			}
			worst = math.Max(worst, math.Abs(g/s.Gain-1))
		})
		if math.Abs(worst-s.GainErrorWorst) > 2*n.RatioTolerance*s.GainErrorWorst+1e-15 {
			t.Errorf("%s: exact worst-corner gain error %.6g, first order %.6g", s.Text, worst, s.GainErrorWorst)
		}
	}
}

// TestSensitivitiesAgainstDifferences checks the adjoint sensitivities
// against central differences of the solved gain (step 1e-6 of each
// element), for every strapping of the split network.
func TestSensitivitiesAgainstDifferences(t *testing.T) {
	n := splitNet()
	all := mustEnumerate(t, n)
	const h = 1e-6
	for _, s := range all {
		for j, name := range s.Elements {
			gain := func(f float64) float64 {
				c := *n
				c.Elements = append([]catalog.MatchedElement(nil), n.Elements...)
				for k := range c.Elements {
					if c.Elements[k].Name == name {
						c.Elements[k].Ohms *= f
					}
				}
				m, _ := prepare(&c)
				var r resolved
				m.resolve(s.Connections, &r)
				st := newStage(m)
				if v := st.check(m, &r); v != usable && v != unbalanced {
					t.Fatal(st.reason(v, &r))
				}
				return st.gain(&r)
			}
			fd := (gain(1+h) - gain(1-h)) / (2 * h) / s.Gain
			if math.Abs(fd-s.Sensitivity[j]) > 1e-6 {
				t.Errorf("%s, %s: sensitivity %.9g, central difference %.9g", s.Text, name, s.Sensitivity[j], fd)
			}
		}
	}
}

// TestHomogeneity: every strapping's gain is a function of ratios alone
// (homogeneous of degree zero in the resistances), so by Euler's theorem
// on homogeneous functions its sensitivities, and those of its common-mode
// gain, sum to zero; and Gp + Gn + Gr = 1 because shifting every source by
// one volt shifts every node by it.
func TestHomogeneity(t *testing.T) {
	for _, n := range []*catalog.MatchedNetwork{classicNet(10e3, 0.001), ratioNet(20e3, 10e3), ratioNet(49.9e3, 12.4e3), splitNet()} {
		all := mustEnumerate(t, n)
		if len(all) == 0 {
			t.Fatal("no strapping")
		}
		for _, s := range all {
			for _, sens := range [][]float64{s.Sensitivity, s.CMSensitivity} {
				sum, abs := 0.0, 0.0
				for _, x := range sens {
					sum += x
					abs += math.Abs(x)
				}
				if math.Abs(sum) > 1e-12*math.Max(abs, 1) {
					t.Errorf("%s: sensitivities %v sum to %g", s.Text, sens, sum)
				}
			}
			if g := s.GainPlus + s.GainMinus + s.GainRef; math.Abs(g-1) > 1e-12 {
				t.Errorf("%s: Gp + Gn + Gr = %.15g", s.Text, g)
			}
		}
	}
}

// TestEnumerationIsMinimal: no two strappings behave alike, every gain is
// usable (positive differential gains, single-ended from vp), and opening
// any connected pin of a strapping makes it unusable or changes what it
// does, so no listed strapping has a needless connection.
func TestEnumerationIsMinimal(t *testing.T) {
	for _, n := range []*catalog.MatchedNetwork{classicNet(10e3, 0.001), ratioNet(20e3, 10e3), splitNet()} {
		all := mustEnumerate(t, n)
		seen := map[string]string{}
		for _, s := range all {
			k := s.behaviour()
			if prev, ok := seen[k]; ok {
				t.Errorf("%s behaves as %s", s.Text, prev)
			}
			seen[k] = s.Text
			if s.Kind == FromMinus || (s.Kind == Differential && s.Gain <= 0) {
				t.Errorf("%s: %s gain %g should not be listed", s.Text, s.Kind, s.Gain)
			}
			for i, term := range s.Connections {
				if term == Open || term == Output && n.Pins[i] == n.OpAmpOut {
					continue
				}
				c := append(Connections(nil), s.Connections...)
				c[i] = Open
				o, err := Evaluate(n, c)
				if err == nil && o.behaviour() == k {
					t.Errorf("%s: pin %s can be left open (%s) with the same figures", s.Text, n.Pins[i], o.Text)
				}
			}
		}
	}
}

// TestTextRoundTrip: every enumerated strapping's text parses back to the
// same connections and figures.
func TestTextRoundTrip(t *testing.T) {
	n := splitNet()
	all := mustEnumerate(t, n)
	for _, s := range all {
		back := mustEval(t, n, s.Text)
		if back.Text != s.Text || back.behaviour() != s.behaviour() {
			t.Errorf("%q read back as %q", s.Text, back.Text)
		}
	}
}

// TestInputRange checks the inputs' range against the op-amp's common-mode
// range, by hand: on ±5 V rails with inputs working to 1.5 V inside each
// rail (−3.5..3.5 V), the gain-½ strapping holds its op-amp's inputs at
// Vcm·Rd/(Rc+Rd) = Vcm/3 (plus 2/3 of Vref), so its common mode reaches
// ±10.5 V, beyond the rails.
func TestInputRange(t *testing.T) {
	n := ratioNet(20e3, 10e3)
	sup := Supply{NegV: -5, PosV: 5, CMNegV: 1.5, CMPosV: 1.5}
	tests := []struct {
		name, text  string
		vref, vdiff float64
		lo, hi      float64
		ok          bool
	}{
		{"divider reaches beyond the rails", "IN-=vn IN+=vp FB=out REF=ref", 0, 0, -10.5, 10.5, true},
		// Vref = 1 V: (Vcm + 2)/3 within ±3.5 gives −12.5..8.5 V.
		{"reference shifts the range", "IN-=vn IN+=vp FB=out REF=ref", 1, 0, -12.5, 8.5, true},
		// 3 V differential: vn does not reach the non-inverting pin, which
		// sits at Vp/3 = (Vcm + 1.5)/3; within ±3.5 V gives −12..9 V.
		{"differential input", "IN-=vn IN+=vp FB=out REF=ref", 0, 3, -12, 9, true},
		{"non-inverting: the pins follow the input", "IN-=ref IN+=vp FB=out", 0, 0, -3.5, 3.5, true},
		{"inverting: the pins stay at the reference", "IN-=vp IN+=ref FB=out", 0, 0, math.Inf(-1), math.Inf(1), true},
		{"inverting with the reference outside the range", "IN-=vp IN+=ref FB=out", 4, 0, math.NaN(), math.NaN(), false},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s := mustEval(t, n, tc.text)
			lo, hi, ok := s.InputRange(sup, tc.vref, tc.vdiff)
			eq := func(a, b float64) bool { return (math.IsNaN(a) && math.IsNaN(b)) || a == b || near(a, b, 1e-12) }
			if ok != tc.ok || !eq(lo, tc.lo) || !eq(hi, tc.hi) {
				t.Errorf("range %g..%g ok %v, want %g..%g ok %v", lo, hi, ok, tc.lo, tc.hi, tc.ok)
			}
		})
	}
	s := mustEval(t, n, "IN-=vn IN+=vp FB=out REF=ref")
	if _, _, ok := s.InputRange(Supply{NegV: -5, PosV: 5, CMNegV: math.NaN(), CMPosV: 1}, 0, 0); ok {
		t.Error("an unknown common-mode range gave a range")
	}
}

// TestUnknownRatioFigures: unknown ratio tolerance and tracking leave the
// error figures unknown, never zero.
func TestUnknownRatioFigures(t *testing.T) {
	s := mustEval(t, unknownNet(), "IN-=vn IN+=vp REF=ref SENSE=out")
	for name, x := range map[string]float64{"worst": s.GainErrorWorst, "rss": s.GainErrorRSS, "drift": s.GainDriftPPM, "cmrr": s.CMRRWorst} {
		if !math.IsNaN(x) {
			t.Errorf("%s = %g with unknown ratio figures, want NaN", name, x)
		}
	}
	if s.Gain != 1 {
		t.Errorf("gain %g", s.Gain)
	}
}

// TestDriftAndRSS: the classic amplifier's differential gain is
// Adm = ((R4/(R3+R4))(1+R2/R1) + R2/R1)/2 (domain notes §2). At equal
// values ∂Adm/∂(R2/R1) = (1/2 + 1)/2 = 3/4 and ∂Adm/∂(R4/(R3+R4)) = 1 with
// ∂(R4/(R3+R4))/∂ln R4 = R3R4/(R3+R4)² = 1/4, so the sensitivities to
// R1..R4 are −3/4, 3/4, −1/4, 1/4 (by hand): Σ|S| = 2 and
// sqrt(ΣS²) = sqrt(5/4), so the worst error is δ, the RSS error
// sqrt(5/4)·δ/2 and the drift τ.
func TestDriftAndRSS(t *testing.T) {
	n := classicNet(10e3, 0.001)
	s := mustEval(t, n, "IN-=vn IN+=vp REF=ref SENSE=out")
	want := []float64{-0.75, 0.75, -0.25, 0.25}
	for j, w := range want {
		if !near(s.Sensitivity[j], w, 1e-12) {
			t.Errorf("sensitivity to %s = %.15g, want %g", s.Elements[j], s.Sensitivity[j], w)
		}
	}
	if !near(s.GainErrorWorst, 0.001, 1e-12) || !near(s.GainErrorRSS, math.Sqrt(1.25)*0.0005, 1e-12) || !near(s.GainDriftPPM, 5, 1e-12) {
		t.Errorf("worst %g, RSS %g, drift %g ppm/K", s.GainErrorWorst, s.GainErrorRSS, s.GainDriftPPM)
	}
}

func TestParseErrors(t *testing.T) {
	n := classicNet(10e3, 0.001)
	tests := []struct{ text, want string }{
		{"IN-vn", `field "IN-vn": write PIN=terminal`},
		{"IN=vn", `no pin "IN"; the pins are IN-, IN+, REF, SENSE, OUT`},
		{"IN-=vn IN-=vp", `pin "IN-" is named twice`},
		{"IN-=x", `terminal "x": use vp, vn, ref, out`},
		{"IN-=open", `terminal "open"`},
		{"OUT=vp", `pin "OUT" is the op-amp's output`},
	}
	for _, tc := range tests {
		_, err := Parse(n, tc.text)
		if !errors.Is(err, ErrText) || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("Parse(%q) = %v, want ErrText with %q", tc.text, err, tc.want)
		}
	}
	c, err := Parse(n, "IN-=n3 SENSE=n3 IN+=n7")
	if err != nil {
		t.Fatal(err)
	}
	if got := c.Text(n.Pins); got != "IN-=n1 SENSE=n1 OUT=out" {
		t.Errorf("tie groups renumbered to %q", got)
	}
	if _, err := Evaluate(n, c); !errors.Is(err, ErrUnusable) {
		t.Errorf("a strapping with no input: %v, want ErrUnusable", err)
	}
	if _, err := Evaluate(n, Connections{InMinus, InPlus, Ref, Output, Ref}); !errors.Is(err, ErrText) {
		t.Errorf("output pin at ref: %v, want ErrText", err)
	}
}

func TestUnusableReasons(t *testing.T) {
	n := classicNet(10e3, 0.001)
	tests := []struct{ text, want string }{
		{"IN-=vp IN+=vn REF=out SENSE=ref", "positive feedback"},
		{"IN-=vn IN+=vp REF=ref", "no input reaches"},
		{"IN-=vn IN+=vp REF=vn SENSE=out", "not a balanced difference amplifier"},
	}
	for _, tc := range tests {
		c, err := Parse(n, tc.text)
		if err != nil {
			t.Fatal(err)
		}
		_, err = Evaluate(n, c)
		if !errors.Is(err, ErrUnusable) || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: %v, want ErrUnusable with %q", tc.text, err, tc.want)
		}
	}
}

func TestNetworkErrors(t *testing.T) {
	tests := []struct {
		name   string
		change func(n *catalog.MatchedNetwork)
		want   string
	}{
		{"no elements", func(n *catalog.MatchedNetwork) { n.Elements = nil }, "no elements"},
		{"bad value", func(n *catalog.MatchedNetwork) { n.Elements[1].Ohms = -1 }, `element 2 ("R2") is -1 ohm`},
		{"same name", func(n *catalog.MatchedNetwork) { n.Elements[1].Name = "r1" }, `has the name of "R1"`},
		{"output inside", func(n *catalog.MatchedNetwork) { n.OpAmpOut = "o" }, `output "o" is not among the pins`},
		{"loose pin", func(n *catalog.MatchedNetwork) { n.Pins = append(n.Pins, "NC") }, `pin "NC" joins no element`},
		{"ratio tolerance", func(n *catalog.MatchedNetwork) { n.RatioTolerance = 2 }, "ratio tolerance 2"},
		{"too many pins", func(n *catalog.MatchedNetwork) {
			for i := range maxPins {
				n.Pins = append(n.Pins, "P"+string(rune('a'+i)))
			}
		}, "more than the 9"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			n := classicNet(10e3, 0.001)
			tc.change(n)
			_, err := Enumerate(n)
			if !errors.Is(err, ErrNetwork) || !strings.Contains(err.Error(), tc.want) {
				t.Errorf("%v, want ErrNetwork with %q", err, tc.want)
			}
		})
	}
}

// TestNetlist: the exported netlist of every strapping names its sources
// as the family netlists do and, solved by package circuit, gives the
// strapping's transfers; the op-amp's inputs sit at OpAmpInputV.
func TestNetlist(t *testing.T) {
	n := ratioNet(20e3, 10e3)
	all := mustEnumerate(t, n)
	for i := range all {
		s := &all[i]
		net, err := s.Netlist(n)
		if err != nil {
			t.Fatal(err)
		}
		names := map[string]float64{"vref": s.GainRef}
		if s.Kind == Differential {
			names["vp"], names["vn"] = s.GainPlus, s.GainMinus
		} else {
			names["vin"] = s.GainPlus
		}
		sol := circuit.NewSolver(net)
		if err := sol.Factor(); err != nil {
			t.Fatal(err)
		}
		sol.Adjoint()
		for _, src := range net.Sources {
			want, ok := names[src.Name]
			if !ok {
				t.Errorf("%s: source %q, want one of vp, vn, vin, vref", s.Text, src.Name)
				continue
			}
			if got := sol.SourceTransfer(net.SourceIndex(src.Name)); !near(got, want, 1e-12) {
				t.Errorf("%s: transfer from %s %.12g, want %.12g", s.Text, src.Name, got, want)
			}
		}
		// Inputs at 1 V (vp), -2 V (vn) and a 0.5 V reference.
		volts := map[string]float64{"vp": 1, "vin": 1, "vn": -2, "vref": 0.5}
		for k := range net.Sources {
			net.Sources[k].V = volts[net.Sources[k].Name]
		}
		v := make([]float64, len(net.Nodes))
		sol.Solve(v)
		if got, want := v[net.OpAmps[0].Plus], s.OpAmpInputV(1, -2, 0.5); !near(got, want, 1e-12) {
			t.Errorf("%s: op-amp input at %.12g V, OpAmpInputV %.12g V", s.Text, got, want)
		}
	}
}

// FuzzParse: any text Parse accepts prints (Text) to a text that parses to
// the same connections.
func FuzzParse(f *testing.F) {
	for _, s := range []string{"IN-=vn IN+=vp REF=ref SENSE=out", "IN-=n2 SENSE=n2", "OUT=out", "IN-=vp IN-=vn", "x", ""} {
		f.Add(s)
	}
	n := classicNet(10e3, 0.001)
	f.Fuzz(func(t *testing.T, text string) {
		c, err := Parse(n, text)
		if err != nil {
			if !errors.Is(err, ErrText) {
				t.Fatalf("Parse(%q): %v, not ErrText", text, err)
			}
			return
		}
		back, err := Parse(n, c.Text(n.Pins))
		if err != nil {
			t.Fatalf("%q printed as %q, which fails: %v", text, c.Text(n.Pins), err)
		}
		if back.Text(n.Pins) != c.Text(n.Pins) {
			t.Fatalf("%q: %q read back as %q", text, c.Text(n.Pins), back.Text(n.Pins))
		}
	})
}

// TestSplitStrappings checks strappings of the split-element network (six
// 20 kΩ elements: R1, R2 from INA-, INB- to the inverting input, R3 from
// there to FB, R4, R5 from INA+, INB+ to NI, R6 from NI to REF), each
// derived by hand with the difference-amplifier equation of domain notes
// §2, Vout = Vp·(R4'/(R3'+R4'))·(1 + R2'/R1') − Vn·R2'/R1' + ..., where the
// primed elements are the strapping's input, feedback and divider
// resistances:
func TestSplitStrappings(t *testing.T) {
	n := splitNet()
	tests := []struct {
		name, text string
		kind       Kind
		gain       float64
		noiseGain  float64
	}{
		// One element of each: R2'/R1' = 20k/20k, divider 20k/(20k+20k):
		// gain 1, noise gain 2.
		{"unity", "INA-=vn FB=out INA+=vp REF=ref", Differential, 1, 2},
		// Both inputs on each side in parallel (10 kΩ in), 20 kΩ feedback
		// and to REF: R2'/R1' = 2, NI at 20/30 of vp, (1+2)·2/3 = 2.
		{"gain 2, inputs in parallel", "INA-=vn INB-=vn FB=out INA+=vp INB+=vp REF=ref", Differential, 2, 3},
		// Feedback R3‖R2 = 10 kΩ (INB- at the output), input R1 = 20 kΩ:
		// R2'/R1' = 1/2; R6‖R5 = 10 kΩ to REF (INB+ at ref) below R4 from
		// vp puts NI at 10/30 of vp, and (1 + 1/2)/3 = 1/2.
		{"gain 1/2, feedback in parallel", "INA-=vn INB-=out FB=out INA+=vp INB+=ref REF=ref", Differential, 0.5, 1.5},
		// Non-inverting 1 + R3/R1 = 2 with NI driven directly.
		{"non-inverting 1+R3/R1", "INA-=ref FB=out NI=vp", FromPlus, 2, 2},
		// Non-inverting 1 + R3/(R1‖R2) = 3.
		{"non-inverting 1+R3/(R1||R2)", "INA-=ref INB-=ref FB=out NI=vp", FromPlus, 3, 3},
		// Inverting −R3/R1 = −1 with NI at the reference.
		{"inverting -R3/R1", "INA-=vp FB=out NI=ref", FromPlus, -1, 2},
		// Attenuator: R4 from vp, R5‖R6 = 10 kΩ to ref, follower: 1/3.
		{"attenuator 1/3", "INA-=out INA+=vp INB+=ref REF=ref", FromPlus, 1.0 / 3, 1},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s := mustEval(t, n, tc.text)
			if s.Kind != tc.kind || !near(s.Gain, tc.gain, 1e-12) || !near(s.NoiseGain, tc.noiseGain, 1e-12) {
				t.Errorf("%s: %s gain %.15g, noise gain %.15g; want %s %g, %g", tc.text, s.Kind, s.Gain, s.NoiseGain, tc.kind, tc.gain, tc.noiseGain)
			}
		})
	}
}
