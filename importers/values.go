package importers

import (
	"errors"
	"fmt"
	"math"
	"regexp"
	"strings"

	"plumb/catalog"
	"plumb/catalog/units"
)

// cleanCell trims the spaces spreadsheets leave around a cell, including
// no-break and zero-width spaces, and drops the apostrophe that plumb's own
// CSV files put before a cell a spreadsheet would read as a formula
// (catalog.SpreadsheetSafe), so that an export imports as it was.
func cleanCell(s string) string {
	return catalog.ReadSpreadsheetSafe(strings.TrimFunc(s, func(r rune) bool {
		return r == ' ' || r == '\t' || r == '\r' || r == '\n' || r == '\u00a0' || r == '\u200b' || r == '\ufeff'
	}))
}

// isBlank reports a cell that means "unknown": blank, "-", "—", "n/a".
func isBlank(s string) bool {
	s = cleanCell(s)
	if len(s) > 4 {
		return false
	}
	switch s {
	case "", "-", "--", "—", "–", "?":
		return true
	}
	for _, w := range []string{"n/a", "na", "nan", "tbd"} {
		if strings.EqualFold(s, w) {
			return true
		}
	}
	return false
}

// hasTyp reports whether s contains "typ" in any case, cheaply, before the
// typical-mark pattern is tried.
func hasTyp(s string) bool {
	for i := 0; i+3 <= len(s); i++ {
		if (s[i]|0x20) == 't' && (s[i+1]|0x20) == 'y' && (s[i+2]|0x20) == 'p' {
			return true
		}
	}
	return false
}

var (
	bareNumberRE = regexp.MustCompile(`^[±+-]?\s*\d+(?:[.,]\d+)?(?:[eE][+-]?\d+)?$`)
	typMarkRE    = regexp.MustCompile(`(?i)\s*\(?\b(typ|typical)\b\.?\)?\s*`)
)

// quantity parses one kind of figure into SI units.
type quantity func(string) (float64, error)

// readValue prepares a cell for the shared parser: decimal comma, a unit
// from the header for a bare number ("0.5" under "Vos (mV)"), and a "typ"
// mark, which it strips and reports.
func readValue(raw, unitHint string, decimalComma bool, q quantity) (v float64, typical bool, err error) {
	v, typical, _, err = readValueHint(raw, unitHint, decimalComma, q)
	return v, typical, err
}

// readValueHint is readValue that also says when the header's unit could
// not be read with the number and the bare number was tried instead (and,
// with an error, refused: a drift needs its unit).
func readValueHint(raw, unitHint string, decimalComma bool, q quantity) (v float64, typical, hintIgnored bool, err error) {
	s := cleanCell(raw)
	if hasTyp(s) && typMarkRE.MatchString(s) {
		typical = true
		s = cleanCell(typMarkRE.ReplaceAllString(s, " "))
	}
	if decimalComma && strings.IndexByte(s, ',') >= 0 {
		s = units.FromDecimalComma(s)
	}
	if unitHint != "" && bareNumberRE.MatchString(s) {
		if v, err = q(s + " " + unitHint); err == nil {
			return finite(raw, v, typical, false)
		}
		hintIgnored = true
	}
	v, err = q(s)
	if err != nil {
		return 0, typical, hintIgnored, err
	}
	return finite(raw, v, typical, hintIgnored)
}

func finite(raw string, v float64, typical, hintIgnored bool) (float64, bool, bool, error) {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, typical, hintIgnored, fmt.Errorf("%w: %q is not a finite number", ErrBadValue, raw)
	}
	return v, typical, hintIgnored, nil
}

// What is left to importers: a supply read as a span, the tolerance
// letters, and the marks stock columns add to a count.

// parseSupply reads a supply as the span between the rails: a split supply
// "±15 V" is -15 V to +15 V (units.ParseSymmetric), a 30 V span; a single
// figure "36 V" is read by units.ParseVoltage.
func parseSupply(s string) (float64, error) {
	if lo, hi, err := units.ParseSymmetric(s, "V"); err == nil {
		return hi - lo, nil
	}
	return units.ParseVoltage(s)
}

// toleranceLetters is the tolerance code letter of IEC 60062 (from
// memory), which approved-parts lists and part numbers often carry in place
// of a percentage.
var toleranceLetters = map[string]float64{"A": 0.0005, "B": 0.001, "C": 0.0025, "D": 0.005, "F": 0.01,
	"G": 0.02, "J": 0.05, "K": 0.10, "M": 0.20}

// parseTolerance reads a tolerance as units.ParsePercent does (a bare
// number is percent), and the IEC 60062 letter codes.
func parseTolerance(s string) (float64, error) {
	if v, ok := toleranceLetters[strings.ToUpper(strings.TrimSpace(s))]; ok {
		return v, nil
	}
	return units.ParsePercent(s)
}

// parseCount reads a count as units.ParseCount does ("12,345", "12 345",
// "12'345", "1.234.567"), with the trailing "+" or "pcs" that stock
// columns add ("1000+", "250 pcs") dropped.
func parseCount(s string) (float64, error) {
	n, err := units.ParseCount(trimCountMark(s))
	return float64(n), err
}

// parseCountDecimalComma is parseCount for files that write a decimal
// comma, where a single dot is a thousands separator ("12.345" is 12345)
// and a comma a decimal one ("1,5" is refused). It is given the cell as
// written, not already rewritten by readValue.
func parseCountDecimalComma(s string) (float64, error) {
	n, err := units.ParseCount(units.FromDecimalComma(trimCountMark(s)))
	return float64(n), err
}

// trimCountMark drops a trailing "+" or "pcs" (any case) from a count.
func trimCountMark(s string) string {
	t := strings.TrimSpace(s)
	if t == "" || t[len(t)-1] != '+' && t[len(t)-1] <= '9' {
		return t
	}
	if n := len(t) - len("pcs"); n >= 0 && strings.EqualFold(t[n:], "pcs") {
		t = strings.TrimSpace(t[:n])
	}
	return strings.TrimSpace(strings.TrimSuffix(t, "+"))
}

// railToRail reads a rail-to-rail column: which of input and output reach
// the rails.
func railToRail(s string) (in, out bool, err error) {
	t := strings.ToLower(cleanCell(s))
	switch t {
	case "yes", "y", "true", "rrio", "in/out", "input/output", "both", "i/o", "rri/o", "in and out", "rail-to-rail in/out", "in-out", "rail-to-rail", "rail to rail":
		return true, true, nil
	case "no", "n", "false", "none":
		return false, false, nil
	case "in", "input", "rri", "input only":
		return true, false, nil
	case "out", "output", "rro", "output only":
		return false, true, nil
	}
	hasIn := strings.Contains(t, "in")
	hasOut := strings.Contains(t, "out")
	if hasIn || hasOut {
		return hasIn && !strings.HasPrefix(t, "out"), hasOut, nil
	}
	return false, false, fmt.Errorf("%w: rail-to-rail %q: use yes/no, in, out or in/out", ErrBadValue, s)
}

// unitErr tells a shared-parser error from the rest for the report.
func unitErr(err error) string {
	var ue *units.Error
	if errors.As(err, &ue) {
		return ue.Error()
	}
	return err.Error()
}
