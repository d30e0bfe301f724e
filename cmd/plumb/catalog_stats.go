package main

import (
	"fmt"
	"strconv"
	"strings"

	"github.com/spf13/cobra"
)

type catalogStatsOptions struct {
	IO      *IOStreams
	Catalog catalogOpener
	Name    string // the catalog's name for the heading
	Format  string
}

func newCatalogStatsCmd(f *Factory, runF func(*catalogStatsOptions) error) *cobra.Command {
	opts := &catalogStatsOptions{IO: f.IO, Catalog: f.Catalog}
	cmd := &cobra.Command{
		Use:     "stats",
		Short:   "Count what the catalog holds",
		Example: `  plumb catalog stats`,
		Args:    noArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			opts.Name = f.CatalogName()
			var err error
			if opts.Format, err = chooseFormat(cmd, f, opts.Format); err != nil {
				return err
			}
			if runF != nil {
				return runF(opts)
			}
			return runCatalogStats(cmd, opts)
		},
	}
	addFormatFlag(cmd, &opts.Format)
	return cmd
}

func runCatalogStats(cmd *cobra.Command, opts *catalogStatsOptions) error {
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
	fields := []field{
		{"resistor series", strconv.Itoa(s.Series)},
		{"values in series", strconv.Itoa(s.SeriesValues)},
		{"single resistors", strconv.Itoa(s.Resistors)},
		{"networks", strconv.Itoa(s.Networks)},
		{"amplifiers", strconv.Itoa(s.Amplifiers)},
		{"voltage references", strconv.Itoa(s.References)},
		{"price breaks", strconv.Itoa(s.PriceBreaks)},
		{"parts out of stock", strconv.Itoa(s.NoStock)},
		{"makers", strings.Join(s.Makers, ", ")},
		{"currencies", strings.Join(s.Currencies, ", ")},
		{"sources", strings.Join(s.Sources, ", ")},
	}
	if opts.Format == "csv" {
		return writeFields(opts.IO, "csv", "FIELD", "VALUE", fields)
	}
	const counts = 8 // the rows above that are counts; the lists follow
	fmt.Fprintf(opts.IO.Out, "%s\n\n", opts.IO.Bold("Catalog: "+opts.Name))
	t := newTable(opts.IO, "HOLDS", "COUNT").alignRight(1)
	for _, f := range fields[:counts] {
		t.row(f.Name, f.Value)
	}
	if err := t.render(opts.IO.Out); err != nil {
		return err
	}
	for _, f := range fields[counts:] {
		fmt.Fprintf(opts.IO.Out, "\n%s: %s", f.Name, f.Value)
	}
	_, err = fmt.Fprintln(opts.IO.Out)
	return err
}
