package importers

import (
	"errors"
	"fmt"
	"math"
	"regexp"
	"strings"

	"plumb/catalog/units"
)

// cleanCell trims the spaces spreadsheets leave around a cell, including
// no-break and zero-width spaces.
func cleanCell(s string) string {
	return strings.TrimFunc(s, func(r rune) bool {
		return r == ' ' || r == '\t' || r == '\r' || r == '\n' || r == '\u00a0' || r == '\u200b' || r == '\ufeff'
	})
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
	digitCommaRE = regexp.MustCompile(`(\d),(\d)`)
	typMarkRE    = regexp.MustCompile(`(?i)\s*\(?\b(typ|typical)\b\.?\)?\s*`)
)

// quantity parses one kind of figure into SI units.
type quantity func(string) (float64, error)

// withDecimalComma rewrites "4,99k" to "4.99k" for files that write a
// decimal comma; the shared parser reads the point form.
func withDecimalComma(s string) string {
	return digitCommaRE.ReplaceAllString(s, "$1.$2")
}

// readValue prepares a cell for the shared parser: decimal comma, a unit
// from the header for a bare number ("0.5" under "Vos (mV)"), and a "typ"
// mark, which it strips and reports.
func readValue(raw, unitHint string, decimalComma bool, q quantity) (v float64, typical bool, err error) {
	v, typical, _, err = readValueHint(raw, unitHint, decimalComma, q)
	return v, typical, err
}

// readValueHint is readValue that also says when the header's unit could
// not be read with the number and the bare number was taken instead.
func readValueHint(raw, unitHint string, decimalComma bool, q quantity) (v float64, typical, hintIgnored bool, err error) {
	s := cleanCell(raw)
	if hasTyp(s) && typMarkRE.MatchString(s) {
		typical = true
		s = cleanCell(typMarkRE.ReplaceAllString(s, " "))
	}
	if decimalComma && strings.IndexByte(s, ',') >= 0 {
		s = withDecimalComma(s)
	}
	if unitHint != "" && bareNumberRE.MatchString(s) {
		if v, err = q(s + " " + unitHint); err == nil {
			return finite(raw, v, typical, false)
		}
		hintIgnored = true
	}
	v, err = q(s)
	if err != nil {
		return 0, typical, false, err
	}
	return finite(raw, v, typical, hintIgnored)
}

func finite(raw string, v float64, typical, hintIgnored bool) (float64, bool, bool, error) {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, typical, hintIgnored, fmt.Errorf("%w: %q is not a finite number", ErrBadValue, raw)
	}
	return v, typical, hintIgnored, nil
}

// Adapters for figures the shared parser reads in another form.

// parseSupply reads a supply span; "±15 V" is a 30 V span.
func parseSupply(s string) (float64, error) {
	t := strings.TrimSpace(s)
	if strings.HasPrefix(t, "±") || strings.HasPrefix(t, "+/-") {
		t = strings.TrimPrefix(strings.TrimPrefix(t, "±"), "+/-")
		v, err := units.ParseVoltage(t)
		return 2 * v, err
	}
	return units.ParseVoltage(t)
}

var perKelvinRE = regexp.MustCompile(`(?i)\s*/\s*(°\s*c|ºc|deg\s*c|k|c)\s*$`)

// parseDrift reads an offset drift "2 µV/°C" as V/K.
func parseDrift(s string) (float64, error) {
	t := perKelvinRE.ReplaceAllString(strings.TrimSpace(s), "")
	if t == strings.TrimSpace(s) && !bareNumberRE.MatchString(t) {
		return 0, fmt.Errorf("%w: offset drift %q needs a per-kelvin unit such as µV/°C", ErrBadValue, s)
	}
	return units.ParseVoltage(t)
}

var perTimeRE = regexp.MustCompile(`(?i)\s*/\s*(µs|us|μs|ms|ns|s)\s*$`)

// parseSlew reads a slew rate "0.5 V/µs" as V/s.
func parseSlew(s string) (float64, error) {
	t := strings.TrimSpace(s)
	m := perTimeRE.FindStringSubmatch(t)
	if m == nil {
		return 0, fmt.Errorf("%w: slew rate %q needs a unit such as V/µs", ErrBadValue, s)
	}
	v, err := units.ParseVoltage(strings.TrimSpace(t[:len(t)-len(m[0])]))
	if err != nil {
		return 0, err
	}
	per := map[string]float64{"µs": 1e-6, "us": 1e-6, "μs": 1e-6, "ms": 1e-3, "ns": 1e-9, "s": 1}[strings.ToLower(m[1])]
	return v / per, nil
}

var (
	vPerMVRE = regexp.MustCompile(`(?i)^\s*([0-9.eE+-]+)\s*v\s*/\s*(m|µ|u|μ)?v\s*$`)
)

// parseGain reads an open-loop gain in dB ("120 dB") or V/V, V/mV, V/µV,
// and returns V/V. A dB figure is 10^(dB/20) (definition of the decibel
// for a voltage ratio).
func parseGain(s string) (float64, error) {
	t := strings.TrimSpace(s)
	if strings.Contains(strings.ToLower(t), "db") {
		db, err := units.ParseDB(t)
		if err != nil {
			return 0, err
		}
		return math.Pow(10, db/20), nil
	}
	if m := vPerMVRE.FindStringSubmatch(t); m != nil {
		var v float64
		if _, err := fmt.Sscan(m[1], &v); err != nil {
			return 0, fmt.Errorf("%w: open-loop gain %q", ErrBadValue, s)
		}
		switch strings.ToLower(m[2]) {
		case "m":
			v *= 1e3
		case "µ", "u", "μ":
			v *= 1e6
		}
		return v, nil
	}
	return 0, fmt.Errorf("%w: open-loop gain %q needs a unit: dB, V/V or V/mV", ErrBadValue, s)
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

// parseCount reads a count with thousands separators ("12,345",
// "12 345", and the decimal-comma locales' "12.345"), a trailing "+" or
// "pcs" dropped.
func parseCount(s string) (float64, error) {
	t := strings.TrimSpace(s)
	if t != "" && (t[len(t)-1] == '+' || t[len(t)-1] > '9' || t[len(t)-1] == '\'') {
		t = strings.TrimSpace(strings.TrimSuffix(strings.TrimSuffix(strings.TrimSpace(strings.TrimSuffix(strings.ToLower(t), "pcs")), "+"), "'"))
	}
	if strings.IndexByte(t, '.') >= 0 && dotThousandsRE.MatchString(t) {
		t = strings.ReplaceAll(t, ".", "")
	}
	if strings.ContainsAny(t, "\u00a0\u202f'") {
		t = countSpaces.Replace(t)
	}
	n, err := units.ParseCount(t)
	return float64(n), err
}

var countSpaces = strings.NewReplacer("\u00a0", " ", "\u202f", " ", "'", ",")

var dotThousandsRE = regexp.MustCompile(`^\d{1,3}(\.\d{3})+$`)

// parseElements reads a network's element count.
func parseElements(s string) (float64, error) { return parseCount(s) }

// railToRail reads a rail-to-rail column: which of input and output reach
// the rails.
func railToRail(s string) (in, out bool, err error) {
	t := strings.ToLower(cleanCell(s))
	switch t {
	case "yes", "y", "true", "rrio", "in/out", "input/output", "both", "i/o", "rri/o", "in and out", "rail-to-rail in/out":
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
