package main

import (
	"context"
	"fmt"
	"path/filepath"
	"strings"
	"time"

	"github.com/spf13/cobra"

	"plumb/catalog"
	"plumb/optimize/cost"
	"plumb/optimize/report"
	"plumb/optimize/search"
)

type reportOptions struct {
	// Rates are the exchange rates of the configuration (currency.rates).
	Rates   cost.Rates
	IO      *IOStreams
	Catalog catalogOpener
	Now     func() time.Time
	Spec    string
	Design  string
	Top     int
	// Frontier draws the cost-versus-margin frontier.
	Frontier bool
	Output   string
	Force    bool
	Quiet    bool
}

func newReportCmd(f *Factory, runF func(*reportOptions) error) *cobra.Command {
	opts := &reportOptions{IO: f.IO, Catalog: f.Catalog, Now: f.Now}
	cmd := &cobra.Command{
		Use:   "report SPEC -o FILE.html|FILE.md",
		Short: "Write a design report (HTML or Markdown) for a design review",
		Long: `Write a report for a design review: the spec, the ranked designs (the --top
cheapest from the catalog, or the one design of --design) side by side,
each design's exact error budget with a chart per limit, Monte Carlo
histograms, gain error over temperature, the priced parts list, near misses
and every caution. The format follows the output name: FILE.html is one
self-contained page (inline CSS and SVG), FILE.md is Markdown with the plots
as SVG files beside it. An existing report is not replaced without --force,
and a failed report leaves no partial files.`,
		Example: `  plumb report logger-calibrated -o logger.html
  plumb report logger-channel --design logger-design -o logger-design.md`,
		Args: exactArgs("SPEC"),
		RunE: func(cmd *cobra.Command, args []string) error {
			opts.Spec = args[0]
			opts.Rates = f.Settings().Rates
			if opts.Output == "" {
				return usagef("%s needs -o FILE.html or -o FILE.md", cmd.CommandPath())
			}
			if ext := strings.ToLower(filepath.Ext(opts.Output)); ext != ".html" && ext != ".md" {
				return usagef("-o %s: the report is written as .html or .md; name the file so", opts.Output)
			}
			if opts.Design != "" && cmd.Flags().Changed(keyTop) {
				return usagef("--design and --top exclude each other: a report covers one given design or the top designs of a search")
			}
			if !cmd.Flags().Changed(keyTop) {
				opts.Top = min(f.Settings().Top, report.DefaultTop)
			}
			if opts.Top < 1 || opts.Top > search.MaxTop {
				return usagef("--top %d: report from 1 to %d designs", opts.Top, search.MaxTop)
			}
			opts.Quiet = f.Quiet
			if runF != nil {
				return runF(opts)
			}
			return runReport(cmd.Context(), opts)
		},
	}
	fl := cmd.Flags()
	fl.StringVar(&opts.Design, "design", "", "report on this `DESIGN` (file or example name) instead of searching")
	fl.IntVar(&opts.Top, keyTop, 0, "number of designs searched for and compared (default: the configured top, at most 3)")
	fl.BoolVar(&opts.Frontier, "frontier", false, "also plot the designs on the cost-versus-margin frontier")
	fl.StringVarP(&opts.Output, "output", "o", "", "report `FILE`: .html or .md")
	fl.BoolVar(&opts.Force, "force", false, "replace an existing report")
	return cmd
}

func runReport(ctx context.Context, opts *reportOptions) error {
	sp, err := loadSpecArg(opts.Spec)
	if err != nil {
		return err
	}
	if err := oneStage("report", sp); err != nil {
		return err
	}
	in := report.Input{Spec: sp, Top: opts.Top, Now: opts.Now, Frontier: opts.Frontier, Rates: opts.Rates}
	if opts.Design != "" {
		if in.Design, err = loadDesignArg(opts.Design); err != nil {
			return err
		}
		if err := oneStageDesign("report", opts.Design, in.Design); err != nil {
			return err
		}
	}
	// Refuse before the work, not after it; the plot files of a Markdown
	// report are checked once their names are known.
	if err := replaceable(opts.Output, opts.Force); err != nil {
		return err
	}
	st, err := opts.Catalog(ctx)
	if err != nil {
		return err
	}
	defer st.Close()
	// The catalog is read through its indexes: the search streams the rows
	// the spec can use, and the parts list finds its part numbers.
	in.Lookup = func(part string) (catalog.Kind, any, error) { return st.Find(ctx, part) }
	if in.Design == nil {
		top := opts.Top
		if top <= 0 {
			top = report.DefaultTop
		}
		res, err := search.SolveCatalog(ctx, st, sp, search.Options{Top: top})
		if res == nil {
			return fmt.Errorf("building the report for %s: searching for designs: %w", specName(sp), err)
		}
		in.Search = res
	}
	rep, err := report.Build(ctx, in)
	if err != nil {
		return fmt.Errorf("building the report for %s: %w", specName(sp), err)
	}
	if strings.EqualFold(filepath.Ext(opts.Output), ".md") {
		dir, name := filepath.Split(opts.Output)
		if dir == "" {
			dir = "."
		}
		var files []report.File
		if files, err = rep.MarkdownFiles(name); err == nil {
			err = writeMarkdownReport(dir, files, opts.Force)
		}
	} else {
		err = writeFileAtomic(opts.Output, opts.Force, rep.WriteHTML)
	}
	if err != nil {
		return fmt.Errorf("writing report %s: %w", opts.Output, err)
	}
	if !opts.Quiet {
		for _, c := range rep.Safety {
			fmt.Fprintln(opts.IO.ErrOut, opts.IO.Bold(opts.IO.Yellow("CAUTION:"))+" "+c)
		}
		fmt.Fprintf(opts.IO.ErrOut, "wrote %s (%d design(s))\n", opts.Output, len(rep.Designs))
	}
	if len(rep.Infeasible) > 0 && opts.Design == "" {
		return fmt.Errorf("spec %s: %w: the report %s explains why: %s", specName(sp), search.ErrInfeasible, opts.Output, strings.Join(rep.Infeasible, "; "))
	}
	return nil
}
