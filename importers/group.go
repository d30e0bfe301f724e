package importers

import (
	"errors"
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
	// StockMin and StockMax span the values' stock (-1 = unknown); the
	// series keeps StockMin.
	StockMin, StockMax int
}

// sameGroup reports whether two rows share what every row of a series
// shares: maker, line, grade and price list.
func sameGroup(a, b *catalog.Resistor) bool {
	return a.Maker == b.Maker && a.Line == b.Line && catalog.SameGrade(a.ResistorGrade, b.ResistorGrade) && a.MinOrder == b.MinOrder &&
		slices.Equal(a.PriceBreaks, b.PriceBreaks)
}

// groupSeries folds runs of consecutive rows that share maker, line, grade
// and price list, whose values are exactly the values of one IEC 60063
// series between the smallest and the largest (at least one decade's worth
// of them), and whose part numbers are the catalog's series part numbers
// (stem-VALUECODE, see catalog.ResistorSeries.PartNumber), into
// ResistorSeries. Other rows stay single Resistors. notes says what was
// grouped, and which runs could not be.
func groupSeries(file string, rows []parsed) (series []catalog.ResistorSeries, singles []catalog.Resistor, groups []Group, notes []Problem) {
	singles = make([]catalog.Resistor, 0, len(rows))
	for start := 0; start < len(rows); {
		end := start + 1
		for end < len(rows) && sameGroup(rows[start].resistor, rows[end].resistor) {
			end++
		}
		run := rows[start:end]
		start = end
		var es *eseries.Series
		if len(run) >= eseries.E3.N {
			es = seriesOf(run)
		}
		if es == nil {
			for _, p := range run {
				singles = append(singles, *p.resistor)
			}
			continue
		}
		s, g, why := asSeries(file, run, es)
		if why != "" {
			notes = append(notes, newProblem(Info, &ParseError{File: file, Line: run[0].line,
				Err: fmt.Errorf("lines %d-%d cover %s from %g to %g ohm at one grade and price, but %s: kept as single resistors",
					run[0].line, run[len(run)-1].line, es.Name, run[0].resistor.ValueOhm, run[len(run)-1].resistor.ValueOhm, why)}, ""))
			for _, p := range run {
				singles = append(singles, *p.resistor)
			}
			continue
		}
		series = append(series, s)
		groups = append(groups, g)
		msg := fmt.Sprintf("lines %d-%d grouped as series %s: %s, %d values from %g to %g ohm", g.FirstLine, g.LastLine, g.Series, g.ESeries, g.Values, g.MinOhm, g.MaxOhm)
		if g.StockMin != g.StockMax {
			msg += fmt.Sprintf("; stock per value runs from %d to %d, the series keeps the least", g.StockMin, g.StockMax)
		}
		notes = append(notes, newProblem(Info, &ParseError{File: file, Line: g.FirstLine, Err: errors.New(msg)}, g.Series))
	}
	return series, singles, groups, notes
}

// seriesOf returns the coarsest E-series whose values between the run's
// smallest and largest are exactly the run's values, or nil.
func seriesOf(run []parsed) *eseries.Series {
	vals := make([]float64, len(run))
	for i, p := range run {
		vals[i] = p.resistor.ValueOhm
	}
	sort.Float64s(vals)
	vals = slices.CompactFunc(vals, func(a, b float64) bool { return math.Abs(a-b) <= 1e-9*a })
	if len(vals) != len(run) || len(vals) < 3 {
		return nil
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
		if match {
			return es
		}
	}
	return nil
}

// asSeries builds the series of a run, or says why the run cannot be one.
func asSeries(file string, run []parsed, es *eseries.Series) (catalog.ResistorSeries, Group, string) {
	r0 := run[0].resistor
	stem := ""
	for _, p := range run {
		code := "-" + catalog.ValueCode(p.resistor.ValueOhm)
		st, ok := strings.CutSuffix(p.resistor.Part, code)
		if !ok || code == "-" || st == "" || stem != "" && st != stem {
			return catalog.ResistorSeries{}, Group{}, fmt.Sprintf("part number %s is not the series stem followed by -%s", p.resistor.Part, catalog.ValueCode(p.resistor.ValueOhm))
		}
		stem = st
	}
	lo, hi := math.Inf(1), math.Inf(-1)
	stockMin, stockMax := math.MaxInt, -1
	for _, p := range run {
		lo, hi = math.Min(lo, p.resistor.ValueOhm), math.Max(hi, p.resistor.ValueOhm)
		stockMin, stockMax = min(stockMin, p.resistor.Stock), max(stockMax, p.resistor.Stock)
	}
	s := catalog.ResistorSeries{Part: stem, Maker: r0.Maker, Line: r0.Line, ESeries: es.Name, MinOhm: lo, MaxOhm: hi,
		ResistorGrade: r0.ResistorGrade, Offer: catalog.Offer{PriceBreaks: r0.PriceBreaks, MinOrder: r0.MinOrder, Stock: stockMin},
		Provenance: r0.Provenance}
	g := Group{File: file, FirstLine: run[0].line, LastLine: run[len(run)-1].line, Series: stem, ESeries: es.Name,
		Values: len(run), MinOhm: lo, MaxOhm: hi, StockMin: stockMin, StockMax: stockMax}
	return s, g, ""
}
