package main

import (
	"fmt"

	"github.com/spf13/cobra"
)

// demoSpec is the example spec `plumb demo` solves.
const demoSpec = "logger-channel.yaml"

type demoOptions struct {
	IO      *IOStreams
	Catalog catalogOpener
	Format  string
}

func newDemoCmd(f *Factory, runF func(*demoOptions) error) *cobra.Command {
	opts := &demoOptions{IO: f.IO, Catalog: f.OpenCatalog}
	cmd := &cobra.Command{
		Use:   "demo",
		Short: "Run the whole job on the demo catalog and an example spec",
		Long: `Run plumb end to end on the embedded demo catalog and the example spec
` + demoSpec + ` (a data-logger input channel): load the spec, search the
catalog for the cheapest designs that meet every limit, and print the ranked
result. The demo catalog and its parts are invented.`,
		Example: `  plumb demo
  plumb demo --format json`,
		Args: noArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			var err error
			if opts.Format, err = chooseFormat(cmd, f, opts.Format); err != nil {
				return err
			}
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
	st, err := opts.Catalog(ctx)
	if err != nil {
		return err
	}
	defer st.Close()
	s, err := st.Stats(ctx)
	if err != nil {
		return fmt.Errorf("counting the catalog: %w", err)
	}
	if opts.Format == "json" {
		return writeJSON(opts.IO.Out, s)
	}
	fmt.Fprintf(opts.IO.Out, "catalog: %d series (%d values), %d resistors, %d networks, %d amplifiers\n",
		s.Series, s.SeriesValues, s.Resistors, s.Networks, s.Amplifiers)
	fmt.Fprintln(opts.IO.Out, "the search is not built yet: this demo will solve "+demoSpec+" once it is")
	return nil
}
