package main

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"plumb/catalog"
	"plumb/catalog/units"
)

// partRow is one catalog part as `plumb catalog list` prints it.
type partRow struct {
	Kind       catalog.Kind
	Part       string
	Maker      string
	Value      string // resistance, range or amplifier type
	ValueOhm   float64
	Tolerance  float64 // fraction; 0 = not applicable
	TCR        float64 // ppm/K; 0 = not applicable
	Package    string
	Technology string
	Offer      catalog.Offer
	Detail     string
}

// partTableHeader is the header of `plumb catalog list`; maker and package
// are in DETAIL so that the table fits a terminal.
var partTableHeader = []string{"PART", "KIND", "VALUE", "TOL", "TCR PPM/K", "PRICE", "STOCK", "DETAIL"}

var partCSVHeader = []string{"kind", "part", "maker", "value", "value_ohm", "tolerance", "tcr_ppm", "package", "technology", "unit_price", "currency", "min_qty", "stock", "detail"}

// partRows flattens a snapshot into rows in the snapshot's order: series,
// resistors, networks, amplifiers, references.
func partRows(s *catalog.Snapshot) []partRow {
	var rows []partRow
	for _, r := range s.ResistorSeries {
		rows = append(rows, partRow{
			Kind: catalog.KindSeries, Part: r.Part, Maker: r.Maker,
			Value:     units.FormatOhms(r.MinOhm) + ".." + units.FormatOhms(r.MaxOhm),
			Tolerance: r.Tolerance, TCR: r.TCR, Package: r.Package, Technology: r.Technology,
			Offer:  r.Offer,
			Detail: joinNonEmpty(r.Maker, r.Package, r.ESeries, r.Technology, formatPower(r.PowerW)),
		})
	}
	for _, r := range s.Resistors {
		rows = append(rows, partRow{
			Kind: catalog.KindResistor, Part: r.Part, Maker: r.Maker,
			Value: units.FormatOhms(r.ValueOhm), ValueOhm: r.ValueOhm,
			Tolerance: r.Tolerance, TCR: r.TCR, Package: r.Package, Technology: r.Technology,
			Offer:  r.Offer,
			Detail: joinNonEmpty(r.Maker, r.Package, r.Technology, formatPower(r.PowerW)),
		})
	}
	for _, n := range s.Networks {
		vals := make([]string, len(n.Values))
		for i, v := range n.Values {
			vals[i] = units.FormatOhms(v)
		}
		rows = append(rows, partRow{
			Kind: catalog.KindNetwork, Part: n.Part, Maker: n.Maker,
			Value:     strings.Join(vals, "/"),
			Tolerance: n.Tolerance, TCR: n.TCR, Package: n.Package, Technology: n.Technology,
			Offer: n.Offer,
			Detail: joinNonEmpty(n.Maker, n.Package, n.Technology, keep("ratio "+units.FormatPercent(n.RatioTolerance)),
				keep("tracking "+units.FormatPPM(n.TCRTracking))),
		})
	}
	for _, a := range s.Amplifiers {
		rows = append(rows, amplifierRow(a))
	}
	for _, r := range s.References {
		supply := ""
		if catalog.Known(r.SupplyMinV) || catalog.Known(r.SupplyMaxV) {
			supply = "supply " + orUnknown(r.SupplyMinV, func(x float64) string { return units.Format(x, "") }) + "-" +
				orUnknown(r.SupplyMaxV, func(x float64) string { return units.Format(x, "V") })
		}
		rows = append(rows, partRow{
			Kind: catalog.KindReference, Part: r.Part, Maker: r.Maker,
			Value: units.Format(r.OutputV, "V"), Tolerance: r.Tolerance, TCR: r.DriftPPM, Package: r.Package,
			Offer: r.Offer,
			Detail: joinNonEmpty(r.Maker, r.Package, r.Topology,
				keep("noise "+orUnknown(r.NoisePPV, func(x float64) string { return units.Format(x, "V") + " p-p" })), keep(supply)),
		})
	}
	return rows
}

func amplifierRow(a catalog.Amplifier) partRow {
	r := partRow{Kind: catalog.KindAmplifier, Part: a.Part, Maker: a.Maker, Value: string(a.Type), Package: a.Package, Offer: a.Offer}
	detail := []string{
		a.Maker, a.Package,
		keep(fmt.Sprintf("%d ch", a.Channels)),
		keep("supply " + units.Format(a.SupplyMinV, "") + "-" + units.Format(a.SupplyMaxV, "V")),
		keep("Vos " + orUnknown(a.VosV, func(x float64) string { return units.Format(x, "V") })),
		keep("GBW " + orUnknown(a.GBWHz, func(x float64) string { return units.Format(x, "Hz") })),
	}
	if a.Type == catalog.MatchedAmp {
		r.Tolerance, r.TCR = a.GainErrorMax, a.GainDriftPPM
		gains := make([]string, len(a.Gains))
		for i, g := range a.Gains {
			gains[i] = strconv.FormatFloat(g, 'g', 4, 64)
		}
		detail = append(detail[:2:2], append([]string{keep("gain " + strings.Join(gains, "/"))}, detail[2:]...)...)
		if a.Network != nil {
			detail = append(detail, fmt.Sprintf("%d elements", len(a.Network.Elements)))
		}
	}
	r.Detail = joinNonEmpty(detail...)
	return r
}

// firstBreak returns the price break with the smallest quantity.
func firstBreak(o catalog.Offer) (catalog.PriceBreak, bool) {
	if len(o.PriceBreaks) == 0 {
		return catalog.PriceBreak{}, false
	}
	b := o.PriceBreaks[0]
	for _, x := range o.PriceBreaks[1:] {
		if x.MinQty < b.MinQty {
			b = x
		}
	}
	return b, true
}

func (r partRow) table() []string {
	price := "-"
	if b, ok := firstBreak(r.Offer); ok {
		price = formatMoney(b.UnitPrice, b.Currency)
	}
	tcr := "-"
	if r.TCR != 0 && !math.IsNaN(r.TCR) {
		tcr = strconv.FormatFloat(r.TCR, 'g', 4, 64)
	}
	return []string{r.Part, string(r.Kind), r.Value, optPercent(r.Tolerance), tcr, price, formatStock(r.Offer.Stock), r.Detail}
}

func (r partRow) csv() []string {
	var price, cur, qty string
	if b, ok := firstBreak(r.Offer); ok {
		price, cur, qty = strconv.FormatFloat(b.UnitPrice, 'g', -1, 64), b.Currency, strconv.Itoa(b.MinQty)
	}
	valueOhm := ""
	if r.ValueOhm > 0 {
		valueOhm = strconv.FormatFloat(r.ValueOhm, 'g', -1, 64)
	}
	figure := func(x float64) string {
		if math.IsNaN(x) {
			return "" // unknown
		}
		return strconv.FormatFloat(x, 'g', -1, 64)
	}
	return []string{string(r.Kind), r.Part, r.Maker, r.Value, valueOhm,
		figure(r.Tolerance), figure(r.TCR),
		r.Package, r.Technology, price, cur, qty, strconv.Itoa(r.Offer.Stock), r.Detail}
}

func optPercent(f float64) string {
	if f == 0 || math.IsNaN(f) {
		return "-"
	}
	return units.FormatPercent(f)
}

func optPPM(p float64) string {
	if p == 0 || math.IsNaN(p) {
		return "-"
	}
	return strconv.FormatFloat(p, 'g', 4, 64) + " ppm/K"
}

func formatPower(w float64) string {
	if w == 0 || math.IsNaN(w) {
		return ""
	}
	return keep(units.Format(w, "W"))
}

// formatMoney prints a price with two decimals, and up to four for
// sub-unit prices so that a 0.0023 resistor does not read as 0.00.
func formatMoney(v float64, currency string) string {
	s := strconv.FormatFloat(v, 'f', 2, 64)
	if math.Abs(v) < 1 {
		s = strings.TrimRight(strconv.FormatFloat(v, 'f', 4, 64), "0")
		if dot := strings.IndexByte(s, '.'); len(s)-dot-1 < 2 {
			s = strconv.FormatFloat(v, 'f', 2, 64)
		}
	}
	return strings.TrimSpace(s + " " + currency)
}

func formatStock(n int) string {
	if n < 0 {
		return "?"
	}
	return strconv.Itoa(n)
}

func joinNonEmpty(parts ...string) string {
	var out []string
	for _, p := range parts {
		if p != "" {
			out = append(out, p)
		}
	}
	return strings.Join(out, ", ")
}
