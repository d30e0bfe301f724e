// Package circuit holds exact linear DC models of the signal-conditioning
// stages plumb designs, a reduced modified-nodal-analysis solver for them
// and a SPICE deck writer for cross-checking the models against an
// independent simulator.
//
// A circuit is a Netlist: resistors at named positions, ideal voltage
// sources to ground, current sources, and op-amps modelled as finite-gain
// voltage-controlled voltage sources with an input offset voltage and two
// input bias currents. New builds the netlist of one family of package
// family's registry (each family's file there draws its topology) with
// plausible nominal values; callers then set values by index and solve.
// Nothing here knows a particular family.
//
// The solver eliminates every node fixed by an ideal source, keeps only the
// free nodes as unknowns and replaces the current-law row of each op-amp
// output node by the amplifier's constraint, because the output current is
// whatever the amplifier supplies:
//
//	V(Out)/Gain - V(Plus) + V(Minus) = Vos
//
// which for Gain = +Inf is exactly the ideal virtual short
// V(Plus) + Vos = V(Minus). Every other free node k gets Kirchhoff's
// current law, sum over resistors of (V(k) - V(j))/R = injected current.
// The system is small (3 unknowns for a difference amplifier, 7 for the
// three-op-amp instrumentation amplifier) and is factored by a dense LU
// decomposition with partial pivoting in fixed-size storage, so Factor and
// Solve allocate nothing.
//
// Method: modified nodal analysis, C.-W. Ho, A. E. Ruehli and P. A. Brennan,
// "The modified nodal approach to network analysis", IEEE Trans. Circuits
// and Systems, 1975 (from memory); LU with partial pivoting, G. H. Golub and
// C. F. Van Loan, "Matrix Computations", ch. 3 (from memory).
package circuit
