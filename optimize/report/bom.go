package report

import (
	"fmt"
	"math"
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

// buildOf maps the spec's build onto the cost package's (the same mapping
// the search uses).
func buildOf(s *spec.Spec) cost.Build {
	b := cost.Build{Quantity: s.Build.Quantity, Attrition: s.Build.Attrition, PerPlacement: s.Build.PlacementCost,
		PerLineItem: s.Build.LineItemCost, Currency: s.Build.Currency}
	if s.Build.Stock == "exclude" {
		b.Stock = cost.StockExclude
	}
	return b
}

// catalogPart is what the parts list shows of one catalog part.
type catalogPart struct {
	maker, what string
	offer       *catalog.Offer
}

func (p *pricer) find(part string) (*catalogPart, error) {
	if p.lookup == nil {
		return nil, fmt.Errorf("part %s: %w (no catalog given)", part, catalog.ErrNotFound)
	}
	kind, v, err := p.lookup(part)
	if err != nil {
		return nil, err
	}
	switch x := v.(type) {
	case *catalog.Resistor:
		return &catalogPart{x.Maker, fmt.Sprintf("resistor %s Ω %s %s, %s %s", units.FormatOhms(x.ValueOhm), units.FormatPercent(x.Tolerance),
			units.FormatPPM(x.TCR), x.Technology, x.Package), &x.Offer}, nil
	case *catalog.Network:
		var vs []string
		for _, o := range x.Values {
			vs = append(vs, units.FormatOhms(o))
		}
		return &catalogPart{x.Maker, fmt.Sprintf("network %s Ω, ratio %s, tracking %s, %s", strings.Join(vs, "/"),
			units.FormatPercent(x.RatioTolerance), units.FormatPPM(x.TCRTracking), x.Package), &x.Offer}, nil
	case *catalog.Amplifier:
		return &catalogPart{x.Maker, fmt.Sprintf("amplifier (%s), %d channel(s), %s", x.Type, x.Channels, x.Package), &x.Offer}, nil
	}
	return nil, fmt.Errorf("part %s: kind %s is not priced", part, kind)
}

// breakUsed returns the minimum quantity of the price break that applies
// when qty pieces are bought (0 when none does).
func breakUsed(o *catalog.Offer, qty int) int {
	best := 0
	for _, b := range o.PriceBreaks {
		if b.MinQty <= qty && b.MinQty > best {
			best = b.MinQty
		}
	}
	return best
}

// price builds the parts list of d at the build quantity: one line per part
// number with the positions it fills, the pieces bought (attrition, minimum
// order and buy-up to a cheaper break included, by cost.Price), the break
// used, the unit price and the extended price.
func (p *pricer) price(d *spec.Design, sr *search.Design) (*bom, error) {
	var uses []cost.Use
	positions := map[string][]string{}
	parts := map[string]*catalogPart{}
	var inline []string
	use := func(part, pos string) error {
		positions[part] = append(positions[part], pos)
		if parts[part] != nil {
			return nil
		}
		cp, err := p.find(part)
		if err != nil {
			return err
		}
		parts[part] = cp
		uses = append(uses, cost.Use{Part: part, Offer: cp.offer, Placements: 1})
		return nil
	}
	for _, ps := range d.Positions {
		for i, e := range ps.Elements {
			pos := ps.Name
			if len(ps.Elements) > 1 {
				pos += "." + string(rune('a'+i))
			}
			switch {
			case e.Network != "":
				if err := use(e.Network, pos); err != nil {
					return nil, err
				}
			case e.Part != "":
				if err := use(e.Part, pos); err != nil {
					return nil, err
				}
				// Each discrete resistor is one placement.
				if len(positions[e.Part]) > 1 {
					uses = append(uses, cost.Use{Part: e.Part, Offer: parts[e.Part].offer, Placements: 1})
				}
			default:
				inline = append(inline, pos)
			}
		}
	}
	if a := d.Amplifier.Part; a != "" {
		if err := use(a, "U1"); err != nil {
			return nil, err
		}
	} else if d.Amplifier.Resolved || d.Amplifier.Amp.AolVV > 0 {
		inline = append(inline, "amplifier")
	}
	out := &bom{table: Table{Header: []string{"part", "maker", "description", "positions", "per stage", "bought", "price break", "unit price", "extended", "stock"}}}
	if len(inline) > 0 {
		out.cautions = append(out.cautions, fmt.Sprintf("%s given as inline figures, not catalog parts: not priced, so the cost leaves them out", strings.Join(inline, ", ")))
	}
	if len(uses) == 0 {
		out.unit, out.total = "not priced", "not priced"
		return out, nil
	}
	bd, err := cost.Price(p.build, uses)
	if err != nil {
		return nil, err
	}
	for _, ln := range bd.Lines {
		cp := parts[ln.Part]
		stock := "unknown"
		if ln.Stock >= 0 {
			stock = strconv.Itoa(ln.Stock)
		}
		stockCell := Cell{Text: stock}
		if ln.Short {
			stockCell = Cell{Text: stock + " (short)", Class: "fail"}
		}
		out.table.Rows = append(out.table.Rows, []Cell{{Text: ln.Part}, {Text: cp.maker}, {Text: cp.what},
			{Text: strings.Join(positions[ln.Part], ", ")}, {Text: strconv.Itoa(ln.Placements)}, {Text: strconv.Itoa(ln.Bought)},
			{Text: "≥ " + strconv.Itoa(breakUsed(cp.offer, ln.Bought))}, {Text: money(ln.UnitPrice, ln.Currency)},
			{Text: money(ln.Extended, ln.Currency)}, stockCell})
	}
	cur := bd.Currency
	out.totals = []Row{
		{"parts", money(bd.Parts, cur)},
		{"assembly (placements and line items)", money(bd.Assembly, cur)},
		{fmt.Sprintf("build of %d stages", p.build.Quantity), money(bd.Total, cur)},
		{"per stage", money(bd.PerUnit, cur)},
	}
	out.unit, out.total = money(bd.PerUnit, cur), money(bd.Total, cur)
	if len(bd.Short) > 0 {
		out.cautions = append(out.cautions, "short of stock for the build: "+strings.Join(bd.Short, ", "))
	}
	if sr != nil && math.Abs(bd.Total-sr.TotalCost) > costSlack*math.Max(1, math.Abs(sr.TotalCost)) {
		out.cautions = append(out.cautions, fmt.Sprintf("the parts list prices the build at %s but the search ranked it at %s; check the catalog for changes since the search",
			money(bd.Total, cur), money(sr.TotalCost, sr.Currency)))
	}
	return out, nil
}
