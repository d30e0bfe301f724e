package main

import (
	"errors"
	"fmt"
	"strings"
	"time"

	"github.com/spf13/cobra"

	"plumb/catalog"
	"plumb/optimize/cost"
	"plumb/optimize/search"
	"plumb/optimize/spec"
)

type solveOptions struct {
	// Rates are the exchange rates of the configuration (currency.rates).
	Rates   cost.Rates
	IO      *IOStreams
	Catalog catalogOpener
	Now     func() time.Time
	Spec    string
	Top     int
	Combos  bool
	// Frontier lists the cost-versus-margin frontier after the ranking.
	Frontier bool
	Format   string
	Explain  int
	BOM      string
	Force    bool
	Quiet    bool
	Verbose  bool
}

func newSolveCmd(f *Factory, runF func(*solveOptions) error) *cobra.Command {
	opts := &solveOptions{IO: f.IO, Catalog: f.Catalog, Now: f.Now}
	cmd := &cobra.Command{
		Use:   "solve SPEC",
		Short: "Find the cheapest designs that meet every limit of a spec",
		Long: `Search the catalog for the lowest-cost designs that meet every limit of the
spec SPEC (a YAML file, or the name of an embedded example such as
logger-channel) under its analysis method, and rank them: parts, cost per
stage and for the build, the binding limit and why each design ranks where
it does. Near misses (cheaper designs that fail) are listed with what they
fail and the cheapest single change that fixes them.

When no design meets the spec, plumb says which limits no part in the
catalog can reach and exits with code 3.`,
		Example: `  plumb solve logger-channel
  plumb solve logger-channel --top 3 --explain 1
  plumb solve logger-channel --format json
  plumb solve logger-channel --bom logger-bom.csv`,
		Args: exactArgs("SPEC"),
		RunE: func(cmd *cobra.Command, args []string) error {
			opts.Spec = args[0]
			var err error
			if opts.Format, err = chooseFormat(cmd, f, opts.Format); err != nil {
				return err
			}
			if !cmd.Flags().Changed(keyTop) {
				opts.Top = f.Settings().Top
			}
			if opts.Top < 1 || opts.Top > search.MaxTop {
				return usagef("--top %d: show from 1 to %d designs", opts.Top, search.MaxTop)
			}
			if opts.Explain < 0 || opts.Explain > opts.Top {
				return usagef("--explain %d: choose a rank from 1 to --top (%d)", opts.Explain, opts.Top)
			}
			opts.Quiet, opts.Verbose = f.Quiet, f.Verbose
			opts.Rates = f.Settings().Rates
			if runF != nil {
				return runF(opts)
			}
			return runSolve(cmd, opts)
		},
	}
	fl := cmd.Flags()
	fl.IntVar(&opts.Top, keyTop, 0, "number of ranked designs (default: the configured top, 5 unless set)")
	fl.BoolVar(&opts.Combos, "combos", false, "allow two resistors in series or in parallel at a feedback position to close a ratio gap")
	fl.BoolVar(&opts.Frontier, "frontier", false, "also list the designs on the cost-versus-margin frontier (none cheaper has as much margin on every limit)")
	fl.IntVar(&opts.Explain, "explain", 0, "print design `N` alone, with its reasons and full budget")
	fl.StringVar(&opts.BOM, "bom", "", "write the purchasing list of design 1 (or --explain N) to `FILE`.csv")
	fl.BoolVar(&opts.Force, "force", false, "replace an existing --bom file")
	addFormatFlag(cmd, &opts.Format)
	return cmd
}

func runSolve(cmd *cobra.Command, opts *solveOptions) error {
	ctx := cmd.Context()
	sp, err := loadSpecArg(opts.Spec)
	if err != nil {
		return err
	}
	if opts.BOM != "" {
		// Refuse before searching, not after printing the whole result.
		if err := replaceable(opts.BOM, opts.Force); err != nil {
			return fmt.Errorf("--bom: %w", err)
		}
	}
	st, err := opts.Catalog(ctx)
	if err != nil {
		return err
	}
	defer st.Close()
	if sp.IsChain() {
		return runSolveChain(cmd, opts, st, sp)
	}
	start := opts.Now()
	res, err := solveSpec(cmd, opts.IO, opts.Quiet, opts.Now, st, sp, search.Options{Top: opts.Top, Combos: opts.Combos, Frontier: opts.Frontier, Rates: opts.Rates})
	if res == nil {
		return err
	}
	if opts.Verbose {
		fmt.Fprintf(opts.IO.ErrOut, "searched %s (%d evaluated, %d skipped by bound) in %s\n",
			countOf(res.Search.Classes, "design class", "design classes"), res.Search.Evaluated, res.Search.BoundPruned, opts.Now().Sub(start).Round(time.Millisecond))
	}
	infeasible := errors.Is(err, search.ErrInfeasible)
	if err != nil && !infeasible {
		return err
	}
	cautionsBesideData(opts.IO, opts.Format, res.Cautions)
	switch opts.Format {
	case "json":
		if werr := writeJSON(opts.IO.Out, res); werr != nil {
			return werr
		}
	case "csv":
		if werr := writeCSV(opts.IO.Out, solveCSVHeader, solveCSVRows(res)); werr != nil {
			return werr
		}
	default:
		if opts.Explain > len(res.Designs) && !infeasible {
			// Not an empty page under the heading: say what there is.
			return fmt.Errorf("--explain %d: the search found %d design(s); choose one of them (solve without --explain lists them)", opts.Explain, len(res.Designs))
		}
		if werr := writeSolveTable(opts.IO.Out, opts.IO, solveTitle(sp), res, opts.Explain); werr != nil {
			return werr
		}
		if opts.Explain > 0 && opts.Explain <= len(res.Designs) {
			// The full budget of design N, as `plumb check` prints it.
			br, berr := res.ExplainN(opts.Explain)
			if berr != nil {
				return fmt.Errorf("--explain %d: %w", opts.Explain, berr)
			}
			fmt.Fprintf(opts.IO.Out, "\n%s\n", opts.IO.Bold(fmt.Sprintf("Full budget of design %d", opts.Explain)))
			if werr := writeCheckTable(opts.IO.Out, opts.IO, sp, br); werr != nil {
				return werr
			}
		}
	}
	if infeasible {
		return infeasibleError(sp, res)
	}
	if opts.BOM != "" {
		rank := max(opts.Explain, 1)
		if rank > len(res.Designs) {
			return fmt.Errorf("--bom: the search found %d design(s), not %d", len(res.Designs), rank)
		}
		if err := writeSearchBOM(ctx, st, sp, res, rank, opts.BOM, opts.Force, opts.Rates); err != nil {
			return err
		}
		if !opts.Quiet {
			fmt.Fprintf(opts.IO.ErrOut, "wrote the purchasing list of design %d to %s\n", rank, opts.BOM)
		}
	}
	return nil
}

// solveSpec runs the search on catalog st with a progress bar on a
// terminal; the search reads only the rows the spec can use.
func solveSpec(cmd *cobra.Command, ios *IOStreams, quiet bool, now func() time.Time, st *catalog.Store, sp *spec.Spec, o search.Options) (*search.Result, error) {
	pr := newProgress(ios, quiet, now)
	o.Progress, o.Trials = pr.update, pr.trials
	res, err := search.SolveCatalog(cmd.Context(), st, sp, o)
	pr.finish()
	if err != nil && !errors.Is(err, search.ErrInfeasible) {
		return nil, fmt.Errorf("solving %s: %w", specName(sp), err)
	}
	return res, err
}

func specName(sp *spec.Spec) string {
	if sp.Name != "" {
		return sp.Name
	}
	return sp.SourceFile
}

func solveTitle(sp *spec.Spec) string {
	t := "Designs for " + specName(sp)
	if sp.About != "" {
		t += ": " + sp.About
	}
	return fmt.Sprintf("%s (build of %d)", t, max(sp.Build.Quantity, 1))
}

// infeasibleError is the error of an infeasible spec; it maps to exit
// code 3.
func infeasibleError(sp *spec.Spec, res *search.Result) error {
	why := ""
	if res.Infeasible != nil {
		why = strings.TrimPrefix(res.Infeasible.Message, search.ErrInfeasible.Error())
		why = strings.TrimLeft(why, ";: ")
	}
	if why != "" {
		why += "; "
	}
	return fmt.Errorf("spec %s: %w: %srelax the limits named above or add the parts they need", specName(sp), search.ErrInfeasible, why)
}
