package main

import (
	"fmt"
	"io"
	"maps"
	"math"
	"regexp"
	"slices"
	"sort"
	"strconv"
	"strings"

	"plumb/catalog"
	"plumb/catalog/units"
	"plumb/optimize/assume"
	"plumb/optimize/budget"
	"plumb/optimize/search"
)

// formatLimitValue prints a search limit figure in the unit its name
// implies (budget.UnitOf; "gain error initial", the search's one name of
// its own, is a fraction like gain error).
func formatLimitValue(name string, v float64) string {
	return budget.FormatFigure(v, budget.UnitOf(name))
}

// limitValue prints a figure of limit l in the limit's own unit, or in
// the unit its name implies when the limit carries none.
func limitValue(l search.Limit, v float64) string {
	if l.Unit != "" {
		return budget.FormatFigure(v, l.Unit)
	}
	return formatLimitValue(l.Name, v)
}

// formatMargin prints a margin ratio (above 1 passes).
func formatMargin(m float64) string {
	if m > 1e6 {
		return "large"
	}
	return strconv.FormatFloat(m, 'f', 2, 64) + "x"
}

// printCautions prints safety cautions first and prominently.
func printCautions(w io.Writer, ios *IOStreams, cautions []string) {
	if w != ios.Out {
		// On stderr (beside JSON or CSV on stdout) colour follows stderr.
		for _, c := range cautions {
			fmt.Fprintln(w, "CAUTION: "+c)
		}
		return
	}
	for _, c := range cautions {
		writeHanging(w, ios, ios.Bold(ios.Yellow("CAUTION:"))+" ", "  ", c)
	}
	if len(cautions) > 0 {
		fmt.Fprintln(w)
	}
}

// cautionsBesideData prints cautions on stderr when stdout carries JSON or
// CSV, where a reader of the data file might miss them.
func cautionsBesideData(ios *IOStreams, format string, cautions []string) {
	if format != "table" {
		printCautions(ios.ErrOut, ios, cautions)
	}
}

// writeDesignParts prints a design's positions and parts.
func writeDesignParts(w io.Writer, ios *IOStreams, d *search.Design) error {
	t := newPageTable(ios, "POSITION", "KIND", "PART", "QTY", "VALUE", "TOL", "TCR", "UNIT PRICE").alignRight(3, 4, 5, 6, 7)
	seen := map[string]bool{} // networks already listed: one network serves all its positions
	for _, p := range d.Parts {
		value := "-"
		if p.ValueOhm > 0 {
			value = units.FormatOhms(p.ValueOhm)
		}
		tol := optPercent(p.Tolerance)
		if p.RatioTolerance > 0 {
			tol += " (ratio " + units.FormatPercent(p.RatioTolerance) + ")"
		}
		tcr := optPPM(p.TCRppm)
		if p.TCRTracking > 0 {
			tcr += " (track " + strconv.FormatFloat(p.TCRTracking, 'g', 3, 64) + ")"
		}
		qty, price := strconv.Itoa(p.Quantity), formatMoney(p.UnitPrice, d.Currency)
		if p.Kind == string(catalog.KindNetwork) {
			if seen[p.Part] {
				qty, price = "", "same network"
			}
			seen[p.Part] = true
		}
		t.row(p.Position, p.Kind, p.Part, qty, value, tol, tcr, price)
	}
	if err := t.render(w); err != nil {
		return err
	}
	for _, p := range d.Parts {
		if p.Strapping != "" {
			writeHanging(w, ios, "", "  ", fmt.Sprintf("%s %s strapped: %s", p.Position, p.Part, p.Strapping))
		}
	}
	return nil
}

// writeSolveTable prints a search result for a terminal or a pipe, fitted
// to the page (100 columns unless the terminal is narrower). With explain
// N > 0 it prints design N alone; the caller adds its full budget.
func writeSolveTable(w io.Writer, ios *IOStreams, title string, r *search.Result, explain int) error {
	printCautions(w, ios, r.Cautions)
	writeHanging(w, ios, "", "  ", ios.Bold(title))
	fmt.Fprintf(w, "method %s; %s, %d evaluated, %d skipped by bound\n",
		r.Method, countOf(r.Search.Classes, "design class", "design classes"), r.Search.Evaluated, r.Search.BoundPruned)
	if explain > 0 {
		for i := range r.Designs {
			if r.Designs[i].Rank == explain {
				return writeDesign(w, ios, r, &r.Designs[i])
			}
		}
		return nil
	}
	fmt.Fprintln(w)
	if r.Infeasible != nil {
		writeInfeasible(w, ios, r.Infeasible)
	}
	if len(r.Designs) > 0 {
		t := newPageTable(ios, "RANK", "FAMILY", "PER STAGE", "BUILD", "BINDING", "MARGIN").alignRight(0, 2, 3, 5)
		for _, d := range r.Designs {
			margin := ""
			if l, ok := limitNamed(d.Limits, d.Binding); ok {
				margin = formatMargin(l.Margin)
			}
			t.row(strconv.Itoa(d.Rank), d.Family, formatMoney(d.UnitCost, d.Currency), formatMoney(d.TotalCost, d.Currency), d.Binding, margin)
		}
		if err := t.render(w); err != nil {
			return err
		}
	}
	for i := range r.Designs {
		if err := writeDesign(w, ios, r, &r.Designs[i]); err != nil {
			return err
		}
	}
	if err := writeFrontier(w, ios, r.Frontier); err != nil {
		return err
	}
	if len(r.NearMisses) > 0 {
		title := "Near misses (the closest designs cheaper than rank 1, failing):"
		if len(r.Designs) == 0 {
			title = "Near misses (the closest designs, failing):"
		}
		if err := writeFailing(w, ios, title, r.NearMisses, true); err != nil {
			return err
		}
	}
	if len(r.CheapestFailing) > 0 {
		if err := writeFailing(w, ios, "Cheapest failing designs:", r.CheapestFailing, false); err != nil {
			return err
		}
	}
	notes := append(slices.Clone(r.Notes), nearMissNotes(r)...)
	if len(notes) > 0 {
		fmt.Fprintln(w)
	}
	for _, n := range notes {
		writeHanging(w, ios, "note: ", "  ", n)
	}
	return nil
}

// nearMissNotes says which figures the near misses' verdicts rest on that
// the catalog does not give (a resistor's load life taken at its
// technology's loosest grade can be all that fails a design), one line per
// part, for the parts the ranked designs' notes do not already cover. JSON
// carries the same in each near miss's assumptions.
func nearMissNotes(r *search.Result) []string {
	noted := map[string]bool{}
	for i := range r.Designs {
		for _, a := range r.Designs[i].Assumptions {
			noted[a.Part+"|"+a.Figure] = true
		}
	}
	var as []assume.Assumption
	for i := range r.NearMisses {
		for _, a := range r.NearMisses[i].Assumptions {
			if k := a.Part + "|" + a.Figure; !noted[k] {
				noted[k] = true
				as = append(as, a)
			}
		}
	}
	sort.SliceStable(as, func(i, j int) bool { return as[i].Part < as[j].Part })
	out := assume.Notes(as)
	for i := range out {
		out[i] = "near miss " + out[i]
	}
	return out
}

// writeDesign prints one ranked design: its cost, its parts, its limits in
// a few short lines, the reasons and its own cautions.
func writeDesign(w io.Writer, ios *IOStreams, r *search.Result, d *search.Design) error {
	fmt.Fprintf(w, "\n%s %s, %s per stage, %s for the build\n", ios.Bold("#"+strconv.Itoa(d.Rank)), d.Family,
		formatMoney(d.UnitCost, d.Currency), formatMoney(d.TotalCost, d.Currency))
	if err := writeDesignParts(w, ios, d); err != nil {
		return err
	}
	for _, why := range d.Reasons {
		if strings.HasPrefix(why, "meets every limit: ") {
			fmt.Fprintln(w, "  - meets every limit:")
			writeHanging(w, ios, "    ", "    ", limitsText(d.Limits))
			continue
		}
		writeBullet(w, ios, why)
	}
	for _, c := range d.Cautions {
		if !slices.Contains(r.Cautions, c) {
			writeHanging(w, ios, "  "+ios.Yellow("CAUTION:")+" ", "    ", c)
		}
	}
	if len(d.ShortStock) > 0 {
		writeHanging(w, ios, "  "+ios.Yellow("!")+" ", "    ", "short of stock for the build: "+strings.Join(d.ShortStock, ", "))
	}
	return nil
}

// limitsText lists limits compactly: "gain error 0.6113% of 1% (1.64x);
// CMRR 41.1 dB of 40 dB (+1.1 dB)", each value and limit printed by
// budget.FormatFigure, the margin in check's words.
func limitsText(ls []search.Limit) string {
	var items []string
	for _, l := range ls {
		margin := l.MarginText
		if margin == "" {
			margin = formatMargin(l.Margin)
		}
		margin = strings.TrimSuffix(margin, " inside the limit")
		items = append(items, fmt.Sprintf("%s %s of %s (%s)", l.Name, keep(limitValue(l, l.Value)), keep(limitValue(l, l.Limit)), keep(margin)))
	}
	return strings.Join(items, "; ")
}

// writeFailing prints failing designs: their parts, cost, what they fail
// and, with fixes, the cheapest change that makes each pass.
func writeFailing(w io.Writer, ios *IOStreams, title string, nms []search.NearMiss, fixes bool) error {
	fmt.Fprintf(w, "\n%s\n", ios.Bold(title))
	header := []string{"PER STAGE", "PARTS", "FAILS"}
	if fixes {
		header = append(header, "CHANGE THAT PASSES")
	}
	t := newPageTable(ios, header...).alignRight(0).wrapColumns(1, 2)
	if fixes {
		t.wrapColumns(1, 2, 3)
	}
	for _, nm := range nms {
		var fails []string
		for _, f := range nm.Fails {
			l := search.Limit{Name: f.Name, Unit: budget.UnitOf(f.Name)}
			if ll, ok := limitNamed(nm.Limits, f.Name); ok {
				l = ll
			}
			margin := l.MarginText
			if margin == "" {
				margin = fmt.Sprintf("by %s", formatMargin(1/math.Max(l.Margin, 1e-12)))
			}
			fails = append(fails, fmt.Sprintf("%s %s of %s (%s)", f.Name, keep(limitValue(l, f.Value)), keep(limitValue(l, f.Limit)), margin))
		}
		row := []string{formatMoney(nm.UnitCost, nm.Currency), nm.PartsText(), strings.Join(fails, "; ")}
		if fixes {
			row = append(row, fixText(&nm))
		}
		t.row(row...)
	}
	return t.render(w)
}

// fixText words a near miss's fix and its alternatives.
func fixText(nm *search.NearMiss) string {
	if nm.Fix == nil {
		return "none found: no amplifier, grade or network change, alone or in pairs, and no calibration"
	}
	txt := keepUnits(nm.Fix.Change)
	if nm.Fix.Kind != "calibration" {
		txt += fmt.Sprintf(" (+%s per stage)", formatMoney(nm.Fix.ExtraCost, nm.Currency))
	}
	for _, a := range nm.Alternatives {
		txt += "; or " + a.Change
	}
	return txt
}

// unitAfterNumber is a number, a space and the unit that follows it.
var unitAfterNumber = regexp.MustCompile(`([0-9]) ((?:[kMG]?Ω)|%|ppm/K|[mµn]?V|dB)`)

// keepUnits keeps each number of s on one line with its unit ("76.8 kΩ",
// "0.1 %") when a table wraps it.
func keepUnits(s string) string { return unitAfterNumber.ReplaceAllString(s, "$1"+nbsp+"$2") }

// writeBullet writes "  - text", wrapped to the terminal width on a
// terminal.
func writeBullet(w io.Writer, ios *IOStreams, text string) {
	writeHanging(w, ios, "  - ", "    ", text)
}

// writeHanging writes text after lead, wrapped to the page (the terminal's
// width, else 100 columns) with cont before each continuation line.
func writeHanging(w io.Writer, ios *IOStreams, lead, cont, text string) {
	lines := []string{text}
	if ios.width > 0 {
		lines = wrapText(text, ios.width-max(textWidth(lead), textWidth(cont)))
	}
	for i, l := range lines {
		if i > 0 {
			lead = cont
		}
		fmt.Fprintln(w, lead+strings.ReplaceAll(l, nbsp, " "))
	}
}

func writeInfeasible(w io.Writer, ios *IOStreams, inf *search.Infeasible) {
	lines := inf.Lines()
	if why := strings.TrimLeft(strings.TrimPrefix(lines[0], search.NoDesign), ": "); why != "" {
		writeHanging(w, ios, ios.Red("No design meets the spec:")+" ", "  ", why)
	} else {
		fmt.Fprintln(w, ios.Red("No design meets the spec."))
	}
	for _, l := range lines[1:] {
		lead, cont := "  ", "    "
		if strings.HasPrefix(l, "  ") {
			lead, cont, l = "    ", "      ", strings.TrimPrefix(l, "  ")
		}
		writeHanging(w, ios, lead, cont, l)
	}
	for _, name := range slices.Sorted(maps.Keys(inf.HardLimits)) {
		fmt.Fprintf(w, "  %d amplifier(s) removed by %s\n", inf.HardLimits[name], name)
	}
}

// solveCSVHeader is the CSV form of a search result: one row per part of
// each ranked design.
var solveCSVHeader = []string{"rank", "family", "unit_cost", "total_cost", "currency", "binding", "position", "kind", "part", "quantity", "value_ohm", "tolerance", "tcr_ppm", "unit_price"}

func solveCSVRows(r *search.Result) [][]string {
	var rows [][]string
	g := func(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
	for _, d := range r.Designs {
		for _, p := range d.Parts {
			rows = append(rows, []string{strconv.Itoa(d.Rank), d.Family, g(d.UnitCost), g(d.TotalCost), d.Currency, d.Binding,
				p.Position, p.Kind, p.Part, strconv.Itoa(p.Quantity), csvOptional(p.ValueOhm), csvOptional(p.Tolerance), csvOptional(p.TCRppm), g(p.UnitPrice)})
		}
	}
	return rows
}

// writeFrontier prints the cost-versus-margin frontier: each design's cost,
// its binding limit and margin, and its parts (wrapped).
func writeFrontier(w io.Writer, ios *IOStreams, f []search.Design) error {
	if len(f) == 0 {
		return nil
	}
	fmt.Fprintf(w, "\n%s\n", ios.Bold("Cost against margin (no cheaper design has as much margin on every limit):"))
	t := newPageTable(ios, "RANK", "PER STAGE", "BINDING", "MARGIN", "PARTS").alignRight(0, 1, 3).wrapColumns(4)
	for _, d := range f {
		rank := "-"
		if d.Rank > 0 {
			rank = strconv.Itoa(d.Rank)
		}
		margin := ""
		if l, ok := limitNamed(d.Limits, d.Binding); ok {
			margin = formatMargin(l.Margin)
		}
		t.row(rank, formatMoney(d.UnitCost, d.Currency), d.Binding, margin, d.PartsText())
	}
	return t.render(w)
}

// limitNamed returns the limit of ls named name.
func limitNamed(ls []search.Limit, name string) (search.Limit, bool) {
	for _, l := range ls {
		if l.Name == name {
			return l, true
		}
	}
	return search.Limit{}, false
}

// countOf writes n with the noun in the number it takes: "1 design class",
// "0 design classes", "148 design classes".
func countOf(n int, one, many string) string {
	if n == 1 {
		return "1 " + one
	}
	return strconv.Itoa(n) + " " + many
}
