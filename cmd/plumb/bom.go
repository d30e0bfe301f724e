package main

import (
	"context"
	"fmt"
	"io"
	"sort"
	"strconv"
	"strings"

	"github.com/spf13/cobra"

	"plumb/catalog"
	"plumb/catalog/units"
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
	b, err := priceDesign(ctx, st, d, build)
	if err != nil {
		return fmt.Errorf("design %s: %w", opts.Design, err)
	}
	write := func(w io.Writer) error {
		switch opts.Format {
		case "json":
			return writeJSON(w, b)
		case "csv":
			return writeCSV(w, bomCSVHeader, b.csvRows())
		}
		return b.writeTable(w, opts.IO)
	}
	return writeOutput(opts.IO, opts.Output, opts.Force, opts.Quiet, write)
}

// specBuild is the build section of a spec in package cost's terms.
func specBuild(sp *spec.Spec) (cost.Build, error) {
	p, err := search.FromSpec(sp)
	if err != nil {
		// A spec whose families the search does not build still prices.
		p.Build = cost.Build{Quantity: sp.Build.Quantity, Attrition: sp.Build.Attrition,
			PerPlacement: sp.Build.PlacementCost, PerLineItem: sp.Build.LineItemCost, Currency: sp.Build.Currency}
	}
	if p.Build.Quantity == 0 {
		p.Build.Quantity = 1
	}
	if err := p.Build.Validate(); err != nil {
		return cost.Build{}, fmt.Errorf("spec %s: build: %w", specName(sp), err)
	}
	return p.Build, nil
}

// bomLine is one part number of a purchasing list.
type bomLine struct {
	Positions []string `json:"positions"`
	PerStage  int      `json:"quantity_per_stage"`
	Needed    int      `json:"quantity_needed"`
	Bought    int      `json:"quantity_bought"`
	Kind      string   `json:"kind"`
	Maker     string   `json:"maker"`
	Part      string   `json:"part"`
	Value     string   `json:"value"`
	Tolerance float64  `json:"tolerance,omitempty"`
	TCR       float64  `json:"tcr_ppm,omitempty"`
	Package   string   `json:"package"`
	UnitPrice float64  `json:"unit_price"`
	Extended  float64  `json:"extended_price"`
	Currency  string   `json:"currency"`
	Source    string   `json:"source"`
	Short     bool     `json:"short_stock,omitempty"`
}

// bom is a priced purchasing list.
type bom struct {
	Stages   int       `json:"stages"`
	Lines    []bomLine `json:"lines"`
	Parts    float64   `json:"parts_total"`
	Assembly float64   `json:"assembly_total"`
	Total    float64   `json:"total"`
	PerStage float64   `json:"per_stage"`
	Currency string    `json:"currency"`
	// Unpriced lists positions with inline figures and no part number.
	Unpriced []string `json:"unpriced,omitempty"`
}

var bomCSVHeader = []string{"positions", "quantity_per_stage", "quantity_needed", "quantity_bought", "maker", "part", "value", "tolerance", "tcr_ppm", "package", "unit_price", "extended_price", "currency", "source"}

// priceDesign prices a design for a build, taking each part's offer,
// maker, package and source from the catalog.
func priceDesign(ctx context.Context, st *catalog.Store, d *spec.Design, build cost.Build) (*bom, error) {
	type use struct {
		part      string
		positions []string
		places    int
		network   bool
	}
	var order []string
	uses := map[string]*use{}
	b := &bom{Stages: build.Quantity}
	add := func(part, pos string, network bool) {
		u := uses[part]
		if u == nil {
			u = &use{part: part, network: network}
			uses[part] = u
			order = append(order, part)
		}
		u.positions = append(u.positions, pos)
		// A network is one piece however many of its elements are used.
		if !network || u.places == 0 {
			u.places++
		}
	}
	for _, p := range d.Positions {
		for i, e := range p.Elements {
			pos := p.Name
			if len(p.Elements) > 1 {
				pos += "." + string(rune('a'+i))
			}
			switch {
			case e.Network != "":
				add(e.Network, pos, true)
			case e.Part != "":
				add(e.Part, pos, false)
			default:
				b.Unpriced = append(b.Unpriced, pos)
			}
		}
	}
	if d.Amplifier.Part != "" {
		add(d.Amplifier.Part, "U1", false)
	} else {
		b.Unpriced = append(b.Unpriced, "U1")
	}
	lines := make([]bomLine, 0, len(order))
	var cuses []cost.Use
	for _, part := range order {
		u := uses[part]
		kind, v, err := st.Find(ctx, part)
		if err != nil {
			return nil, fmt.Errorf("part %s at %s: %w", part, strings.Join(u.positions, ", "), err)
		}
		ln, offer := describeForBOM(kind, v)
		ln.Positions, ln.PerStage = u.positions, u.places
		lines = append(lines, ln)
		cuses = append(cuses, cost.Use{Part: ln.Part, Offer: offer, Placements: u.places})
	}
	bd, err := cost.Price(build, cuses)
	if err != nil {
		return nil, fmt.Errorf("pricing: %w", err)
	}
	for i := range lines {
		for _, cl := range bd.Lines {
			if cl.Part == lines[i].Part {
				lines[i].Needed, lines[i].Bought = cl.Needed, cl.Bought
				lines[i].UnitPrice, lines[i].Extended, lines[i].Currency, lines[i].Short = cl.UnitPrice, cl.Extended, cl.Currency, cl.Short
			}
		}
	}
	sort.SliceStable(lines, func(i, j int) bool { return lines[i].Positions[0] < lines[j].Positions[0] })
	b.Lines, b.Parts, b.Assembly, b.Total, b.PerStage, b.Currency = lines, bd.Parts, bd.Assembly, bd.Total, bd.PerUnit, bd.Currency
	return b, nil
}

// describeForBOM takes the purchasing fields of a part found in the catalog.
func describeForBOM(kind catalog.Kind, v any) (bomLine, *catalog.Offer) {
	ln := bomLine{Kind: string(kind)}
	switch p := v.(type) {
	case *catalog.Resistor:
		ln.Maker, ln.Part, ln.Value, ln.Tolerance, ln.TCR, ln.Package, ln.Source = p.Maker, p.Part, units.FormatOhms(p.ValueOhm), p.Tolerance, p.TCR, p.Package, p.Source
		return ln, &p.Offer
	case *catalog.Network:
		vals := make([]string, len(p.Values))
		for i, x := range p.Values {
			vals[i] = units.FormatOhms(x)
		}
		ln.Maker, ln.Part, ln.Value, ln.Tolerance, ln.TCR, ln.Package, ln.Source = p.Maker, p.Part, strings.Join(vals, "/"), p.Tolerance, p.TCR, p.Package, p.Source
		return ln, &p.Offer
	case *catalog.Amplifier:
		ln.Maker, ln.Part, ln.Value, ln.Package, ln.Source = p.Maker, p.Part, string(p.Type), p.Package, p.Source
		if p.Type == catalog.MatchedAmp {
			ln.Tolerance, ln.TCR = p.GainErrorMax, p.GainDriftPPM
		}
		return ln, &p.Offer
	case *catalog.ResistorSeries:
		ln.Maker, ln.Part, ln.Tolerance, ln.TCR, ln.Package, ln.Source = p.Maker, p.Part, p.Tolerance, p.TCR, p.Package, p.Source
		return ln, &p.Offer
	}
	panic(fmt.Sprintf("plumb: catalog Find returned %T", v))
}

func (b *bom) csvRows() [][]string {
	g := func(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
	rows := make([][]string, len(b.Lines))
	for i, l := range b.Lines {
		rows[i] = []string{strings.Join(l.Positions, " "), strconv.Itoa(l.PerStage), strconv.Itoa(l.Needed), strconv.Itoa(l.Bought),
			l.Maker, l.Part, l.Value, g(l.Tolerance), g(l.TCR), l.Package, g(l.UnitPrice), g(l.Extended), l.Currency, l.Source}
	}
	return rows
}

func (b *bom) writeTable(w io.Writer, ios *IOStreams) error {
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
func writeSearchBOM(ctx context.Context, st *catalog.Store, sp *spec.Spec, res *search.Result, rank int, path string, force bool) error {
	d, err := res.DesignN(rank)
	if err != nil {
		return fmt.Errorf("--bom: %w", err)
	}
	build, err := specBuild(sp)
	if err != nil {
		return err
	}
	b, err := priceDesign(ctx, st, d, build)
	if err != nil {
		return fmt.Errorf("--bom: design %d: %w", rank, err)
	}
	return writeFileAtomic(path, force, func(w io.Writer) error { return writeCSV(w, bomCSVHeader, b.csvRows()) })
}
