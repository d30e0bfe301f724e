package search

import (
	"context"
	"strings"
	"testing"

	"plumb/catalog"
	"plumb/optimize/cost"
)

// TestCombosCloseRatioGap: no two E12 values are within 0.4 % of a 2.5
// ratio (8.2/3.3 = 2.485 is the nearest, 0.6 % off; common practice
// arithmetic), so without pairs the search must buy at least one E96 part
// (for example 97.6 over 39); with pairs, a pair such as 8.2 k + 47 ohm over
// 3.3 k (2.4991) all in the cheap E12 grade wins.
func TestCombosCloseRatioGap(t *testing.T) {
	eur := func(p float64) catalog.Offer {
		return catalog.Offer{PriceBreaks: []catalog.PriceBreak{{MinQty: 1, UnitPrice: p, Currency: "EUR"}}, Stock: -1}
	}
	grade := catalog.ResistorGrade{Technology: "thin-film", Package: "0603", Tolerance: 0.0005, TCR: 10, PowerW: 0.1}
	parts := &Parts{
		Series: []catalog.ResistorSeries{
			{Part: "E12X", ESeries: "E12", MinOhm: 10, MaxOhm: 1e6, ResistorGrade: grade, Offer: eur(0.01)},
			{Part: "E96X", ESeries: "E96", MinOhm: 10, MaxOhm: 1e6, ResistorGrade: grade, Offer: eur(0.10)},
		},
		Amplifiers: []catalog.Amplifier{{Part: "OPX", Type: catalog.OpAmp, SupplyMinV: 3, SupplyMaxV: 36, CMNegV: 1.5, CMPosV: 1.5,
			SwingNegV: 1, SwingPosV: 1, AolVV: 1e7, CMRRdB: 120, GBWHz: 1e6, Offer: eur(0.40)}},
	}
	p := Problem{Circuit: Difference, Gain: 2.5, SupplyNeg: -12, SupplyPos: 12, InMin: -1, InMax: 1, TMin: 25, TMax: 25, TRef: 25,
		RMinOhm: 10, Limits: Limits{TotalGainError: 0.004}, Build: cost.Build{Quantity: 1}}
	tests := []struct {
		name   string
		combos bool
		allE12 bool
		pair   bool
	}{
		{"single values need an E96 part", false, false, false},
		{"a series or parallel pair of E12 values", true, true, true},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			res, err := SolveProblem(context.Background(), parts, p, Options{Top: 1, Combos: tc.combos})
			if err != nil {
				t.Fatal(err)
			}
			d := res.Designs[0]
			pair, allE12 := false, true
			for _, pt := range d.Parts {
				if pt.Kind == "resistor" && !strings.HasPrefix(pt.Part, "E12X-") {
					allE12 = false
				}
				pair = pair || strings.HasSuffix(pt.Position, ".b")
			}
			if allE12 != tc.allE12 {
				t.Errorf("all parts E12: %v, want %v (%+v)", allE12, tc.allE12, d.Parts)
			}
			if pair != tc.pair {
				t.Errorf("pair used: %v, want %v (%+v)", pair, tc.pair, d.Parts)
			}
			if d.Metrics.GainError > 0.004 {
				t.Errorf("gain error %.4g over the limit", d.Metrics.GainError)
			}
		})
	}
}
