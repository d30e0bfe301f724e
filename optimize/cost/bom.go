package cost

import (
	"fmt"
	"sort"
	"strconv"
	"strings"

	"plumb/catalog"
	"plumb/catalog/units"
	"plumb/optimize/circuit"
	"plumb/optimize/family"
	"plumb/optimize/spec"
)

// BuildOf maps the build section of a spec onto a Build: quantity,
// attrition, the cost per placement and per line item, the currency, and
// the stock policy ("exclude" is StockExclude; "flag" or empty is
// StockFlag). A quantity of 0 (a spec made in code without a build) is one
// stage. The result is validated; an unknown stock policy wraps ErrBuild.
func BuildOf(sb spec.Build) (Build, error) {
	b := Build{Quantity: sb.Quantity, Attrition: sb.Attrition, PerPlacement: sb.PlacementCost,
		PerLineItem: sb.LineItemCost, Currency: sb.Currency}
	if b.Quantity == 0 {
		b.Quantity = 1
	}
	switch sb.Stock {
	case "exclude":
		b.Stock = StockExclude
	case "", "flag":
		b.Stock = StockFlag
	default:
		return Build{}, fmt.Errorf("%w: build.stock %q: use exclude or flag", ErrBuild, sb.Stock)
	}
	if err := b.Validate(); err != nil {
		return Build{}, err
	}
	return b, nil
}

// BOMLine is one part number of a design's purchasing list.
type BOMLine struct {
	// Positions are the positions the part fills: resistor positions (an
	// element of a pair as "R2.a"), and U1, U2, ... for amplifier packages.
	Positions []string     `json:"positions"`
	PerStage  int          `json:"quantity_per_stage"` // pieces per stage
	Needed    int          `json:"quantity_needed"`    // for the build, with attrition
	Bought    int          `json:"quantity_bought"`    // after minimum order and price breaks
	Kind      catalog.Kind `json:"kind"`
	Maker     string       `json:"maker"`
	Part      string       `json:"part"`
	// Value is the resistance in engineering notation ("4.99k"), the
	// element values of a network ("1k/10k/1k/10k"), or the amplifier type.
	Value string `json:"value"`
	// Tolerance is a fraction and TCR ±ppm/K; for a matched amplifier they
	// are its gain error and gain drift. Zero for an op-amp.
	Tolerance float64 `json:"tolerance,omitempty"`
	TCR       float64 `json:"tcr_ppm,omitempty"`
	Package   string  `json:"package"`
	UnitPrice float64 `json:"unit_price"`
	// BreakQty is the minimum quantity of the price break UnitPrice is from.
	BreakQty int     `json:"break_min_qty"`
	Extended float64 `json:"extended_price"` // Bought x UnitPrice
	Currency string  `json:"currency"`
	Source   string  `json:"source"`
	Stock    int     `json:"stock"` // -1 when unknown
	Short    bool    `json:"short_stock,omitempty"`
	// Item is the catalog part: *catalog.Resistor, *catalog.ResistorSeries,
	// *catalog.Network or *catalog.Amplifier.
	Item any `json:"-"`
}

// BOM is the priced purchasing list of one design for a build.
type BOM struct {
	Stages   int       `json:"stages"`
	Lines    []BOMLine `json:"lines"` // by first position
	Parts    float64   `json:"parts_total"`
	Assembly float64   `json:"assembly_total"`
	Total    float64   `json:"total"`
	PerStage float64   `json:"per_stage"` // Total / Stages
	Currency string    `json:"currency"`
	// Unpriced lists the positions given as inline figures, without a part
	// number; the totals leave them out.
	Unpriced []string `json:"unpriced,omitempty"`
}

// ampPosition is the position of the design's amplifier, and the stem of
// the positions of its packages when it needs more than one.
const ampPosition = "U"

// refPosition is the position of a design's reference part (reference.part:
// auto in its spec).
const refPosition = "REF"

// DesignBOM prices design d for build b, finding each part number with
// find (catalog.Store.Find or spec.SnapshotLookup, for example).
//
// Pieces per stage: a discrete resistor is one piece per position it fills.
// A network is one piece however many of its elements are used, as long as
// no element is used twice; in general, as many pieces as the most-used
// element is used. The amplifier's op-amps are counted in the circuit
// model of the design's family (three for an in-amp, none for a divider
// without buffer, one otherwise); an amplifier of c channels is
// ceil(op-amps / c) packages per stage, since a stage does not share a
// package with the next. Pieces are then bought by Price: one line per part
// number, attrition, minimum order and buy-up to a cheaper break.
func DesignBOM(d *spec.Design, find spec.Lookup, b Build) (*BOM, error) {
	if err := b.Validate(); err != nil {
		return nil, err
	}
	type use struct {
		positions []string
		discrete  int         // placements as a single resistor
		elements  map[int]int // network element index -> times used
		amp       bool
	}
	uses := map[string]*use{}
	var order []string
	bm := &BOM{Stages: b.Quantity}
	add := func(part, pos string) *use {
		u := uses[part]
		if u == nil {
			u = &use{elements: map[int]int{}}
			uses[part] = u
			order = append(order, part)
		}
		u.positions = append(u.positions, pos)
		return u
	}
	for _, p := range d.Positions {
		for i, e := range p.Elements {
			pos := p.Name
			if len(p.Elements) > 1 {
				pos += "." + string(rune('a'+i))
			}
			switch {
			case e.Network != "":
				add(e.Network, pos).elements[e.Index]++
			case e.Part != "":
				add(e.Part, pos).discrete++
			default:
				bm.Unpriced = append(bm.Unpriced, pos)
			}
		}
	}
	opamps, err := amplifiers(d)
	if err != nil {
		return nil, err
	}
	switch {
	case d.Amplifier.Part != "":
		if u := uses[d.Amplifier.Part]; u != nil {
			return nil, fmt.Errorf("%w: part %s is named as the amplifier and at %s; give each its own part", ErrDesign, d.Amplifier.Part, strings.Join(u.positions, ", "))
		}
		// A part named for a stage without op-amps is bought once.
		opamps = max(opamps, 1)
		add(d.Amplifier.Part, ampPosition+"1").amp = true
	case opamps > 0:
		bm.Unpriced = append(bm.Unpriced, ampPosition+"1")
	}
	if d.Reference != nil {
		add(d.Reference.Part, refPosition).discrete++
	}

	lines := make([]BOMLine, 0, len(order))
	cuses := make([]Use, 0, len(order))
	for _, part := range order {
		u := uses[part]
		kind, v, err := find(part)
		if err != nil {
			return nil, fmt.Errorf("part %s at %s: %w", part, strings.Join(u.positions, ", "), err)
		}
		ln, offer, err := describe(kind, v)
		if err != nil {
			return nil, fmt.Errorf("part %s at %s: %w", part, strings.Join(u.positions, ", "), err)
		}
		switch _, isAmp := ln.Item.(*catalog.Amplifier); {
		case isAmp && !u.amp:
			return nil, fmt.Errorf("%w: part %s at %s is an amplifier; give a resistor or a network element there", ErrDesign, part, strings.Join(u.positions, ", "))
		case !isAmp && u.amp:
			return nil, fmt.Errorf("%w: amplifier part %s is a %s, not an amplifier", ErrDesign, part, kind)
		}
		ln.Positions, ln.PerStage = u.positions, u.discrete
		for _, n := range u.elements {
			ln.PerStage = max(ln.PerStage, u.discrete+n)
		}
		if u.amp {
			ln.PerStage = packages(opamps, ln.Item.(*catalog.Amplifier).Channels)
			ln.Positions = nil
			for i := 1; i <= ln.PerStage; i++ {
				ln.Positions = append(ln.Positions, ampPosition+strconv.Itoa(i))
			}
		}
		lines = append(lines, ln)
		cuses = append(cuses, Use{Part: part, Offer: offer, Placements: ln.PerStage})
	}
	bd, err := Price(b, cuses)
	if err != nil {
		return nil, fmt.Errorf("pricing: %w", err)
	}
	byPart := make(map[string]*Line, len(bd.Lines))
	for i := range bd.Lines {
		byPart[bd.Lines[i].Part] = &bd.Lines[i]
	}
	for i := range lines {
		ln, cl := &lines[i], byPart[lines[i].Part]
		ln.Needed, ln.Bought, ln.UnitPrice, ln.Extended = cl.Needed, cl.Bought, cl.UnitPrice, cl.Extended
		ln.Currency, ln.Stock, ln.Short = cl.Currency, cl.Stock, cl.Short
		ln.BreakQty = breakQty(cuses[i].Offer, cl.Bought)
	}
	sort.SliceStable(lines, func(i, j int) bool { return lines[i].Positions[0] < lines[j].Positions[0] })
	bm.Lines, bm.Parts, bm.Assembly, bm.Total, bm.PerStage, bm.Currency = lines, bd.Parts, bd.Assembly, bd.Total, bd.PerUnit, bd.Currency
	return bm, nil
}

// amplifiers returns the number of op-amps in the circuit model of d's
// family and options; an integrated family (one catalog part) is one.
func amplifiers(d *spec.Design) (int, error) {
	if f := family.Lookup(d.Family); f != nil && f.Integrated() {
		return 1, nil
	}
	net, err := circuit.New(circuit.Family(d.Family), d.Options.Netlist())
	if err != nil {
		return 0, fmt.Errorf("%w: design %s: %w", ErrDesign, d.Name, err)
	}
	return len(net.OpAmps), nil
}

// packages is ceil(opamps / channels): the packages of a channels-channel
// amplifier that hold opamps op-amps (a catalog channel count below 1 is
// read as 1).
func packages(opamps, channels int) int {
	channels = max(channels, 1)
	return (opamps + channels - 1) / channels
}

// breakQty returns the minimum quantity of the price break that applies
// when qty pieces are bought: the largest MinQty at or below qty (0 when
// none is).
func breakQty(o *catalog.Offer, qty int) int {
	best := 0
	for _, pb := range o.PriceBreaks {
		if pb.MinQty <= qty && pb.MinQty > best {
			best = pb.MinQty
		}
	}
	return best
}

// describe takes the purchasing fields of a part found in the catalog,
// given by value or pointer.
func describe(kind catalog.Kind, v any) (BOMLine, *catalog.Offer, error) {
	switch x := v.(type) {
	case catalog.Resistor:
		v = &x
	case catalog.ResistorSeries:
		v = &x
	case catalog.Network:
		v = &x
	case catalog.Amplifier:
		v = &x
	case catalog.Reference:
		v = &x
	}
	ln := BOMLine{Kind: kind, Item: v}
	switch p := v.(type) {
	case *catalog.Resistor:
		ln.Maker, ln.Part, ln.Value, ln.Tolerance, ln.TCR, ln.Package, ln.Source = p.Maker, p.Part, units.FormatOhms(p.ValueOhm), p.Tolerance, p.TCR, p.Package, p.Source
		return ln, &p.Offer, nil
	case *catalog.ResistorSeries:
		// A series stem: one price list for every value.
		ln.Maker, ln.Part, ln.Tolerance, ln.TCR, ln.Package, ln.Source = p.Maker, p.Part, p.Tolerance, p.TCR, p.Package, p.Source
		return ln, &p.Offer, nil
	case *catalog.Network:
		vals := make([]string, len(p.Values))
		for i, x := range p.Values {
			vals[i] = units.FormatOhms(x)
		}
		ln.Maker, ln.Part, ln.Value, ln.Tolerance, ln.TCR, ln.Package, ln.Source = p.Maker, p.Part, strings.Join(vals, "/"), p.Tolerance, p.TCR, p.Package, p.Source
		return ln, &p.Offer, nil
	case *catalog.Reference:
		ln.Maker, ln.Part, ln.Value, ln.Tolerance, ln.TCR, ln.Package, ln.Source = p.Maker, p.Part, units.Format(p.OutputV, "V"), p.Tolerance, p.DriftPPM, p.Package, p.Source
		return ln, &p.Offer, nil
	case *catalog.Amplifier:
		ln.Maker, ln.Part, ln.Value, ln.Package, ln.Source = p.Maker, p.Part, string(p.Type), p.Package, p.Source
		if p.Type == catalog.MatchedAmp {
			ln.Tolerance, ln.TCR = p.GainErrorMax, p.GainDriftPPM
		}
		return ln, &p.Offer, nil
	}
	return BOMLine{}, nil, fmt.Errorf("%w: the catalog returned a %s (%T), which has no price list", ErrDesign, kind, v)
}
