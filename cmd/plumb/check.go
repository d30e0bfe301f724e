package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"strconv"
	"strings"
	"time"

	"github.com/spf13/cobra"

	"plumb/catalog"
	"plumb/catalog/units"
	"plumb/optimize/budget"
	"plumb/optimize/cost"
	"plumb/optimize/family"
	"plumb/optimize/spec"
)

// errCheckFailed is returned when a checked design breaks a limit.
var errCheckFailed = errors.New("design fails the spec")

type checkOptions struct {
	IO      *IOStreams
	Catalog catalogOpener
	Now     func() time.Time
	Spec    string
	Design  string
	Format  string
	Quiet   bool
	// Rates are the exchange rates of the configuration (currency.rates),
	// for the cost of a chain's design.
	Rates cost.Rates
}

func newCheckCmd(f *Factory, runF func(*checkOptions) error) *cobra.Command {
	opts := &checkOptions{IO: f.IO, Catalog: f.Catalog, Now: f.Now}
	cmd := &cobra.Command{
		Use:   "check SPEC --design DESIGN",
		Short: "Compute the error budget of a design against a spec",
		Long: `Compute the full error budget of the design DESIGN against the spec SPEC
under the spec's analysis method (worst case over every tolerance corner,
RSS, or Monte Carlo): one line per limit with the design's value, the limit,
the margin and pass or fail, then each limit's contributors from largest to
smallest, then cautions and notes. Parts named in the design are looked up
in the catalog. SPEC and DESIGN are files or names of embedded examples.

For a spec with stages, DESIGN lists one design per stage under stages;
each stage is budgeted under its stage spec as the search takes it, priced
for the build, and the chain's figures and limits follow from the cascade.

A design that fails a limit makes plumb exit with code 1 after printing the
budget.`,
		Example: `  plumb check logger-channel --design logger-design
  plumb check attenuator --design attenuator-design --format json
  plumb check two-stage --design two-stage-design`,
		Args: exactArgs("SPEC"),
		RunE: func(cmd *cobra.Command, args []string) error {
			opts.Spec = args[0]
			if opts.Design == "" {
				return usagef("%s needs --design DESIGN (a design file or example name)", cmd.CommandPath())
			}
			var err error
			if opts.Format, err = chooseFormat(cmd, f, opts.Format); err != nil {
				return err
			}
			opts.Quiet = f.Quiet
			opts.Rates = f.Settings().Rates
			if runF != nil {
				return runF(opts)
			}
			return runCheck(cmd.Context(), opts)
		},
	}
	cmd.Flags().StringVar(&opts.Design, "design", "", "design `DESIGN` to check (file or example name)")
	addFormatFlag(cmd, &opts.Format)
	return cmd
}

func runCheck(ctx context.Context, opts *checkOptions) error {
	sp, err := loadSpecArg(opts.Spec)
	if err != nil {
		return err
	}
	d, err := loadDesignArg(opts.Design)
	if err != nil {
		return err
	}
	if sp.IsChain() || d.IsChain() {
		return runCheckChain(ctx, opts, sp, d)
	}
	if len(d.Unresolved()) > 0 {
		st, err := opts.Catalog(ctx)
		if err != nil {
			return err
		}
		defer st.Close()
		lookup := func(part string) (catalog.Kind, any, error) { return st.Find(ctx, part) }
		if err := d.Resolve(lookup); err != nil {
			// Each problem already says what to do: a part not found names
			// the close part numbers, or how to look for it.
			return err
		}
	}
	pr := newProgress(opts.IO, opts.Quiet, opts.Now)
	res, err := budget.EvaluateContext(ctx, sp, d, pr.trials)
	pr.finish()
	if err != nil {
		return fmt.Errorf("budget of %s against %s: %w", opts.Design, specName(sp), err)
	}
	cautionsBesideData(opts.IO, opts.Format, res.Cautions)
	switch opts.Format {
	case "json":
		err = writeJSON(opts.IO.Out, res)
	case "csv":
		err = writeCSV(opts.IO.Out, checkCSVHeader, checkCSVRows(res))
	default:
		err = writeCheckTable(opts.IO.Out, opts.IO, sp, res)
	}
	if err != nil {
		return err
	}
	if !res.Pass {
		var fails []string
		for _, l := range res.Limits {
			if !l.Pass {
				fails = append(fails, l.Name)
			}
		}
		if len(fails) == 0 {
			fails = append(fails, "the Monte Carlo yield target")
		}
		return fmt.Errorf("%w: %s breaks %s: change the parts named in its contributors, or run `plumb solve %s` for designs that pass",
			errCheckFailed, opts.Design, strings.Join(fails, ", "), opts.Spec)
	}
	return nil
}

// writeCheckFigures prints the figures a reviewer reads before the
// limits: the nominal gain against its target and, for a differential
// input, the resistors' own CMRR and the output error the common-mode
// range adds on top of the offset; and, for a channel into an ADC, what
// the ADC reads and how wrong it can be.
func writeCheckFigures(w io.Writer, ios *IOStreams, sp *spec.Spec, r *budget.Result) {
	m := &r.Metrics
	unit := ""
	if f := family.Lookup(r.Family); f != nil && f.GainUnit() != "V/V" {
		unit = " " + f.GainUnit()
	}
	g := func(v float64) string { return strconv.FormatFloat(v, 'g', 6, 64) + unit }
	writeHanging(w, ios, "", "  ", fmt.Sprintf("nominal gain %s (target %s: %s off at nominal values)",
		g(m.Gain), g(m.GainTarget), units.FormatPercent(m.GainNominalError)))
	if m.CMRRResistorsdB > 0 {
		line := "CMRR of the resistors alone " + budget.FormatFigure(m.CMRRResistorsdB, "dB")
		if m.CommonModeErrorV > 0 {
			line += fmt.Sprintf("; the common mode over %g..%g V adds up to %s at the output (at the total CMRR), on top of the output offset",
				sp.CommonMode.Min, sp.CommonMode.Max, budget.FormatFigure(m.CommonModeErrorV, "V"))
		}
		writeHanging(w, ios, "", "  ", line)
	}
	if r.Channel != nil {
		writeHanging(w, ios, "", "  ", r.Channel.Summary())
	}
}

func writeCheckTable(w io.Writer, ios *IOStreams, sp *spec.Spec, r *budget.Result) error {
	printCautions(w, ios, r.Cautions)
	verdict := ios.Green("PASS")
	if !r.Pass {
		verdict = ios.Red("FAIL")
	}
	fmt.Fprintf(w, "%s %s against %s (%s): %s\n", ios.Bold("Budget of"), r.Family, specName(sp), r.Method, verdict)
	for _, p := range r.Design {
		value := ""
		if p.Ohm > 0 {
			value = " " + units.FormatOhms(p.Ohm)
		}
		fmt.Fprintf(w, "  %s: %s%s %s\n", p.Position, p.Part, value, p.Grade)
	}
	writeCheckFigures(w, ios, sp, r)
	fmt.Fprintln(w)
	t := newPageTable(ios, "METRIC", "VALUE", "LIMIT", "MARGIN", "RESULT").alignRight(1, 2, 3)
	for _, l := range r.Limits {
		res := ios.Green("pass")
		if !l.Pass {
			res = ios.Red("FAIL")
		}
		margin := l.MarginText
		if margin == "" {
			margin = formatMargin(l.Margin)
		}
		t.row(l.Name, budget.FormatFigure(l.Value, l.Unit), budget.FormatFigure(l.Limit, l.Unit), margin, res)
	}
	if err := t.render(w); err != nil {
		return err
	}
	if r.Binding != "" {
		fmt.Fprintf(w, "binding limit: %s\n", r.Binding)
	}
	if r.WorstCorner != "" {
		writeHanging(w, ios, "", "  ", "worst corner: "+r.WorstCorner)
	}
	if err := writeContributors(w, ios, r.Limits); err != nil {
		return err
	}
	if mc := r.MonteCarlo; mc != nil {
		fmt.Fprintf(w, "\nMonte Carlo: %d trials (seed %d, %s), yield %s", mc.Trials, mc.Seed, mc.Distribution, units.FormatPercent(mc.Yield))
		if mc.YieldTarget > 0 {
			fmt.Fprintf(w, " against a target of %s", units.FormatPercent(mc.YieldTarget))
		}
		fmt.Fprintln(w)
	}
	if len(r.Notes) > 0 {
		fmt.Fprintln(w)
	}
	for _, n := range r.Notes {
		writeBullet(w, ios, "note: "+n)
	}
	return nil
}

// writeContributors prints the contributors to each limit that has them
// (a stage's budget or a chain's), one table per limit.
func writeContributors(w io.Writer, ios *IOStreams, limits []budget.Limit) error {
	for _, l := range limits {
		if len(l.Contributors) == 0 {
			continue
		}
		fmt.Fprintf(w, "\n%s\n", ios.Bold("Contributors to "+l.Name+":"))
		ct := newPageTable(ios, "CONTRIBUTOR", "SIZE", "SHARE").alignRight(1, 2)
		for _, c := range l.Contributors {
			size := budget.FormatFigure(c.Value, l.Unit)
			if l.Unit == "dB" {
				// A dB figure does not split into terms; the share says it.
				size = strconv.FormatFloat(c.Value, 'g', 3, 64)
			}
			ct.row(c.Name, size, strconv.FormatFloat(100*c.Share, 'f', 1, 64)+" %")
		}
		if err := ct.render(w); err != nil {
			return err
		}
	}
	return nil
}

var checkCSVHeader = []string{"limit", "value", "limit_value", "unit", "margin", "pass", "contributor", "contribution", "share"}

// checkCSVRows lists each limit, then its contributors on their own rows.
func checkCSVRows(r *budget.Result) [][]string {
	g := func(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
	var rows [][]string
	for _, l := range r.Limits {
		rows = append(rows, []string{l.Name, g(l.Value), g(l.Limit), l.Unit, g(l.Margin), strconv.FormatBool(l.Pass), "", "", ""})
		for _, c := range l.Contributors {
			rows = append(rows, []string{l.Name, "", "", l.Unit, "", "", c.Name, g(c.Value), g(c.Share)})
		}
	}
	return rows
}
