package units

import (
	"math"
	"strings"
)

var ohmSymbols = []symbol{{"\u03a9", 0, ""}, {"\u2126", 0, ""}, {"ohm", 0, ""}, {"ohms", 0, ""}, {"R", 0, ""}} // Greek omega, ohm sign

var kelvinRefusal = []refusal{
	{"K", "kelvin is not accepted here: give the temperature in °C"},
	{"°K", "kelvin is not accepted here: give the temperature in °C"},
	{"°F", "Fahrenheit is not accepted: give the temperature in °C"},
	{"F", "Fahrenheit is not accepted: give the temperature in °C"},
}

var (
	resistanceKind = kind{
		name: qResistance, symbols: ohmSymbols, bare: true,
		prefixes: pMilli | pKilo | pUpperK | pMega | pGiga | pMeg,
		needUnit: "Ω, ohm or R", strict: "4.99kΩ, 4k99, 10R or 100 ohm",
	}
	fractionKind = kind{
		name: qFraction, symbols: []symbol{{"%", -2, ""}, {"ppm", -6, ""}},
		bare: true, negative: true, pm: true,
		needUnit: "% or ppm", strict: "0.1%, ±0.05 % or 1000ppm",
	}
	percentKind = kind{
		name: qPercent, symbols: []symbol{{"%", -2, ""}, {"ppm", -6, ""}},
		bare: true, bareExp: -2, negative: true, pm: true,
	}
	tempcoKind = kind{
		name: qTempco,
		symbols: []symbol{
			{"ppm/K", 0, ""}, {"ppm/°C", 0, ""}, {"ppm/ºC", 0, ""}, {"ppm/˚C", 0, ""}, {"ppm/C", 0, ""},
			{"ppm/℃", 0, ""}, {"ppm/degC", 0, ""}, {"ppm/deg", 0, ""},
			{"ppm", 0, "ppm alone does not say per kelvin; a tolerance is also given in ppm"},
			{"/K", 6, ""}, {"/°C", 6, ""}, {"/ºC", 6, ""}, {"/˚C", 6, ""}, {"/C", 6, ""}, {"/℃", 6, ""},
			{"%/K", 4, ""}, {"%/°C", 4, ""}, {"%/C", 4, ""},
		},
		bare: true, negative: true, pm: true,
		needUnit: "ppm/K or ppm/°C", strict: "25ppm/K, ±25 ppm/°C or 5e-6/K",
	}
	powerKind = kind{
		name: qPower, symbols: []symbol{{"W", 0, ""}},
		bare: true, prefixes: pGeneral,
		needUnit: "W or mW", strict: "0.125W, 125mW or 1/8W",
	}
	voltageKind = kind{
		name: qVoltage, symbols: []symbol{{"V", 0, ""}},
		bare: true, prefixes: pGeneral, negative: true,
		needUnit: "V, mV or µV", strict: "15V, 500mV or -2.5 V",
	}
	currentKind = kind{
		name: qCurrent, symbols: []symbol{{"A", 0, ""}},
		prefixes: pGeneral, negative: true, needUnit: "A, mA, µA, nA, pA",
		strict: "2nA, 1.5 µA or 5A",
	}
	frequencyKind = kind{
		name: qFrequency, symbols: []symbol{{"Hz", 0, ""}},
		bare: true, prefixes: pGeneral | pUpperK,
		needUnit: "Hz, kHz or MHz", strict: "10kHz, 1.2 MHz or 100Hz",
	}
	voltageNoiseKind = kind{
		name: qVoltageNoise, symbols: noiseSymbols("V"),
		prefixes: pGeneral, needUnit: "nV/√Hz", strict: "4.5nV/√Hz or 4.5 nV/rtHz",
	}
	currentNoiseKind = kind{
		name: qCurrentNoise, symbols: noiseSymbols("A"),
		prefixes: pGeneral, needUnit: "pA/√Hz or fA/√Hz", strict: "0.5pA/√Hz or 0.5 pA/rtHz",
	}
	dbKind = kind{
		name: qDB, symbols: []symbol{{"dB", 0, ""}},
		bare: true, negative: true, needUnit: "dB", strict: "80dB or -3 dB",
	}
	temperatureKind = kind{
		name: qTemperature,
		symbols: []symbol{
			{"°C", 0, ""}, {"ºC", 0, ""}, {"˚C", 0, ""}, {"℃", 0, ""}, {"C", 0, ""}, {"degC", 0, ""}, {"deg", 0, ""},
		},
		bare: true, negative: true, refuse: kelvinRefusal,
		needUnit: "°C or C", strict: "25C, -40 °C or 85°C",
	}
)

// noiseSymbols lists the ways of writing unit/√Hz.
func noiseSymbols(u string) []symbol {
	var out []symbol
	for _, d := range []string{"√Hz", "√(Hz)", "rtHz", "rt(Hz)", "sqrtHz", "sqrt(Hz)", "Hz^0.5", "Hz^1/2", "Hz^(1/2)", "Hz½"} {
		out = append(out, symbol{u + "/" + d, 0, ""})
	}
	return out
}

// ParseResistance reads a resistance in ohm. It accepts a plain number
// ("470", "0.05"), an SI prefix with or without a unit ("4.99k", "2.2 MOhm",
// "10 kΩ", "10 kOhms", "50 mΩ"), the trade's letter-for-decimal-point form
// ("4k99", "4K99", "10R", "0R1", "R47", "1M5") and a decimal comma where it is
// unambiguous ("1,5k").
//
// Case of the prefix matters as in SI: "1m" and "1 mohm" are 1e-3 Ω,
// "1M" is 1e6 Ω. "K" is read as kilo. Negative values are refused.
func ParseResistance(s string) (float64, error) {
	if v, reason, ok := readInfix(s); ok {
		if reason != "" {
			return 0, newError(s, qResistance, reason)
		}
		return v, nil
	}
	return resistanceKind.parse(s)
}

// readInfix reads the letter-for-decimal-point form "4k99", "0R1", "R47",
// "1M5" (digits, one of R r m k K M G, digits, then optionally an ohm
// symbol; the leading digits may be left out before R).
// ok is false when s is not of that form.
func readInfix(s string) (v float64, reason string, ok bool) {
	t := trimSpaces(s)
	neg := false
	if strings.HasPrefix(t, "-") || strings.HasPrefix(t, "−") {
		neg = true
		t = strings.TrimPrefix(strings.TrimPrefix(t, "-"), "−")
	}
	i := 0
	for i < len(t) && isDigit(t[i]) {
		i++
	}
	if i+1 >= len(t) || !isDigit(t[i+1]) || (i == 0 && t[0] != 'R' && t[0] != 'r') {
		return 0, "", false
	}
	var exp int
	switch t[i] {
	case 'R', 'r':
		exp = 0
	case 'm':
		exp = -3
	case 'k', 'K':
		exp = 3
	case 'M':
		exp = 6
	case 'G':
		exp = 9
	default:
		return 0, "", false
	}
	j := i + 1
	for j < len(t) && isDigit(t[j]) {
		j++
	}
	if rest := skipSpaces(t[j:]); rest != "" {
		matched := false
		for _, sym := range ohmSymbols[:4] { // not "R": "4k7R" names the point twice
			if foldEq(rest, sym.text) {
				matched = true
			}
		}
		if !matched {
			return 0, "", false
		}
	}
	if neg {
		return 0, "a resistance cannot be negative", true
	}
	n := number{intDigits: t[:i], fracDigits: t[i+1 : j]}
	v, reason = n.float(exp)
	return v, reason, true
}

// ParseFraction reads a relative figure as a fraction: "0.1%", "±1 %",
// "+/-0.05%", "± 0.01 %", "1000ppm" and a bare number, which is read as a
// fraction ("0.001" is 0.1 %). A leading ± is dropped (tolerances are
// symmetric); a plain sign is kept.
func ParseFraction(s string) (float64, error) { return fractionKind.parse(s) }

// ParsePercent is ParseFraction for columns given in percent: a bare number
// is read as percent ("0.1" is 0.001). "%" and "ppm" are read as written.
func ParsePercent(s string) (float64, error) { return percentKind.parse(s) }

// ParsePPM reads a temperature coefficient in ppm/K: "±25ppm/°C",
// "25 ppm/K", "25ppm/C", "25 ppm", "25ppm/ºC", a bare number (read as
// ppm/K, "±25") and a per-kelvin figure such as "5e-6/K" (5 ppm/K). A
// kelvin and a degree Celsius are the same step, so ppm/°C equals ppm/K.
func ParsePPM(s string) (float64, error) { return tempcoKind.parse(s) }

// powerAgreement is the relative difference allowed between the two forms of
// "0.063W, 1/16W": catalogs round the decimal form (1/16 W is 0.0625 W).
const powerAgreement = 0.02

// ParsePower reads a power in W: "0.125W", "125mW", "1/8W", "1/10 W", a
// bare number ("0.1") and both forms together ("0.125W, 1/8W"), which must
// agree within 2 % (the decimal form is often rounded); the first is then
// returned.
func ParsePower(s string) (float64, error) { return parsePower(s, false) }

func parsePower(s string, strict bool) (float64, error) {
	t := trimSpaces(s)
	if isBlank(t) {
		return 0, powerKind.fail(s, "no value given", stBlank, strict)
	}
	a, b, pair := splitPowerPair(t)
	if !pair {
		a = t
	}
	va, reason, st := readPower(a, strict)
	if st == stOK && pair {
		var vb float64
		vb, reason, st = readPower(b, strict)
		if st == stOK && math.Abs(va-vb) > powerAgreement*math.Max(va, vb) {
			reason, st = "the two ratings "+trimSpaces(a)+" and "+trimSpaces(b)+" disagree", stBad
		}
	}
	if st != stOK {
		return 0, powerKind.fail(s, reason, st, strict)
	}
	return va, nil
}

// splitPowerPair splits "0.125W, 1/8W" at the comma or semicolon that
// follows a W.
func splitPowerPair(t string) (a, b string, ok bool) {
	i := strings.IndexAny(t, ",;")
	if i < 0 {
		return "", "", false
	}
	a = trimSpaces(t[:i])
	if !strings.HasSuffix(a, "W") && !strings.HasSuffix(a, "w") {
		return "", "", false
	}
	return a, t[i+1:], true
}

// readPower reads one power rating, decimal or fraction of a watt.
func readPower(t string, strict bool) (float64, string, status) {
	t = trimSpaces(t)
	if isBlank(t) {
		return 0, "one of the two ratings is missing", stBad
	}
	num, rest, reason := readNumber(t)
	if reason == "" && strings.HasPrefix(rest, "/") && num.fracDigits == "" && !num.hasExp {
		den, rest2, reason := readNumber(rest[1:])
		if reason != "" || den.neg || den.fracDigits != "" || den.hasExp || strings.HasPrefix(rest[1:], "+") {
			return 0, "expected a fraction of whole numbers such as 1/8W", stBad
		}
		if num.neg {
			return 0, "a power cannot be negative", stBad
		}
		u := skipSpaces(rest2)
		if u == "" && strict {
			return 0, "a unit is needed (" + powerKind.needUnit + ")", stNoUnit
		}
		if u != "" && !foldEq(u, "W") {
			return 0, "a fraction is read in W only, e.g. 1/8W", stBad
		}
		a, _ := num.float(0)
		b, reason := den.float(0)
		if reason != "" {
			return 0, reason, stBad
		}
		if b == 0 {
			return 0, "division by zero", stBad
		}
		return a / b, "", stOK
	}
	return powerKind.read(t, mode{strict: strict})
}

// ParseVoltage reads a voltage in V: "15V", "-5 V", "500mV", "2.5" (bare:
// V). "±15V" is a pair, not one voltage, and is refused; read it with
// ParseSymmetric.
func ParseVoltage(s string) (float64, error) { return voltageKind.parse(s) }

// ParseCurrent reads a current in A: "1nA", "2 pA", "5A", "1.5 uA",
// "1.5 µA", "20 fA". The unit is required: a bare number is refused because
// currents in datasheets are given in nA or pA as often as in A.
func ParseCurrent(s string) (float64, error) { return currentKind.parse(s) }

// ParseFrequency reads a frequency in Hz: "10kHz", "1.2 MHz", "100Hz",
// "1e6" (bare: Hz). "KHz" is read as kHz.
func ParseFrequency(s string) (float64, error) { return frequencyKind.parse(s) }

// ParseVoltageNoise reads a voltage noise density in V/√Hz: "4.5nV/√Hz",
// "4.5 nV/rtHz", "4.5nV/sqrt(Hz)". The unit is required.
func ParseVoltageNoise(s string) (float64, error) { return voltageNoiseKind.parse(s) }

// ParseCurrentNoise reads a current noise density in A/√Hz: "0.5 pA/√Hz",
// "100 fA/rtHz". The unit is required.
func ParseCurrentNoise(s string) (float64, error) { return currentNoiseKind.parse(s) }

// ParseDB reads a level in decibels: "80dB", "80 dB", "80", "-3 dB".
func ParseDB(s string) (float64, error) { return dbKind.parse(s) }

// ParseTemperature reads a temperature in °C (never kelvin): "25C",
// "25 °C", "-40", "+125℃". Kelvin and Fahrenheit are refused.
func ParseTemperature(s string) (float64, error) { return temperatureKind.parse(s) }

// ParseTemperatureRange reads a temperature range in °C: "-40..85C",
// "-40 to 85 °C", "0..70", "-40…+125°C", "-40°C..85°C". lo must be below hi.
func ParseTemperatureRange(s string) (lo, hi float64, err error) {
	return parseRange(s, &temperatureKind, qTempRange, "", false)
}

// ParseRange reads a range of values in unit: "-10..10V", "0..2.5 V",
// "-5V..5V", "-5 to 5 V". Each end takes SI prefixes as ParseQuantity does;
// a unit written once, after the upper end, applies to both ("-500..500mV"
// is ±0.5 V). lo must be below hi.
func ParseRange(s string, unit string) (lo, hi float64, err error) {
	k := quantityKind(unit)
	return parseRange(s, k, "range in "+unitName(unit), "-10..10"+unit+" or 0 to 2.5 "+unit, false)
}

// rangeSeparators join the two ends of a range.
var rangeSeparators = [...]string{"..", "…", " to ", "to"}

// Reasons shared by the range readers.
const (
	reasonReversed = "the range runs from high to low: the lower end must be below the upper end"
	reasonEqual    = "the two ends are equal: the lower end must be below the upper end"
)

// parseRange reads "lo..hi" (or "lo to hi") of kind k. In strict mode each
// end needs its unit (written once after the upper end or at both ends), a
// single value v is the range v..v, "±v" is -v..v and the ends may be equal.
func parseRange(s string, k *kind, quantity, example string, strict bool) (lo, hi float64, err error) {
	st := stBad
	fail := func(reason string) (float64, float64, error) {
		return 0, 0, rangeError(s, quantity, example, reason, st)
	}
	t := trimSpaces(s)
	if isBlank(t) {
		st = stBlank
		return fail("no value given")
	}
	m := mode{strict: strict}
	if rest, ok := cutPlusMinus(t); ok && strict {
		var v float64
		var reason string
		v, reason, st = readSymmetric(rest, k, m)
		if st != stOK {
			return fail(reason)
		}
		return -v, v, nil
	}
	var a, b string
	found := false
	for _, sep := range rangeSeparators {
		if i := indexFold(t, sep); i >= 0 {
			a, b, found = t[:i], t[i+len(sep):], true
			break
		}
	}
	if !found {
		if !strict {
			return fail("expected two values joined by .. or to")
		}
		var v float64
		var reason string
		v, reason, st = k.read(t, m)
		if st != stOK {
			return fail(reason)
		}
		return v, v, nil
	}
	if trimSpaces(a) == "" || trimSpaces(b) == "" {
		return fail("one end of the range is missing")
	}
	hi, reason, st := k.read(b, m)
	if st != stOK {
		st = st.ofEnd()
		return fail("upper end: " + reason)
	}
	m.unit = unitText(b)
	lo, reason, st = k.read(a, m)
	if st != stOK {
		st = st.ofEnd()
		return fail("lower end: " + reason)
	}
	if lo > hi {
		return fail(reasonReversed)
	}
	if lo == hi && !strict {
		return fail(reasonEqual)
	}
	return lo, hi, nil
}

// rangeError builds the *Error of a range reader (outside the closure that
// calls it, so that a successful read allocates nothing).
func rangeError(s, quantity, example, reason string, st status) error {
	e := newError(s, quantity, reason)
	e.example = example
	e.err = st.sentinel()
	return e
}

// ofEnd is the status of a range with one failed end: a blank end ("1..-")
// makes a bad range, not a blank cell.
func (st status) ofEnd() status {
	if st == stBlank {
		return stBad
	}
	return st
}

// unitText returns what follows the number in an end of a range: "mV" in
// "500mV", "" for a bare number.
func unitText(end string) string {
	_, rest, reason := readNumber(trimSpaces(end))
	if reason != "" {
		return ""
	}
	return trimSpaces(rest)
}

// indexFold is strings.Index ignoring ASCII case.
func indexFold(s, sub string) int {
	for i := 0; i+len(sub) <= len(s); i++ {
		if strings.EqualFold(s[i:i+len(sub)], sub) {
			return i
		}
	}
	return -1
}

// ParseSymmetric reads a symmetric pair such as a split supply, "±15V",
// "+/-15 V", "± 2.5", and returns -v, v. The magnitude takes SI prefixes as
// ParseQuantity does and must not be negative.
func ParseSymmetric(s string, unit string) (lo, hi float64, err error) {
	quantity := "symmetric value in " + unitName(unit)
	fail := func(reason string, st status) (float64, float64, error) {
		e := newError(s, quantity, reason)
		e.example = "±15" + unit + " or +/-2.5 " + unit
		e.err = st.sentinel()
		return 0, 0, e
	}
	t := trimSpaces(s)
	if isBlank(t) {
		return fail("no value given", stBlank)
	}
	rest, ok := cutPlusMinus(t)
	if !ok {
		return fail("expected ± before the value", stBad)
	}
	v, reason, st := readSymmetric(rest, quantityKind(unit), mode{})
	if st != stOK {
		return fail(reason, st)
	}
	return -v, v, nil
}

// readSymmetric reads the magnitude after a ±.
func readSymmetric(rest string, k *kind, m mode) (float64, string, status) {
	if strings.HasPrefix(rest, "-") || strings.HasPrefix(rest, "+") || strings.HasPrefix(rest, "−") {
		return 0, "a sign after ±", stBad
	}
	v, reason, st := k.read(rest, m)
	if st == stBlank {
		return 0, "no value after ±", stBad
	}
	return v, reason, st
}

// ParseQuantity reads a number with an optional SI prefix (f p n u µ m k M G)
// and the unit symbol given (matched without regard to ASCII case and
// spaces), or no unit: ParseQuantity("2.2 mA", "A") is 0.0022. With unit ""
// only a number and an optional prefix are read.
func ParseQuantity(s string, unit string) (float64, error) {
	k := quantityKind(unit)
	v, reason, st := k.read(s, mode{})
	if st != stOK {
		e := k.fail(s, reason, st, false)
		e.example = quantityExample(unit)
		return 0, e
	}
	return v, nil
}

func quantityKind(unit string) *kind {
	k := &kind{name: "value in " + unitName(unit), bare: true, prefixes: pGeneral, negative: true}
	if unit != "" {
		k.symbols = []symbol{{unit, 0, ""}}
	}
	return k
}

func unitName(unit string) string {
	if unit == "" {
		return "plain number"
	}
	return unit
}

func quantityExample(unit string) string {
	return "2.5" + unit + ", 10 m" + unit + " or 4.7k" + unit
}

// ParseCount reads a whole count such as stock on hand: "12345", "12,345",
// "12 345", "12'345", "1.234.567" (thousands separated by commas, spaces,
// apostrophes or dots, one kind throughout, groups of three). A dot is taken
// for a thousands separator only when there are two or more of them: "12.345"
// could be a decimal and is refused. Fractions, prefixes ("1.2k") and
// negative counts are refused; "-" and other blanks give ErrBlank.
func ParseCount(s string) (int, error) {
	t := trimSpaces(s)
	if isBlank(t) {
		return 0, blankError(s, qCount)
	}
	fail := func(reason string) (int, error) { return 0, newError(s, qCount, reason) }
	if strings.HasPrefix(t, "-") || strings.HasPrefix(t, "−") {
		return fail("a count cannot be negative")
	}
	const maxCount = math.MaxInt64 / 10
	const groupsOfThree = "thousands separators must split the digits into groups of three"
	n := 0
	group := 0  // digits in the current group
	groups := 0 // groups closed by a separator
	sep := ""   // the separator in use
	for i := 0; i < len(t); {
		c := t[i]
		switch {
		case isDigit(c):
			if n > maxCount || n*10 > math.MaxInt64-int(c-'0') {
				return fail("number too large")
			}
			n = n*10 + int(c-'0')
			group++
			i++
			continue
		case c == 'k' || c == 'K' || c == 'M' || c == 'e' || c == 'E':
			return fail("a count must be a whole number of pieces, written in digits")
		}
		size, this := countSeparator(t, i)
		if size == 0 {
			return fail("unexpected character in a count")
		}
		if sep != "" && sep != this {
			return fail("mixed thousands separators")
		}
		sep = this
		if group == 0 || group > 3 || (groups > 0 && group != 3) {
			return fail(groupsOfThree)
		}
		groups++
		group = 0
		i += size
	}
	if group == 0 {
		return fail("expected digits")
	}
	if sep == "." && groups == 1 {
		return fail("a count must be a whole number of pieces, and one dot could be a decimal point")
	}
	if groups > 0 && group != 3 {
		return fail(groupsOfThree)
	}
	return n, nil
}

// countSeparator returns the byte length of the thousands separator at t[i]
// (0 if there is none) and its class: "," "." "'" (apostrophe or right
// single quotation mark U+2019) or " " (any space spaceLen knows).
func countSeparator(t string, i int) (int, string) {
	switch t[i] {
	case ',', '.', '\'':
		return 1, t[i : i+1]
	case 0xE2: // U+2019 is E2 80 99
		if i+2 < len(t) && t[i+1] == 0x80 && t[i+2] == 0x99 {
			return 3, "'"
		}
	}
	if size := spaceLen(t, i); size > 0 {
		return size, " "
	}
	return 0, ""
}
