// Package catalog holds the engineer's component catalog: the part types
// (resistor series, individual resistors, matched resistor networks and
// amplifiers), their price breaks and stock, and the SQLite store they live in.
//
// Every figure is held in SI units: ohm, a fraction for tolerances (0.001 for
// 0.1 %), ppm/K for temperature coefficients, W, V, A, Hz, V/√Hz and A/√Hz.
// Conversion from and to the notations engineers write happens only at the
// edges, in package units.
//
// Sub-packages: eseries (the IEC 60063 preferred number series) and units
// (engineering-notation parsing and printing).
package catalog
