package report

import (
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"

	"plumb/catalog"
	"plumb/catalog/units"
	"plumb/optimize/cost"
	"plumb/optimize/search"
	"plumb/optimize/spec"
)

// costSlack is the relative difference between the parts list's total and
// the search's total above which the report says they disagree.
const costSlack = 1e-9

// pricer prices designs for one build from the catalog.
type pricer struct {
	build  cost.Build
	lookup spec.Lookup
}

// bom is a priced parts list ready to print.
type bom struct {
	table       Table
	totals      []Row
	unit, total string
	cautions    []string
}

// buildOf maps the spec's build onto the cost package's (the mapping the
// search uses).
func buildOf(s *spec.Spec) (cost.Build, error) {
	b, err := cost.BuildOf(s.Build)
	if err != nil {
		return cost.Build{}, fmt.Errorf("report: spec %s: %w", s.Name, err)
	}
	return b, nil
}

func (p *pricer) find(part string) (catalog.Kind, any, error) {
	if p.lookup == nil {
		return "", nil, fmt.Errorf("%w (no catalog given)", catalog.ErrNotFound)
	}
	return p.lookup(part)
}

// describe is what the parts list says of one catalog part.
func describe(item any) string {
	switch x := item.(type) {
	case *catalog.Resistor:
		return fmt.Sprintf("resistor %s Ω %s %s, %s %s", units.FormatOhms(x.ValueOhm), units.FormatPercent(x.Tolerance),
			units.FormatPPM(x.TCR), x.Technology, x.Package)
	case *catalog.ResistorSeries:
		return fmt.Sprintf("resistor series %s %s %s, %s %s", x.ESeries, units.FormatPercent(x.Tolerance),
			units.FormatPPM(x.TCR), x.Technology, x.Package)
	case *catalog.Network:
		var vs []string
		for _, o := range x.Values {
			vs = append(vs, units.FormatOhms(o))
		}
		return fmt.Sprintf("network %s Ω, ratio %s, tracking %s, %s", strings.Join(vs, "/"),
			units.FormatPercent(x.RatioTolerance), units.FormatPPM(x.TCRTracking), x.Package)
	case *catalog.Amplifier:
		return fmt.Sprintf("amplifier (%s), %d channel(s), %s", x.Type, x.Channels, x.Package)
	}
	return fmt.Sprintf("%T", item)
}

// price builds the parts list of d at the build quantity with
// cost.DesignBOM: one line per part number, in part-number order, with the
// positions it fills, the pieces bought (attrition, minimum order and
// buy-up to a cheaper break included), the break used, the unit price and
// the extended price.
func (p *pricer) price(d *spec.Design, sr *search.Design) (*bom, error) {
	b, err := cost.DesignBOM(d, p.find, p.build)
	if err != nil {
		return nil, err
	}
	out := &bom{table: Table{Header: []string{"part", "maker", "description", "positions", "per stage", "bought", "price break", "unit price", "extended", "stock"}}}
	if len(b.Unpriced) > 0 {
		out.cautions = append(out.cautions, fmt.Sprintf("%s given as inline figures, not catalog parts: not priced, so the cost leaves them out", strings.Join(b.Unpriced, ", ")))
	}
	if len(b.Lines) == 0 {
		out.unit, out.total = "not priced", "not priced"
		return out, nil
	}
	lines := slices.Clone(b.Lines)
	slices.SortStableFunc(lines, func(x, y cost.BOMLine) int { return strings.Compare(x.Part, y.Part) })
	var short []string
	for _, ln := range lines {
		stock := "unknown"
		if ln.Stock >= 0 {
			stock = strconv.Itoa(ln.Stock)
		}
		stockCell := Cell{Text: stock}
		if ln.Short {
			stockCell = Cell{Text: stock + " (short)", Class: "fail"}
			short = append(short, ln.Part)
		}
		out.table.Rows = append(out.table.Rows, []Cell{{Text: ln.Part}, {Text: ln.Maker}, {Text: describe(ln.Item)},
			{Text: strings.Join(ln.Positions, ", ")}, {Text: strconv.Itoa(ln.PerStage)}, {Text: strconv.Itoa(ln.Bought)},
			{Text: "≥ " + strconv.Itoa(ln.BreakQty)}, {Text: money(ln.UnitPrice, ln.Currency)},
			{Text: money(ln.Extended, ln.Currency)}, stockCell})
	}
	cur := b.Currency
	out.totals = []Row{
		{"parts", money(b.Parts, cur)},
		{"assembly (placements and line items)", money(b.Assembly, cur)},
		{fmt.Sprintf("build of %d stages", b.Stages), money(b.Total, cur)},
		{"per stage", money(b.PerStage, cur)},
	}
	out.unit, out.total = money(b.PerStage, cur), money(b.Total, cur)
	if len(short) > 0 {
		out.cautions = append(out.cautions, "short of stock for the build: "+strings.Join(short, ", "))
	}
	if sr != nil && math.Abs(b.Total-sr.TotalCost) > costSlack*math.Max(1, math.Abs(sr.TotalCost)) {
		out.cautions = append(out.cautions, fmt.Sprintf("the parts list prices the build at %s but the search ranked it at %s; check the catalog for changes since the search",
			money(b.Total, cur), money(sr.TotalCost, sr.Currency)))
	}
	return out, nil
}
