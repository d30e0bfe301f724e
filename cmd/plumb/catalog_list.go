package main

import (
	"fmt"
	"slices"
	"strings"

	"github.com/spf13/cobra"

	"plumb/catalog"
	"plumb/catalog/units"
)

// catalogKinds are the --kind values of `plumb catalog list`.
var catalogKinds = []string{string(catalog.KindResistor), string(catalog.KindSeries), string(catalog.KindNetwork), string(catalog.KindAmplifier),
	string(catalog.KindReference)}

type catalogListOptions struct {
	IO      *IOStreams
	Catalog catalogOpener
	Filter  catalog.Filter
	Format  string
}

// listFlags are the text forms of the list filters, parsed in RunE so that
// a bad value is a usage error.
type listFlags struct {
	kind, min, max, maxTol, maxTCR   string
	technology, pkg, maker, partLike string
}

func newCatalogListCmd(f *Factory, runF func(*catalogListOptions) error) *cobra.Command {
	opts := &catalogListOptions{IO: f.IO, Catalog: f.Catalog}
	var lf listFlags
	cmd := &cobra.Command{
		Use:   "list",
		Short: "List catalog parts, optionally filtered",
		Long: `List the parts of the catalog: resistor series (one line per product line),
single resistors, networks, amplifiers and voltage references, with value,
tolerance, tempco (a reference's initial accuracy and drift), the price at
the smallest price break and the stock; maker, package and other figures
are in DETAIL.

Resistive filters (--min, --max, --max-tolerance, --max-tcr, --technology)
leave amplifiers and references out. --max-tolerance takes a percentage ("0.1" or "0.1%");
--max-tcr takes ppm/K ("25" or "25ppm/K").`,
		Example: `  plumb catalog list
  plumb catalog list --kind series --max-tolerance 0.1 --max-tcr 25
  plumb catalog list --kind amplifier --format json
  plumb catalog list --kind reference
  plumb catalog list --min 1k --max 10k --package 0603`,
		Args: noArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			var err error
			if opts.Filter, err = lf.parse(); err != nil {
				return err
			}
			if opts.Format, err = chooseFormat(cmd, f, opts.Format); err != nil {
				return err
			}
			if runF != nil {
				return runF(opts)
			}
			return runCatalogList(cmd, opts)
		},
	}
	fl := cmd.Flags()
	fl.StringVar(&lf.kind, "kind", "", "only this kind: "+strings.Join(catalogKinds, ", "))
	fl.StringVar(&lf.min, "min", "", "lowest value, `OHMS` (4k99, 10R, 1M)")
	fl.StringVar(&lf.max, "max", "", "highest value, `OHMS`")
	fl.StringVar(&lf.maxTol, "max-tolerance", "", "largest tolerance, `PERCENT`")
	fl.StringVar(&lf.maxTCR, "max-tcr", "", "largest tempco, `PPM/K`")
	fl.StringVar(&lf.technology, "technology", "", "technology word (thin-film, thick-film, foil, ...)")
	fl.StringVar(&lf.pkg, "package", "", "package or size code (0603, SOIC-8, ...)")
	fl.StringVar(&lf.maker, "maker", "", "maker name")
	fl.StringVar(&lf.partLike, "part", "", "part number `PATTERN` (substring, or * and ? wildcards)")
	addFormatFlag(cmd, &opts.Format)
	return cmd
}

// parse turns the text flags into a filter.
func (lf listFlags) parse() (catalog.Filter, error) {
	f := catalog.Filter{Technology: lf.technology, Package: lf.pkg, Maker: lf.maker, PartLike: lf.partLike}
	var err error
	if f.Kind, err = parseKind(lf.kind, catalogKinds); err != nil {
		return f, err
	}
	parse := func(flag, text string, p *float64, read func(string) (float64, error)) {
		if err != nil || text == "" {
			return
		}
		v, e := read(text)
		if e != nil {
			err = usagef("--%s: %w", flag, e)
			return
		}
		if v < 0 {
			err = usagef("--%s %q: must not be negative", flag, text)
			return
		}
		*p = v
	}
	parse("min", lf.min, &f.MinOhm, units.ParseResistance)
	parse("max", lf.max, &f.MaxOhm, units.ParseResistance)
	parse("max-tolerance", lf.maxTol, &f.MaxTolerance, units.ParsePercent)
	parse("max-tcr", lf.maxTCR, &f.MaxTCR, units.ParsePPM)
	if err == nil && f.MaxOhm > 0 && f.MinOhm > f.MaxOhm {
		err = usagef("--min %s is above --max %s", lf.min, lf.max)
	}
	return f, err
}

func runCatalogList(cmd *cobra.Command, opts *catalogListOptions) error {
	ctx := cmd.Context()
	st, err := opts.Catalog(ctx)
	if err != nil {
		return err
	}
	defer st.Close()
	snap, err := st.List(ctx, opts.Filter)
	if err != nil {
		return fmt.Errorf("listing the catalog: %w", err)
	}
	switch opts.Format {
	case "json":
		return catalog.WriteSnapshotJSON(opts.IO.Out, snap)
	case "csv":
		rows := partRows(snap)
		out := make([][]string, len(rows))
		for i, r := range rows {
			out[i] = r.csv()
		}
		return writeCSV(opts.IO.Out, partCSVHeader, out)
	}
	rows := partRows(snap)
	if len(rows) == 0 {
		fmt.Fprintln(opts.IO.ErrOut, "no part matches the filters: loosen them or run `plumb catalog stats` to see what the catalog holds")
		return nil
	}
	t := newTable(opts.IO, partTableHeader...).alignRight(2, 3, 4, 5, 6)
	for _, r := range rows {
		t.row(r.table()...)
	}
	return t.render(opts.IO.Out)
}

// parseKind reads a --kind value ("" for none) from the allowed words.
func parseKind(text string, allowed []string) (catalog.Kind, error) {
	if text == "" {
		return "", nil
	}
	k := strings.ToLower(strings.TrimSpace(text))
	if !slices.Contains(allowed, k) {
		return "", usagef("--kind %q: use one of %s", text, strings.Join(allowed, ", "))
	}
	return catalog.Kind(k), nil
}
