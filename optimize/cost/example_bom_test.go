package cost_test

import (
	"fmt"
	"os"
	"strings"

	"plumb/catalog"
	"plumb/optimize/cost"
	"plumb/optimize/spec"
)

// A difference amplifier on one network and one op-amp, built 100 times
// from the fixture catalog.
func ExampleDesignBOM() {
	data, err := os.ReadFile("testdata/catalog.json")
	if err != nil {
		fmt.Println(err)
		return
	}
	snap, err := catalog.ReadSnapshotJSON(strings.NewReader(string(data)))
	if err != nil {
		fmt.Println(err)
		return
	}
	find, err := spec.SnapshotLookup(snap)
	if err != nil {
		fmt.Println(err)
		return
	}
	d, err := spec.LoadDesign("testdata/network.yaml")
	if err != nil {
		fmt.Println(err)
		return
	}
	bom, err := cost.DesignBOM(d, find, cost.Build{Quantity: 100})
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, l := range bom.Lines {
		fmt.Printf("%-12s %-10s %-14s %d per stage, %d bought at the %d break: %.2f %s\n",
			strings.Join(l.Positions, " "), l.Part, l.Value, l.PerStage, l.Bought, l.BreakQty, l.Extended, l.Currency)
	}
	fmt.Printf("total %.2f %s, %.2f per stage\n", bom.Total, bom.Currency, bom.PerStage)
	// Output:
	// R1 R2 R3 R4  TN4-1K10K  1k/10k/1k/10k  1 per stage, 100 bought at the 100 break: 90.00 EUR
	// U1           PL-1       opamp          1 per stage, 100 bought at the 100 break: 150.00 EUR
	// total 240.00 EUR, 2.40 per stage
}
