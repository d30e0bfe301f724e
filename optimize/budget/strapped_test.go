package budget

import (
	"math"
	"testing"

	"plumb/catalog"
	"plumb/optimize/spec"
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
		Network: &catalog.MatchedNetwork{
			Elements: []catalog.MatchedElement{
				{Name: "R1", Ohms: 20e3, A: "INA-", B: "inv"},
				{Name: "R2", Ohms: 20e3, A: "INB-", B: "inv"},
				{Name: "R3", Ohms: 20e3, A: "inv", B: "FB"},
				{Name: "R4", Ohms: 20e3, A: "INA+", B: "NI"},
				{Name: "R5", Ohms: 20e3, A: "INB+", B: "NI"},
				{Name: "R6", Ohms: 20e3, A: "NI", B: "REF"},
			},
			Pins:     []string{"INA-", "INB-", "FB", "OUT", "INA+", "INB+", "REF", "NI"},
			OpAmpInv: "inv", OpAmpNonInv: "NI", OpAmpOut: "OUT",
			Tolerance: 0.0025, RatioTolerance: 0.0005, RatioDriftPPM: 3,
		},
		Offer: catalog.Offer{Stock: 1000, PriceBreaks: []catalog.PriceBreak{{MinQty: 1, UnitPrice: 2, Currency: "USD"}}},
	}
}

// strappedDesign resolves a strapped design of amp with strapping text.
func strappedDesign(t testing.TB, amp catalog.Amplifier, text string) *spec.Design {
	t.Helper()
	d := mustDesign(t, "family: strapped\namplifier: {part: "+amp.Part+", strapping: \""+text+"\"}\n")
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
	// First order in δ: the budget adds each element's ratio deviation to
	// the network's common shift c (absolute tolerance 0.25 %), so a ratio
	// moves by (ε1 − ε2)/(1 + c), a second-order 0.25 % of the figure.
	near("initial gain error", m.GainErrorInitial, 0.0005, 3e-3)
	near("gain drift", m.DriftPPMPerK, 3, 4e-3)
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
