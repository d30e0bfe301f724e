// Package family holds the circuit families plumb designs, one file each,
// and the registry that lists them (registry.go). A Family carries
// everything particular to its circuit: the spec's input kind, what it does
// with a reference, which gains it can make (with the message when it
// cannot), the netlist package circuit solves and ngspice cross-checks
// (positions and their roles follow the conventions in Family's doc), and
// the options the netlist takes, and what the search needs (Search: the
// shape of its space and the screening and design models: the ratio, a
// second stage, a shift network, a shunt). Each family's doc comment holds
// its topology and equations with their sources.
//
// The spec reader, the circuit solver, the error budget, the search and
// the commands take the list and each family's facts from here and never
// name a family (TestFamiliesStayInTheirPlace).
//
// The package imports no other plumb package, so that every layer can use
// it.
package family
