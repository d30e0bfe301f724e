package main

import (
	"io"
	"strings"

	"github.com/spf13/cobra"

	"plumb/catalog"
)

type catalogExportOptions struct {
	IO      *IOStreams
	Catalog catalogOpener
	Format  string // json or csv
	Kind    catalog.Kind
	Output  string // "" for stdout
	Force   bool
	Quiet   bool
}

func newCatalogExportCmd(f *Factory, runF func(*catalogExportOptions) error) *cobra.Command {
	opts := &catalogExportOptions{IO: f.IO, Catalog: f.Catalog}
	var kind string
	cmd := &cobra.Command{
		Use:   "export",
		Short: "Write the catalog as JSON (all of it) or CSV (one kind)",
		Long: `Write the catalog to stdout or a file. JSON holds the whole catalog in the
snapshot format that the demo data uses; CSV holds one kind of part (--kind
series, resistor, network, amplifier or reference), values in SI units and the price
breaks packed in one column. An existing file is not replaced without
--force, and a failed export leaves no partial file.`,
		Example: `  plumb catalog export --format json -o catalog.json
  plumb catalog export --format csv --kind series`,
		Args: noArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			var err error
			if opts.Format, err = chooseFormat(cmd, f, opts.Format, "json", "csv"); err != nil {
				return err
			}
			if opts.Kind, err = parseKind(kind, catalogKinds); err != nil {
				return err
			}
			if opts.Format == "csv" && opts.Kind == "" {
				return usagef("a CSV export holds one kind of part: add --kind (%s), or use --format json for the whole catalog", strings.Join(catalogKinds, ", "))
			}
			if opts.Format == "json" && opts.Kind != "" {
				return usagef("--kind applies to CSV only: a JSON export holds the whole catalog")
			}
			opts.Quiet = f.Quiet
			if runF != nil {
				return runF(opts)
			}
			return runCatalogExport(cmd, opts)
		},
	}
	addFormatFlag(cmd, &opts.Format, "json", "csv")
	cmd.Flags().StringVar(&kind, "kind", "", "kind of part for CSV: "+strings.Join(catalogKinds, ", "))
	cmd.Flags().StringVarP(&opts.Output, "output", "o", "", "write to `FILE` instead of stdout")
	cmd.Flags().BoolVar(&opts.Force, "force", false, "replace an existing output file")
	return cmd
}

func runCatalogExport(cmd *cobra.Command, opts *catalogExportOptions) error {
	ctx := cmd.Context()
	st, err := opts.Catalog(ctx)
	if err != nil {
		return err
	}
	defer st.Close()
	write := func(w io.Writer) error {
		if opts.Format == "csv" {
			return st.WriteCSV(ctx, w, opts.Kind)
		}
		return st.WriteJSON(ctx, w)
	}
	return writeOutput(opts.IO, opts.Output, opts.Force, opts.Quiet, write)
}
