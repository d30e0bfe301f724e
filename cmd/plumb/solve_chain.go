package main

import (
	"errors"
	"fmt"
	"io"
	"strings"
	"unicode/utf8"

	"github.com/spf13/cobra"

	"plumb/catalog"
	"plumb/optimize/budget"
	"plumb/optimize/search"
	"plumb/optimize/spec"
)

// runSolveChain solves a spec that lists stages: the cheapest chains, each
// with its stages and the chain's figures at its output, and the near
// misses. --explain N prints chain N alone with its full budget,
// --bom writes the purchasing list of chain 1 (or N) over both stages;
// --frontier is for one-stage specs and is refused here.
func runSolveChain(cmd *cobra.Command, opts *solveOptions, st *catalog.Store, sp *spec.Spec) error {
	if opts.Frontier {
		return fmt.Errorf("solve %s: --frontier is not available for a spec with stages yet; the table shows each chain's margins", specName(sp))
	}
	pr := newProgress(opts.IO, opts.Quiet, opts.Now)
	o := search.Options{Top: opts.Top, Combos: opts.Combos, Rates: opts.Rates, Progress: pr.update, Trials: pr.trials}
	res, err := search.SolveChainCatalog(cmd.Context(), st, sp, o)
	pr.finish()
	if err := writeChainOutcome(opts.IO, opts.Format, "", sp, res, err, opts.Explain); err != nil {
		return err
	}
	if opts.BOM == "" {
		return nil
	}
	rank := max(opts.Explain, 1)
	if rank > len(res.Designs) {
		return fmt.Errorf("--bom: the search found %d chain(s), not %d", len(res.Designs), rank)
	}
	build, err := specBuild(sp)
	if err != nil {
		return err
	}
	b, err := priceStages(cmd.Context(), st, res.Designs[rank-1].Designs(), build, opts.Rates)
	if err != nil {
		return fmt.Errorf("--bom: chain %d: %w", rank, err)
	}
	if err := writeFileAtomic(opts.BOM, opts.Force, func(w io.Writer) error { return writeCSV(w, bomCSVHeader, bomCSVRows(b)) }); err != nil {
		return err
	}
	if !opts.Quiet {
		fmt.Fprintf(opts.IO.ErrOut, "wrote the purchasing list of chain %d to %s\n", rank, opts.BOM)
	}
	return nil
}

// writeChainOutcome prints a chain search's result in format (the table
// after banner, when banner is not empty) and returns the search's error:
// an infeasible chain after its result, any other error before it.
func writeChainOutcome(ios *IOStreams, format, banner string, sp *spec.Spec, res *search.ChainResult, err error, explain int) error {
	infeasible := errors.Is(err, search.ErrInfeasible)
	if err != nil && !infeasible {
		return fmt.Errorf("solving %s: %w", specName(sp), err)
	}
	cautionsBesideData(ios, format, res.Cautions)
	var werr error
	switch format {
	case "json":
		werr = writeJSON(ios.Out, res)
	case "csv":
		werr = writeCSV(ios.Out, chainCSVHeader, chainCSVRows(res))
	default:
		if explain > len(res.Designs) && !infeasible {
			// Not an empty page under the heading: say what there is.
			return fmt.Errorf("--explain %d: the search found %d chain(s); choose one of them (solve without --explain lists them)", explain, len(res.Designs))
		}
		if banner != "" {
			writeHanging(ios.Out, ios, "", "  ", banner)
			fmt.Fprintln(ios.Out)
		}
		werr = writeChainTable(ios.Out, ios, sp, res, explain)
	}
	if werr != nil {
		return werr
	}
	if infeasible {
		return fmt.Errorf("spec %s: %w: %s; relax the chain's limits or add the parts they need", specName(sp), search.ErrInfeasible, res.Infeasible)
	}
	return nil
}

// oneStage refuses a spec with stages for a command that handles one
// stage only.
func oneStage(command string, sp *spec.Spec) error {
	if sp.IsChain() {
		return fmt.Errorf("%s %s: the spec lists stages, which %s does not take yet; use plumb solve for a chain", command, specName(sp), command)
	}
	return nil
}

// oneStageDesign refuses a chain's design (one with stages) for a command
// that handles one stage only.
func oneStageDesign(command, name string, d *spec.Design) error {
	if d.IsChain() {
		return fmt.Errorf("%s %s: the design lists stages, which %s does not take yet; give one stage's design, or use plumb check for a chain", command, name, command)
	}
	return nil
}

var chainCSVHeader = []string{"rank", "stage", "family", "position", "part", "total_cost", "unit_cost", "currency"}

// chainCSVRows lists every part of every stage of every ranked chain.
func chainCSVRows(res *search.ChainResult) [][]string {
	var rows [][]string
	for _, d := range res.Designs {
		for _, s := range d.Stages {
			for _, p := range s.Parts {
				rows = append(rows, []string{fmt.Sprint(d.Rank), fmt.Sprint(s.Stage), s.Family, p.Position, p.Part,
					fmt.Sprint(d.TotalCost), fmt.Sprint(d.UnitCost), d.Currency})
			}
		}
	}
	return rows
}

// writeChainTable prints each ranked chain: per stage its family, parts
// and own figures, then the chain's limits at its output; then the near
// misses. With explain > 0 it prints chain explain alone with its full
// budget (writeChainBudget).
func writeChainTable(w io.Writer, ios *IOStreams, sp *spec.Spec, res *search.ChainResult, explain int) error {
	for _, line := range wrapWords(solveTitle(sp), 96) {
		fmt.Fprintln(w, ios.Bold(escapeText(line, "")))
	}
	for i := range res.Designs {
		d := &res.Designs[i]
		if explain > 0 && d.Rank != explain {
			continue
		}
		writeChainDesign(w, ios, fmt.Sprintf("Chain %d: %s", d.Rank, chainCostLine(d)), d)
		if explain > 0 {
			if err := writeChainBudget(w, ios, sp, d, d.StageBudgets()); err != nil {
				return err
			}
		}
	}
	if res.Infeasible != "" {
		fmt.Fprintf(w, "\nNo chain passes: %s\n", res.Infeasible)
	}
	if explain == 0 && len(res.NearMisses) > 0 {
		title := "Near misses (the closest chains cheaper than chain 1, failing):"
		if len(res.Designs) == 0 {
			title = "Near misses (the closest chains, failing):"
		}
		fmt.Fprintf(w, "\n%s\n", ios.Bold(title))
		for i := range res.NearMisses {
			writeChainNearMiss(w, ios, &res.NearMisses[i])
		}
	}
	writeChainNotes(w, res.Notes)
	return nil
}

// writeChainNearMiss prints a failing chain as a ranked one, then what it
// fails and the change of one stage that makes it pass.
func writeChainNearMiss(w io.Writer, ios *IOStreams, nm *search.ChainNearMiss) {
	fmt.Fprintf(w, "\n%s\n", ios.Bold(fmt.Sprintf("%s; shortfall %.3gx", chainCost(nm.UnitCost, nm.TotalCost, nm.Currency), nm.Shortfall)))
	writeChainStages(w, &nm.ChainDesign)
	var fails []string
	for _, f := range nm.Fails {
		fails = append(fails, f.Text)
	}
	for i, line := range wrapWords("fails: "+strings.Join(fails, "; "), 92) {
		fmt.Fprintf(w, "  %s%s\n", map[bool]string{true: "", false: "  "}[i == 0], line)
	}
	fix := "no listed design of either stage passes with the other's"
	if nm.Fix != nil {
		fix = fmt.Sprintf("%s (+%s per chain, %s for the build)", nm.Fix.Change, formatMoney(nm.Fix.ExtraCost, nm.Currency), formatMoney(nm.Fix.TotalCost, nm.Currency))
	}
	for i, line := range wrapWords("passes with: "+fix, 92) {
		fmt.Fprintf(w, "  %s%s\n", map[bool]string{true: "", false: "  "}[i == 0], escapeText(line, ""))
	}
}

// chainCostLine is a chain's cost per unit and for the build, in its
// currency, and its binding limit.
func chainCostLine(d *search.ChainDesign) string {
	return fmt.Sprintf("%s; binding: %s", chainCost(d.UnitCost, d.TotalCost, d.Currency), d.Binding)
}

// chainCost words a chain's cost as solve words a stage's: one chain (all
// its stages, the unit the build counts) and the whole build.
func chainCost(unit, total float64, currency string) string {
	return fmt.Sprintf("%s per chain (all stages), %s for the build", formatMoney(unit, currency), formatMoney(total, currency))
}

// writeChainDesign prints one chain under heading: per stage its family,
// parts and own figures, then the chain's gain and each chain limit with
// its value, limit, margin and pass or fail.
func writeChainDesign(w io.Writer, ios *IOStreams, heading string, d *search.ChainDesign) {
	fmt.Fprintf(w, "\n%s\n", ios.Bold(heading))
	writeChainStages(w, d)
	fmt.Fprintf(w, "  chain    gain %.6g\n", d.Metrics.Gain)
	// Columns as wide as their widest entry, so that a long limit name
	// (amplifier headroom) does not push its row out of line.
	name, value, limit := 0, 0, 0
	for _, l := range d.Limits {
		name = max(name, utf8.RuneCountInString(l.Name))
		value = max(value, utf8.RuneCountInString(budget.FormatFigure(l.Value, l.Unit)))
		limit = max(limit, utf8.RuneCountInString(budget.FormatFigure(l.Limit, l.Unit)))
	}
	pad := func(s string, n int, right bool) string {
		fill := strings.Repeat(" ", max(0, n-utf8.RuneCountInString(s)))
		if right {
			return fill + s
		}
		return s + fill
	}
	for _, l := range d.Limits {
		mark := "ok  "
		if !l.Pass {
			mark = "FAIL"
		}
		fmt.Fprintf(w, "    %s %s  %s  limit %s  %s\n", mark, pad(l.Name, name, false), pad(budget.FormatFigure(l.Value, l.Unit), value, true),
			pad(budget.FormatFigure(l.Limit, l.Unit), limit, true), l.MarginText)
	}
}

// writeChainStages prints each stage of a chain: its family, gain, cost,
// parts and own figures, and the parts short of stock.
func writeChainStages(w io.Writer, d *search.ChainDesign) {
	for _, s := range d.Stages {
		// Positions grouped per part, "R1, R3: PART (grade); U1, U2: PART",
		// as the search's diagnosis names a design's parts.
		parts := (&search.Design{Parts: s.Parts}).PartsText()
		fmt.Fprintf(w, "  stage %d  %s, gain %g, parts %s per chain\n", s.Stage, s.Family, s.Gain, formatMoney(s.UnitCost, d.Currency))
		for _, line := range wrapWords(parts, 88) {
			fmt.Fprintf(w, "      %s\n", escapeText(line, ""))
		}
		figs := fmt.Sprintf("gain error %s, drift %s, offset %s, CM error %s, CMRR %s, noise %s",
			budget.FormatFigure(s.Metrics.GainError, ""), budget.FormatFigure(s.Metrics.DriftPPMPerK, "ppm/K"),
			budget.FormatFigure(s.Metrics.OutputOffsetV, "V"), budget.FormatFigure(s.CommonModeErrorV, "V"),
			budget.FormatFigure(s.Metrics.CMRRdB, "dB"), budget.FormatFigure(s.Metrics.NoiseRMSV, "V"))
		for _, line := range wrapWords(figs, 88) {
			fmt.Fprintf(w, "      %s\n", line)
		}
	}
	if len(d.ShortStock) > 0 {
		for _, line := range wrapWords("short of stock for the build: "+strings.Join(d.ShortStock, ", "), 88) {
			fmt.Fprintf(w, "  %s\n", escapeText(line, ""))
		}
	}
}

// writeChainNotes prints a chain's notes as a list.
func writeChainNotes(w io.Writer, notes []string) {
	if len(notes) > 0 {
		fmt.Fprintln(w, "\nNotes:")
		for _, n := range notes {
			for i, line := range wrapWords(n, 94) {
				lead := "- "
				if i > 0 {
					lead = "  "
				}
				fmt.Fprintf(w, "%s%s\n", lead, escapeText(line, ""))
			}
		}
	}
}

// wrapWords breaks text into lines of at most width runes at spaces.
func wrapWords(text string, width int) []string {
	var out []string
	line := ""
	for _, word := range strings.Fields(text) {
		switch {
		case line == "":
			line = word
		case len([]rune(line))+1+len([]rune(word)) > width:
			out = append(out, line)
			line = word
		default:
			line += " " + word
		}
	}
	if line != "" {
		out = append(out, line)
	}
	return out
}
