package importers

import (
	"fmt"
	"math"
	"regexp"
	"strings"

	"plumb/catalog"
	"plumb/catalog/units"
)

var (
	// supplySepRE joins the two ends of a supply range in one cell: "to",
	// "~", "..", "…", an en or em dash.
	supplySepRE = regexp.MustCompile(`(?i)\s*(?:\bto\b|~|\.\.\.?|…|–|—)\s*`)
	// supplyDashRE is a plain hyphen between two figures, "4.5-36V": no
	// supply end is negative, so the hyphen cannot be a minus sign there.
	supplyDashRE = regexp.MustCompile(`(?i)^([±+/\-]*\s*\d[\d.]*\s*[a-zµ]*)\s*-\s*(\d.*)$`)
)

// parseSupplyRange reads a supply range written in one cell as the total
// span between the rails at each end, V: "2.7 V to 36 V" is 2.7..36,
// "3V~5.5V" 3..5.5, "4.5-36V" 4.5..36, and a split-supply range
// "±1.35V ~ ±18V" is 2.7..36 (a ±V supply spans 2V from rail to rail, the
// way single-supply figures count it; common practice). A unit written
// once applies to both ends; a bare number takes the header's unit, else
// volts. A parenthesised second form, "2.7 V to 36 V (±1.35 V to ±18 V)",
// must agree with the first.
func parseSupplyRange(s, hint string, decimalComma bool) (lo, hi float64, err error) {
	t := cleanCell(s)
	if decimalComma {
		t = units.FromDecimalComma(t)
	}
	main, alt := t, ""
	if i := strings.IndexByte(t, '('); i > 0 && strings.HasSuffix(t, ")") {
		main, alt = strings.TrimSpace(t[:i]), t[i+1:len(t)-1]
	}
	if lo, hi, err = supplyEnds(main, hint); err != nil {
		return 0, 0, fmt.Errorf("%w: supply range %q: %v; write it like \"2.7 V to 36 V\" or \"±1.35 V to ±18 V\"", ErrBadValue, s, err)
	}
	if alt != "" {
		if alo, ahi, aerr := supplyEnds(alt, hint); aerr == nil && !(closeTo(alo, lo) && closeTo(ahi, hi)) {
			return 0, 0, fmt.Errorf("%w: supply range %q: %s and %s spans (%g V to %g V against %g V to %g V) disagree; keep one",
				ErrBadValue, s, main, alt, lo, hi, alo, ahi)
		}
	}
	return lo, hi, nil
}

// supplyEnds reads "LO SEP HI" as total spans.
func supplyEnds(t, hint string) (lo, hi float64, err error) {
	ends := supplySepRE.Split(strings.TrimSpace(t), -1)
	if len(ends) == 1 {
		if m := supplyDashRE.FindStringSubmatch(strings.TrimSpace(t)); m != nil {
			ends = []string{m[1], m[2]}
		}
	}
	if len(ends) != 2 || strings.TrimSpace(ends[0]) == "" || strings.TrimSpace(ends[1]) == "" {
		return 0, 0, fmt.Errorf("give the lowest and highest supply joined by \"to\" or \"~\"")
	}
	unit := hint
	if unit == "" {
		unit = "V"
	}
	var split [2]bool
	var v [2]float64
	for i, e := range ends {
		e = strings.TrimSpace(e)
		if rest, ok := cutPlusMinus(e); ok {
			split[i], e = true, rest
		}
		if bareNumberRE.MatchString(e) {
			e += " " + unit
		}
		if v[i], err = units.ParseVoltage(e); err != nil {
			return 0, 0, fmt.Errorf("%s", unitErr(err))
		}
		if !(v[i] > 0) || math.IsInf(v[i], 0) {
			return 0, 0, fmt.Errorf("a supply of %g V: both ends must be above zero", v[i])
		}
		if split[i] {
			v[i] *= 2
		}
	}
	if split[0] != split[1] {
		return 0, 0, fmt.Errorf("one end is a split supply (±) and the other is not; write ± at both ends, or neither for the total span")
	}
	if !(v[0] < v[1]) {
		return 0, 0, fmt.Errorf("the lowest supply %g V is not below the highest %g V", v[0], v[1])
	}
	return v[0], v[1], nil
}

// cutPlusMinus removes a leading "±", "+/-" or "+-" and reports whether
// there was one.
func cutPlusMinus(s string) (string, bool) {
	for _, p := range []string{"±", "+/-", "+-"} {
		if rest, ok := strings.CutPrefix(s, p); ok {
			return strings.TrimSpace(rest), true
		}
	}
	return s, false
}

// supplyRange reads the supply range of a part (an amplifier's span
// between its rails, a series reference's input voltage): one cell
// (FieldSupplyRange) or the two columns FieldSupplyMin and FieldSupplyMax.
// Each bound is catalog.Unknown() when not given; given reports either.
func (r *rowReader) supplyRange(lo, hi *float64) (given bool, err error) {
	*lo, *hi = catalog.Unknown(), catalog.Unknown()
	if s, ok := r.raw(FieldSupplyRange); ok {
		a, b, err := parseSupplyRange(s, r.unitHint(FieldSupplyRange), r.decimalComma)
		if err != nil {
			return false, r.skip(FieldSupplyRange, s, err)
		}
		*lo, *hi = a, b
		return true, nil
	}
	var failed error
	for _, f := range []struct {
		field Field
		dst   *float64
	}{{FieldSupplyMin, lo}, {FieldSupplyMax, hi}} {
		v, ok, _, err := r.value(f.field, parseSupply)
		if err != nil {
			failed = err
			continue
		}
		if ok {
			*f.dst = v
			given = true
		}
	}
	return given, failed
}
