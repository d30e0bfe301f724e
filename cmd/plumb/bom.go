package main

import (
	"context"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"github.com/spf13/cobra"

	"plumb/catalog"
	"plumb/optimize/cost"
	"plumb/optimize/search"
	"plumb/optimize/spec"
)

type bomOptions struct {
	IO      *IOStreams
	Catalog catalogOpener
	Design  string
	Spec    string
	Format  string
	Output  string
	Force   bool
	Quiet   bool
	// Rates are the exchange rates of the configuration (currency.rates).
	Rates cost.Rates
}

func newBOMCmd(f *Factory, runF func(*bomOptions) error) *cobra.Command {
	opts := &bomOptions{IO: f.IO, Catalog: f.Catalog}
	cmd := &cobra.Command{
		Use:   "bom DESIGN",
		Short: "Print the purchasing list of a design",
		Long: `Print the purchasing list (bill of materials) of the design DESIGN (a YAML
file, or the name of an embedded example such as logger-design): for each
part number the positions it fills, the quantity per stage and for the
build, maker, value, tolerance, tempco, package, the unit price at the price
break used, the extended price and where the part's figures came from.

The build (quantity, attrition, assembly costs) comes from --spec; without
it one stage is priced.`,
		Example: `  plumb solve logger-channel --top 1 --bom bom.csv
  plumb bom logger-design --spec logger-channel
  plumb bom logger-design --format csv -o bom-list.csv`,
		Args: exactArgs("DESIGN"),
		RunE: func(cmd *cobra.Command, args []string) error {
			opts.Design = args[0]
			var err error
			if opts.Format, err = chooseFormat(cmd, f, opts.Format); err != nil {
				return err
			}
			opts.Quiet = f.Quiet
			opts.Rates = f.Settings().Rates
			if runF != nil {
				return runF(opts)
			}
			return runBOM(cmd.Context(), opts)
		},
	}
	cmd.Flags().StringVar(&opts.Spec, "spec", "", "spec `SPEC` whose build section sets quantity and costs")
	cmd.Flags().StringVarP(&opts.Output, "output", "o", "", "write to `FILE` instead of stdout")
	cmd.Flags().BoolVar(&opts.Force, "force", false, "replace an existing output file")
	addFormatFlag(cmd, &opts.Format)
	return cmd
}

func runBOM(ctx context.Context, opts *bomOptions) error {
	d, err := loadDesignArg(opts.Design)
	if err != nil {
		return err
	}
	if err := oneStageDesign("bom", opts.Design, d); err != nil {
		return err
	}
	build := cost.Build{Quantity: 1}
	if opts.Spec != "" {
		sp, err := loadSpecArg(opts.Spec)
		if err != nil {
			return err
		}
		if build, err = specBuild(sp); err != nil {
			return err
		}
	}
	st, err := opts.Catalog(ctx)
	if err != nil {
		return err
	}
	defer st.Close()
	b, err := priceDesign(ctx, st, d, build, opts.Rates)
	if err != nil {
		return fmt.Errorf("design %s: %w", opts.Design, err)
	}
	write := func(w io.Writer) error {
		switch opts.Format {
		case "json":
			return writeJSON(w, b)
		case "csv":
			return writeCSV(w, bomCSVHeader, bomCSVRows(b))
		}
		return writeBOMTable(w, opts.IO, b)
	}
	return writeOutput(opts.IO, opts.Output, opts.Force, opts.Quiet, write)
}

// specBuild is the build section of a spec in package cost's terms.
func specBuild(sp *spec.Spec) (cost.Build, error) {
	b, err := cost.BuildOf(sp.Build)
	if err != nil {
		return cost.Build{}, fmt.Errorf("spec %s: build: %w", specName(sp), err)
	}
	return b, nil
}

var bomCSVHeader = []string{"positions", "quantity_per_stage", "quantity_needed", "quantity_bought", "maker", "part", "value", "tolerance", "tcr_ppm", "package", "unit_price", "extended_price", "currency", "source"}

// priceDesign prices a design for a build, taking each part's offer,
// maker, package and source from the catalog.
// Prices in other currencies than the build's are converted at rates, as
// the search converts them.
func priceDesign(ctx context.Context, st *catalog.Store, d *spec.Design, build cost.Build, rates cost.Rates) (*cost.BOM, error) {
	return priceStages(ctx, st, []*spec.Design{d}, build, rates)
}

// priceStages prices the stages of a chain together as priceDesign prices
// one (cost.StagesBOM: a part number the stages share is one line).
func priceStages(ctx context.Context, st *catalog.Store, ds []*spec.Design, build cost.Build, rates cost.Rates) (*cost.BOM, error) {
	find := func(part string) (catalog.Kind, any, error) {
		kind, v, err := st.Find(ctx, part)
		if err != nil || build.Currency == "" {
			return kind, v, err
		}
		v, ok := (&cost.Converter{To: build.Currency, Rates: rates}).Part(v)
		if !ok {
			return kind, v, fmt.Errorf("%w: %s has a price in a currency with no rate to %s in currency.rates; add one to the config", cost.ErrMixedCurrency, part, build.Currency)
		}
		return kind, v, nil
	}
	return cost.StagesBOM(ds, find, build)
}

// bomCSVRows writes a line's figures unwrapped; a tolerance or tempco the
// part has none of (an op-amp's, zero in cost.BOMLine) is left blank, as
// the JSON leaves it out, not written as 0.
func bomCSVRows(b *cost.BOM) [][]string {
	g := func(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
	rows := make([][]string, len(b.Lines))
	for i, l := range b.Lines {
		rows[i] = []string{strings.Join(l.Positions, " "), strconv.Itoa(l.PerStage), strconv.Itoa(l.Needed), strconv.Itoa(l.Bought),
			l.Maker, l.Part, l.Value, csvOptional(l.Tolerance), csvOptional(l.TCR), l.Package, g(l.UnitPrice), g(l.Extended), l.Currency, l.Source}
	}
	return rows
}

func writeBOMTable(w io.Writer, ios *IOStreams, b *cost.BOM) error {
	fmt.Fprintf(w, "%s\n", ios.Bold(fmt.Sprintf("Purchasing list for %d stage(s)", b.Stages)))
	t := newTable(ios, "POSITIONS", "PER STAGE", "BUY", "MAKER", "PART", "VALUE", "TOL", "TCR", "PACKAGE", "UNIT", "EXTENDED").alignRight(1, 2, 5, 6, 7, 9, 10)
	for _, l := range b.Lines {
		buy := strconv.Itoa(l.Bought)
		if l.Short {
			buy += " (short)"
		}
		t.row(strings.Join(l.Positions, " "), strconv.Itoa(l.PerStage), buy, l.Maker, l.Part, l.Value,
			optPercent(l.Tolerance), optPPM(l.TCR), l.Package, formatMoney(l.UnitPrice, ""), formatMoney(l.Extended, ""))
	}
	if err := t.render(w); err != nil {
		return err
	}
	fmt.Fprintf(w, "parts %s, assembly %s, total %s, per stage %s\n",
		formatMoney(b.Parts, b.Currency), formatMoney(b.Assembly, b.Currency), formatMoney(b.Total, b.Currency), formatMoney(b.PerStage, b.Currency))
	if len(b.Unpriced) > 0 {
		fmt.Fprintf(w, "not priced (inline figures, no part number): %s\n", strings.Join(b.Unpriced, ", "))
	}
	return nil
}

// writeSearchBOM writes the purchasing list of a ranked design as CSV.
func writeSearchBOM(ctx context.Context, st *catalog.Store, sp *spec.Spec, res *search.Result, rank int, path string, force bool, rates cost.Rates) error {
	d, err := res.DesignN(rank)
	if err != nil {
		return fmt.Errorf("--bom: %w", err)
	}
	build, err := specBuild(sp)
	if err != nil {
		return err
	}
	b, err := priceDesign(ctx, st, d, build, rates)
	if err != nil {
		return fmt.Errorf("--bom: design %d: %w", rank, err)
	}
	return writeFileAtomic(path, force, func(w io.Writer) error { return writeCSV(w, bomCSVHeader, bomCSVRows(b)) })
}

// csvOptional writes a figure for a CSV cell, blank where the part has no
// such figure (zero in the omitempty JSON fields, such as an op-amp's
// tolerance, tempco or resistance) or it is unknown (NaN).
func csvOptional(v float64) string {
	if v == 0 || math.IsNaN(v) {
		return ""
	}
	return strconv.FormatFloat(v, 'g', -1, 64)
}
