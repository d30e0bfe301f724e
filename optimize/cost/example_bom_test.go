package cost_test

import (
	"fmt"
	"strings"

	"plumb/catalog"
	"plumb/optimize/cost"
	"plumb/optimize/spec"
)

// A difference amplifier on one network and one op-amp, built 100 times.
func ExampleDesignBOM() {
	d, err := spec.ParseDesign([]byte(`family: difference
positions:
  R1: {network: EX4-10K, element: 1}
  R2: {network: EX4-10K, element: 2}
  R3: {network: EX4-10K, element: 3}
  R4: {network: EX4-10K, element: 4}
amplifier: {part: EXA-1}
`), "example.yaml")
	if err != nil {
		fmt.Println(err)
		return
	}
	eur := func(qty int, price float64) catalog.PriceBreak {
		return catalog.PriceBreak{MinQty: qty, UnitPrice: price, Currency: "EUR"}
	}
	parts := map[string]any{
		"EX4-10K": &catalog.Network{Part: "EX4-10K", Maker: "Example Films", Values: []float64{10e3, 10e3, 10e3, 10e3},
			Offer: catalog.Offer{PriceBreaks: []catalog.PriceBreak{eur(1, 1.10), eur(100, 0.80)}, Stock: -1}},
		"EXA-1": &catalog.Amplifier{Part: "EXA-1", Maker: "Example Linear", Type: catalog.OpAmp, Channels: 1,
			Offer: catalog.Offer{PriceBreaks: []catalog.PriceBreak{eur(1, 0.60)}, Stock: -1}},
	}
	find := func(part string) (catalog.Kind, any, error) {
		switch p := parts[part].(type) {
		case *catalog.Network:
			return catalog.KindNetwork, p, nil
		case *catalog.Amplifier:
			return catalog.KindAmplifier, p, nil
		}
		return "", nil, fmt.Errorf("%q: %w", part, catalog.ErrNotFound)
	}
	bom, err := cost.DesignBOM(d, find, cost.Build{Quantity: 100})
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, l := range bom.Lines {
		fmt.Printf("%-12s %-8s %-16s %d per stage, %d bought at the %d break: %.2f %s\n",
			strings.Join(l.Positions, " "), l.Part, l.Value, l.PerStage, l.Bought, l.BreakQty, l.Extended, l.Currency)
	}
	fmt.Printf("total %.2f %s, %.2f per stage\n", bom.Total, bom.Currency, bom.PerStage)
	// Output:
	// R1 R2 R3 R4  EX4-10K  10k/10k/10k/10k  1 per stage, 100 bought at the 100 break: 80.00 EUR
	// U1           EXA-1    opamp            1 per stage, 100 bought at the 1 break: 60.00 EUR
	// total 140.00 EUR, 1.40 per stage
}
