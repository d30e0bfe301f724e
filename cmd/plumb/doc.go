// Command plumb picks orderable parts for analog signal-conditioning stages
// and proves them with an error budget.
//
// This package is the command layer only: it parses flags and the
// configuration (cobra and viper), opens the catalog, calls the catalog,
// importers and optimize packages, and prints their results as tables, JSON
// or CSV. Main is the one place where errors become exit codes:
//
//	0  success
//	1  error (a missing file, a bad spec, a failed import, ...)
//	2  usage error (unknown command or flag, wrong number of arguments)
//	3  the spec is infeasible with the parts in the catalog
//
// Each command lives in its own file: an options struct holds its flags and
// the streams it writes to, newXxxCmd builds the cobra command, and runXxx
// does the work, so tests can parse flags without running anything and run
// the command without a process.
package main
