package report

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"plumb/catalog/units"
	"plumb/optimize/budget"
	"plumb/optimize/spec"
)

// unitSymbol is the symbol a chart axis shows for a budget unit word
// (Limit.Unit).
func unitSymbol(unit string) string {
	switch unit {
	case "ohm":
		return "Ω"
	case "V/rtHz":
		return "V/√Hz"
	}
	return unit
}

// sig writes v to three significant figures, as a plain decimal between
// 1e-4 and 1e6 (6280, 0.0585) and with an exponent outside.
func sig(v float64) string {
	a := math.Abs(v)
	if math.IsNaN(v) || math.IsInf(v, 0) || a >= 1e6 || (a < 1e-4 && a != 0) {
		return strconv.FormatFloat(v, 'g', 3, 64)
	}
	if a == 0 {
		return "0"
	}
	r, _ := strconv.ParseFloat(strconv.FormatFloat(v, 'g', 3, 64), 64)
	return strconv.FormatFloat(r, 'f', -1, 64)
}

// money writes a price with its currency, to four significant figures for
// unit prices below one and to cents above.
func money(v float64, currency string) string {
	var s string
	if math.Abs(v) < 1 && v != 0 {
		s = strconv.FormatFloat(v, 'g', 4, 64)
	} else {
		s = strconv.FormatFloat(v, 'f', 2, 64)
	}
	if currency == "" {
		return s
	}
	return s + " " + currency
}

func rangeText(r spec.Range, unit string) string {
	return units.Format(r.Min, unit) + " … " + units.Format(r.Max, unit)
}

func yesNo(b bool) string {
	if b {
		return "yes"
	}
	return "no"
}

// specRows lists every field of the spec in engineering notation. Unset
// optional figures are written "none".
func specRows(s *spec.Spec) []Row {
	var rows []Row
	add := func(name, value string) { rows = append(rows, Row{name, value}) }
	opt := func(name string, v float64, f func(float64) string) {
		if v == 0 {
			add(name, "none")
		} else {
			add(name, f(v))
		}
	}
	eng := func(u string) func(float64) string { return func(v float64) string { return units.Format(v, u) } }
	add("name", s.Name)
	add("about", s.About)
	add("families", strings.Join(s.Families, ", "))
	signal := "V"
	gainUnit := "V/V"
	if s.CurrentInput() {
		signal, gainUnit = "A", "V/A"
	}
	add("gain", sig(s.Gain)+" "+gainUnit)
	opt("output offset target", s.Offset, eng("V"))
	kind := "single-ended"
	if s.Differential {
		kind = "differential"
	}
	add("input ("+kind+")", rangeText(s.Input, signal))
	rangeOrNone := func(name string, r spec.Range, set bool) {
		if set || r != (spec.Range{}) {
			add(name, rangeText(r, "V"))
		} else {
			add(name, "none")
		}
	}
	rangeOrNone("common-mode input", s.CommonMode, s.Differential)
	rangeOrNone("output range", s.Output, false)
	add("supply rails", rangeText(s.Supply, "V")+" (span "+units.Format(s.Supply.Span(), "V")+")")
	if ref := s.Reference; ref != nil {
		add("reference", fmt.Sprintf("%s, tolerance %s, drift %s ppm/K, source %s", units.Format(ref.V, "V"),
			sig(100*ref.Tolerance)+" %", sig(1e6*ref.Drift), units.Format(ref.SourceOhm, "Ω")))
	} else {
		add("reference", "none")
	}
	opt("source impedance", s.SourceOhm, eng("Ω"))
	opt("load resistance", s.LoadOhm, eng("Ω"))
	opt("load leakage current", s.LeakageA, eng("A"))
	add("temperature range", rangeText(s.Temp, "°C"))
	add("reference temperature", units.Format(s.TempRef, "°C")+" (worst excursion "+units.Format(s.WorstExcursion(), "K")+")")
	l := s.Limits
	pct := func(v float64) string { return sig(100*v) + " %" }
	opt("limit: gain error (max)", l.GainError, pct)
	opt("limit: CMRR (min)", l.CMRRdB, func(v float64) string { return budget.FormatFigure(v, "dB") })
	opt("limit: gain drift (max)", l.GainDrift, func(v float64) string { return sig(1e6*v) + " ppm/K" })
	opt("limit: output offset (max)", l.OutputOffsetV, eng("V"))
	opt("limit: offset drift (max)", l.OffsetDriftVK, eng("V/K"))
	opt("limit: noise RMS (max)", l.NoiseRMSV, eng("V"))
	opt("limit: noise density (max)", l.NoiseDensity, eng("V/√Hz"))
	opt("limit: bandwidth (min)", l.BandwidthHz, eng("Hz"))
	opt("limit: input impedance (min)", l.InputImpedance, eng("Ω"))
	a := s.Analysis
	add("analysis method", a.Method)
	add("Monte Carlo", fmt.Sprintf("%d trials, seed %d, %s distribution, tolerance = %s sigma", a.Trials, a.Seed, a.Distribution, sig(a.Sigmas)))
	opt("yield target", a.Yield, pct)
	add("calibration", fmt.Sprintf("gain: %s, offset: %s", yesNo(s.Calibrate.Gain), yesNo(s.Calibrate.Offset)))
	if s.Impedance != (spec.Range{}) {
		add("resistor values", rangeText(s.Impedance, "Ω"))
	} else {
		add("resistor values", "any")
	}
	b := s.Build
	cur := b.Currency
	if cur == "" {
		cur = "catalog currency"
	}
	add("build quantity", strconv.Itoa(b.Quantity)+" stages")
	add("attrition", pct(b.Attrition))
	add("cost per placement", money(b.PlacementCost, b.Currency))
	add("cost per line item", money(b.LineItemCost, b.Currency))
	add("currency", cur)
	add("stock policy", b.Stock)
	if len(s.Combos) > 0 {
		add("value pairs", strings.Join(s.Combos, ", "))
	} else {
		add("value pairs", "none")
	}
	opt("power derating", s.Derating, pct)
	return rows
}
