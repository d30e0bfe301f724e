package importers

import (
	"fmt"
	"math"
	"slices"
	"sort"
	"strings"

	"plumb/catalog"
	"plumb/catalog/eseries"
)

// Group is a run of resistor rows folded into one ResistorSeries.
type Group struct {
	File      string
	FirstLine int
	LastLine  int
	Series    string // the series part (order-code stem)
	ESeries   string
	Values    int
	MinOhm    float64
	MaxOhm    float64
}

// groupKey is what every row of a series shares: maker, line, grade and
// price list.
func groupKey(r *catalog.Resistor) string {
	var b strings.Builder
	fmt.Fprintf(&b, "%s|%s|%s|%s|%g|%g|%g|%g|", r.Maker, r.Line, r.Technology, r.Package, r.Tolerance, r.TCR, r.PowerW, r.MaxVoltageV)
	for _, p := range r.PriceBreaks {
		fmt.Fprintf(&b, "%d:%g%s;", p.MinQty, p.UnitPrice, p.Currency)
	}
	fmt.Fprintf(&b, "|%d", r.MinOrder)
	return b.String()
}

// groupSeries folds runs of consecutive rows that share maker, line, grade
// and price list, and whose values are exactly the values of one IEC 60063
// series between the smallest and the largest (at least one decade's worth
// of them), into ResistorSeries. The rows stay as Resistors, each naming
// its series in SeriesPart, since they carry their own part number and
// stock.
func groupSeries(file string, rows []parsed) ([]catalog.ResistorSeries, []Group) {
	var series []catalog.ResistorSeries
	var groups []Group
	for start := 0; start < len(rows); {
		end := start + 1
		key := groupKey(rows[start].resistor)
		for end < len(rows) && groupKey(rows[end].resistor) == key {
			end++
		}
		if s, g, ok := asSeries(file, rows[start:end]); ok {
			series = append(series, s)
			groups = append(groups, g)
		}
		start = end
	}
	return series, groups
}

func asSeries(file string, run []parsed) (catalog.ResistorSeries, Group, bool) {
	vals := make([]float64, len(run))
	for i, p := range run {
		vals[i] = p.resistor.ValueOhm
	}
	sort.Float64s(vals)
	vals = slices.CompactFunc(vals, func(a, b float64) bool { return closeTo(a, b) && math.Abs(a-b) <= 1e-9*a })
	if len(vals) != len(run) || len(vals) < 3 {
		return catalog.ResistorSeries{}, Group{}, false
	}
	lo, hi := vals[0], vals[len(vals)-1]
	for _, es := range eseries.All() {
		if len(vals) < es.N {
			continue
		}
		want := es.Values(lo*(1-1e-9), hi*(1+1e-9))
		if len(want) != len(vals) {
			continue
		}
		match := true
		for i := range want {
			if math.Abs(want[i]-vals[i]) > 1e-9*want[i] {
				match = false
				break
			}
		}
		if !match {
			continue
		}
		r0 := run[0].resistor
		stem := partStem(run)
		s := catalog.ResistorSeries{Part: stem, Maker: r0.Maker, Line: r0.Line, ESeries: es.Name, MinOhm: lo, MaxOhm: hi,
			ResistorGrade: r0.ResistorGrade, Offer: catalog.Offer{PriceBreaks: r0.PriceBreaks, MinOrder: r0.MinOrder, Stock: -1},
			Provenance: r0.Provenance}
		for _, p := range run {
			p.resistor.SeriesPart = stem
		}
		g := Group{File: file, FirstLine: run[0].line, LastLine: run[len(run)-1].line, Series: stem, ESeries: es.Name,
			Values: len(vals), MinOhm: lo, MaxOhm: hi}
		return s, g, true
	}
	return catalog.ResistorSeries{}, Group{}, false
}

// partStem names a series by what its part numbers share: the common
// prefix and suffix around the value code, "TF0603-*-B25". When they share
// little, maker, line and grade name it.
func partStem(run []parsed) string {
	pre, suf := run[0].resistor.Part, run[0].resistor.Part
	for _, p := range run[1:] {
		pre = commonPrefix(pre, p.resistor.Part)
		suf = commonSuffix(suf, p.resistor.Part)
	}
	if len(pre)+len(suf) >= len(run[0].resistor.Part) {
		suf = ""
	}
	if len(pre) >= 3 {
		return pre + "*" + suf
	}
	r := run[0].resistor
	return fmt.Sprintf("%s %s %s %g%% %gppm", r.Maker, r.Line, r.Package, r.Tolerance*100, r.TCR)
}

func commonPrefix(a, b string) string {
	n := 0
	for n < len(a) && n < len(b) && a[n] == b[n] {
		n++
	}
	return a[:n]
}

func commonSuffix(a, b string) string {
	n := 0
	for n < len(a) && n < len(b) && a[len(a)-1-n] == b[len(b)-1-n] {
		n++
	}
	return a[len(a)-n:]
}
