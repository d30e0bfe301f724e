package family

// Matched is a difference stage built on one catalog part: an amplifier
// with matched resistors inside, at one of the gains its pins make. It has
// no positions to fill: its gain error, gain drift, CMRR, offset and noise
// are the maker's limits (catalog.Amplifier), the offset and noise taken at
// noise gain 1 + G with the internal resistors' Thevenin resistance R/2
// (domain notes §2). The reference pin wants a low-impedance drive, so a
// reference impedance is not modelled.
var Matched = &Family{
	Name:        "matched",
	About:       "an amplifier with matched resistors inside",
	Input:       Differential,
	Reference:   RefOutput,
	GainProblem: positiveGain,
	Search:      Search{Strategy: Part, As: Difference, OpAmps: 1},
}
