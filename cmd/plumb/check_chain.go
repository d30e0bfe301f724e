package main

import (
	"context"
	"fmt"
	"io"
	"slices"
	"strconv"
	"strings"

	"plumb/catalog"
	"plumb/optimize/budget"
	"plumb/optimize/cost"
	"plumb/optimize/search"
	"plumb/optimize/spec"
)

// chainCheck is the JSON of `plumb check` for a chain: the chain as the
// search prints a ranked one (its stages with their parts, costs and own
// figures, the chain's figures and limits) and each stage's full budget
// under the stage's spec.
type chainCheck struct {
	Design   string              `json:"design"`
	Spec     string              `json:"spec"`
	Method   string              `json:"method"`
	Pass     bool                `json:"pass"`
	Chain    *search.ChainDesign `json:"chain"`
	Stages   []*budget.Result    `json:"stage_budgets"`
	Notes    []string            `json:"notes,omitempty"`
	Cautions []string            `json:"cautions,omitempty"`
}

// runCheckChain checks a chain's design against a spec with stages: each
// stage's budget under the stage's spec as the chain's search takes it
// (spec.Spec.StageProblem), priced for the spec's build, and the chain's
// budget from them (search.CheckChain, budget.Cascade).
func runCheckChain(ctx context.Context, opts *checkOptions, sp *spec.Spec, d *spec.Design) error {
	switch {
	case !sp.IsChain():
		return fmt.Errorf("design %s lists stages but spec %s has none; check it against a spec with stages, or give the design's one stage alone", opts.Design, specName(sp))
	case !d.IsChain():
		return fmt.Errorf("spec %s lists stages but design %s has none; give one design per stage under stages (see data/examples/two-stage-design.yaml)", specName(sp), opts.Design)
	case len(d.Stages) != len(sp.Stages):
		return fmt.Errorf("design %s has %d stages, spec %s %d; give one design per stage of the spec", opts.Design, len(d.Stages), specName(sp), len(sp.Stages))
	}
	for i, st := range d.Stages {
		if fams := sp.Stages[i].Families; !slices.Contains(fams, st.Family) {
			return fmt.Errorf("design %s stage %d is family %s, which stage %d of spec %s does not take (%s); change the stage's family or the spec's", opts.Design, i+1, st.Family, i+1, specName(sp), strings.Join(fams, ", "))
		}
	}
	build, err := specBuild(sp)
	if err != nil {
		return err
	}
	st, err := opts.Catalog(ctx)
	if err != nil {
		return err
	}
	defer st.Close()
	if len(d.Unresolved()) > 0 {
		lookup := func(part string) (catalog.Kind, any, error) { return st.Find(ctx, part) }
		if err := d.Resolve(lookup); err != nil {
			return err // each unknown part carries its own hint
		}
	}
	out := &chainCheck{Design: opts.Design, Spec: specName(sp), Method: sp.Analysis.Method}
	stages := make([]search.CheckedStage, len(d.Stages))
	pr := newProgress(opts.IO, opts.Quiet, opts.Now)
	b, err := priceStages(ctx, st, d.Stages, build, opts.Rates)
	if err != nil {
		return fmt.Errorf("design %s: %w", opts.Design, err)
	}
	if len(b.Unpriced) > 0 {
		out.Notes = append(out.Notes, fmt.Sprintf("%s given by inline figures, without a part number, are left out of the cost", strings.Join(b.Unpriced, ", ")))
	}
	parts := stageParts(b, len(d.Stages))
	for i, sd := range d.Stages {
		r, err := budget.EvaluateContext(ctx, sp.StageProblem(i), sd, pr.trials)
		if err != nil {
			pr.finish()
			return fmt.Errorf("budget of %s stage %d against %s: %w", opts.Design, i+1, specName(sp), err)
		}
		total := b.StageTotals[i]
		stages[i] = search.CheckedStage{Family: r.Family, TotalCost: total, UnitCost: total / float64(build.Quantity), Currency: b.Currency, Parts: parts[i], Budget: r}
		out.Stages = append(out.Stages, r)
		for _, c := range r.Cautions {
			if !slices.Contains(out.Cautions, c) {
				out.Cautions = append(out.Cautions, c)
			}
		}
	}
	pr.finish()
	cd, err := search.CheckChain(sp, stages)
	if err != nil {
		return fmt.Errorf("chain budget of %s against %s: %w", opts.Design, specName(sp), err)
	}
	cb := cd.Budget()
	out.Chain, out.Pass = cd, cb.Pass
	out.Notes = append(out.Notes, search.ChainCostNote)
	out.Notes = append(out.Notes, cb.Notes...)
	cautionsBesideData(opts.IO, opts.Format, out.Cautions)
	switch opts.Format {
	case "json":
		err = writeJSON(opts.IO.Out, out)
	case "csv":
		err = writeCSV(opts.IO.Out, chainCSVHeader, chainCSVRows(&search.ChainResult{Designs: []search.ChainDesign{*cd}}))
	default:
		err = writeChainCheck(opts, sp, out)
	}
	if err != nil {
		return err
	}
	if !out.Pass {
		var fails []string
		for _, l := range cd.Limits {
			if !l.Pass {
				fails = append(fails, l.Name)
			}
		}
		for k, r := range out.Stages {
			if !r.Pass {
				fails = append(fails, fmt.Sprintf("stage %d's own limits (binding: %s)", k+1, r.Binding))
			}
		}
		return fmt.Errorf("%w: %s breaks %s: change the parts of the stage that contributes most, or run `plumb solve %s` for chains that pass",
			errCheckFailed, opts.Design, strings.Join(fails, ", "), opts.Spec)
	}
	return nil
}

// writeChainCheck prints the chain's check as solve prints a ranked chain,
// under a heading with the verdict, then the contributors to each chain
// limit and the notes.
func writeChainCheck(opts *checkOptions, sp *spec.Spec, c *chainCheck) error {
	ios, w := opts.IO, opts.IO.Out
	printCautions(w, ios, c.Cautions)
	verdict := ios.Green("PASS")
	if !c.Pass {
		verdict = ios.Red("FAIL")
	}
	d := c.Chain
	fmt.Fprintf(w, "%s %s against %s (%s): %s\n", ios.Bold("Budget of chain"), escapeText(c.Design, ""), specName(sp), c.Method, verdict)
	writeChainDesign(w, ios, chainCostLine(d), d)
	if err := writeChainBudget(w, ios, sp, d, c.Stages); err != nil {
		return err
	}
	writeChainNotes(w, c.Notes)
	return nil
}

// writeChainBudget prints the contributors to each of a chain's limits,
// then each stage's full budget under the stage's spec as check prints
// one stage's (writeCheckTable).
func writeChainBudget(w io.Writer, ios *IOStreams, sp *spec.Spec, d *search.ChainDesign, stages []*budget.Result) error {
	if err := writeContributors(w, ios, d.Budget().Limits); err != nil {
		return err
	}
	for k, br := range stages {
		fmt.Fprintf(w, "\n%s\n", ios.Bold(fmt.Sprintf("Stage %d", k+1)))
		if err := writeCheckTable(w, ios, sp.StageProblem(k), br); err != nil {
			return err
		}
	}
	return nil
}

// stageParts lists a chain's BOM lines (positions written STAGE:POSITION)
// as the search lists each stage's parts, one per position.
func stageParts(b *cost.BOM, stages int) [][]search.Part {
	out := make([][]search.Part, stages)
	for _, l := range b.Lines {
		for _, pos := range l.Positions {
			stage, name, ok := strings.Cut(pos, ":")
			k, err := strconv.Atoi(stage)
			if !ok || err != nil || k < 1 || k > stages {
				continue
			}
			out[k-1] = append(out[k-1], search.Part{Position: name, Kind: string(l.Kind), Part: l.Part, Quantity: max(1, l.PerStage/len(l.Positions)),
				Bought: l.Bought, UnitPrice: l.UnitPrice, Tolerance: l.Tolerance, TCRppm: l.TCR})
		}
	}
	return out
}
