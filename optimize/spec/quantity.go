package spec

import (
	"fmt"
	"math"
	"strconv"
	"strings"
)

// unit describes one kind of quantity as a spec writes it: the symbols it
// may carry, whether a bare number is accepted, the factor that takes the
// written number to SI, and a valid form for error messages.
type unit struct {
	what    string   // "voltage"
	symbols []string // accepted suffixes after the SI prefix, lower case
	bare    bool     // a bare number is read in the base unit
	prefix  bool     // SI prefixes allowed
	example string
}

// Quantities used in spec and design files.
var (
	uVolt      = unit{"voltage", []string{"v"}, false, true, "10V, 500mV or ±10V"}
	uAmp       = unit{"current", []string{"a"}, false, true, "5A, 2nA or 1.5uA"}
	uOhm       = unit{"resistance", []string{"ω", "Ω", "ohm", "ohms", "r"}, true, true, "10k, 4.99k or 100"}
	uHertz     = unit{"frequency", []string{"hz"}, false, true, "10kHz or 1MHz"}
	uWatt      = unit{"power", []string{"w"}, false, true, "0.125W or 125mW"}
	uDB        = unit{"level in dB", []string{"db"}, false, false, "80dB"}
	uVPerK     = unit{"drift", []string{"v/k", "v/°c", "v/c"}, false, true, "10uV/K"}
	uNoise     = unit{"noise density", []string{"v/√hz", "v/rthz", "v/sqrt(hz)"}, false, true, "20nV/rtHz"}
	uCurNoise  = unit{"current noise density", []string{"a/√hz", "a/rthz", "a/sqrt(hz)"}, false, true, "0.5pA/rtHz"}
	uCelsius   = unit{"temperature", []string{"c", "°c"}, false, false, "25C or -40C"}
	uGain      = unit{"gain", []string{"v/v", "x"}, true, false, "10, -2 or 0.25V/V"}
	uTransR    = unit{"gain", []string{"v/a", "ω", "ohm"}, true, true, "0.5V/A"}
	uKPerW     = unit{"thermal resistance", []string{"k/w", "°c/w", "c/w"}, true, false, "250K/W"}
	uPlain     = unit{"number", nil, true, false, "3"}
	siPrefixes = map[string]float64{"f": 1e-15, "p": 1e-12, "n": 1e-9, "u": 1e-6, "µ": 1e-6, "μ": 1e-6, "m": 1e-3, "k": 1e3, "K": 1e3, "M": 1e6, "G": 1e9}
)

// quantityError describes text that is not a quantity of the kind wanted.
type quantityError struct {
	input  string
	u      unit
	reason string
}

func (e *quantityError) Error() string {
	return fmt.Sprintf("%q %s; write it like %s", e.input, e.reason, e.u.example)
}

// parseQuantity reads one value such as "10k", "500mV", "80dB" into SI.
func parseQuantity(s string, u unit) (float64, error) {
	t := strings.TrimSpace(s)
	t = strings.ReplaceAll(t, " ", "")
	t = strings.ReplaceAll(t, "\u2212", "-")
	if t == "" {
		return 0, &quantityError{s, u, "is empty"}
	}
	// Split the leading number.
	i := 0
	for i < len(t) && strings.ContainsRune("+-0123456789.eE", rune(t[i])) {
		// Stop at an 'e' or 'E' not followed by a digit or sign: it is not an exponent.
		if (t[i] == 'e' || t[i] == 'E') && (i+1 >= len(t) || !strings.ContainsRune("+-0123456789", rune(t[i+1]))) {
			break
		}
		i++
	}
	num, rest := t[:i], t[i:]
	v, err := strconv.ParseFloat(num, 64)
	if err != nil || math.IsInf(v, 0) || math.IsNaN(v) {
		return 0, &quantityError{s, u, "is not a number with a unit"}
	}
	if rest == "" {
		if !u.bare {
			return 0, &quantityError{s, u, "has no unit"}
		}
		return v, nil
	}
	lower := strings.ToLower(rest)
	for _, sym := range u.symbols {
		if lower == sym {
			return v, nil
		}
	}
	if u.prefix {
		for p, f := range siPrefixes {
			if !strings.HasPrefix(rest, p) {
				continue
			}
			after := strings.ToLower(rest[len(p):])
			if after == "" && u.bare {
				return v * f, nil
			}
			for _, sym := range u.symbols {
				if after == sym {
					return v * f, nil
				}
			}
		}
	}
	return 0, &quantityError{s, u, "is not a " + u.what}
}

// parseFraction reads "0.05%", "500ppm" or "±0.1%" as a fraction. A bare
// number is refused: 0.1 could mean 10 % or 0.1 %.
func parseFraction(s string) (float64, error) {
	u := unit{"fraction", nil, false, false, "0.05%, ±0.1% or 500ppm"}
	t := strings.TrimPrefix(strings.TrimSpace(s), "±")
	t = strings.ReplaceAll(t, " ", "")
	for suf, div := range map[string]float64{"%": 1e2, "ppm": 1e6} {
		if strings.HasSuffix(strings.ToLower(t), suf) {
			v, err := strconv.ParseFloat(t[:len(t)-len(suf)], 64)
			if err != nil {
				return 0, &quantityError{s, u, "is not a number"}
			}
			return v / div, nil
		}
	}
	if _, err := strconv.ParseFloat(t, 64); err == nil {
		return 0, &quantityError{s, u, "has no unit"}
	}
	return 0, &quantityError{s, u, "is not a fraction"}
}

// parsePPMPerK reads a temperature coefficient such as "25ppm/K" or
// "±5 ppm/°C" and returns it per kelvin as a fraction (25e-6).
func parsePPMPerK(s string) (float64, error) {
	u := unit{"temperature coefficient", nil, false, false, "25ppm/K or ±5ppm/°C"}
	t := strings.ToLower(strings.ReplaceAll(strings.TrimPrefix(strings.TrimSpace(s), "±"), " ", ""))
	for _, suf := range []string{"ppm/k", "ppm/°c", "ppm/c"} {
		if strings.HasSuffix(t, suf) {
			v, err := strconv.ParseFloat(t[:len(t)-len(suf)], 64)
			if err != nil {
				return 0, &quantityError{s, u, "is not a number"}
			}
			return v / 1e6, nil
		}
	}
	if _, err := strconv.ParseFloat(t, 64); err == nil {
		return 0, &quantityError{s, u, "has no unit"}
	}
	return 0, &quantityError{s, u, "is not a temperature coefficient"}
}

// parseRange reads "±10V", "-10..10V", "0..4V" or a single "5V" (lo = hi)
// as an interval in SI. The unit may be written once at the end or on both
// ends.
func parseRange(s string, u unit) (lo, hi float64, err error) {
	t := strings.TrimSpace(s)
	if strings.HasPrefix(t, "±") || strings.HasPrefix(t, "+/-") {
		t = strings.TrimPrefix(strings.TrimPrefix(t, "±"), "+/-")
		v, err := parseQuantity(t, u)
		if err != nil {
			return 0, 0, &quantityError{s, u, "is not a ± range"}
		}
		return -math.Abs(v), math.Abs(v), nil
	}
	a, b, found := strings.Cut(t, "..")
	if !found {
		v, err := parseQuantity(t, u)
		return v, v, err
	}
	hiV, err := parseQuantity(b, u)
	if err != nil {
		return 0, 0, &quantityError{s, u, "does not end in a " + u.what}
	}
	loV, err := parseQuantity(a, u)
	if err != nil {
		// "-10..10V": the unit written once applies to both ends.
		loV, err = parseQuantity(a+unitSuffix(b), u)
		if err != nil {
			return 0, 0, &quantityError{s, u, "does not start with a " + u.what}
		}
	}
	if loV > hiV {
		return 0, 0, &quantityError{s, u, "runs from high to low"}
	}
	return loV, hiV, nil
}

// unitSuffix returns the prefix and unit after the number in s ("mV" in "500mV").
func unitSuffix(s string) string {
	t := strings.TrimSpace(s)
	i := 0
	for i < len(t) && strings.ContainsRune("+-0123456789.", rune(t[i])) {
		i++
	}
	return t[i:]
}

func pow10(x float64) float64 { return math.Pow(10, x) }
