package catalog

import (
	"fmt"
	"math"
	"slices"
	"strings"
	"unicode"

	"plumb/catalog/eseries"
)

// partError is a validation error naming the part, its place in the batch
// and the field.
func partError(kind Kind, row int, part, field, format string, a ...any) error {
	name := part
	if name == "" {
		name = "(no part number)"
	}
	return fmt.Errorf("%w: %s %s (%s row %d): %s: %s", ErrInvalid, kind, name, kind, row+1, field, fmt.Sprintf(format, a...))
}

// checker collects the first problem of one part.
type checker struct {
	kind Kind
	row  int
	part string
	err  error
	// problem is the first problem without the part: "field: what".
	problem string
}

func (c *checker) fail(field, format string, a ...any) {
	if c.err == nil {
		c.err = partError(c.kind, c.row, c.part, field, format, a...)
		c.problem = field + ": " + fmt.Sprintf(format, a...)
	}
}

func (c *checker) text(field, v string) {
	if strings.TrimSpace(v) == "" {
		c.fail(field, "is empty: fill it in")
	}
}

func (c *checker) partNumber(v string) {
	switch {
	case v == "":
		c.fail("part", "is empty: every part needs its order code")
	case strings.TrimSpace(v) != v || strings.IndexFunc(v, unicode.IsSpace) >= 0:
		c.fail("part", "%q contains white space: remove it", v)
	case strings.Contains(v, ","):
		c.fail("part", "%q contains a comma: remove it", v)
	}
}

// positive checks a figure that must be finite and > 0.
func (c *checker) positive(field string, v float64) {
	if !(v > 0) || math.IsInf(v, 0) {
		c.fail(field, "%s must be a positive number in SI units", formatFloat(v))
	}
}

// nonNegative checks a figure that may be unknown (NaN) and is otherwise
// finite and >= 0.
func (c *checker) nonNegative(field string, v float64) {
	if math.IsNaN(v) {
		return
	}
	if !(v >= 0) || math.IsInf(v, 0) {
		c.fail(field, "%s must be zero or a positive number in SI units", formatFloat(v))
	}
}

// finite checks a figure that may be unknown (NaN) and is otherwise finite.
func (c *checker) finite(field string, v float64) {
	if math.IsInf(v, 0) {
		c.fail(field, "%s is not a finite number", formatFloat(v))
	}
}

// positiveOrUnknown checks a figure that may be unknown (NaN) and is
// otherwise finite and > 0.
func (c *checker) positiveOrUnknown(field string, v float64) {
	if !math.IsNaN(v) {
		c.positive(field, v)
	}
}

// fraction checks a tolerance: a fraction in (0, 1).
func (c *checker) fraction(field string, v float64) {
	if !(v > 0 && v < 1) {
		c.fail(field, "%s is not a fraction between 0 and 1: write 0.001 for 0.1 %%", formatFloat(v))
	}
}

// grade checks a resistor grade: only the tolerance is required; every
// other figure may be unknown.
func (c *checker) grade(g *ResistorGrade) {
	c.fraction("tolerance", g.Tolerance)
	c.nonNegative("tcr_ppm", g.TCR)
	c.positiveOrUnknown("power_w", g.PowerW)
	c.nonNegative("max_voltage_v", g.MaxVoltageV)
	c.nonNegative("thermal_resistance_k_per_w", g.ThermalResistance)
	c.nonNegative("load_life", g.LoadLife)
}

// offer checks the offer and sorts the price breaks by quantity.
func (c *checker) offer(o *Offer) {
	if o.Stock < -1 {
		c.fail("stock", "%d is negative: give the quantity on hand, or -1 for unknown", o.Stock)
	}
	if o.MinOrder < 0 {
		c.fail("min_order", "%d is negative", o.MinOrder)
	}
	slices.SortFunc(o.PriceBreaks, func(a, b PriceBreak) int { return a.MinQty - b.MinQty })
	for i, b := range o.PriceBreaks {
		switch {
		case b.MinQty < 1:
			c.fail("price_breaks", "break quantity %d is below 1", b.MinQty)
		case i > 0 && o.PriceBreaks[i-1].MinQty == b.MinQty:
			c.fail("price_breaks", "two breaks at quantity %d: keep one", b.MinQty)
		case !(b.UnitPrice >= 0) || math.IsInf(b.UnitPrice, 0):
			c.fail("price_breaks", "unit price %s at quantity %d is not a price", formatFloat(b.UnitPrice), b.MinQty)
		case !currencyCode(b.Currency):
			c.fail("price_breaks", "currency %q at quantity %d is not a three-letter ISO 4217 code such as USD", b.Currency, b.MinQty)
		}
	}
}

func checkSeries(row int, rs *ResistorSeries) error {
	c := checker{kind: KindSeries, row: row, part: rs.Part}
	c.partNumber(rs.Part)
	c.text("maker", rs.Maker)
	if _, err := eseries.ByName(rs.ESeries); err != nil {
		c.fail("e_series", "%v", err)
	}
	c.positive("min_ohm", rs.MinOhm)
	c.positive("max_ohm", rs.MaxOhm)
	if c.err == nil && rs.MaxOhm < rs.MinOhm {
		c.fail("max_ohm", "%s is below min_ohm %s", formatFloat(rs.MaxOhm), formatFloat(rs.MinOhm))
	}
	if c.err == nil {
		if es, _ := eseries.ByName(rs.ESeries); len(es.Values(rs.MinOhm, rs.MaxOhm)) == 0 {
			c.fail("min_ohm", "no %s value between %s and %s ohm", es.Name, formatFloat(rs.MinOhm), formatFloat(rs.MaxOhm))
		}
	}
	c.grade(&rs.ResistorGrade)
	c.offer(&rs.Offer)
	return c.err
}

func checkResistor(row int, r *Resistor) error {
	c := checker{kind: KindResistor, row: row, part: r.Part}
	c.partNumber(r.Part)
	c.text("maker", r.Maker)
	c.positive("value_ohm", r.ValueOhm)
	c.grade(&r.ResistorGrade)
	c.offer(&r.Offer)
	return c.err
}

func checkNetwork(row int, n *Network) error {
	c := checker{kind: KindNetwork, row: row, part: n.Part}
	c.partNumber(n.Part)
	c.text("maker", n.Maker)
	if len(n.Values) < 2 {
		c.fail("values_ohm", "a network needs at least two element values, got %d", len(n.Values))
	}
	for _, v := range n.Values {
		c.positive("values_ohm", v)
	}
	c.fraction("tolerance", n.Tolerance)
	c.fraction("ratio_tolerance", n.RatioTolerance)
	c.nonNegative("tcr_ppm", n.TCR)
	c.nonNegative("tcr_tracking_ppm", n.TCRTracking)
	c.positiveOrUnknown("power_w", n.PowerW)
	c.nonNegative("max_voltage_v", n.MaxVoltageV)
	c.offer(&n.Offer)
	return c.err
}

func checkAmplifier(row int, a *Amplifier) error {
	c := checker{kind: KindAmplifier, row: row, part: a.Part}
	c.partNumber(a.Part)
	c.text("maker", a.Maker)
	switch a.Type {
	case OpAmp:
		if len(a.Gains) > 0 {
			c.fail("gains", "an op-amp has no fixed gains: use type %q for an amplifier with matched resistors", MatchedAmp)
		}
	case MatchedAmp:
		if len(a.Gains) == 0 {
			c.fail("gains", "a matched amplifier needs its fixed gains, e.g. [1] or [1, 2, 5, 10]")
		}
		for _, g := range a.Gains {
			c.positive("gains", g)
		}
	default:
		c.fail("type", "%q is not %q or %q", a.Type, OpAmp, MatchedAmp)
	}
	if a.Channels < 1 {
		c.fail("channels", "%d: an amplifier has at least one channel", a.Channels)
	}
	c.positive("supply_min_v", a.SupplyMinV)
	c.positive("supply_max_v", a.SupplyMaxV)
	if c.err == nil && a.SupplyMaxV < a.SupplyMinV {
		c.fail("supply_max_v", "%s is below supply_min_v %s", formatFloat(a.SupplyMaxV), formatFloat(a.SupplyMinV))
	}
	for _, f := range []struct {
		name string
		v    float64
	}{{"cm_neg_v", a.CMNegV}, {"cm_pos_v", a.CMPosV}, {"swing_neg_v", a.SwingNegV}, {"swing_pos_v", a.SwingPosV},
		{"in_neg_v", a.InNegV}, {"in_pos_v", a.InPosV}} {
		c.finite(f.name, f.v)
	}
	for _, f := range []struct {
		name string
		v    float64
	}{{"vos_v", a.VosV}, {"vos_drift_v_per_k", a.VosDriftVK}, {"ib_a", a.IbA}, {"ios_a", a.IosA},
		{"noise_v_per_rthz", a.NoiseVHz}, {"noise_a_per_rthz", a.NoiseAHz}, {"iq_a", a.IqA},
		{"gain_error_max", a.GainErrorMax}, {"gain_drift_ppm", a.GainDriftPPM}, {"internal_ohm", a.InternalOhm}} {
		c.nonNegative(f.name, f.v)
	}
	c.positiveOrUnknown("aol_v_per_v", a.AolVV)
	c.positiveOrUnknown("cmrr_db", a.CMRRdB)
	c.positiveOrUnknown("gbw_hz", a.GBWHz)
	c.positiveOrUnknown("slew_v_per_s", a.SlewVs)
	switch a.RailToRail {
	case "", RailIn, RailOut, RailInOut:
	default:
		c.fail("rail_to_rail", "%q is not %q, %q, %q or empty", a.RailToRail, RailIn, RailOut, RailInOut)
	}
	if a.Network != nil {
		if a.Type != MatchedAmp {
			c.fail("network", "only an amplifier of type %q has a network of matched resistors inside", MatchedAmp)
		} else {
			c.checkMatched(a.Network)
		}
	}
	for _, name := range a.TypicalOnly {
		if !amplifierFigure(name) {
			c.fail("typical_only", "%q is not the JSON name of an amplifier figure (e.g. \"vos_drift_v_per_k\")", name)
		}
	}
	c.offer(&a.Offer)
	return c.err
}

// Bounds of a reference's rated temperature range, °C: below absolute zero
// or above a solder reflow peak is a slip, not a rating.
const (
	refTempLowestC  = -273.15
	refTempHighestC = 300
)

func checkReference(row int, r *Reference) error {
	c := checker{kind: KindReference, row: row, part: r.Part}
	c.partNumber(r.Part)
	c.text("maker", r.Maker)
	switch r.Topology {
	case "", RefSeries, RefShunt:
	default:
		c.fail("topology", "%q is not %q, %q or empty", r.Topology, RefSeries, RefShunt)
	}
	c.positive("output_v", r.OutputV)
	c.fraction("tolerance", r.Tolerance)
	c.nonNegative("drift_ppm", r.DriftPPM)
	c.finite("temp_min_c", r.TempMinC)
	c.finite("temp_max_c", r.TempMaxC)
	switch {
	case Known(r.TempMinC) != Known(r.TempMaxC):
		c.fail("temp_min_c", "give both ends of the rated temperature range, or neither")
	case Known(r.TempMinC) && !(r.TempMinC < r.TempMaxC):
		c.fail("temp_max_c", "%s is not above temp_min_c %s", formatFloat(r.TempMaxC), formatFloat(r.TempMinC))
	case Known(r.TempMinC) && (r.TempMinC < refTempLowestC || r.TempMaxC > refTempHighestC):
		c.fail("temp_min_c", "range %s..%s °C is outside %g..%g °C", formatFloat(r.TempMinC), formatFloat(r.TempMaxC),
			refTempLowestC, float64(refTempHighestC))
	}
	for _, f := range []struct {
		name string
		v    float64
	}{{"noise_pp_v", r.NoisePPV}, {"noise_v_per_rthz", r.NoiseVHz}, {"dropout_v", r.DropoutV},
		{"load_source_a", r.LoadSourceA}, {"load_sink_a", r.LoadSinkA}, {"output_ohm", r.OutputOhm},
		{"long_term_ppm", r.LongTermPPM}, {"iq_a", r.IqA}} {
		c.nonNegative(f.name, f.v)
	}
	c.positiveOrUnknown("supply_min_v", r.SupplyMinV)
	c.positiveOrUnknown("supply_max_v", r.SupplyMaxV)
	if c.err == nil && Known(r.SupplyMinV) && Known(r.SupplyMaxV) && r.SupplyMaxV < r.SupplyMinV {
		c.fail("supply_max_v", "%s is below supply_min_v %s", formatFloat(r.SupplyMaxV), formatFloat(r.SupplyMinV))
	}
	c.offer(&r.Offer)
	return c.err
}

// amplifierFigure reports whether name is the JSON name of a figure column
// of amplifiers.
func amplifierFigure(name string) bool {
	for _, c := range amplifierTable.cols {
		if c.figure && c.kind == colFloat && c.name == name {
			return true
		}
	}
	return name == "gains"
}

// Validate checks every part of the snapshot (sorting price breaks by
// quantity) and that no part number appears twice within a kind. The first
// problem is returned, wrapping ErrInvalid.
func (s *Snapshot) Validate() error {
	if err := checkAll(KindSeries, s.ResistorSeries, checkSeries, func(p *ResistorSeries) string { return p.Part }); err != nil {
		return err
	}
	if err := checkAll(KindResistor, s.Resistors, checkResistor, func(p *Resistor) string { return p.Part }); err != nil {
		return err
	}
	if err := checkAll(KindNetwork, s.Networks, checkNetwork, func(p *Network) string { return p.Part }); err != nil {
		return err
	}
	if err := checkAll(KindAmplifier, s.Amplifiers, checkAmplifier, func(p *Amplifier) string { return p.Part }); err != nil {
		return err
	}
	return checkAll(KindReference, s.References, checkReference, func(p *Reference) string { return p.Part })
}

func checkAll[T any](kind Kind, parts []T, check func(int, *T) error, part func(*T) string) error {
	seen := make(map[string]int, len(parts))
	for i := range parts {
		if err := check(i, &parts[i]); err != nil {
			return err
		}
		p := part(&parts[i])
		if j, dup := seen[p]; dup {
			return partError(kind, i, p, "part", "appears twice in the batch (rows %d and %d): keep one", j+1, i+1)
		}
		seen[p] = i
	}
	return nil
}

// currencyCode reports whether s has the shape of an ISO 4217 code: three
// letters A-Z.
func currencyCode(s string) bool {
	if len(s) != 3 {
		return false
	}
	for i := range 3 {
		if s[i] < 'A' || s[i] > 'Z' {
			return false
		}
	}
	return true
}
