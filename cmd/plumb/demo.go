package main

import (
	"errors"
	"fmt"
	"io/fs"
	"slices"
	"strings"
	"time"

	"github.com/spf13/cobra"

	"plumb/catalog"
	"plumb/data"
	"plumb/optimize/search"
	"plumb/optimize/spec"
)

// demoSpec is the embedded example spec `plumb demo` solves when it is
// given none.
const demoSpec = "logger-channel"

// demoTop is the number of designs the demo shows.
const demoTop = 3

type demoOptions struct {
	// Spec names the embedded example spec to solve.
	Spec   string
	IO     *IOStreams
	Now    func() time.Time
	Format string
	Quiet  bool
}

func newDemoCmd(f *Factory, runF func(*demoOptions) error) *cobra.Command {
	opts := &demoOptions{IO: f.IO, Now: f.Now, Spec: demoSpec}
	cmd := &cobra.Command{
		Use:   "demo [EXAMPLE]",
		Short: "Run the whole job on the demo catalog and an example spec",
		Long: `Run plumb end to end on the embedded demo catalog and the example spec
` + demoSpec + ` (a data-logger input channel): load the spec, search the
catalog for the cheapest designs that meet every limit, and print the ranked
designs with their parts, costs, binding limits and near misses.

Name another embedded example spec to solve it instead: ` + strings.Join(demoSpecs(), ", ") + `.
The channel examples (adc-channel, strapped-gain, two-stage) budget the
whole channel in LSB at the ADC.

The demo always uses the embedded catalog, whatever --catalog says; its
makers, parts and prices are invented. Run the same search on your own
catalog with ` + "`plumb solve EXAMPLE`" + `.`,
		Example: `  plumb demo
  plumb demo adc-channel
  plumb demo two-stage --format json`,
		Args:      rangeArgs(0, 1, "EXAMPLE"),
		ValidArgs: demoSpecs(),
		RunE: func(cmd *cobra.Command, args []string) error {
			var err error
			if len(args) == 1 {
				name := strings.TrimSuffix(args[0], ".yaml")
				if !slices.Contains(demoSpecs(), name) {
					return usagef("%q is not an embedded example spec: use one of %s, or run `plumb solve FILE` for a spec of your own", args[0], strings.Join(demoSpecs(), ", "))
				}
				opts.Spec = name
			}
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
	sp, err := loadSpecArg(opts.Spec)
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
	banner := fmt.Sprintf("plumb demo: the example spec %s solved on the embedded demo catalog (%d series, %d resistors, %d networks, %d amplifiers, %d references; invented parts)",
		opts.Spec, stats.Series, stats.Resistors, stats.Networks, stats.Amplifiers, stats.References)
	if sp.IsChain() {
		return runDemoChain(cmd, opts, st, sp, banner)
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
		writeHanging(opts.IO.Out, opts.IO, "", "  ", banner)
		fmt.Fprintln(opts.IO.Out)
		err = writeSolveTable(opts.IO.Out, opts.IO, solveTitle(sp), res, 0)
		if err == nil && !infeasible {
			fmt.Fprintln(opts.IO.Out)
			writeHanging(opts.IO.Out, opts.IO, "next: ", "  ", fmt.Sprintf("`plumb solve %s --explain 1` for the limits of design 1, `plumb solve %s --bom bom.csv` for its purchasing list", opts.Spec, opts.Spec))
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

// runDemoChain solves an example spec that lists stages, as `plumb solve`
// does for a chain.
func runDemoChain(cmd *cobra.Command, opts *demoOptions, st *catalog.Store, sp *spec.Spec, banner string) error {
	res, err := search.SolveChainCatalog(cmd.Context(), st, sp, search.Options{Top: demoTop})
	return writeChainOutcome(opts.IO, opts.Format, banner, sp, res, err, 0)
}

// demoSpecs lists the embedded example specs (not the designs), sorted.
func demoSpecs() []string {
	var names []string
	entries, _ := fs.ReadDir(data.Examples(), ".") // embedded: cannot fail
	for _, e := range entries {
		n, ok := strings.CutSuffix(e.Name(), ".yaml")
		if ok && !strings.HasSuffix(n, "-design") {
			names = append(names, n)
		}
	}
	slices.Sort(names)
	return names
}
