package budget

import (
	"math"
	"plumb/optimize/circuit"
	"strings"
	"testing"

	"plumb/catalog"
	"plumb/optimize/spec"
	"plumb/optimize/strap"
	"plumb/optimize/strap/straptest"
)

// splitPart is an invented amplifier (no real part) with eight pins and a
// split-element network: two 20 kΩ inputs on each side, a 20 kΩ feedback
// element to FB and a 20 kΩ element from the non-inverting input NI to REF.
// Its front page lists gain 1 only; gain 2 needs a strapping.
func splitPart() catalog.Amplifier {
	return catalog.Amplifier{
		Part: "ZX-SPL8", Maker: "Vantorel Analog", Type: catalog.MatchedAmp, Channels: 1,
		SupplyMinV: 4, SupplyMaxV: 36, CMNegV: 1.5, CMPosV: 1.5, SwingNegV: 1, SwingPosV: 1,
		VosV: 100e-6, VosDriftVK: 1e-6, IbA: 10e-9, IosA: 1e-9, AolVV: 1e12, CMRRdB: 200, GBWHz: 1e6,
		NoiseVHz: 20e-9, NoiseAHz: 0.1e-12, Gains: []float64{1}, GainErrorMax: 0.0005, GainDriftPPM: 2,
		InNegV: 1.5, InPosV: 1.5, InternalOhm: 20e3,
		Network: straptest.SplitNetwork(),
		Offer:   catalog.Offer{Stock: 1000, PriceBreaks: []catalog.PriceBreak{{MinQty: 1, UnitPrice: 2, Currency: "USD"}}},
	}
}

// strappedDesign resolves a strapped design of amp with strapping text.
func strappedDesign(t testing.TB, amp catalog.Amplifier, text string) *spec.Design {
	t.Helper()
	return strappedDesignIn(t, "strapped", amp, text)
}

// strappedDesignIn resolves a design of family fam of amp with strapping
// text.
func strappedDesignIn(t testing.TB, fam string, amp catalog.Amplifier, text string) *spec.Design {
	t.Helper()
	d := mustDesign(t, "family: "+fam+"\namplifier: {part: "+amp.Part+", strapping: \""+text+"\"}\n")
	err := d.Resolve(func(part string) (catalog.Kind, any, error) {
		if part != amp.Part {
			return "", nil, catalog.ErrNotFound
		}
		return catalog.KindAmplifier, amp, nil
	})
	if err != nil {
		t.Fatal(err)
	}
	return d
}

// TestStrappedBudgetByHand checks the exact budget of the split part
// strapped for gain 2 against a derivation by hand. Both inputs of each
// side in parallel make a difference amplifier with R1∥R2 = 10 kΩ in,
// R3 = 20 kΩ feedback, R4∥R5 = 10 kΩ in and R6 = 20 kΩ to the reference:
//
//	G = R3/(R1∥R2) = 2, noise gain NG = 1 + G = 3 (domain notes §2).
//
// With k1 = R3/(R1∥R2), k2 = R6/(R4∥R5) the differential gain is
// Adm = (k1 + k2(1+k1)/(1+k2))/2, so ∂ln Adm/∂ln k1 = (1+2G)/(2(1+G)) = 5/6
// and ∂ln Adm/∂ln k2 = 1/(2(1+G)) = 1/6; ln(R1∥R2) moves by half of ln R1
// and half of ln R2. The sensitivities to the six elements are therefore
// 5/12, 5/12, 5/6, 1/12, 1/12, 1/6, summing in magnitude to 2, and with
// each element within ±δ/2 of the network's common value (δ = 0.05 %
// ratio tolerance) the worst-case initial gain error is 2·δ/2 = δ =
// 0.05 %. The same sum with the ±τ/2 tracking (τ = 3 ppm/K) gives a gain
// drift of 3 ppm/K. The worst-case CMRR of the resistors is (1+G)/(2δ')
// (Franco, difference-amplifier section, from memory; domain notes §2)
// with δ' the ratio's whole spread over the range, δ + τ·ΔT = 0.05 % +
// 3 ppm/K × 60 K = 0.068 %: 3/0.00136 = 2206, 66.87 dB. The op-amp's offset reaches the
// output times NG: 3 × 100 µV = 300 µV; the bias currents see
// R4∥R5∥R6 = R1∥R2∥R3 = 6.667 kΩ at both inputs, so Ib cancels and the
// offset current adds 6.667 kΩ × 1 nA × NG = 20 µV.
func TestStrappedBudgetByHand(t *testing.T) {
	s := mustSpec(t, `name: strapped-hand
about: hand check of a strapped amplifier
families: [strapped]
gain: 2
input: {differential: ±1V, common_mode: -1..1V}
supply: ±15V
temperature: {range: 25..85C}
limits: {gain_error: 1%}
`)
	d := strappedDesign(t, splitPart(), "INA-=vn INB-=vn FB=out INA+=vp INB+=vp REF=ref")
	if d.Amplifier.Strapping != "INA-=vn INB-=vn FB=out OUT=out INA+=vp INB+=vp REF=ref" {
		t.Errorf("strapping %q", d.Amplifier.Strapping)
	}
	r, err := Evaluate(s, d)
	if err != nil {
		t.Fatal(err)
	}
	m := r.Metrics
	near := func(what string, got, want, rel float64) {
		t.Helper()
		if math.Abs(got-want) > rel*math.Abs(want) {
			t.Errorf("%s %.6g, want %.6g (within %.2g)", what, got, want, rel)
		}
	}
	near("gain", m.Gain, 2, 1e-9)
	near("noise gain", m.NoiseGain, 3, 1e-9)
	// First order in δ: the next term is of relative size δ. The
	// network's common shift (absolute tolerance 0.25 %) scales every
	// element alike and leaves the ratios alone.
	near("initial gain error", m.GainErrorInitial, 0.0005, 1e-3)
	near("gain drift", m.DriftPPMPerK, 3, 1e-3)
	near("resistor CMRR", m.CMRRResistorsdB, 20*math.Log10(3/(2*(0.0005+3e-6*60))), 1e-3)
	// Offset at the reference temperature: NG·Vos + NG·Ios·6.667 kΩ, and
	// the drift NG·dVos/dT over the 60 K excursion.
	near("offset", m.OutputOffsetV, 3*100e-6+3*1e-9*20e3/3+3*1e-6*60, 1e-3)
}

// TestStrappedAgainstNgspice hands the split part strapped for gain 2, as
// the evaluator builds it at a corner of its ratio tolerance (R1 and R3
// high, R4 and R6 low: the two sides' ratios move apart), to ngspice (an
// independent circuit simulator) and compares the output for a
// differential input and for a common-mode input with the evaluator's
// solved transfers, and the common-mode output with the first-order
// figure at that corner.
func TestStrappedAgainstNgspice(t *testing.T) {
	path := ngspicePath(t)
	s := mustSpec(t, `name: strapped-spice
about: ngspice check of a strapped amplifier
families: [strapped]
gain: 2
input: {differential: ±1V, common_mode: -5..5V}
supply: ±15V
temperature: {range: 0..50C}
source_impedance: 100
limits: {gain_error: 1%}
`)
	amp := splitPart()
	amp.AolVV = 1e6 // ngspice rounds badly at larger VCVS gains
	d := strappedDesign(t, amp, "INA-=vn INB-=vn FB=out INA+=vp INB+=vp REF=ref")
	e, err := NewEvaluator(s, d.Family, d.Options)
	if err != nil {
		t.Fatal(err)
	}
	c, err := CandidateOf(e, d)
	if err != nil {
		t.Fatal(err)
	}
	if err := e.SetCandidate(c); err != nil {
		t.Fatal(err)
	}
	signs := map[string]float64{"R1": 1, "R3": 1, "R4": -1, "R6": -1}
	for k, pos := range e.positions {
		if sg, ok := signs[pos]; ok {
			e.x[e.devParam(k)] = sg
		}
	}
	var p point
	if err := e.eval(e.x, s.TempRef, false, &p); err != nil {
		t.Fatal(err)
	}
	clear(e.x)
	for _, drive := range []struct {
		name string
		set  func()
		want float64
	}{
		{"differential 1 V", func() { e.driveSignal(1) }, p.gain},
		{"common mode 10 V", func() { e.driveCM(10) }, 10 * p.acm},
	} {
		e.quiet()
		drive.set()
		got := ngspiceOut(t, path, e.net)
		if math.Abs(got-drive.want) > 1e-6*math.Abs(drive.want)+1e-9 {
			t.Errorf("%s: ngspice V(out) = %.9g, evaluator %.9g", drive.name, got, drive.want)
		}
	}
	// The corner moves R1∥R2 by +δ/4 (half of R1's +δ/2) and R3 by +δ/2,
	// so k1 = R3/(R1∥R2) by +δ/4; R4∥R5 by −δ/4 and R6 by −δ/2, so
	// k2 = R6/(R4∥R5) by −δ/4. Acm = (k2 − k1)/(1 + k2) (difference
	// amplifier, domain notes §2) is to first order G·(Δk2 − Δk1)/(1 + G) =
	// 2·(−δ/2)/3 = −δ/3 with δ = 0.05 %, within a few per cent (second
	// order and the finite open-loop gain).
	if want := -0.0005 / 3; math.Abs(p.acm-want) > 0.02*math.Abs(want) {
		t.Errorf("corner common-mode gain %.4g, want about %.4g", p.acm, want)
	}
}

// looseSplitPart is splitPart with the absolute tolerance of the demo's
// strappable parts, 20 %: far looser than the ratio tolerance, as thin-film
// networks inside amplifiers are (common practice).
func looseSplitPart() catalog.Amplifier {
	a := splitPart()
	n := *a.Network
	n.Tolerance = 0.2
	a.Network = &n
	return a
}

// gain2Spec is a spec for the split part strapped for gain 2 over the
// temperature range temp, with extra fields.
func gain2Spec(t *testing.T, temp, extra string) *spec.Spec {
	return mustSpec(t, `name: strapped-gain2
about: a strapped amplifier at gain 2
families: [strapped]
gain: 2
input: {differential: ±1V, common_mode: -5..5V}
supply: ±15V
temperature: {range: `+temp+`}
limits: {gain_error: 1%, cmrr: 40dB}
`+extra)
}

// gain2Strapping ties both input pairs of the split part: gain R3/(R1∥R2) = 2.
const gain2Strapping = "INA-=vn INB-=vn FB=out INA+=vp INB+=vp REF=ref"

// TestStrappedContributorsAddUp checks that the listed contributors of a
// strapped design add up to the totals under the method used, and that the
// totals are the hand figures of TestStrappedBudgetByHand at a 20 %
// absolute tolerance: a ratio tolerance bounds the ratio of any two
// elements whatever their common value (common practice), so the absolute
// tolerance must not reach the gain or the CMRR. Worst case: the gain error
// over 0..70 °C is δ + τ·ΔT = 0.05 % + 3 ppm/K × 45 K = 0.0635 % (the
// sensitivities sum to 2 in magnitude, each element within ±δ/2 and ±τ/2),
// the sum of the contributors; 1/CMRR is the sum of the common-mode
// contributors, the resistors' part (1+G)/(2δ') with δ' = 0.0635 % (Franco,
// difference-amplifier section, from memory; domain notes §2). RSS: the
// tolerance terms add in quadrature (each tolerance 3 sigma, the figure
// 3 sigma).
func TestStrappedContributorsAddUp(t *testing.T) {
	for _, tc := range []struct{ method, source string }{{"worst-case", "0"}, {"rss", "0"}, {"worst-case", "1k"}, {"rss", "1k"}} {
		method := tc.method
		t.Run(method+" source "+tc.source, func(t *testing.T) {
			s := gain2Spec(t, "0..70C", "source_impedance: "+tc.source+"\nanalysis: {method: "+method+"}\n")
			r, err := Evaluate(s, strappedDesign(t, looseSplitPart(), gain2Strapping))
			if err != nil {
				t.Fatal(err)
			}
			var gl, cl []Contribution
			for _, l := range r.Limits {
				switch l.Name {
				case LimitGainError:
					gl = l.Contributors
				case LimitCMRR:
					cl = l.Contributors
				}
			}
			if len(gl) == 0 || len(cl) == 0 {
				t.Fatalf("no contributors: gain %v, CMRR %v", gl, cl)
			}
			lin, sq := 0.0, 0.0
			for _, c := range gl {
				if strings.Contains(c.Name, "open-loop") || strings.Contains(c.Name, "quantization") || strings.HasPrefix(c.Name, "nominal") {
					lin += c.Value // nominal terms add as they are
					continue
				}
				sq += c.Value * c.Value
				if method == "worst-case" {
					lin += c.Value
				}
			}
			sum := lin
			if method == "rss" {
				sum += math.Sqrt(sq)
			}
			// The contributors are first-order sensitivities and the total
			// the exact worst corner: they differ by the second-order term,
			// of relative size δ' (0.06 %), far below a printed digit.
			m := r.Metrics
			if math.Abs(sum-m.GainError) > 1e-3*m.GainError {
				t.Errorf("gain error %.6g, its contributors add to %.6g: %v", m.GainError, sum, gl)
			}
			// A source resistance makes the gain depend on the elements'
			// absolute values: their tolerance and tempco (assumed, and
			// listed as such) join the contributors.
			withSource := tc.source != "0"
			if got := len(r.Assumptions) > 0 && r.Assumptions[0].Figure == "tcr_ppm"; got != withSource {
				t.Errorf("assumptions %v: the absolute tempco should be listed exactly when a source resistance is given", r.Assumptions)
			}
			dp := 0.0005 + 3e-6*45
			if method == "worst-case" && !withSource {
				if math.Abs(m.GainError-dp) > 1e-3*dp {
					t.Errorf("gain error %.6g, want δ + τΔT = %.6g", m.GainError, dp)
				}
			}
			inv := 0.0
			for _, c := range cl {
				if method == "rss" {
					inv += c.Value * c.Value
				} else {
					inv += c.Value
				}
			}
			if method == "rss" {
				inv = math.Sqrt(inv)
			}
			if got := 20 * math.Log10(1/inv); math.Abs(got-m.CMRRdB) > 1e-3 {
				t.Errorf("CMRR %.4f dB, its contributors give %.4f dB: %v", m.CMRRdB, got, cl)
			}
			if method == "worst-case" && !withSource {
				if want := 20 * math.Log10(3/(2*dp)); math.Abs(m.CMRRResistorsdB-want) > 1e-3 {
					t.Errorf("resistor CMRR %.4f dB, want (1+G)/(2δ') = %.4f dB", m.CMRRResistorsdB, want)
				}
			}
		})
	}
}

// TestStrappedCMRRCornerAgainstNgspice builds the split part strapped for
// gain 2 by hand at its worst common-mode corner at 70 °C (the two sides'
// ratios R3/(R1∥R2) and R6/(R4∥R5) pulled apart by the ratio tolerance and
// the tracking, the whole network 20 % low or high), solves it in ngspice
// (an independent circuit simulator) driven differentially and in common
// mode, and compares its CMRR with (1+G)/(2δ'), δ' = δ + τ·ΔT (Franco,
// difference-amplifier section, from memory; domain notes §2), and with
// the budget's resistor CMRR. The network's common shift must not move it.
func TestStrappedCMRRCornerAgainstNgspice(t *testing.T) {
	path := ngspicePath(t)
	const (
		delta, tau, dT, abs, tc = 0.0005, 3e-6, 45.0, 0.2, 50e-6
		aol                     = 1e6 // ngspice rounds badly at larger VCVS gains
	)
	want := 3 / (2 * (delta + tau*dT))
	// Each element: R0·(1 + c)(1 ± δ/2)(1 + α·ΔT)(1 ± τ/2·ΔT).
	el := func(c, sign float64) float64 {
		return 20e3 * (1 + c) * (1 + sign*delta/2) * (1 + tc*dT) * (1 + sign*tau/2*dT)
	}
	for _, c := range []float64{-abs, abs} {
		net := &circuit.Netlist{Family: "strapping", Nodes: []string{"0", "vp", "vn", "inv", "ni", "out"}, Out: 5}
		net.Resistors = []circuit.Resistor{
			{Name: "R1", A: 2, B: 3, Ohm: el(c, -1)}, {Name: "R2", A: 2, B: 3, Ohm: el(c, -1)},
			{Name: "R3", A: 3, B: 5, Ohm: el(c, 1)},
			{Name: "R4", A: 1, B: 4, Ohm: el(c, 1)}, {Name: "R5", A: 1, B: 4, Ohm: el(c, 1)},
			{Name: "R6", A: 4, B: 0, Ohm: el(c, -1)},
		}
		net.OpAmps = []circuit.OpAmp{{Name: "A1", Plus: 4, Minus: 3, Out: 5, Gain: aol}}
		net.Sources = []circuit.Source{{Name: "vp", Node: 1, V: 0.5}, {Name: "vn", Node: 2, V: -0.5}}
		adm := ngspiceOut(t, path, net)
		net.Sources[0].V, net.Sources[1].V = 10, 10
		acm := ngspiceOut(t, path, net) / 10
		got := math.Abs(adm / acm)
		// First order in δ': the next term is of order δ' (0.06 %).
		if math.Abs(got/want-1) > 2e-3 {
			t.Errorf("common shift %+g: ngspice CMRR %.6g (%.3f dB), want (1+G)/(2δ') = %.6g", c, got, 20*math.Log10(got), want)
		}
		s := gain2Spec(t, "25..70C", "")
		amp := looseSplitPart()
		amp.AolVV = aol
		r, err := Evaluate(s, strappedDesign(t, amp, gain2Strapping))
		if err != nil {
			t.Fatal(err)
		}
		if db := 20 * math.Log10(got); math.Abs(r.Metrics.CMRRResistorsdB-db) > 0.01 {
			t.Errorf("common shift %+g: budget's resistor CMRR %.4f dB, ngspice at the worst corner %.4f dB", c, r.Metrics.CMRRResistorsdB, db)
		}
	}
}

// TestStrappedSingleAgainstNgspice budgets single-ended strappings of each
// kind the search offers (inverting, non-inverting through the internal
// divider, non-inverting gain) with a 1 kΩ source resistance, hands each
// netlist as the evaluator builds it at a corner of its tolerances
// (network 20 % low, elements scattered) to ngspice (an independent
// circuit simulator), and compares the output for 1 V in with the
// evaluator's solved gain; at nominal values the gain must be the
// strapping's G·Zin/(Zin + Rs) (Thevenin: the source resistance and the
// stage's input impedance divide the input).
func TestStrappedSingleAgainstNgspice(t *testing.T) {
	path := ngspicePath(t)
	for _, c := range []struct {
		name, strapping string
		gain            float64 // the strapping's nominal gain
	}{
		// Inverting: -R3/(R1∥R2) = -20k/10k.
		{"inverting", "INA-=vp INB-=vp FB=out INA+=ref", -2},
		// Through the divider R4, R6 (one half), then 1 + R3/(R1∥R2):
		// 20k/40k × (1 + 20k/10k) = 1.5.
		{"non-inverting through the divider", "INA-=ref INB-=ref FB=out INA+=vp REF=ref", 1.5},
		// Non-inverting at the op-amp's pin: 1 + R3/R1 = 2.
		{"non-inverting", "INA-=ref FB=out NI=vp", 2},
	} {
		t.Run(c.name, func(t *testing.T) {
			s := mustSpec(t, `name: strapped-se
about: a single-ended strapped amplifier
families: [strapped-single]
gain: `+ftoa(c.gain)+`
input: {single_ended: ±1V}
supply: ±15V
temperature: {range: 25..70C}
source_impedance: 1k
limits: {gain_error: 5%}
`)
			amp := looseSplitPart()
			amp.AolVV = 1e6 // ngspice rounds badly at larger VCVS gains
			d := strappedDesignIn(t, "strapped-single", amp, c.strapping)
			e, err := NewEvaluator(s, d.Family, d.Options)
			if err != nil {
				t.Fatal(err)
			}
			cand, err := CandidateOf(e, d)
			if err != nil {
				t.Fatal(err)
			}
			if err := e.SetCandidate(cand); err != nil {
				t.Fatal(err)
			}
			var p0 point
			if err := e.eval(e.x, s.TempRef, false, &p0); err != nil {
				t.Fatal(err)
			}
			st, err := strap.Evaluate(amp.Network, mustStrap(t, amp.Network, c.strapping))
			if err != nil {
				t.Fatal(err)
			}
			zin := st.InputPlusOhm
			ideal := st.Gain * zin / (zin + 1e3)
			if math.Abs(st.Gain-c.gain) > 1e-12 || math.Abs(p0.gain/ideal-1) > 3*st.NoiseGain/1e6 {
				t.Errorf("nominal gain %.9g, strapping %.6g (want %g), G·Zin/(Zin+Rs) = %.9g", p0.gain, st.Gain, c.gain, ideal)
			}
			for k := range e.positions {
				e.x[e.devParam(k)] = float64(1 - 2*(k%2))
			}
			for j, p := range e.params {
				if p.kind == pDev && p.pos < 0 {
					e.x[j] = -1
				}
			}
			var p point
			if err := e.eval(e.x, 70, false, &p); err != nil {
				t.Fatal(err)
			}
			clear(e.x)
			e.quiet()
			e.driveSignal(1)
			if got := ngspiceOut(t, path, e.net); math.Abs(got-p.gain) > 1e-6*math.Abs(p.gain) {
				t.Errorf("ngspice V(out) = %.9g for 1 V in, evaluator %.9g", got, p.gain)
			}
		})
	}
}

// mustStrap parses a strapping text of network n.
func mustStrap(t *testing.T, n *catalog.MatchedNetwork, text string) strap.Connections {
	t.Helper()
	c, err := strap.Parse(n, text)
	if err != nil {
		t.Fatal(err)
	}
	return c
}

// TestMatchedSourceAndReferenceAgainstNgspice budgets an invented matched
// amplifier (gain 0.2, 380 kΩ input resistors, no network in the catalog)
// with a 10 kΩ source resistance on each input and a 1 kΩ reference
// resistance, and compares its gain, common-mode gain and output at zero
// input, at nominal values and with the internal resistors 25 % low (the
// assumed absolute tolerance), with ngspice's DC solve of the classic
// difference amplifier R1 = R3 = 380 kΩ, R2 = R4 = 76 kΩ with those
// resistances in series (domain notes §2; ngspice is an independent
// circuit simulator). The source resistance alone takes the gain to
// G·R1/(R1 + Rs) and leaves the balance; the reference resistance spoils
// it, Acm = Rref/(R1 + Rs + R2 + Rref).
func TestMatchedSourceAndReferenceAgainstNgspice(t *testing.T) {
	path := ngspicePath(t)
	const (
		rin, g, rs, rref, vref = 380e3, 0.2, 10e3, 1e3, 2.5
		aol                    = 1e6 // ngspice rounds badly at larger VCVS gains
	)
	s := mustSpec(t, `name: matched-rs
about: a matched amplifier behind a source and a reference resistance
families: [matched]
gain: 0.2
input: {differential: ±10V, common_mode: -20..20V}
supply: ±15V
reference: {voltage: 2.5V, impedance: 1k}
source_impedance: 10k
temperature: {range: 25..25C}
limits: {gain_error: 10%}
`)
	amp := catalog.Amplifier{Part: "ZX-HV02", Type: catalog.MatchedAmp, Gains: []float64{g}, GainErrorMax: 0.0008,
		GainDriftPPM: 4, InternalOhm: rin, CMRRdB: 84, AolVV: aol, GBWHz: 1e6}
	e, err := NewEvaluator(s, "matched", spec.Options{})
	if err != nil {
		t.Fatal(err)
	}
	if err := e.SetCandidate(&Candidate{Amp: &amp, MatchedGain: g}); err != nil {
		t.Fatal(err)
	}
	abs := -1
	for j, p := range e.params {
		if p.kind == pMAbs {
			abs = j
			if p.scale != 0.25 {
				t.Errorf("internal resistors' tolerance %g, want the assumed 25 %%", p.scale)
			}
		}
	}
	if abs < 0 {
		t.Fatal("no parameter for the internal resistors' absolute value")
	}
	for _, x := range []float64{0, -1} {
		e.x[abs] = x
		var p point
		if err := e.eval(e.x, s.TempRef, false, &p); err != nil {
			t.Fatal(err)
		}
		clear(e.x)
		r1 := rin * (1 + 0.25*x)
		net := &circuit.Netlist{Family: "matched", Nodes: []string{"0", "vp", "vn", "inp", "inn", "m", "pp", "vref", "refz", "out"}, Out: 9}
		net.Resistors = []circuit.Resistor{
			{Name: "Rsrcp", A: 1, B: 3, Ohm: rs}, {Name: "Rsrcn", A: 2, B: 4, Ohm: rs},
			{Name: "R1", A: 4, B: 5, Ohm: r1}, {Name: "R2", A: 5, B: 9, Ohm: g * r1},
			{Name: "R3", A: 3, B: 6, Ohm: r1}, {Name: "R4", A: 6, B: 8, Ohm: g * r1},
			{Name: "Rref", A: 7, B: 8, Ohm: rref},
		}
		net.OpAmps = []circuit.OpAmp{{Name: "A1", Plus: 6, Minus: 5, Out: 9, Gain: aol}}
		net.Sources = []circuit.Source{{Name: "vp", Node: 1, V: 0.5}, {Name: "vn", Node: 2, V: -0.5}, {Name: "vref", Node: 7}}
		adm := ngspiceOut(t, path, net)
		net.Sources[0].V, net.Sources[1].V = 10, 10
		acm := ngspiceOut(t, path, net) / 10
		net.Sources[0].V, net.Sources[1].V, net.Sources[2].V = 0, 0, vref
		base := ngspiceOut(t, path, net)
		tol := 3 * (1 + g) / aol // the finite gain's NG/A
		for _, c := range []struct {
			what      string
			got, want float64
		}{
			{"gain", p.gain, adm},
			{"common-mode gain", p.acm, acm},
			{"output at zero input", p.base, base},
		} {
			if math.Abs(c.got-c.want) > tol*math.Max(math.Abs(c.want), 1e-3) {
				t.Errorf("internal resistors %+g×25 %%: %s %.9g, ngspice %.9g", x, c.what, c.got, c.want)
			}
		}
		if want := rref / (r1 + rs + g*r1 + rref); math.Abs(acm-want) > 1e-3*want {
			t.Errorf("internal resistors %+g×25 %%: ngspice Acm %.6g, want Rref/(R1+Rs+R2+Rref) = %.6g", x, acm, want)
		}
	}
	// The budget lists every term, the nominal loss to the source and
	// reference among them, and its worst-case terms add up to the total;
	// the design's assumed figures are named.
	r, err := Evaluate(s, &spec.Design{Family: "matched", Amplifier: spec.AmplifierChoice{Part: amp.Part, Gain: g, Amp: amp, Resolved: true}})
	if err != nil {
		t.Fatal(err)
	}
	var figs []string
	for _, a := range r.Assumptions {
		figs = append(figs, a.Figure)
	}
	if got := strings.Join(figs, " "); got != "tcr_ppm internal_ohm" {
		t.Errorf("assumed figures %q, want the internal resistors' tempco and tolerance", got)
	}
	cs, sum := contributorSum(r, LimitGainError)
	if ge := r.Metrics.GainError; math.Abs(sum-ge) > 1e-6*ge || len(cs) == 0 || !strings.HasPrefix(cs[0].Name, "nominal gain with source, reference") {
		t.Errorf("gain error %.6g, contributors add to %.6g: %v", ge, sum, cs)
	}
}

// contributorSum returns the contributors of limit name in r and the sum
// of their values.
func contributorSum(r *Result, name string) ([]Contribution, float64) {
	for _, l := range r.Limits {
		if l.Name == name {
			sum := 0.0
			for _, c := range l.Contributors {
				sum += c.Value
			}
			return l.Contributors, sum
		}
	}
	return nil, 0
}
