package search

import (
	"fmt"
	"math"
	"sort"
	"strconv"

	"plumb/catalog"
	"plumb/catalog/eseries"
	"plumb/optimize/cost"
)

// Parts is the catalog content the search reads.
type Parts struct {
	Series     []catalog.ResistorSeries
	Resistors  []catalog.Resistor
	Networks   []catalog.Network
	Amplifiers []catalog.Amplifier
}

// group is a set of resistor values sold at one grade and one price list:
// within a group only the value changes, so grade choice and value choice
// separate.
type group struct {
	key    string
	grade  catalog.ResistorGrade
	offer  catalog.Offer // the shared price list and minimum order
	values []float64     // ascending, inside the resistor window
	parts  []string
	stock  []int
	// ext[p] and qty[p] are the extended price and pieces bought of one part
	// number placed p times per stage (NaN when it cannot be priced).
	ext [maxPlace + 1]float64
	qty [maxPlace + 1]int
}

// appendGradeKey appends the key that groups resistors: every grade
// figure, the minimum order and the whole price list.
func appendGradeKey(b []byte, g *catalog.ResistorGrade, o *catalog.Offer) []byte {
	b = append(b, g.Technology...)
	b = append(b, '|')
	b = append(b, g.Package...)
	for _, x := range [...]float64{g.Tolerance, g.TCR, g.PowerW, g.MaxVoltageV, g.ThermalResistance, g.LoadLife} {
		b = append(b, '|')
		b = strconv.AppendFloat(b, x, 'g', -1, 64)
	}
	b = append(b, '|')
	b = strconv.AppendInt(b, int64(o.MinOrder), 10)
	for _, pb := range o.PriceBreaks {
		b = append(b, '|')
		b = strconv.AppendInt(b, int64(pb.MinQty), 10)
		b = append(b, ':')
		b = strconv.AppendFloat(b, pb.UnitPrice, 'g', -1, 64)
		b = append(b, pb.Currency...)
	}
	return b
}

// resistorRow is one orderable resistor value, from a row or a series.
type resistorRow struct {
	part  string
	value float64
	stock int
	grade catalog.ResistorGrade
	offer *catalog.Offer
}

// buildGroups groups every resistor row and series value inside the window
// by grade and price list. A value offered twice in a group keeps the part
// with more stock (unknown stock counts as plenty), then the lower part
// number.
func buildGroups(parts *Parts, p *Problem) ([]*group, error) {
	byKey := map[string]*group{}
	type entry struct {
		part  string
		stock int
	}
	vals := map[*group]map[float64]entry{}
	var kb []byte
	// groupOf finds or makes the group of a grade and price list.
	groupOf := func(gr *catalog.ResistorGrade, o *catalog.Offer) *group {
		kb = appendGradeKey(kb[:0], gr, o)
		if g, ok := byKey[string(kb)]; ok {
			return g
		}
		g := &group{key: string(kb), grade: *gr, offer: catalog.Offer{PriceBreaks: o.PriceBreaks, MinOrder: o.MinOrder, Stock: -1}}
		byKey[g.key] = g
		vals[g] = map[float64]entry{}
		return g
	}
	add := func(g *group, r resistorRow) {
		if r.value < p.RMinOhm || r.value > p.RMaxOhm || !(r.grade.Tolerance >= 0 && r.grade.Tolerance < 0.5) {
			return
		}
		if p.Build.Currency != "" && !offerIn(r.offer, p.Build.Currency) {
			return
		}
		if p.Build.Stock == cost.StockExclude && r.offer.Stock == 0 {
			return
		}
		if g == nil {
			g = groupOf(&r.grade, r.offer)
		}
		e, ok := vals[g][r.value]
		better := !ok || stockRank(r.stock) > stockRank(e.stock) || (stockRank(r.stock) == stockRank(e.stock) && r.part < e.part)
		if better {
			vals[g][r.value] = entry{r.part, r.stock}
		}
	}
	for i := range parts.Resistors {
		r := &parts.Resistors[i]
		add(nil, resistorRow{r.Part, r.ValueOhm, r.Stock, r.ResistorGrade, &r.Offer})
	}
	for i := range parts.Series {
		rs := &parts.Series[i]
		es, err := eseries.ByName(rs.ESeries)
		if err != nil {
			return nil, fmt.Errorf("resistor series %s: %w", rs.Part, err)
		}
		lo, hi := math.Max(rs.MinOhm, p.RMinOhm), math.Min(rs.MaxOhm, p.RMaxOhm)
		if lo > hi {
			continue
		}
		var g *group
		for _, v := range es.Values(lo, hi) {
			r := resistorRow{rs.PartNumber(v), v, rs.Stock, rs.ResistorGrade, &rs.Offer}
			if g == nil {
				g = groupOf(&r.grade, r.offer)
			}
			add(g, r)
		}
	}
	keys := make([]string, 0, len(byKey))
	for k := range byKey {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	out := make([]*group, 0, len(keys))
	for _, k := range keys {
		g := byKey[k]
		vs := make([]float64, 0, len(vals[g]))
		for v := range vals[g] {
			vs = append(vs, v)
		}
		sort.Float64s(vs)
		g.values = vs
		for _, v := range vs {
			e := vals[g][v]
			g.parts = append(g.parts, e.part)
			g.stock = append(g.stock, e.stock)
		}
		g.ext[0] = 0
		priced := false
		for pl := 1; pl <= maxPlace; pl++ {
			q, unit, _, err := cost.Buy(&g.offer, p.Build.Needed(pl), p.Build.ExactQuantity)
			if err != nil {
				g.ext[pl] = math.NaN()
				continue
			}
			g.ext[pl], g.qty[pl] = float64(q)*unit, q
			priced = true
		}
		if priced && len(vs) > 0 {
			out = append(out, g)
		}
	}
	return out, nil
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

// inampOpAmps is the number of op-amps of the instrumentation amplifier.
const inampOpAmps = 3

// packages is the number of amplifier packages a stage needs: one per
// op-amp, or ceil(op-amps / channels) of a dual or quad part.
func packages(p *Problem, a *catalog.Amplifier) int {
	if p.Circuit != InAmp {
		return 1
	}
	ch := max(a.Channels, 1)
	return (inampOpAmps + ch - 1) / ch
}

// pinRange returns the voltages the op-amp input pins see.
func pinRange(p *Problem, k float64) (lo, hi float64) {
	lo, hi = math.Inf(1), math.Inf(-1)
	for _, vcm := range []float64{p.CMMin, p.CMMax} {
		for _, vd := range []float64{p.InMin, p.InMax} {
			var v float64
			switch p.Circuit {
			case Difference:
				v = (vcm+vd/2)*k/(1+k) + p.Ref/(1+k)
			case NonInverting:
				v = vd
			case Inverting:
				v = p.Ref
			case LevelShift:
				v = p.lsNode(vd)
			case InAmp:
				// A1 and A2 see the inputs; A3 sees the first stage's
				// outputs Vcm ± G1·Vd/2 through R3/R4.
				k2 := p.stage2Gain()
				o1 := vcm + (1+2*k)*vd/2
				v = o1*k2/(1+k2) + p.Ref/(1+k2)
				lo, hi = math.Min(lo, math.Min(vcm-vd/2, vcm+vd/2)), math.Max(hi, math.Max(vcm-vd/2, vcm+vd/2))
			}
			lo, hi = math.Min(lo, v), math.Max(hi, v)
		}
	}
	return lo, hi
}

// outRange returns the output voltages the stage must swing to.
func outRange(p *Problem) (lo, hi float64) {
	var a, b float64
	switch p.Circuit {
	case Inverting:
		a, b = p.Ref-p.Gain*(p.InMin-p.Ref), p.Ref-p.Gain*(p.InMax-p.Ref)
	case NonInverting:
		// Rg returns to the reference: Vout = G·Vin - (G-1)·Vref.
		a, b = p.Gain*p.InMin-(p.Gain-1)*p.Ref, p.Gain*p.InMax-(p.Gain-1)*p.Ref
	case Divider:
		a, b = p.Gain*p.InMin, p.Gain*p.InMax
	case LevelShift:
		a, b = p.Gain*p.InMin+p.Shift, p.Gain*p.InMax+p.Shift
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

// hardAmp applies the hard limits to an amplifier at nominal ratio k:
// supply span, pin common-mode range, output swing and bandwidth. It
// returns "" when the amplifier can be used, else the limit it breaks.
func hardAmp(p *Problem, a *catalog.Amplifier, k float64) string {
	span := p.SupplyPos - p.SupplyNeg
	if span < a.SupplyMinV || (a.SupplyMaxV > 0 && span > a.SupplyMaxV) {
		return "supply range"
	}
	var lo, hi float64
	negM, posM := a.CMNegV, a.CMPosV
	if a.Type == catalog.MatchedAmp {
		// Matched amplifiers are judged on their input pins' range.
		lo, hi = math.Inf(1), math.Inf(-1)
		for _, vcm := range []float64{p.CMMin, p.CMMax} {
			for _, vd := range []float64{p.InMin, p.InMax} {
				lo = math.Min(lo, math.Min(vcm-vd/2, vcm+vd/2))
				hi = math.Max(hi, math.Max(vcm-vd/2, vcm+vd/2))
			}
		}
		negM, posM = a.InNegV, a.InPosV
	} else {
		lo, hi = pinRange(p, k)
	}
	if lo < p.SupplyNeg+negM || hi > p.SupplyPos-posM {
		return "input headroom"
	}
	olo, ohi := outRange(p)
	ng := 1 + k
	if p.Circuit == InAmp {
		// The first stage's outputs swing to Vcm ± G1·Vd/2 too.
		g1 := 1 + 2*k
		for _, vcm := range []float64{p.CMMin, p.CMMax} {
			for _, vd := range []float64{p.InMin, p.InMax} {
				olo, ohi = math.Min(olo, math.Min(vcm-g1*vd/2, vcm+g1*vd/2)), math.Max(ohi, math.Max(vcm-g1*vd/2, vcm+g1*vd/2))
			}
		}
		ng = math.Max(g1, 1+p.stage2Gain())
	}
	if olo < p.SupplyNeg+a.SwingNegV || ohi > p.SupplyPos-a.SwingPosV {
		return "output swing"
	}
	if p.BandwidthHz > 0 && a.GBWHz/ng < p.BandwidthHz {
		return "bandwidth"
	}
	return ""
}

// buildAmps returns the op-amps and the matched amplifiers that pass the
// hard limits, each sorted by cost, and the count removed per reason.
func buildAmps(parts *Parts, p *Problem, fams map[Family]bool) (op, matched []amp, why hardReason) {
	why = hardReason{}
	k := p.ratio()
	if p.Circuit == Divider {
		if lo, hi := outRange(p); lo < p.SupplyNeg || hi > p.SupplyPos {
			why["output outside the supply"]++
			return nil, nil, why
		}
		return []amp{noAmp(p)}, nil, why
	}
	w := p.window()
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
			if !fams[DiscreteDifference] && !fams[NetworkDifference] && !fams[DiscreteNonInverting] && !fams[DiscreteInverting] && !fams[DiscreteInAmp] && !fams[NetworkInAmp] && !fams[DiscreteLevelShift] {
				continue
			}
			if r := hardAmp(p, a, k); r != "" {
				why[r]++
				continue
			}
			op = append(op, amp{a: a, cost: c, k0: k, ainv: dbInv(a.CMRRdB), short: short})
		case catalog.MatchedAmp:
			if !fams[MatchedDifference] {
				continue
			}
			g, ok := nearestGain(a.Gains, p.Gain, w)
			if !ok {
				why["no matching gain"]++
				continue
			}
			if r := hardAmp(p, a, g); r != "" {
				why[r]++
				continue
			}
			matched = append(matched, amp{a: a, cost: c, k0: g, ainv: dbInv(a.CMRRdB), short: short})
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
