package main

import (
	"fmt"
	"io"
	"maps"
	"slices"
	"strconv"
	"strings"

	"plumb/catalog"
	"plumb/catalog/units"
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
		fmt.Fprintln(w, ios.Bold(ios.Yellow("CAUTION:"))+" "+c)
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
	t := newTable(ios, "POSITION", "KIND", "PART", "QTY", "VALUE", "TOL", "TCR", "UNIT PRICE").alignRight(3, 4, 5, 6, 7)
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
	return t.render(w)
}

// writeLimits prints the limits a design is checked against.
func writeLimits(w io.Writer, ios *IOStreams, ls []search.Limit) error {
	t := newTable(ios, "METRIC", "VALUE", "LIMIT", "MARGIN", "RESULT").alignRight(1, 2, 3)
	for _, l := range ls {
		res := ios.Green("pass")
		if !l.Pass {
			res = ios.Red("FAIL")
		}
		margin := l.MarginText // check's words, where the exact budget gave them
		if margin == "" {
			margin = formatMargin(l.Margin)
		}
		t.row(l.Name, limitValue(l, l.Value), limitValue(l, l.Limit), margin, res)
	}
	return t.render(w)
}

// writeSolveTable prints a search result for a terminal or a pipe.
func writeSolveTable(w io.Writer, ios *IOStreams, title string, r *search.Result, explain int) error {
	printCautions(w, ios, r.Cautions)
	fmt.Fprintf(w, "%s\n", ios.Bold(title))
	fmt.Fprintf(w, "method %s; %d design classes, %d evaluated, %d skipped by bound\n\n",
		r.Method, r.Search.Classes, r.Search.Evaluated, r.Search.BoundPruned)
	if r.Infeasible != nil {
		writeInfeasible(w, ios, r.Infeasible)
	}
	if len(r.Designs) > 0 {
		t := newTable(ios, "RANK", "FAMILY", "PER STAGE", "BUILD", "BINDING", "MARGIN").alignRight(0, 2, 3, 5)
		for _, d := range r.Designs {
			margin := ""
			for _, l := range d.Limits {
				if l.Name == d.Binding {
					margin = formatMargin(l.Margin)
				}
			}
			t.row(strconv.Itoa(d.Rank), d.Family, formatMoney(d.UnitCost, d.Currency), formatMoney(d.TotalCost, d.Currency), d.Binding, margin)
		}
		if err := t.render(w); err != nil {
			return err
		}
	}
	for i := range r.Designs {
		d := &r.Designs[i]
		if explain > 0 && d.Rank != explain {
			continue
		}
		fmt.Fprintf(w, "\n%s %s, %s per stage, %s for the build\n", ios.Bold("#"+strconv.Itoa(d.Rank)), d.Family,
			formatMoney(d.UnitCost, d.Currency), formatMoney(d.TotalCost, d.Currency))
		if err := writeDesignParts(w, ios, d); err != nil {
			return err
		}
		if explain > 0 {
			fmt.Fprintln(w)
			if err := writeLimits(w, ios, d.Limits); err != nil {
				return err
			}
		}
		for _, why := range d.Reasons {
			writeBullet(w, ios, why)
		}
		for _, c := range d.Cautions {
			if !slices.Contains(r.Cautions, c) {
				fmt.Fprintf(w, "  %s %s\n", ios.Yellow("CAUTION:"), c)
			}
		}
		if len(d.ShortStock) > 0 {
			fmt.Fprintf(w, "  %s short of stock for the build: %s\n", ios.Yellow("!"), strings.Join(d.ShortStock, ", "))
		}
	}
	if err := writeFrontier(w, ios, r.Frontier); err != nil {
		return err
	}
	if len(r.NearMisses) > 0 {
		title := "Near misses (cheaper than rank 1, but failing):"
		if len(r.Designs) == 0 {
			title = "Near misses (the closest designs, failing):"
		}
		fmt.Fprintf(w, "\n%s\n", ios.Bold(title))
		t := newTable(ios, "FAMILY", "PER STAGE", "FAILS", "FIX").alignRight(1).wrapColumns(2, 3)
		for _, nm := range r.NearMisses {
			var fails []string
			for _, f := range nm.Fails {
				fails = append(fails, f.Text)
			}
			fix := "no single change found"
			if nm.Fix != nil {
				fix = fmt.Sprintf("%s (+%s per stage)", nm.Fix.Change, formatMoney(nm.Fix.ExtraCost, nm.Currency))
			}
			t.row(nm.Family, formatMoney(nm.UnitCost, nm.Currency), strings.Join(fails, "; "), fix)
		}
		if err := t.render(w); err != nil {
			return err
		}
	}
	for _, n := range r.Notes {
		fmt.Fprintf(w, "\nnote: %s\n", n)
	}
	return nil
}

// writeBullet writes "  - text", wrapped to the terminal width on a
// terminal.
func writeBullet(w io.Writer, ios *IOStreams, text string) {
	writeHanging(w, ios, "  - ", "    ", text)
}

// writeHanging writes text after lead; on a terminal it wraps it to the
// page with cont before each continuation line (lead and cont of the same
// width). Piped output keeps one line per item, for grep.
func writeHanging(w io.Writer, ios *IOStreams, lead, cont, text string) {
	lines := []string{text}
	if ios.IsStdoutTTY() {
		lines = wrapText(text, ios.width-max(textWidth(lead), textWidth(cont)))
	}
	for i, l := range lines {
		if i > 0 {
			lead = cont
		}
		fmt.Fprintln(w, lead+l)
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
				p.Position, p.Kind, p.Part, strconv.Itoa(p.Quantity), g(p.ValueOhm), g(p.Tolerance), g(p.TCRppm), g(p.UnitPrice)})
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
	t := newTable(ios, "RANK", "PER STAGE", "BINDING", "MARGIN", "PARTS").alignRight(0, 1, 3).wrapColumns(4)
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
