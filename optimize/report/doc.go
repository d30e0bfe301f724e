// Package report turns a spec and its designs into a design report for a
// design review and for purchasing: the spec in engineering notation, the
// ranked designs side by side (cost per stage and per build, every limit's
// value, limit and margin, the binding limit), and for each design its
// error budget as a horizontal bar chart of contributors per limit with the
// limit drawn as a line, the Monte Carlo histogram of each limited metric
// with its limit lines and the yield, the gain error against temperature
// over the spec's range with the limit band, and the parts list priced at
// the build quantity; then the near misses with their fixes, the cautions
// and the notes.
//
// Build computes everything from the exported API of optimize/budget,
// optimize/search and optimize/cost: budget.Evaluate under the spec's own
// method for the budget, a Monte Carlo copy of the spec (same seed, the
// spec's distribution) for the histograms when the spec's method is not
// Monte Carlo, and Evaluator.GainErrorVsTemperature for the temperature
// plot. Nothing numeric is computed here beyond unit scaling, binning and
// the BOM lookup of the price break used.
//
// WriteHTML writes one self-contained XHTML-clean file: inline CSS (with a
// print style sheet and a page break before each design), inline SVG plots
// drawn with gonum.org/v1/plot's vgsvg backend, no scripts and no fetches;
// a Content-Security-Policy meta element forbids any. MarkdownFiles gives
// the same content as Markdown with the plots as .svg files to write beside
// it, and a list of them (Sidecars) so that a later report knows its own.
//
// Plot colours are the Okabe–Ito palette (M. Okabe and K. Ito, "Color
// Universal Design", 2008), which stays distinguishable under the common
// colour-vision deficiencies. Vermilion (#D55E00) is kept for limit lines
// only, always dashed, so a reader and a test can find them.
package report
