package search

import (
	"context"
	"math"
	"testing"

	"plumb/catalog"
	"plumb/optimize/budget"
	"plumb/optimize/spec"
)

// usd is a one-break price list in USD with unlimited stock.
func usd(p float64) catalog.Offer {
	return catalog.Offer{PriceBreaks: []catalog.PriceBreak{{MinQty: 1, UnitPrice: p, Currency: "USD"}}, Stock: -1}
}

// diagSnapshot is a small invented catalog for the diagnosis tests: a
// thick-film 1 % and a thin-film 0.1 % E96 series, a 0.01 % foil grade and
// two op-amps, a cheap one with 1 mV offset and a precise one.
func diagSnapshot() *catalog.Snapshot {
	return &catalog.Snapshot{
		ResistorSeries: []catalog.ResistorSeries{
			{Part: "DX-TK", ESeries: "E96", MinOhm: 10, MaxOhm: 1e6, ResistorGrade: catalog.ResistorGrade{Technology: "thick-film", Package: "0603", Tolerance: 0.01, TCR: 100, PowerW: 0.1}, Offer: usd(0.002)},
			{Part: "DX-TN", ESeries: "E96", MinOhm: 10, MaxOhm: 1e6, ResistorGrade: catalog.ResistorGrade{Technology: "thin-film", Package: "0603", Tolerance: 0.001, TCR: 25, PowerW: 0.1}, Offer: usd(0.05)},
			{Part: "DX-FL", ESeries: "E96", MinOhm: 10, MaxOhm: 1e6, ResistorGrade: catalog.ResistorGrade{Technology: "foil", Package: "0805", Tolerance: 0.0001, TCR: 2, PowerW: 0.1}, Offer: usd(2.5)},
		},
		Amplifiers: []catalog.Amplifier{
			{Part: "DX-OA1", Type: catalog.OpAmp, Channels: 1, SupplyMinV: 3, SupplyMaxV: 36, CMNegV: 1.5, CMPosV: 1.5, SwingNegV: 1, SwingPosV: 1,
				VosV: 1e-3, VosDriftVK: 5e-6, IbA: 20e-9, IosA: 5e-9, AolVV: 2e5, CMRRdB: 90, GBWHz: 1e6, NoiseVHz: 20e-9, NoiseAHz: 0.5e-12, Offer: usd(0.2)},
			{Part: "DX-OA2", Type: catalog.OpAmp, Channels: 1, SupplyMinV: 3, SupplyMaxV: 36, CMNegV: 1.5, CMPosV: 1.5, SwingNegV: 1, SwingPosV: 1,
				VosV: 25e-6, VosDriftVK: 0.3e-6, IbA: 1e-9, IosA: 0.5e-9, AolVV: 1e6, CMRRdB: 120, GBWHz: 5e6, NoiseVHz: 8e-9, NoiseAHz: 0.2e-12, Offer: usd(1.8)},
		},
	}
}

func mustParseSpec(t *testing.T, yaml string) *spec.Spec {
	t.Helper()
	s, err := spec.Parse([]byte(yaml), "test.yaml")
	if err != nil {
		t.Fatal(err)
	}
	return s
}

// worstExactMargin is the smallest margin of an exact budget's limits.
func worstExactMargin(r *budget.Result) float64 {
	w := math.Inf(1)
	for _, l := range r.Limits {
		w = math.Min(w, l.Margin)
	}
	return w
}

func limitOf(r *budget.Result, name string) budget.Limit {
	for _, l := range r.Limits {
		if l.Name == name {
			return l
		}
	}
	return budget.Limit{}
}

// TestEqualCostVariantsRankByMargin: every value of a grade costs the same,
// so the search must choose among equal-cost variants by margin, not by
// catalog order. An inverting gain of -10 with a ±1 V input puts up to 10 V
// across Rf: at Rf = 2.05 k that is 48.8 mW, 98 % of a 0.1 W part derated to
// half (P = V²/R, IEC 60115-1 derating, common practice); the design the
// search ranks first must have at least the worst margin of that variant
// and less stress.
func TestEqualCostVariantsRankByMargin(t *testing.T) {
	s := mustParseSpec(t, `name: ties
about: equal-cost variants of one grade
family: inverting
gain: -10
input: {single_ended: ±1V}
supply: ±15V
temperature: {range: 0..50C}
limits: {gain_error: 5%, output_offset: 20mV}
impedance: {min: 100, max: 1M}
build: {quantity: 100}
`)
	res, err := Solve(context.Background(), diagSnapshot(), s, Options{Top: 1})
	if err != nil {
		t.Fatal(err)
	}
	d := res.Designs[0]
	first, err := res.ExplainN(1)
	if err != nil {
		t.Fatal(err)
	}
	// The thin variant: the same parts at Rg = 205 ohm, Rf = 2.05 k.
	sd, _ := res.DesignN(1)
	thin := *sd
	thin.Positions = append([]spec.Position(nil), sd.Positions...)
	for i := range thin.Positions {
		p := &thin.Positions[i]
		p.Elements = append([]spec.Element(nil), p.Elements...)
		switch p.Name {
		case "Rg":
			p.Elements[0].Ohm = 205
		case "Rf":
			p.Elements[0].Ohm = 2050
		}
	}
	thinBudget, err := budget.Evaluate(s, &thin)
	if err != nil {
		t.Fatal(err)
	}
	if pw := limitOf(thinBudget, budget.LimitPower).Value; pw < 0.9 {
		t.Fatalf("the 2.05 k variant should sit near its derated power, got %.3g", pw)
	}
	if w, wt := worstExactMargin(first), worstExactMargin(thinBudget); w < wt {
		t.Errorf("rank 1 (%s) has worst margin %.3g, below the equal-cost 2.05 k variant's %.3g", d.Parts[0].Part, w, wt)
	}
	if pw, pt := limitOf(first, budget.LimitPower).Value, limitOf(thinBudget, budget.LimitPower).Value; pw >= pt {
		t.Errorf("rank 1 runs a resistor at %.0f %% of its derated power, the 2.05 k variant at %.0f %%", 100*pw, 100*pt)
	}
}
