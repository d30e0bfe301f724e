package cost

import (
	"errors"
	"fmt"
	"math"
	"sort"

	"plumb/catalog"
	"plumb/optimize/spec"
)

// Sentinel errors a caller can branch on.
var (
	// ErrMixedCurrency is returned when the parts of one design are priced in
	// different currencies.
	ErrMixedCurrency = errors.New("cost: parts are priced in different currencies")
	// ErrNoPrice is returned when a part has no price break that applies.
	ErrNoPrice = errors.New("cost: no price break applies")
	// ErrShortStock is returned under StockExclude when a part has fewer
	// pieces in stock than the build buys.
	ErrShortStock = errors.New("cost: not enough stock")
	// ErrBuild is returned for an invalid build description.
	ErrBuild = errors.New("cost: invalid build")
	// ErrDesign is returned for a design whose parts cannot be listed: a
	// part of the wrong kind at a position, or an unknown family.
	ErrDesign = errors.New("cost: design cannot be priced")
)

// ceilSlack absorbs binary rounding in quantity x (1 + attrition) so that,
// for example, 100 x 1.1 buys 110 pieces and not 111.
const ceilSlack = 1e-9

// StockPolicy says what to do with a part whose stock is below the quantity
// bought. Unknown stock (catalog.Offer.Stock < 0) is never short.
type StockPolicy int

// Stock policies. The zero value flags short parts without excluding them.
const (
	StockFlag    StockPolicy = iota // short parts are listed in Breakdown.Short
	StockExclude                    // a short part makes Price fail with ErrShortStock
	StockIgnore                     // stock is not looked at
)

// Build describes what is built and how it is paid for. The zero value of
// every field but Quantity is a usable default: no attrition, no assembly
// costs, currency taken from the parts, short stock flagged, buy-up to a
// cheaper price break allowed.
type Build struct {
	// Quantity is the number of stages (boards, channels) built; at least 1.
	Quantity int
	// Attrition is the extra fraction bought for loss in assembly (0.02 for
	// 2 %).
	Attrition float64
	// PerPlacement is the assembly cost of placing one part.
	PerPlacement float64
	// PerLineItem is the cost of one distinct part number on the BOM
	// (kitting, feeder set-up, approval).
	PerLineItem float64
	// Currency, when set, is the currency every price must be in.
	Currency string
	// Stock is the policy for parts with too little stock.
	Stock StockPolicy
	// ExactQuantity, when true, buys exactly the pieces needed, never more
	// to reach a cheaper price break.
	ExactQuantity bool
}

// Validate reports a build that cannot be priced.
func (b Build) Validate() error {
	switch {
	case b.Quantity < 1:
		return fmt.Errorf("%w: quantity %d: build at least one stage", ErrBuild, b.Quantity)
	case b.Quantity > spec.MaxQuantity:
		return fmt.Errorf("%w: quantity %d: plumb prices builds of at most %d stages", ErrBuild, b.Quantity, spec.MaxQuantity)
	case b.Attrition < 0 || math.IsNaN(b.Attrition) || b.Attrition > 10:
		return fmt.Errorf("%w: attrition %g: give a fraction between 0 and 10", ErrBuild, b.Attrition)
	case b.PerPlacement < 0 || math.IsNaN(b.PerPlacement):
		return fmt.Errorf("%w: cost per placement %g must not be negative", ErrBuild, b.PerPlacement)
	case b.PerLineItem < 0 || math.IsNaN(b.PerLineItem):
		return fmt.Errorf("%w: cost per line item %g must not be negative", ErrBuild, b.PerLineItem)
	}
	return nil
}

// Needed returns the pieces bought for a part placed placements times per
// stage, before minimum order and price breaks:
// ceil(placements x Quantity x (1 + Attrition)).
func (b Build) Needed(placements int) int {
	n := float64(placements*b.Quantity) * (1 + b.Attrition)
	return int(math.Ceil(n - ceilSlack))
}

// Buy returns the quantity to order of a part when need pieces are needed,
// its unit price, currency and the extended price. The quantity is at least
// need and the offer's minimum order; unless exact is set it is raised to a
// higher price break when that makes the line cheaper. It allocates nothing.
func Buy(o *catalog.Offer, need int, exact bool) (qty int, unit float64, currency string, err error) {
	q := need
	if o.MinOrder > q {
		q = o.MinOrder
	}
	unit, currency, ok := o.UnitPrice(q)
	if !ok {
		// Below the first break: the first break is the least one can buy.
		first := -1
		for i, pb := range o.PriceBreaks {
			if first < 0 || pb.MinQty < o.PriceBreaks[first].MinQty {
				first = i
			}
		}
		if first < 0 {
			return 0, 0, "", ErrNoPrice
		}
		q = o.PriceBreaks[first].MinQty
		unit, currency = o.PriceBreaks[first].UnitPrice, o.PriceBreaks[first].Currency
	}
	if exact {
		return q, unit, currency, nil
	}
	best := float64(q) * unit
	for _, pb := range o.PriceBreaks {
		if pb.MinQty <= q {
			continue
		}
		if pb.Currency != currency {
			return 0, 0, "", fmt.Errorf("%w: one price list holds %q and %q", ErrMixedCurrency, currency, pb.Currency)
		}
		if ext := float64(pb.MinQty) * pb.UnitPrice; ext < best {
			best, q, unit = ext, pb.MinQty, pb.UnitPrice
		}
	}
	return q, unit, currency, nil
}

// LineCost returns the extended price of one part number placed placements
// times per stage, and whether its stock is short. It allocates nothing and
// is what the search calls in its inner loop.
func (b Build) LineCost(o *catalog.Offer, placements int) (ext float64, currency string, short bool, err error) {
	q, unit, cur, err := Buy(o, b.Needed(placements), b.ExactQuantity)
	if err != nil {
		return 0, "", false, err
	}
	short = b.Stock != StockIgnore && o.Stock >= 0 && o.Stock < q
	if short && b.Stock == StockExclude {
		return 0, cur, true, ErrShortStock
	}
	return float64(q) * unit, cur, short, nil
}

// Use is one part number at one stage of a design.
type Use struct {
	Part  string
	Offer *catalog.Offer
	// Stage names the stage of a multi-stage design ("" for one stage).
	Stage string
	// Placements is the number of positions it fills per built unit.
	Placements int
}

// Line is one BOM line: one part number with every placement that shares it.
type Line struct {
	Part       string  `json:"part"`
	Placements int     `json:"placements"` // per built unit, all stages
	Needed     int     `json:"needed"`     // with attrition
	Bought     int     `json:"bought"`     // after minimum order and price breaks
	UnitPrice  float64 `json:"unit_price"`
	Extended   float64 `json:"extended"`
	Currency   string  `json:"currency"`
	Stock      int     `json:"stock"`
	Short      bool    `json:"short,omitempty"`
}

// Breakdown is the priced BOM of a design for a build.
type Breakdown struct {
	Lines    []Line  `json:"lines"`
	Parts    float64 `json:"parts"`    // sum of the lines' extended prices
	Assembly float64 `json:"assembly"` // placements and line items
	Total    float64 `json:"total"`    // the whole build
	PerUnit  float64 `json:"per_unit"` // Total / Quantity
	// Stages is the cost per built unit of each stage; a shared line's cost
	// is split in proportion to its placements.
	Stages   map[string]float64 `json:"stages"`
	Currency string             `json:"currency"`
	// Short lists part numbers with too little stock (StockFlag).
	Short []string `json:"short,omitempty"`
}

// Price prices the uses of a design for build b. Uses that share a part
// number are summed into one line before the price break is chosen, so a
// value reused at two positions is bought as one larger quantity and counts
// as one line item.
func Price(b Build, uses []Use) (Breakdown, error) {
	if err := b.Validate(); err != nil {
		return Breakdown{}, err
	}
	type acc struct {
		offer  *catalog.Offer
		place  int
		stages map[string]int
	}
	byPart := map[string]*acc{}
	var order []string
	for i, u := range uses {
		if u.Offer == nil || u.Part == "" || u.Placements < 1 {
			return Breakdown{}, fmt.Errorf("%w: use %d (part %q): a use needs a part number, an offer and at least one placement", ErrBuild, i, u.Part)
		}
		a := byPart[u.Part]
		if a == nil {
			a = &acc{offer: u.Offer, stages: map[string]int{}}
			byPart[u.Part] = a
			order = append(order, u.Part)
		}
		a.place += u.Placements
		a.stages[u.Stage] += u.Placements
	}
	sort.Strings(order)
	bd := Breakdown{Stages: map[string]float64{}, Currency: b.Currency}
	totalPlace := 0
	for _, part := range order {
		a := byPart[part]
		need := b.Needed(a.place)
		q, unit, cur, err := Buy(a.offer, need, b.ExactQuantity)
		if err != nil {
			return Breakdown{}, fmt.Errorf("part %s: %w", part, err)
		}
		if bd.Currency == "" {
			bd.Currency = cur
		} else if cur != bd.Currency {
			return Breakdown{}, fmt.Errorf("%w: part %s is priced in %q, the design in %q; price every part in one currency", ErrMixedCurrency, part, cur, bd.Currency)
		}
		ln := Line{Part: part, Placements: a.place, Needed: need, Bought: q, UnitPrice: unit,
			Extended: float64(q) * unit, Currency: cur, Stock: a.offer.Stock}
		if b.Stock != StockIgnore && a.offer.Stock >= 0 && a.offer.Stock < q {
			if b.Stock == StockExclude {
				return Breakdown{}, fmt.Errorf("part %s: %w: %d in stock, %d to buy", part, ErrShortStock, a.offer.Stock, q)
			}
			ln.Short = true
			bd.Short = append(bd.Short, part)
		}
		bd.Lines = append(bd.Lines, ln)
		bd.Parts += ln.Extended
		totalPlace += a.place
		lineShare := ln.Extended + b.PerLineItem
		for st, p := range a.stages {
			bd.Stages[st] += (lineShare*float64(p)/float64(a.place) + b.PerPlacement*float64(p*b.Quantity)) / float64(b.Quantity)
		}
	}
	bd.Assembly = float64(totalPlace*b.Quantity)*b.PerPlacement + float64(len(bd.Lines))*b.PerLineItem
	bd.Total = bd.Parts + bd.Assembly
	bd.PerUnit = bd.Total / float64(b.Quantity)
	return bd, nil
}

// SharedFloor is a lower bound on what uses (one stage's part numbers)
// add to the total of a build that prices them together with other uses
// (another stage's) through Price, when shared reports the part numbers
// the other uses may hold too. A line of a part number not shared costs
// what Price charges for it alone, its line item included; a shared one
// at least its pieces times the part's lowest unit price at any break,
// without minimum order, buy-up or line item, which the joint line pays
// once for both; every placement costs in full. Price's total of both
// lists together is then at least the sum of their floors: the joint line
// buys at least the pieces both need, at a unit price no lower than the
// lowest break, plus one line item (package doc). A floor above a
// stage's own price would make that false, so the floor of a stage with
// nothing shared is its Price total.
func (b Build) SharedFloor(uses []Use, shared func(part string) bool) (float64, error) {
	var alone []Use
	floor := 0.0
	for _, u := range uses {
		if !shared(u.Part) {
			alone = append(alone, u)
			continue
		}
		low := math.Inf(1)
		for _, pb := range u.Offer.PriceBreaks {
			low = min(low, pb.UnitPrice)
		}
		if math.IsInf(low, 1) {
			return 0, fmt.Errorf("part %s: %w", u.Part, ErrNoPrice)
		}
		pieces := float64(u.Placements*b.Quantity) * (1 + b.Attrition)
		floor += pieces*low + float64(u.Placements*b.Quantity)*b.PerPlacement
	}
	if len(alone) > 0 {
		bd, err := Price(b, alone)
		if err != nil {
			return 0, err
		}
		floor += bd.Total
	}
	return floor, nil
}
