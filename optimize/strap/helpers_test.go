package strap

import (
	"math"

	"plumb/catalog"
	"plumb/optimize/strap/straptest"
)

// Invented test networks (no real part): element values, pins and nodes
// drawn for these tests.

// classicNet is the four-equal-resistor difference amplifier with a sense
// pin: R1 from IN- to the inverting input, R2 from there to SENSE, R3 from
// IN+ to the non-inverting input, R4 from there to REF.
func classicNet(ohm, ratioTol float64) *catalog.MatchedNetwork {
	return &catalog.MatchedNetwork{
		Elements: []catalog.MatchedElement{
			{Name: "R1", Ohms: ohm, A: "IN-", B: "inv"},
			{Name: "R2", Ohms: ohm, A: "inv", B: "SENSE"},
			{Name: "R3", Ohms: ohm, A: "IN+", B: "ninv"},
			{Name: "R4", Ohms: ohm, A: "ninv", B: "REF"},
		},
		Pins:     []string{"IN-", "IN+", "REF", "SENSE", "OUT"},
		OpAmpInv: "inv", OpAmpNonInv: "ninv", OpAmpOut: "OUT",
		Tolerance: 0.01, RatioTolerance: ratioTol, RatioDriftPPM: 5,
	}
}

// ratioNet is a difference amplifier of gain R2/R1 with the feedback
// element brought out to FB: Ra (r1) from IN- to the inverting input, Rb
// (r2) from there to FB, Rc (r1) from IN+ to the non-inverting input, Rd
// (r2) from there to REF.
func ratioNet(r1, r2 float64) *catalog.MatchedNetwork {
	return &catalog.MatchedNetwork{
		Elements: []catalog.MatchedElement{
			{Name: "Ra", Ohms: r1, A: "IN-", B: "inv"},
			{Name: "Rb", Ohms: r2, A: "inv", B: "FB"},
			{Name: "Rc", Ohms: r1, A: "IN+", B: "ninv"},
			{Name: "Rd", Ohms: r2, A: "ninv", B: "REF"},
		},
		Pins:     []string{"IN-", "IN+", "FB", "REF", "OUT"},
		OpAmpInv: "inv", OpAmpNonInv: "ninv", OpAmpOut: "OUT",
		Tolerance: 0.001, RatioTolerance: 0.0002, RatioDriftPPM: 2,
	}
}

// splitNet is the split-element difference amplifier of eight pins
// (straptest.SplitNetwork).
func splitNet() *catalog.MatchedNetwork { return straptest.SplitNetwork() }

// unknownNet is classicNet with its ratio figures unknown.
func unknownNet() *catalog.MatchedNetwork {
	n := classicNet(10e3, math.NaN())
	n.RatioDriftPPM = math.NaN()
	return n
}

type catalogNet struct {
	name string
	n    *catalog.MatchedNetwork
}
