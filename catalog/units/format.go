package units

import (
	"math"
	"strconv"
	"strings"
)

// digits returns |v| rounded to n significant figures (n = 0: the fewest
// that read back exactly) as a digit string d and exponent e, so that
// |v| ≈ d[0].d[1:] × 10^e. v must be finite and not zero.
func digits(v float64, n int) (string, int) {
	s := strconv.FormatFloat(math.Abs(v), 'e', n-1, 64)
	i := strings.IndexByte(s, 'e')
	e, _ := strconv.Atoi(s[i+1:])
	return strings.Replace(s[:i], ".", "", 1), e
}

// place writes the digit string d with the decimal point after the first
// point digits (padding with zeros either side), and drops trailing zeros
// of the fraction.
func place(d string, point int) string {
	var b strings.Builder
	switch {
	case point <= 0:
		b.WriteString("0.")
		b.WriteString(strings.Repeat("0", -point))
		b.WriteString(d)
	case point >= len(d):
		b.WriteString(d)
		b.WriteString(strings.Repeat("0", point-len(d)))
	default:
		b.WriteString(d[:point])
		b.WriteByte('.')
		b.WriteString(d[point:])
	}
	s := b.String()
	if strings.IndexByte(s, '.') >= 0 {
		s = strings.TrimRight(s, "0")
		s = strings.TrimSuffix(s, ".")
	}
	return s
}

func sign(v float64) string {
	if v < 0 {
		return "-"
	}
	return ""
}

// ohmPrefixes are the prefixes FormatOhms uses, by thousands.
var ohmPrefixes = [...]string{"", "k", "M", "G"}

// FormatOhms writes a resistance in the trade's engineering notation with up
// to six significant figures and no trailing zeros: 4990 is "4.99k",
// 10000 "10k", 100 "100", 49.9 "49.9", 2.2e6 "2.2M", and a computed or
// inline value keeps its digits (19047.6 is "19.0476k", not "19k"). Values below 1 Ω are
// written as plain decimals ("0.1", "0.05"), since "m" is easily misread as
// "M"; values beyond the G range or below 1e-6 Ω use an exponent. The result
// reads back with ParseResistance.
func FormatOhms(v float64) string {
	if v == 0 {
		return "0"
	}
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return strconv.FormatFloat(v, 'g', -1, 64)
	}
	d, e := digits(v, 6)
	switch {
	case e < -6 || e >= 12:
		return sign(v) + place(d, 1) + "e" + strconv.Itoa(e)
	case e < 0:
		return sign(v) + place(d, e+1)
	}
	p := e / 3
	return sign(v) + place(d, e-3*p+1) + ohmPrefixes[p]
}

// siPrefixes are the prefixes Format uses, from 1e-15 by thousands.
var siPrefixes = [...]string{"f", "p", "n", "µ", "m", "", "k", "M", "G"}

// Format writes v in engineering notation with an SI prefix (f to G) and
// the unit, up to four significant figures without trailing zeros:
// Format(2.5e-9, "V/√Hz") is "2.5 nV/√Hz", Format(1e-3, "V") is "1 mV".
// With unit "" no space is written ("4.7k"). Values outside the prefix
// range use an exponent ("1.5e-18 A").
func Format(v float64, unit string) string { return formatSI(v, unit, 4) }

// FormatSlewRate writes a slew rate given in V/s in the datasheet's V/µs,
// with an SI prefix where it is small: 6e6 is "6 V/µs", 5e5 "500 mV/µs".
// ParseSlewRate reads it back.
func FormatSlewRate(v float64) string { return formatSI(v*1e-6, "V/µs", 4) }

// FormatExact is Format with all the digits float64 needs to be read back
// exactly (the shortest that do, as strconv gives them): FormatExact(1e-5,
// "V") is "10 µV", FormatExact(1.2345678e-9, "A") "1.2345678 nA". Values
// outside the prefix range use an exponent. The parsers read the result back
// to the same float64, for units that take SI prefixes.
func FormatExact(v float64, unit string) string { return formatSI(v, unit, 0) }

// formatSI writes v with an SI prefix and n significant figures (0: the
// shortest that read back exactly).
func formatSI(v float64, unit string, n int) string {
	sp := " "
	if unit == "" {
		sp = ""
	}
	if v == 0 {
		return "0" + sp + unit
	}
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return strconv.FormatFloat(v, 'g', -1, 64) + sp + unit
	}
	d, e := digits(v, n)
	if e < -15 || e >= 12 {
		return sign(v) + place(d, 1) + "e" + strconv.Itoa(e) + sp + unit
	}
	p := floorDiv(e, 3)
	return sign(v) + place(d, e-3*p+1) + sp + siPrefixes[p+5] + unit
}

func floorDiv(a, b int) int {
	q := a / b
	if a%b != 0 && (a < 0) != (b < 0) {
		q--
	}
	return q
}

// plain writes v to four significant figures as a plain decimal, shifted by
// 10^shift, falling back to an exponent far from 1.
func plain(v float64, shift int) string {
	if v == 0 {
		return "0"
	}
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return strconv.FormatFloat(v, 'g', -1, 64)
	}
	d, e := digits(v, 4)
	e += shift
	if e < -9 || e > 9 {
		return sign(v) + place(d, 1) + "e" + strconv.Itoa(e)
	}
	return sign(v) + place(d, e+1)
}

// FormatPercent writes a fraction as a percentage, up to four significant
// figures: 0.001 is "0.1%", 0.0005 "0.05%", 1e-4 "0.01%".
func FormatPercent(f float64) string { return plain(f, 2) + "%" }

// FormatPPM writes a temperature coefficient given in ppm/K: 25 is
// "25 ppm/K".
func FormatPPM(p float64) string { return plain(p, 0) + " ppm/K" }

// DB returns a voltage (amplitude) ratio in decibels, 20·log10(ratio)
// (IEC 60027-3 field quantity level).
func DB(ratio float64) float64 { return 20 * math.Log10(ratio) }

// FromDB returns the amplitude ratio of a level in decibels, 10^(db/20).
func FromDB(db float64) float64 { return math.Pow(10, db/20) }
