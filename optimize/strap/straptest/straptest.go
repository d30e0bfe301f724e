// Package straptest holds invented matched networks (no real part) that
// the tests of several packages strap, so that each is drawn once.
package straptest

import "plumb/catalog"

// SplitNetwork is a split-element difference amplifier of eight pins: two
// 20 kΩ inputs on each side (INA-, INB- to the inverting input; INA+,
// INB+ to the non-inverting one NI), a 20 kΩ feedback element to FB, a
// 20 kΩ element from NI to REF, and NI itself brought out; absolute
// tolerance 0.25 %, ratio tolerance 0.05 %, tracking 3 ppm/K. Its inputs
// in parallel make gain 2, one input of each side gain 1.
func SplitNetwork() *catalog.MatchedNetwork {
	return &catalog.MatchedNetwork{
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
	}
}
