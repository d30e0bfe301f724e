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
	// StageTotals is each stage's share of Total for a chain (StagesBOM):
	// a stage that shares no part number with another costs what it costs
	// priced alone, the others split the shared lines (line item
	// included) in proportion to their pieces. Empty for one stage.
	StageTotals []float64 `json:"stage_totals,omitempty"`
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
	return StagesBOM([]*spec.Design{d}, find, b)
}

// StagesBOM prices the stages ds of one chain together for build b: one
// purchasing list in which a part number used by several stages is one
// line, bought at the stages' joint quantity (its price break, minimum
// order and stock counted over the sum, one line item), each stage's
// pieces counted as DesignBOM counts them. With more than one stage a
// position is written STAGE:POSITION ("2:R1"), and StageTotals splits the
// total between the stages. For one stage it is DesignBOM.
func StagesBOM(ds []*spec.Design, find spec.Lookup, b Build) (*BOM, error) {
	if err := b.Validate(); err != nil {
		return nil, err
	}
	bm := &BOM{Stages: b.Quantity}
	var lines []BOMLine
	var cuses []Use
	perStage := make([][]Use, len(ds))
	for i, d := range ds {
		stage := ""
		if len(ds) > 1 {
			stage = strconv.Itoa(i + 1)
		}
		ls, us, unpriced, err := designLines(d, find, stage)
		if err != nil {
			if stage != "" {
				return nil, fmt.Errorf("stage %s: %w", stage, err)
			}
			return nil, err
		}
		lines, cuses, perStage[i] = append(lines, ls...), append(cuses, us...), us
		bm.Unpriced = append(bm.Unpriced, unpriced...)
	}
	bd, err := Price(b, cuses)
	if err != nil {
		return nil, fmt.Errorf("pricing: %w", err)
	}
	byPart := make(map[string]*Line, len(bd.Lines))
	for i := range bd.Lines {
		byPart[bd.Lines[i].Part] = &bd.Lines[i]
	}
	// One line per part number: a later stage's line of a part number
	// joins the first.
	merged := lines[:0]
	at := map[string]int{}
	for i, ln := range lines {
		if k, ok := at[ln.Part]; ok {
			merged[k].Positions = append(merged[k].Positions, ln.Positions...)
			merged[k].PerStage += ln.PerStage
			continue
		}
		at[ln.Part] = len(merged)
		cl := byPart[ln.Part]
		ln.Needed, ln.Bought, ln.UnitPrice, ln.Extended = cl.Needed, cl.Bought, cl.UnitPrice, cl.Extended
		ln.Currency, ln.Stock, ln.Short = cl.Currency, cl.Stock, cl.Short
		ln.BreakQty = breakQty(cuses[i].Offer, cl.Bought)
		merged = append(merged, ln)
	}
	sort.SliceStable(merged, func(i, j int) bool { return merged[i].Positions[0] < merged[j].Positions[0] })
	bm.Lines, bm.Parts, bm.Assembly, bm.Total, bm.PerStage, bm.Currency = merged, bd.Parts, bd.Assembly, bd.Total, bd.PerUnit, bd.Currency
	if len(ds) > 1 {
		stages := map[string]int{}
		for _, u := range cuses {
			stages[u.Part]++
		}
		for i := range ds {
			alone := true
			for _, u := range perStage[i] {
				alone = alone && stages[u.Part] == 1
			}
			total := bd.Stages[strconv.Itoa(i+1)] * float64(b.Quantity)
			if alone {
				one, err := Price(b, perStage[i])
				if err != nil {
					return nil, fmt.Errorf("pricing stage %d: %w", i+1, err)
				}
				total = one.Total
			}
			bm.StageTotals = append(bm.StageTotals, total)
		}
	}
	return bm, nil
}

// StageUses lists the part numbers of design d with their placements per
// built unit, as StagesBOM prices them (stage names the stage in the
// uses; "" for a single stage).
func StageUses(d *spec.Design, find spec.Lookup, stage string) ([]Use, error) {
	_, us, _, err := designLines(d, find, stage)
	return us, err
}

// designLines lists the part numbers of design d, each with its positions
// (written STAGE:POSITION when stage is not empty), pieces per built unit
// and catalog figures, the matching uses of Price, and the positions given
// as inline figures.
func designLines(d *spec.Design, find spec.Lookup, stage string) ([]BOMLine, []Use, []string, error) {
	type use struct {
		positions []string
		discrete  int         // placements as a single resistor
		elements  map[int]int // network element index -> times used
		amp       bool
	}
	uses := map[string]*use{}
	var order, unpriced []string
	prefix := ""
	if stage != "" {
		prefix = stage + ":"
	}
	add := func(part, pos string) *use {
		u := uses[part]
		if u == nil {
			u = &use{elements: map[int]int{}}
			uses[part] = u
			order = append(order, part)
		}
		u.positions = append(u.positions, prefix+pos)
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
				unpriced = append(unpriced, prefix+pos)
			}
		}
	}
	opamps, err := amplifiers(d)
	if err != nil {
		return nil, nil, nil, err
	}
	switch {
	case d.Amplifier.Part != "":
		if u := uses[d.Amplifier.Part]; u != nil {
			return nil, nil, nil, fmt.Errorf("%w: part %s is named as the amplifier and at %s; give each its own part", ErrDesign, d.Amplifier.Part, strings.Join(u.positions, ", "))
		}
		// A part named for a stage without op-amps is bought once.
		opamps = max(opamps, 1)
		add(d.Amplifier.Part, ampPosition+"1").amp = true
	case opamps > 0:
		unpriced = append(unpriced, prefix+ampPosition+"1")
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
			return nil, nil, nil, fmt.Errorf("part %s at %s: %w", part, strings.Join(u.positions, ", "), err)
		}
		ln, offer, err := describe(kind, v)
		if err != nil {
			return nil, nil, nil, fmt.Errorf("part %s at %s: %w", part, strings.Join(u.positions, ", "), err)
		}
		switch _, isAmp := ln.Item.(*catalog.Amplifier); {
		case isAmp && !u.amp:
			return nil, nil, nil, fmt.Errorf("%w: part %s at %s is an amplifier; give a resistor or a network element there", ErrDesign, part, strings.Join(u.positions, ", "))
		case !isAmp && u.amp:
			return nil, nil, nil, fmt.Errorf("%w: amplifier part %s is a %s, not an amplifier", ErrDesign, part, kind)
		}
		ln.Positions, ln.PerStage = u.positions, u.discrete
		for _, n := range u.elements {
			ln.PerStage = max(ln.PerStage, u.discrete+n)
		}
		if u.amp {
			ln.PerStage = packages(opamps, ln.Item.(*catalog.Amplifier).Channels)
			ln.Positions = nil
			for i := 1; i <= ln.PerStage; i++ {
				ln.Positions = append(ln.Positions, prefix+ampPosition+strconv.Itoa(i))
			}
		}
		lines = append(lines, ln)
		cuses = append(cuses, Use{Part: part, Offer: offer, Stage: stage, Placements: ln.PerStage})
	}
	return lines, cuses, unpriced, nil
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
