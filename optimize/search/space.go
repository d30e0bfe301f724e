package search

import (
	"context"
	"fmt"
	"math"
	"sort"

	"plumb/catalog"
	"plumb/optimize/cost"
	"plumb/optimize/family"
	"plumb/optimize/strap"
)

// Parts is the catalog content the search reads.
type Parts struct {
	Series     []catalog.ResistorSeries
	Resistors  []catalog.Resistor
	Networks   []catalog.Network
	Amplifiers []catalog.Amplifier

	// rows, when set, streams the resistors in place of Series and
	// Resistors (a catalog file, read by indexed queries).
	rows catalog.ResistorSource
	// tables holds the grade tables one search has built, so that its
	// sub-searches (one per shunt or second-stage gain) read the catalog
	// once; nil outside a search.
	tables map[tableKey][]*group
	// straps holds the strappings of each amplifier's matched network one
	// search has enumerated (nil outside a search), with the error that
	// refused a network.
	straps map[*catalog.MatchedNetwork]strappings
}

// strappings are the usable strappings of one network, or why it has none.
type strappings struct {
	list []strap.Strapping
	err  error
}

// forSearch returns a copy of ps with its own table cache, for one search.
func (ps *Parts) forSearch() *Parts {
	c := *ps
	c.tables = map[tableKey][]*group{}
	c.straps = map[*catalog.MatchedNetwork]strappings{}
	return &c
}

// strappingsOf returns the usable strappings of network n, enumerated once
// per search (package strap; about 0.2 s for eight pins).
func (ps *Parts) strappingsOf(n *catalog.MatchedNetwork) ([]strap.Strapping, error) {
	if ps.straps == nil {
		ps.straps = map[*catalog.MatchedNetwork]strappings{}
	}
	if s, ok := ps.straps[n]; ok {
		return s.list, s.err
	}
	list, err := strap.Enumerate(n)
	ps.straps[n] = strappings{list, err}
	return list, err
}

// resistorRows returns the source of the resistor rows.
func (ps *Parts) resistorRows() catalog.ResistorSource {
	if ps.rows != nil {
		return ps.rows
	}
	return &catalog.Snapshot{ResistorSeries: ps.Series, Resistors: ps.Resistors}
}

// group is every resistor value the catalog sells in one grade: the
// figures the error budget and the ratings depend on (technology, size,
// tolerance, tempco, power, voltage, thermal resistance, load life).
// Prices never split a group: for each value and each number of
// placements per stage it keeps the cheapest part at the build quantity,
// so grade choice and value choice separate and the number of classes does
// not grow with the number of price lists.
type group struct {
	grade  catalog.ResistorGrade
	values []float64 // ascending, inside the resistor window
	// buy[i*places+p] is the cheapest way to buy value i placed p times per
	// stage (ext NaN: no part can be bought so).
	buy []pick
	// lb[p] is the least extended price of any value placed p times.
	lb [maxPlace + 1]float64
}

// places is the stride of group.buy: placements 0..maxPlace.
const places = maxPlace + 1

// pick is the part bought for one value at one number of placements: the
// cheapest that can be bought at the quantity, ties going to a part whose
// stock covers it, then to more stock, then to the lower part number.
type pick struct {
	ext   float64 // extended price of the pieces bought
	qty   int32   // pieces bought
	short bool    // stock below qty (flagged, under cost.StockFlag)
	part  *offered
}

// offered is one part number with its offer (price list, minimum order,
// stock).
type offered struct {
	part  string
	offer catalog.Offer
}

// at returns the pick of value i placed p times.
func (g *group) at(i, p int) *pick { return &g.buy[i*places+p] }

// worse reports whether a part (at extended price ext, short of stock
// or not, with stock and part number) is preferred to y.
func (y *pick) worse(ext float64, short bool, stock int, part string) bool {
	if math.IsNaN(y.ext) {
		return true
	}
	if ext != y.ext {
		return ext < y.ext
	}
	if short != y.short {
		return !short
	}
	if a, b := stockRank(stock), stockRank(y.part.offer.Stock); a != b {
		return a > b
	}
	return part < y.part.part
}

// groupKey identifies a group: every grade figure. The strings are the
// interned ones of the rows, so building a key allocates nothing.
type groupKey struct {
	tech, pkg                       string
	tol, tcr, pw, maxV, therm, life float64
}

func keyOf(g *catalog.ResistorGrade) groupKey {
	return groupKey{g.Technology, g.Package, g.Tolerance, g.TCR, g.PowerW, g.MaxVoltageV, g.ThermalResistance, g.LoadLife}
}

// tableKey is what a grade table depends on: the resistor window, the
// build and the placement counts priced.
type tableKey struct {
	rmin, rmax float64
	build      cost.Build
	used       uint16
}

// usedPlacements is the set (bit p for p placements per stage) of the
// numbers of placements one part number can have in a design of the
// circuit: every sum of a subset of its positions' placements, since
// positions that take one value of one grade share a part number.
func usedPlacements(p *Problem) uint16 {
	var lines []int
	f := p.family().SearchFamily()
	switch r := f.Search.Ratio; {
	case f.Search.Strategy == family.TwoStage:
		lines = []int{r.PerRg, r.PerRf, r.PerRf, 4} // and the second stage's four
	case f.Search.Strategy == family.ShiftNetwork:
		lines = []int{1, 1, 1, 2} // R1, R2, R3 and Rg = Rf
	default:
		lines = []int{r.PerRg, r.PerRf, r.PerRf} // Rg, Rf and a combination's second value
	}
	sums := uint16(1) // the empty sum
	for _, n := range lines {
		sums |= sums << n
	}
	return sums &^ 1 & (1<<places - 1)
}

// tableBuilder reduces streamed resistor rows to groups.
type tableBuilder struct {
	p      *Problem
	used   []int // placement counts priced
	need   [places]int
	groups map[groupKey]*groupBuilder
	// first is the first usable part and its currency, to refuse a
	// catalog priced in two currencies when the build names none.
	first, firstCur string
	err             error
}

type groupBuilder struct {
	grade catalog.ResistorGrade
	index map[float64]int32
	buy   []pick
	vals  []float64
}

// add takes one row: per placement count, the part replaces the value's
// pick when it is preferred.
func (tb *tableBuilder) add(r *catalog.ResistorRow) error {
	p := tb.p
	var cand [places]pick
	priced := false
	for _, pl := range tb.used {
		c := &cand[pl]
		c.ext = math.NaN()
		q, unit, _, err := cost.Buy(&r.Offer, tb.need[pl], p.Build.ExactQuantity)
		if err != nil {
			continue
		}
		short := p.Build.Stock != cost.StockIgnore && r.Offer.Stock >= 0 && r.Offer.Stock < q
		if short && p.Build.Stock == cost.StockExclude {
			continue
		}
		c.ext, c.qty, c.short = float64(q)*unit, int32(q), short
		priced = true
	}
	if !priced {
		return nil
	}
	if p.Build.Currency == "" {
		for _, b := range r.Offer.PriceBreaks {
			if tb.first == "" {
				tb.first, tb.firstCur = r.Part, b.Currency
			} else if b.Currency != tb.firstCur {
				return fmt.Errorf("%w: %s is priced in %q and %s in %q; set the build currency or keep one currency in the catalog", cost.ErrMixedCurrency, tb.first, tb.firstCur, r.Part, b.Currency)
			}
		}
	}
	key := keyOf(&r.Grade)
	gb := tb.groups[key]
	if gb == nil {
		gb = &groupBuilder{grade: r.Grade, index: map[float64]int32{}}
		tb.groups[key] = gb
	}
	i, ok := gb.index[r.ValueOhm]
	if !ok {
		i = int32(len(gb.vals))
		gb.index[r.ValueOhm] = i
		gb.vals = append(gb.vals, r.ValueOhm)
		for range places {
			gb.buy = append(gb.buy, pick{ext: math.NaN()})
		}
	}
	// Only a part that wins somewhere is copied (the row is reused).
	var o *offered
	for _, pl := range tb.used {
		c := &cand[pl]
		if math.IsNaN(c.ext) {
			continue
		}
		cur := &gb.buy[int(i)*places+pl]
		if !cur.worse(c.ext, c.short, r.Offer.Stock, r.Part) {
			continue
		}
		if o == nil {
			o = &offered{part: r.Part, offer: r.Offer}
			o.offer.PriceBreaks = append([]catalog.PriceBreak(nil), r.Offer.PriceBreaks...)
		}
		c.part = o
		*cur = *c
	}
	return nil
}

// build sorts each group's values and returns the groups in grade order.
func (tb *tableBuilder) build() []*group {
	out := make([]*group, 0, len(tb.groups))
	for _, gb := range tb.groups {
		order := make([]int, len(gb.vals))
		for i := range order {
			order[i] = i
		}
		sort.Slice(order, func(a, b int) bool { return gb.vals[order[a]] < gb.vals[order[b]] })
		g := &group{grade: gb.grade, values: make([]float64, len(order)), buy: make([]pick, len(gb.buy))}
		for pl := range g.lb {
			g.lb[pl] = math.NaN()
		}
		for n, i := range order {
			g.values[n] = gb.vals[i]
			copy(g.buy[n*places:(n+1)*places], gb.buy[i*places:(i+1)*places])
			for pl := range places {
				if e := g.buy[n*places+pl].ext; !math.IsNaN(e) && (math.IsNaN(g.lb[pl]) || e < g.lb[pl]) {
					g.lb[pl] = e
				}
			}
		}
		out = append(out, g)
	}
	sort.Slice(out, func(a, b int) bool { return gradeLess(&out[a].grade, &out[b].grade) })
	return out
}

// gradeLess orders grades by technology, package and then each figure.
func gradeLess(a, b *catalog.ResistorGrade) bool {
	if a.Technology != b.Technology {
		return a.Technology < b.Technology
	}
	if a.Package != b.Package {
		return a.Package < b.Package
	}
	x := [...]float64{a.Tolerance, a.TCR, a.PowerW, a.MaxVoltageV, a.ThermalResistance, a.LoadLife}
	y := [...]float64{b.Tolerance, b.TCR, b.PowerW, b.MaxVoltageV, b.ThermalResistance, b.LoadLife}
	for i := range x {
		if x[i] != y[i] {
			return x[i] < y[i]
		}
	}
	return false
}

// resistorQuery selects the resistor rows a problem can use: inside its
// value window, tolerance below 50 %, in the build's currency, with stock
// on hand under cost.StockExclude.
func resistorQuery(p *Problem) catalog.ResistorQuery {
	return catalog.ResistorQuery{MinOhm: p.RMinOhm, MaxOhm: p.RMaxOhm, BelowTolerance: 0.5,
		Currency: p.Build.Currency, InStock: p.Build.Stock == cost.StockExclude}
}

// buildGroups streams the resistor rows inside the problem's window
// (tolerance below 50 %, the build's currency, stock on hand under
// cost.StockExclude) and reduces them to grade groups. Within a search the
// groups of one window and build are built once.
func buildGroups(ctx context.Context, parts *Parts, p *Problem) ([]*group, error) {
	key := tableKey{p.RMinOhm, p.RMaxOhm, p.Build, usedPlacements(p)}
	if gs, ok := parts.tables[key]; ok {
		return gs, nil
	}
	tb := &tableBuilder{p: p, groups: map[groupKey]*groupBuilder{}}
	for pl := 1; pl < places; pl++ {
		if key.used&(1<<pl) != 0 {
			tb.used = append(tb.used, pl)
			tb.need[pl] = p.Build.Needed(pl)
		}
	}
	if err := parts.resistorRows().EachResistor(ctx, resistorQuery(p), tb.add); err != nil {
		return nil, err
	}
	gs := tb.build()
	if parts.tables != nil {
		parts.tables[key] = gs
	}
	return gs, nil
}

func stockRank(s int) int {
	if s < 0 {
		return math.MaxInt
	}
	return s
}

func offerIn(o *catalog.Offer, cur string) bool {
	for _, b := range o.PriceBreaks {
		if b.Currency != cur {
			return false
		}
	}
	return len(o.PriceBreaks) > 0
}

// currencyOf returns the currency of an offer's price list ("" if empty).
func currencyOf(o *catalog.Offer) string {
	if len(o.PriceBreaks) == 0 {
		return ""
	}
	return o.PriceBreaks[0].Currency
}

// amp is an amplifier that passed the hard limits, with its exact cost.
type amp struct {
	a    *catalog.Amplifier
	cost float64 // parts and assembly for the build
	// k0 is the nominal ratio (matched amplifiers: the chosen gain).
	k0    float64
	ainv  float64 // 1/CMRR of the amplifier, linear
	short bool
	// build labels an integrated part's designs (its family walked in the
	// circuit, see variant); "" for an op-amp.
	build Family
	// st is the strapping of a part whose family straps it (nil: the part
	// at one of its front-page gains).
	st *strap.Strapping
}

// label names the amplifier in a change: its part number, and a strapped
// part's strapping.
func (a *amp) label() string {
	if a.st != nil {
		return a.a.Part + " strapped " + a.st.Text
	}
	return a.a.Part
}

// hardReason counts why amplifiers were removed by hard limits.
type hardReason map[string]int

// ampCost prices n amplifier packages per stage, with their placements and
// line item.
func ampCost(p *Problem, o *catalog.Offer, n int) (float64, bool, bool) {
	ext, _, short, err := p.Build.LineCost(o, n)
	if err != nil {
		return 0, false, false
	}
	return ext + p.Build.PerPlacement*float64(n*p.Build.Quantity) + p.Build.PerLineItem, short, true
}

// packages is the number of amplifier packages a stage needs: one per
// op-amp, or ceil(op-amps / channels) of a dual or quad part (a single
// op-amp stage or an integrated part is one).
func packages(p *Problem, a *catalog.Amplifier) int {
	n := p.family().Search.OpAmps
	if n <= 1 {
		return 1
	}
	ch := max(a.Channels, 1)
	return (n + ch - 1) / ch
}

// pinRange returns the voltages the op-amp input pins see.
func pinRange(p *Problem, k float64) (lo, hi float64) {
	lo, hi = math.Inf(1), math.Inf(-1)
	for _, vcm := range []float64{p.CMMin, p.CMMax} {
		for _, vd := range []float64{p.InMin, p.InMax} {
			var v float64
			switch p.strategy() {
			case family.RatioPair:
				v = p.family().Search.Ratio.Pin(k, vd, vcm, p.Ref)
			case family.ShiftNetwork:
				v = p.lsNode(vd)
			case family.TwoStage:
				l, h := p.family().Search.Ratio.Stage2.Pins(k, p.stage2Gain(), vd, vcm, p.Ref)
				lo, hi = math.Min(lo, l), math.Max(hi, h)
				continue
			}
			lo, hi = math.Min(lo, v), math.Max(hi, v)
		}
	}
	return lo, hi
}

// outRange returns the output voltages the stage must swing to.
func outRange(p *Problem) (lo, hi float64) {
	var a, b float64
	switch r := p.family().SearchFamily().Search.Ratio; {
	case p.strategy() == family.ShiftNetwork:
		a, b = p.Gain*p.InMin+p.Shift, p.Gain*p.InMax+p.Shift
	case r != nil:
		a, b = r.Out(p.Gain, p.InMin, p.Ref), r.Out(p.Gain, p.InMax, p.Ref)
	default:
		a, b = p.Gain*p.InMin+p.Ref, p.Gain*p.InMax+p.Ref
	}
	return math.Min(a, b), math.Max(a, b)
}

// noAmp stands in for the amplifier of an unbuffered divider: no cost, no
// offset, and the load's leakage current as its bias current.
func noAmp(p *Problem) amp {
	return amp{a: &catalog.Amplifier{IbA: p.LeakageA}, k0: p.ratio()}
}

// hardAmp applies the hard limits to an amplifier at nominal ratio k (or
// strapped as st): supply span, pin common-mode range, output swing and
// bandwidth. It returns "" when the amplifier can be used, else the limit
// it breaks.
func hardAmp(p *Problem, a *catalog.Amplifier, k float64, st *strap.Strapping) string {
	span := p.SupplyPos - p.SupplyNeg
	if span < a.SupplyMinV || (a.SupplyMaxV > 0 && span > a.SupplyMaxV) {
		return "supply range"
	}
	var lo, hi float64
	negM, posM := a.CMNegV, a.CMPosV
	ng := 1 + k
	switch {
	case st != nil:
		// A strapped part's internal op-amp sees Kp·Vp + Kn·Vn + Kr·Vref
		// (package strap), inside its own common-mode range.
		lo, hi = math.Inf(1), math.Inf(-1)
		for _, in := range strappedCorners(p, st) {
			v := st.OpAmpInputV(in[0], in[1], p.Ref)
			lo, hi = math.Min(lo, v), math.Max(hi, v)
		}
		ng = st.NoiseGain
	case a.Type == catalog.MatchedAmp:
		// Matched amplifiers are judged on their input pins' range.
		lo, hi = math.Inf(1), math.Inf(-1)
		for _, vcm := range []float64{p.CMMin, p.CMMax} {
			for _, vd := range []float64{p.InMin, p.InMax} {
				lo = math.Min(lo, math.Min(vcm-vd/2, vcm+vd/2))
				hi = math.Max(hi, math.Max(vcm-vd/2, vcm+vd/2))
			}
		}
		negM, posM = a.InNegV, a.InPosV
	default:
		lo, hi = pinRange(p, k)
	}
	if lo < p.SupplyNeg+negM || hi > p.SupplyPos-posM {
		return "input headroom"
	}
	if swingHeadroom(p, a, k, st) < 0 {
		return "output swing"
	}
	if r := p.family().Search.Ratio; r != nil && r.Stage2 != nil {
		ng = r.Stage2.NoiseGain(k, p.stage2Gain())
	}
	if p.BandwidthHz > 0 && a.GBWHz/ng < p.BandwidthHz {
		return "bandwidth"
	}
	return ""
}

// swingHeadroom is the least distance, in volts, between the outputs the
// stage drives at nominal ratio k (an in-amp's first-stage outputs too)
// and the limits of amplifier a's swing at the rails; negative where the
// amplifier cannot reach them.
func swingHeadroom(p *Problem, a *catalog.Amplifier, k float64, st *strap.Strapping) float64 {
	olo, ohi := stageOut(p, st)
	if r := p.family().Search.Ratio; r != nil && r.Stage2 != nil {
		// The first stage's outputs swing too.
		for _, vcm := range [2]float64{p.CMMin, p.CMMax} {
			for _, vd := range [2]float64{p.InMin, p.InMax} {
				l, h := r.Stage2.Swing(k, vd, vcm)
				olo, ohi = math.Min(olo, l), math.Max(ohi, h)
			}
		}
	}
	return math.Min(olo-(p.SupplyNeg+a.SwingNegV), p.SupplyPos-a.SwingPosV-ohi)
}

// stageOut returns the outputs the stage drives at the target gain (a
// strapped part: at its strapping's nominal gains).
func stageOut(p *Problem, st *strap.Strapping) (olo, ohi float64) {
	if st == nil {
		return outRange(p)
	}
	// Vout = Gp·Vp + Gn·Vn + Gr·Vref at every input corner.
	olo, ohi = math.Inf(1), math.Inf(-1)
	for _, in := range strappedCorners(p, st) {
		v := st.GainPlus*in[0] + st.GainMinus*in[1] + st.GainRef*p.Ref
		olo, ohi = math.Min(olo, v), math.Max(ohi, v)
	}
	return olo, ohi
}

// movedHeadroom screens the output headroom a design keeps once its
// errors move the output, as the exact budget judges it: the headroom of
// the output at the design's own nominal gain (and a level shift's own
// nominal shift) to amplifier a's swing, less the worst gain error x the
// largest |input| x |gain|, less the worst offset (budget's outputMove).
// The screen takes headroomSlack of the errors, so it reads at or above
// the budget's figure and prunes only designs the budget fails
// (TestScreenHeadroomAboveExact).
func (s *space) movedHeadroom(a *amp, m *metrics) float64 {
	p := s.p
	g := p.Gain * math.Abs(m.gain/p.Gain) // the design's gain, the spec's sign
	head := math.Inf(1)
	for _, vin := range [2]float64{p.InMin, p.InMax} {
		var v float64
		if s.strategy() == family.ShiftNetwork {
			v = g*vin + p.Shift + m.nomOff
		} else {
			v = s.fam().SearchFamily().Search.Ratio.Out(g, vin, p.Ref)
		}
		head = math.Min(head, math.Min(v-(p.SupplyNeg+a.a.SwingNegV), p.SupplyPos-a.a.SwingPosV-v))
	}
	x := math.Max(math.Abs(p.InMin), math.Abs(p.InMax)) * math.Abs(m.gain)
	k := headroomSlack
	if s.rss {
		k = headroomSlackRSS
	}
	return head - k*(math.Abs(m.totalErr)*x+math.Abs(m.offset))
}

// headroomSlack and headroomSlackRSS are the share of the screened gain
// error and offset the headroom screen takes, under worst case and RSS:
// the screening figures may read above the exact budget's, the RSS ones
// by a fifth where the screen adds the ratio's rounding linearly
// (TestScreenHeadroomAboveExact found 0.0186 screened against 0.0146).
const (
	headroomSlack    = 0.9
	headroomSlackRSS = 0.6
)

// opAmpBuilds reports whether fams allows a build on an op-amp (discrete
// resistors or a network).
func opAmpBuilds(p *Problem, fams map[Family]bool) bool {
	f := p.family()
	return fams[variant(f, buildDiscrete)] || fams[variant(f, buildNetwork)]
}

// buildAmps returns the op-amps and the matched amplifiers that pass the
// hard limits, each sorted by cost, and the count removed per reason.
func buildAmps(parts *Parts, p *Problem, fams map[Family]bool) (op, matched []amp, why hardReason) {
	why = hardReason{}
	k := p.ratio()
	if r := p.family().Search.Ratio; r != nil && r.Passive {
		if lo, hi := outRange(p); lo < p.SupplyNeg || hi > p.SupplyPos {
			why["output outside the supply"]++
			return nil, nil, why
		}
		return []amp{noAmp(p)}, nil, why
	}
	w := p.window()
	opOK := opAmpBuilds(p, fams)
	// The integrated families the spec allows in this circuit.
	type partFam struct {
		g     *family.Family
		build Family
	}
	var partFams []partFam
	for _, g := range p.partFamilies() {
		if b := partLabel(p.family(), g); fams[b] {
			partFams = append(partFams, partFam{g, b})
		}
	}
	for i := range parts.Amplifiers {
		a := &parts.Amplifiers[i]
		if p.Build.Currency != "" && !offerIn(&a.Offer, p.Build.Currency) {
			continue
		}
		c, short, ok := ampCost(p, &a.Offer, packages(p, a))
		if !ok {
			why["no price or stock"]++
			continue
		}
		switch a.Type {
		case catalog.OpAmp:
			if !opOK {
				continue
			}
			if r := hardAmp(p, a, k, nil); r != "" {
				why[r]++
				continue
			}
			op = append(op, amp{a: a, cost: c, k0: k, ainv: dbInv(a.CMRRdB), short: short})
		case catalog.MatchedAmp:
			for _, pf := range partFams {
				build := pf.build
				if pf.g.Search.Strappings {
					matched = append(matched, strappedAmps(parts, p, a, amp{a: a, cost: c, short: short, build: build}, w, why)...)
					continue
				}
				gain, ok := nearestGain(a.Gains, p.Gain, w)
				if !ok {
					why["no matching gain"]++
					continue
				}
				if r := hardAmp(p, a, gain, nil); r != "" {
					why[r]++
					continue
				}
				matched = append(matched, amp{a: a, cost: c, k0: gain, ainv: dbInv(a.CMRRdB), short: short, build: build})
			}
		}
	}
	byCost := func(s []amp) {
		sort.SliceStable(s, func(i, j int) bool {
			if s[i].cost != s[j].cost {
				return s[i].cost < s[j].cost
			}
			return s[i].a.Part < s[j].a.Part
		})
	}
	byCost(op)
	byCost(matched)
	return op, matched, why
}

// strappedCorners lists the input corners (Vp, Vn) a strapping sees: the
// differential input at both ends on both ends of the common-mode range
// (Vp = Vcm + vd/2, Vn = Vcm - vd/2), or a single-ended input at both ends
// (Vn unconnected, 0).
func strappedCorners(p *Problem, st *strap.Strapping) [][2]float64 {
	if st.Kind != strap.Differential {
		return [][2]float64{{p.InMin, 0}, {p.InMax, 0}}
	}
	var out [][2]float64
	for _, vcm := range []float64{p.CMMin, p.CMMax} {
		for _, vd := range []float64{p.InMin, p.InMax} {
			out = append(out, [2]float64{vcm + vd/2, vcm - vd/2})
		}
	}
	return out
}

// strappedAmps returns a strapped design of amplifier a (base holds its
// cost and build) for every strapping of its network of the circuit's
// input kind (differential, or single-ended from vp: inverting,
// non-inverting, attenuating) whose gain, sign included, lies within the
// window w of the spec's and that passes the hard limits, counting the
// others in why. A differential strapping's resistor CMRR, (1+G)/(2δ) for
// the classic strapping, adds to the part's own: 1/CMRR ≤ 1/CMRRr +
// 1/CMRRa (domain notes §2); a single-ended one has no common-mode input.
func strappedAmps(parts *Parts, p *Problem, a *catalog.Amplifier, base amp, w float64, why hardReason) []amp {
	if a.Network == nil {
		why["no matched network to strap"]++
		return nil
	}
	list, err := parts.strappingsOf(a.Network)
	if err != nil {
		why["matched network not strappable"]++
		return nil
	}
	kind, target := strap.Differential, p.Gain
	if p.family().Input != family.Differential {
		kind = strap.FromPlus
		if p.Inverts {
			target = -target
		}
	}
	var out []amp
	found := false
	for i := range list {
		st := &list[i]
		if st.Kind != kind || !(math.Abs(st.Gain/target-1) <= w) {
			continue
		}
		found = true
		if r := hardAmp(p, a, st.Gain, st); r != "" {
			why[r]++
			continue
		}
		x := base
		x.k0, x.st = st.Gain, st
		if kind == strap.Differential {
			x.ainv = dbInv(a.CMRRdB) + strappedCMInv(st, a.Network, p.deltaT())
		}
		out = append(out, x)
	}
	if !found {
		why["no strapping makes the gain"]++
	}
	return out
}

// strappedCMInv is 1/CMRR of the strapped resistors over the temperature
// range: the worst-case common-mode gain |Acm| + Σ|∂Acm/∂ln Ri|·δ'/2 over
// Adm (package strap), with the ratio spread δ' = δ + τ·ΔT that the ratio
// tolerance δ and the tracking τ over the worst excursion ΔT allow
// together (tempco mismatch as a further mismatch, domain notes §2).
func strappedCMInv(st *strap.Strapping, n *catalog.MatchedNetwork, dT float64) float64 {
	spread := n.RatioTolerance + n.RatioDriftPPM*1e-6*dT
	acm := math.Abs(st.CommonModeGain)
	for _, x := range st.CMSensitivity {
		acm += math.Abs(x) * spread / 2
	}
	return acm / math.Abs(st.Gain)
}

func nearestGain(gs []float64, g, w float64) (float64, bool) {
	best, ok := 0.0, false
	for _, x := range gs {
		if math.Abs(x/g-1) <= w && (!ok || math.Abs(x/g-1) < math.Abs(best/g-1)) {
			best, ok = x, true
		}
	}
	return best, ok
}

// dbInv converts a CMRR in dB to 1/CMRR; a missing figure (0 dB or less)
// counts as no rejection at all, never as an ideal one.
func dbInv(db float64) float64 {
	if db <= 0 {
		return 1
	}
	return math.Pow(10, -db/20)
}
