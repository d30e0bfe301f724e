package family

// Matched is a difference stage built on one catalog part: an amplifier
// with matched resistors inside, at one of the gains its pins make. It has
// no positions to fill: its gain error, gain drift, CMRR, offset and noise
// are the maker's limits (catalog.Amplifier), the offset and noise taken at
// noise gain 1 + G with the internal resistors' Thevenin resistance R/2
// (domain notes §2). The spec's source and reference resistances act on it
// as on the classic difference amplifier R1 = R3 = the part's internal
// resistor, R2 = R4 = G·R1, each input through Rs and the reference pin
// through Rref (the budget's evalMatched solves those transfers): the gain
// falls to G·R1/(R1 + Rs), equal source resistances keep the balance, and
// the reference resistance unbalances it, Acm = Rref/(R1 + Rs + R2 + Rref);
// the internal resistors' absolute tolerance then reaches the gain.
var Matched = &Family{
	Name:        "matched",
	About:       "an amplifier with matched resistors inside",
	Input:       Differential,
	Reference:   RefOutput,
	GainProblem: positiveGain,
	Search:      Search{Strategy: Part, As: Difference, OpAmps: 1},
}
