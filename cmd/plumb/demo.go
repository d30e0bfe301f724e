package main

import (
	"errors"
	"fmt"
	"time"

	"github.com/spf13/cobra"

	"plumb/data"
	"plumb/optimize/search"
)

// demoSpec is the embedded example spec `plumb demo` solves.
const demoSpec = "logger-channel"

// demoTop is the number of designs the demo shows.
const demoTop = 3

type demoOptions struct {
	IO     *IOStreams
	Now    func() time.Time
	Format string
	Quiet  bool
}

func newDemoCmd(f *Factory, runF func(*demoOptions) error) *cobra.Command {
	opts := &demoOptions{IO: f.IO, Now: f.Now}
	cmd := &cobra.Command{
		Use:   "demo",
		Short: "Run the whole job on the demo catalog and an example spec",
		Long: `Run plumb end to end on the embedded demo catalog and the example spec
` + demoSpec + ` (a data-logger input channel): load the spec, search the
catalog for the cheapest designs that meet every limit, and print the ranked
designs with their parts, costs, binding limits and near misses.

The demo always uses the embedded catalog, whatever --catalog says; its
makers, parts and prices are invented. Run the same search on your own
catalog with ` + "`plumb solve " + demoSpec + "`" + `.`,
		Example: `  plumb demo
  plumb demo --format json`,
		Args: noArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			var err error
			if opts.Format, err = chooseFormat(cmd, f, opts.Format); err != nil {
				return err
			}
			opts.Quiet = f.Quiet
			if runF != nil {
				return runF(opts)
			}
			return runDemo(cmd, opts)
		},
	}
	addFormatFlag(cmd, &opts.Format)
	return cmd
}

func runDemo(cmd *cobra.Command, opts *demoOptions) error {
	ctx := cmd.Context()
	sp, err := loadSpecArg(demoSpec)
	if err != nil {
		return err
	}
	st, err := data.Demo()
	if err != nil {
		return fmt.Errorf("opening the embedded demo catalog: %w", err)
	}
	defer st.Close()
	stats, err := st.Stats(ctx)
	if err != nil {
		return fmt.Errorf("reading the embedded demo catalog: %w", err)
	}
	res, err := solveSpec(cmd, opts.IO, opts.Quiet, opts.Now, st, sp, search.Options{Top: demoTop})
	if res == nil {
		return err
	}
	infeasible := errors.Is(err, search.ErrInfeasible)
	cautionsBesideData(opts.IO, opts.Format, res.Cautions)
	switch opts.Format {
	case "json":
		err = writeJSON(opts.IO.Out, res)
	case "csv":
		err = writeCSV(opts.IO.Out, solveCSVHeader, solveCSVRows(res))
	default:
		writeHanging(opts.IO.Out, opts.IO, "", "  ", fmt.Sprintf("plumb demo: the example spec %s solved on the embedded demo catalog (%d series, %d resistors, %d networks, %d amplifiers; invented parts)",
			demoSpec, stats.Series, stats.Resistors, stats.Networks, stats.Amplifiers))
		fmt.Fprintln(opts.IO.Out)
		err = writeSolveTable(opts.IO.Out, opts.IO, solveTitle(sp), res, 0)
		if err == nil && !infeasible {
			fmt.Fprintln(opts.IO.Out)
			writeHanging(opts.IO.Out, opts.IO, "next: ", "  ", fmt.Sprintf("`plumb solve %s --explain 1` for the limits of design 1, `plumb solve %s --bom bom.csv` for its purchasing list", demoSpec, demoSpec))
		}
	}
	if err != nil {
		return err
	}
	if infeasible {
		return infeasibleError(sp, res)
	}
	return nil
}
