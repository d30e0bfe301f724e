package search

import (
	"context"
	"fmt"

	"plumb/catalog"
	"plumb/optimize/cost"
)

func ExampleSolveProblem() {
	eur := func(p float64) catalog.Offer {
		return catalog.Offer{PriceBreaks: []catalog.PriceBreak{{MinQty: 1, UnitPrice: p, Currency: "EUR"}}, Stock: -1}
	}
	parts := &Parts{
		Series: []catalog.ResistorSeries{
			{Part: "TF", ESeries: "E24", MinOhm: 1e3, MaxOhm: 1e5, ResistorGrade: catalog.ResistorGrade{Technology: "thin-film", Tolerance: 0.001, TCR: 10, PowerW: 0.1}, Offer: eur(0.05)},
			{Part: "TK", ESeries: "E24", MinOhm: 1e3, MaxOhm: 1e5, ResistorGrade: catalog.ResistorGrade{Technology: "thick-film", Tolerance: 0.01, TCR: 100, PowerW: 0.1}, Offer: eur(0.01)},
		},
		Amplifiers: []catalog.Amplifier{{Part: "OPX", Type: catalog.OpAmp, SupplyMinV: 3, SupplyMaxV: 36, CMNegV: 1.5, CMPosV: 1.5, SwingNegV: 1, SwingPosV: 1,
			VosV: 100e-6, VosDriftVK: 1e-6, AolVV: 1e6, CMRRdB: 110, GBWHz: 1e6, Offer: eur(0.40)}},
	}
	p := Problem{Circuit: Difference, Gain: 2, SupplyNeg: -12, SupplyPos: 12, InMin: -2, InMax: 2, CMMin: -3, CMMax: 3,
		TMin: 0, TMax: 70, TRef: 25, Limits: Limits{CMRRdB: 50, DriftPPM: 30}, Build: cost.Build{Quantity: 10}}
	res, err := SolveProblem(context.Background(), parts, p, Options{Top: 1})
	if err != nil {
		fmt.Println(err)
		return
	}
	d := res.Designs[0]
	fmt.Printf("%s %.2f %s per stage, binding %s\n", d.Family, d.UnitCost, d.Currency, d.Binding)
	for _, pt := range d.Parts {
		fmt.Println(pt.Position, pt.Part)
	}
	// Output:
	// difference-discrete 0.60 EUR per stage, binding gain drift
	// R1 TF-18K0
	// R2 TF-36K0
	// R3 TF-18K0
	// R4 TF-36K0
	// U1 OPX
}
