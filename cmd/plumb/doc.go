// Command plumb picks orderable parts for analog signal-conditioning stages
// and proves them with an error budget.
//
// Commands:
//
//	plumb demo                       the whole job on the embedded catalog and an example spec
//	plumb solve SPEC                 the cheapest designs meeting every limit, ranked, with near misses
//	plumb check SPEC --design D      the full error budget of one design
//	plumb bom DESIGN                 a design's purchasing list
//	plumb report SPEC -o FILE        an HTML or Markdown design report
//	plumb import FILE...             distributor exports into the catalog, all or nothing
//	plumb catalog init|list|show|stats|export|history
//	plumb series NAME                IEC 60063 preferred values over a range
//	plumb config show                each setting, its value and where it came from
//	plumb completion SHELL, plumb man DIR
//
// This package is the command layer only: it parses flags and the
// configuration (cobra and viper), opens the catalog, calls the catalog,
// importers and optimize packages, and prints their results as tables, JSON
// or CSV. Main is the one place where errors become exit codes:
//
//	0  success
//	1  error (a missing file, a bad spec, a failed import, a design that fails its check)
//	2  usage error (unknown command or flag, bad flag value, wrong number of arguments)
//	3  the spec is infeasible with the parts in the catalog
//
// Settings (catalog, format, top, color) come from the flag, else the
// environment (PLUMB_CATALOG, ...), else the config file (plumb.yaml in the
// user config directory under plumb/, or --config / PLUMB_CONFIG), else the
// default.
//
// Each command lives in its own file: an options struct holds its flags and
// the streams it writes to, newXxxCmd builds the cobra command, and runXxx
// does the work, so tests can parse flags without running anything and run
// the command without a process.
package main
