package strap

import (
	"math"

	"plumb/catalog"
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

// splitNet is a split-element difference amplifier of eight pins: two
// 20 kΩ inputs on each side (INA-, INB- to the inverting input; INA+, INB+
// to the non-inverting one), a 20 kΩ feedback element to FB, a 20 kΩ
// element from the non-inverting input to REF, and the non-inverting input
// itself brought out as NI.
func splitNet() *catalog.MatchedNetwork {
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
