package strap_test

import (
	"fmt"

	"plumb/catalog"
	"plumb/optimize/strap"
)

// An invented difference amplifier whose 20 kΩ input and 10 kΩ feedback
// elements make a gain of 1/2 as drawn and 2 with their roles swapped.
func ExampleEnumerate() {
	n := &catalog.MatchedNetwork{
		Elements: []catalog.MatchedElement{
			{Name: "Ra", Ohms: 20e3, A: "IN-", B: "inv"},
			{Name: "Rb", Ohms: 10e3, A: "inv", B: "FB"},
			{Name: "Rc", Ohms: 20e3, A: "IN+", B: "ninv"},
			{Name: "Rd", Ohms: 10e3, A: "ninv", B: "REF"},
		},
		Pins:     []string{"IN-", "IN+", "FB", "REF", "OUT"},
		OpAmpInv: "inv", OpAmpNonInv: "ninv", OpAmpOut: "OUT",
		Tolerance: 0.001, RatioTolerance: 0.0002, RatioDriftPPM: 2,
	}
	all, err := strap.Enumerate(n)
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, s := range all {
		if s.Kind == strap.Differential {
			fmt.Printf("%-30s gain %.3g  CMRR %.1f dB  gain error %.2g %%\n", s.Text, s.Gain, s.CMRRdB(), 100*s.GainErrorWorst)
		}
	}
	// Output:
	// IN-=vn IN+=vp FB=out REF=ref OUT=out gain 0.5  CMRR 71.5 dB  gain error 0.02 %
	// IN-=out IN+=ref FB=vn REF=vp OUT=out gain 2  CMRR 77.5 dB  gain error 0.02 %
}
