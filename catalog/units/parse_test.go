package units

import (
	"errors"
	"math"
	"strings"
	"testing"
)

// parseCase is one input for a single-value parser. err is a substring the
// error message must contain ("" for success); blank marks ErrBlank.
type parseCase struct {
	name  string
	in    string
	want  float64
	err   string
	blank bool
}

// checkParse runs cases against parse. Values are compared with a relative
// tolerance of 1e-15 (one or two ulp: the decimal was rounded once).
func checkParse(t *testing.T, quantity string, parse func(string) (float64, error), cases []parseCase) {
	t.Helper()
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			got, err := parse(tc.in)
			if tc.err != "" || tc.blank {
				checkErr(t, tc.in, quantity, err, tc.err, tc.blank)
				return
			}
			if err != nil {
				t.Fatalf("parse(%q): %v", tc.in, err)
			}
			if !close(got, tc.want, 1e-15) {
				t.Errorf("parse(%q) = %v, want %v", tc.in, got, tc.want)
			}
		})
	}
}

func close(a, b, rel float64) bool {
	if a == b {
		return true
	}
	return math.Abs(a-b) <= rel*math.Max(math.Abs(a), math.Abs(b))
}

// checkErr checks that err is an *Error that quotes the input, names the
// quantity, gives an example, and contains part.
func checkErr(t *testing.T, in, quantity string, err error, part string, blank bool) {
	t.Helper()
	if err == nil {
		t.Fatalf("parse(%q) succeeded, want an error", in)
	}
	var ue *Error
	if !errors.As(err, &ue) {
		t.Fatalf("parse(%q) error %T, want *Error", in, err)
	}
	if ue.Input != in || ue.Quantity != quantity {
		t.Errorf("Error{Input: %q, Quantity: %q}, want %q, %q", ue.Input, ue.Quantity, in, quantity)
	}
	msg := err.Error()
	if !strings.HasPrefix(msg, "units: cannot read ") || !strings.Contains(msg, "; write it like ") {
		t.Errorf("message %q lacks the quoted input or an example", msg)
	}
	if !strings.Contains(msg, part) {
		t.Errorf("message %q does not contain %q", msg, part)
	}
	if errors.Is(err, ErrBlank) != blank {
		t.Errorf("errors.Is(%q, ErrBlank) = %v, want %v", msg, !blank, blank)
	}
}

// Resistance notation: SI prefixes (BIPM SI Brochure, 9th ed., table of
// prefixes, from memory) and the letter-as-decimal-point code of IEC 60062
// ("4K7", "R47", from memory).
func TestParseResistance(t *testing.T) {
	checkParse(t, "resistance", ParseResistance, []parseCase{
		{name: "infix k", in: "4k99", want: 4990},
		{name: "prefix k", in: "4.99k", want: 4990},
		{name: "infix upper K", in: "4K99", want: 4990},
		{name: "R as unit", in: "10R", want: 10},
		{name: "R as point", in: "0R1", want: 0.1},
		{name: "R as point 4R7", in: "4R7", want: 4.7},
		{name: "leading R", in: "R47", want: 0.47},
		{name: "leading R sense resistor", in: "R010", want: 0.01},
		{name: "rejects lone R", in: "R", err: "expected a number"},
		{name: "mega", in: "1M", want: 1e6},
		{name: "infix M", in: "1M5", want: 1.5e6},
		{name: "infix with unit", in: "4k7 Ω", want: 4700},
		{name: "bare", in: "470", want: 470},
		{name: "MOhm with space", in: "2.2 MOhm", want: 2.2e6},
		{name: "kΩ omega U+03A9", in: "10 k\u03a9", want: 1e4},
		{name: "kΩ ohm sign U+2126", in: "10 k\u2126", want: 1e4},
		{name: "kOhms", in: "10 kOhms", want: 1e4},
		{name: "kohm", in: "4.99 kohm", want: 4990},
		{name: "milliohm symbol", in: "1mΩ", want: 1e-3},
		{name: "milliohm word", in: "1 mohm", want: 1e-3},
		{name: "milliohm bare prefix", in: "1m", want: 1e-3},
		{name: "giga", in: "1G", want: 1e9},
		// SPICE writes mega as MEG in any case, since its M is milli
		// (ngspice manual, "Scale factors", from memory); the trade's
		// parts lists copy it. Here M stays mega, and MEG is mega too.
		{name: "SPICE MEG with a space", in: "2.2 MEG", want: 2.2e6},
		{name: "SPICE MEG", in: "2.2MEG", want: 2.2e6},
		{name: "SPICE meg lower case", in: "1meg", want: 1e6},
		{name: "SPICE Meg with ohm", in: "4.7 Megohm", want: 4.7e6},
		{name: "SPICE MEG with Ω", in: "1MEGΩ", want: 1e6},
		{name: "infix upper K 4K7", in: "4K7", want: 4700},
		{name: "infix M 2M2", in: "2M2", want: 2.2e6},
		{name: "infix R 1R5", in: "1R5", want: 1.5},
		{name: "rejects MEGA", in: "1MEGA", err: "unknown unit"},
		{name: "fraction of an ohm", in: "0.05", want: 0.05},
		{name: "50 milliohm", in: "50 mΩ", want: 0.05},
		{name: "decimal comma", in: "1,5k", want: 1500},
		{name: "no-break space", in: "10\u00a0kΩ", want: 1e4},
		{name: "thin space", in: "10\u2009kΩ", want: 1e4},
		{name: "narrow no-break space", in: "10\u202fk\u2126", want: 1e4},
		{name: "space between prefix and unit", in: "10 k ohm", want: 1e4},
		{name: "surrounding spaces", in: "  4.99k\t", want: 4990},
		{name: "exponent", in: "4.99e3", want: 4990},
		{name: "plus sign", in: "+100", want: 100},
		{name: "leading dot", in: ".5", want: 0.5},
		{name: "zero ohm jumper", in: "0R", want: 0},
		{name: "OHMS upper case", in: "100 OHMS", want: 100},
		{name: "rejects 4x99", in: "4x99", err: `unknown unit or prefix "x99"`},
		{name: "rejects bare prefix", in: "k", err: "expected a number"},
		{name: "rejects two points", in: "4.99.1k", err: "more than one decimal separator"},
		{name: "rejects infinity", in: "∞", err: "expected a number"},
		{name: "rejects words", in: "ten", err: "expected a number"},
		{name: "rejects negative", in: "-1k", err: "cannot be negative"},
		{name: "rejects negative infix", in: "-4k7", err: "cannot be negative"},
		{name: "rejects thousands comma", in: "1,000", err: "decimal or a thousands separator"},
		{name: "rejects comma and dot", in: "1,000.5", err: "without thousands separators"},
		{name: "rejects exponent with prefix", in: "1e3k", err: "not both"},
		{name: "rejects volts", in: "10V", err: "unknown unit"},
		{name: "rejects micro", in: "1uΩ", err: "unknown unit"},
		{name: "rejects ±", in: "±10k", err: "pair of values"},
		{name: "rejects overflow", in: "1e999", err: "out of range"},
		{name: "rejects hex", in: "0x10", err: "unknown unit"},
		{name: "rejects NaN word", in: "NaN", err: "expected a number"},
		{name: "blank", in: "", blank: true},
		{name: "dash", in: "-", blank: true},
		{name: "em dash", in: "—", blank: true},
		{name: "n/a", in: "n/a", blank: true},
		{name: "N/A", in: " N/A ", blank: true},
	})
}

// ppm is 1e-6 and % is 1e-2 (common practice).
func TestParseFraction(t *testing.T) {
	checkParse(t, "fraction", ParseFraction, []parseCase{
		{name: "percent", in: "0.1%", want: 0.001},
		{name: "plus-minus", in: "±1 %", want: 0.01},
		{name: "ascii plus-minus", in: "+/-0.05%", want: 0.0005},
		{name: "spaced plus-minus", in: "± 0.01 %", want: 0.0001},
		{name: "ppm", in: "1000ppm", want: 0.001},
		{name: "bare is fraction", in: "0.001", want: 0.001},
		{name: "signed", in: "-0.2%", want: -0.002},
		{name: "decimal comma", in: "0,1 %", want: 0.001},
		{name: "rejects lone percent", in: "%", err: "expected a number"},
		{name: "rejects sign after ±", in: "±-1%", err: "sign after ±"},
		{name: "rejects ohms", in: "1k", err: "unknown unit"},
		{name: "blank", in: "-", blank: true},
	})
}

func TestParsePercent(t *testing.T) {
	checkParse(t, "percentage", ParsePercent, []parseCase{
		{name: "bare is percent", in: "0.1", want: 0.001},
		{name: "with sign", in: "1%", want: 0.01},
		{name: "plus-minus bare", in: "±5", want: 0.05},
		{name: "ppm", in: "50 ppm", want: 5e-5},
		{name: "rejects text", in: "tight", err: "expected a number"},
		{name: "blank", in: "", blank: true},
	})
}

// ppm/°C equals ppm/K: a kelvin step equals a degree Celsius step (SI
// Brochure, 9th ed., from memory).
func TestParsePPM(t *testing.T) {
	checkParse(t, "temperature coefficient", ParsePPM, []parseCase{
		{name: "ppm per degree C", in: "±25ppm/°C", want: 25},
		{name: "ppm per K", in: "25 ppm/K", want: 25},
		{name: "ppm per C", in: "25ppm/C", want: 25},
		{name: "ppm only", in: "25 ppm", want: 25},
		{name: "bare", in: "±25", want: 25},
		{name: "masculine ordinal", in: "25ppm/ºC", want: 25},
		{name: "per kelvin", in: "5e-6/K", want: 5},
		{name: "degree Celsius sign", in: "10 ppm/℃", want: 10},
		{name: "negative", in: "-50 ppm/K", want: -50},
		{name: "percent per K", in: "0.01 %/K", want: 100},
		{name: "rejects percent", in: "25%", err: "unknown unit"},
		{name: "rejects ppm per F", in: "25 ppm/F", err: "unknown unit"},
		{name: "blank", in: "n/a", blank: true},
	})
}

// 1/8 W = 0.125 W and 1/16 W ≈ 0.063 W as catalogs print it (common
// practice).
func TestParsePower(t *testing.T) {
	checkParse(t, "power", ParsePower, []parseCase{
		{name: "decimal", in: "0.125W", want: 0.125},
		{name: "fraction", in: "1/8W", want: 0.125},
		{name: "milliwatt", in: "125mW", want: 0.125},
		{name: "both forms", in: "0.125W, 1/8W", want: 0.125},
		{name: "both forms rounded", in: "0.063W, 1/16W", want: 0.063},
		{name: "both forms semicolon", in: "1/4W;0.25W", want: 0.25},
		{name: "fraction with space", in: "1/10 W", want: 0.1},
		{name: "bare", in: "0.1", want: 0.1},
		{name: "bare fraction", in: "1/4", want: 0.25},
		{name: "lower-case w", in: "2w", want: 2},
		{name: "rejects disagreeing pair", in: "0.25W, 1/8W", err: "disagree"},
		{name: "rejects division by zero", in: "1/0W", err: "division by zero"},
		{name: "rejects decimal fraction", in: "1/2.5W", err: "whole numbers"},
		{name: "rejects negative", in: "-1W", err: "cannot be negative"},
		{name: "rejects half pair", in: "0.125W, -", err: "missing"},
		{name: "rejects volts", in: "5V", err: "unknown unit"},
		{name: "blank", in: "—", blank: true},
	})
}

func TestParseVoltage(t *testing.T) {
	checkParse(t, "voltage", ParseVoltage, []parseCase{
		{name: "volts", in: "15V", want: 15},
		{name: "negative", in: "-5 V", want: -5},
		{name: "unicode minus", in: "−5 V", want: -5},
		{name: "millivolts", in: "500mV", want: 0.5},
		{name: "microvolts", in: "25 µV", want: 25e-6},
		{name: "Greek mu", in: "25 μV", want: 25e-6},
		{name: "bare", in: "2.5", want: 2.5},
		{name: "kilovolts", in: "1.5kV", want: 1500},
		{name: "rejects symmetric", in: "±15V", err: "pair of values"},
		{name: "rejects MV typo", in: "5 mA", err: "unknown unit"},
		{name: "rejects range", in: "1..", err: "unknown unit"},
		{name: "blank", in: "", blank: true},
	})
}

func TestParseCurrent(t *testing.T) {
	checkParse(t, "current", ParseCurrent, []parseCase{
		{name: "nanoamps", in: "1nA", want: 1e-9},
		{name: "picoamps", in: "2 pA", want: 2e-12},
		{name: "amps", in: "5A", want: 5},
		{name: "u for micro", in: "1.5 uA", want: 1.5e-6},
		{name: "micro sign", in: "1.5 µA", want: 1.5e-6},
		{name: "femtoamps", in: "20 fA", want: 20e-15},
		{name: "negative bias", in: "-3 nA", want: -3e-9},
		{name: "rejects bare", in: "5", err: "a unit is needed"},
		{name: "rejects volts", in: "5 nV", err: "unknown unit"},
		{name: "blank", in: "-", blank: true},
	})
}

func TestParseFrequency(t *testing.T) {
	checkParse(t, "frequency", ParseFrequency, []parseCase{
		{name: "kilohertz", in: "10kHz", want: 1e4},
		{name: "megahertz", in: "1.2 MHz", want: 1.2e6},
		{name: "hertz", in: "100Hz", want: 100},
		{name: "bare exponent", in: "1e6", want: 1e6},
		{name: "upper K", in: "10KHz", want: 1e4},
		{name: "millihertz", in: "10 mHz", want: 0.01},
		{name: "rejects negative", in: "-1Hz", err: "cannot be negative"},
		{name: "rejects unit", in: "10 kV", err: "unknown unit"},
	})
}

func TestParseNoise(t *testing.T) {
	checkParse(t, "voltage noise density", ParseVoltageNoise, []parseCase{
		{name: "root sign", in: "4.5nV/√Hz", want: 4.5e-9},
		{name: "rtHz", in: "4.5 nV/rtHz", want: 4.5e-9},
		{name: "sqrt()", in: "4.5nV/sqrt(Hz)", want: 4.5e-9},
		{name: "spaced", in: "4.5 nV / √Hz", want: 4.5e-9},
		{name: "micro", in: "1 µV/√Hz", want: 1e-6},
		{name: "rejects bare", in: "4.5", err: "a unit is needed"},
		{name: "rejects per Hz", in: "4.5 nV/Hz", err: "unknown unit"},
		{name: "rejects current", in: "4.5 pA/√Hz", err: "unknown unit"},
	})
	checkParse(t, "current noise density", ParseCurrentNoise, []parseCase{
		{name: "picoamps", in: "0.5 pA/√Hz", want: 5e-13},
		{name: "femtoamps", in: "100 fA/rtHz", want: 1e-13},
		{name: "rejects voltage", in: "0.5 nV/√Hz", err: "unknown unit"},
		{name: "blank", in: "N/A", blank: true},
	})
}

func TestParseDB(t *testing.T) {
	checkParse(t, "level in dB", ParseDB, []parseCase{
		{name: "no space", in: "80dB", want: 80},
		{name: "space", in: "80 dB", want: 80},
		{name: "bare", in: "80", want: 80},
		{name: "negative", in: "-3 dB", want: -3},
		{name: "rejects dBm", in: "10 dBm", err: "unknown unit"},
	})
}

func TestParseTemperature(t *testing.T) {
	checkParse(t, "temperature", ParseTemperature, []parseCase{
		{name: "C", in: "25C", want: 25},
		{name: "degree sign", in: "25 °C", want: 25},
		{name: "bare negative", in: "-40", want: -40},
		{name: "plus", in: "+125℃", want: 125},
		{name: "ordinal", in: "85ºC", want: 85},
		{name: "rejects kelvin", in: "300K", err: "kelvin"},
		{name: "rejects Fahrenheit", in: "77 °F", err: "Fahrenheit"},
		{name: "blank", in: "", blank: true},
	})
}

// rangeCase is one input for a two-value parser.
type rangeCase struct {
	name   string
	in     string
	lo, hi float64
	err    string
	blank  bool
}

func checkRange(t *testing.T, quantity string, parse func(string) (float64, float64, error), cases []rangeCase) {
	t.Helper()
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			lo, hi, err := parse(tc.in)
			if tc.err != "" || tc.blank {
				checkErr(t, tc.in, quantity, err, tc.err, tc.blank)
				return
			}
			if err != nil {
				t.Fatalf("parse(%q): %v", tc.in, err)
			}
			if !close(lo, tc.lo, 1e-15) || !close(hi, tc.hi, 1e-15) {
				t.Errorf("parse(%q) = %v, %v; want %v, %v", tc.in, lo, hi, tc.lo, tc.hi)
			}
		})
	}
}

func TestParseTemperatureRange(t *testing.T) {
	checkRange(t, "temperature range", ParseTemperatureRange, []rangeCase{
		{name: "dots", in: "-40..85C", lo: -40, hi: 85},
		{name: "to", in: "-40 to 85 °C", lo: -40, hi: 85},
		{name: "bare", in: "0..70", lo: 0, hi: 70},
		{name: "ellipsis", in: "-40…+125°C", lo: -40, hi: 125},
		{name: "units both ends", in: "-40°C..85°C", lo: -40, hi: 85},
		{name: "TO upper case", in: "-55 TO 150", lo: -55, hi: 150},
		{name: "rejects reversed", in: "85..-40", err: "below the upper end"},
		{name: "rejects equal", in: "25..25", err: "below the upper end"},
		{name: "rejects open end", in: "1..", err: "missing"},
		{name: "rejects one value", in: "25C", err: "two values"},
		{name: "rejects kelvin end", in: "0..300K", err: "kelvin"},
		{name: "blank", in: "-", blank: true},
	})
}

func TestParseRange(t *testing.T) {
	parse := func(s string) (float64, float64, error) { return ParseRange(s, "V") }
	checkRange(t, "range in V", parse, []rangeCase{
		{name: "symmetric", in: "-10..10V", lo: -10, hi: 10},
		{name: "spaced unit", in: "0..2.5 V", lo: 0, hi: 2.5},
		{name: "unit both ends", in: "-5V..5V", lo: -5, hi: 5},
		{name: "millivolts", in: "-500mV..500mV", lo: -0.5, hi: 0.5},
		{name: "to", in: "0 to 3.3 V", lo: 0, hi: 3.3},
		{name: "rejects reversed", in: "5..0V", err: "below the upper end"},
		{name: "rejects wrong unit", in: "0..5A", err: "upper end"},
		{name: "rejects garbage end", in: "x..5V", err: "lower end"},
	})
}

func TestParseSymmetric(t *testing.T) {
	parse := func(s string) (float64, float64, error) { return ParseSymmetric(s, "V") }
	checkRange(t, "symmetric value in V", parse, []rangeCase{
		{name: "plus-minus sign", in: "±15V", lo: -15, hi: 15},
		{name: "ascii", in: "+/-15 V", lo: -15, hi: 15},
		{name: "spaced", in: "± 2.5", lo: -2.5, hi: 2.5},
		{name: "millivolts", in: "±500mV", lo: -0.5, hi: 0.5},
		{name: "rejects plain value", in: "15V", err: "expected ±"},
		{name: "rejects sign", in: "±-15V", err: "sign after ±"},
		{name: "rejects nothing after", in: "±", err: "no value after ±"},
		{name: "rejects wrong unit", in: "±15A", err: "unknown unit"},
		{name: "blank", in: "", blank: true},
	})
}

func TestParseQuantity(t *testing.T) {
	parse := func(s string) (float64, error) { return ParseQuantity(s, "A") }
	checkParse(t, "value in A", parse, []parseCase{
		{name: "milli", in: "2.2 mA", want: 2.2e-3},
		{name: "bare", in: "3", want: 3},
		{name: "prefix only", in: "3m", want: 3e-3},
		{name: "giga", in: "1GA", want: 1e9},
		{name: "rejects other unit", in: "3 V", err: "unknown unit"},
		{name: "rejects upper K", in: "3KA", err: "unknown unit"},
	})
	plain := func(s string) (float64, error) { return ParseQuantity(s, "") }
	checkParse(t, "value in plain number", plain, []parseCase{
		{name: "number", in: "1e-3", want: 1e-3},
		{name: "kilo", in: "4.7k", want: 4700},
		{name: "rejects unit", in: "4.7 V", err: "unknown unit"},
	})
}

func TestParseCount(t *testing.T) {
	tests := []struct {
		name  string
		in    string
		want  int
		err   string
		blank bool
	}{
		{name: "comma thousands", in: "12,345", want: 12345},
		{name: "space thousands", in: "12 345", want: 12345},
		{name: "thin space thousands", in: "1\u2009234\u2009567", want: 1234567},
		{name: "plain", in: "12345", want: 12345},
		{name: "narrow no-break space thousands", in: "12\u202f345", want: 12345},
		{name: "zero", in: "0", want: 0},
		{name: "millions", in: "1,000,000", want: 1000000},
		{name: "rejects dash as blank", in: "-", blank: true},
		{name: "blank", in: "", blank: true},
		{name: "rejects prefix", in: "1.2k", err: "whole number"},
		{name: "rejects dot thousands", in: "12.345", err: "whole number"},
		{name: "rejects bad grouping", in: "12,34", err: "groups of three"},
		{name: "rejects long first group", in: "1234,567", err: "groups of three"},
		{name: "rejects mixed separators", in: "1,234 567", err: "mixed"},
		{name: "rejects negative", in: "-5", err: "negative"},
		{name: "rejects text", in: "plenty", err: "unexpected character"},
		{name: "rejects overflow", in: "99999999999999999999", err: "too large"},
		// 2^63 - 1 is the largest int64; one more wrapped negative.
		{name: "largest int64", in: "9223372036854775807", want: 9223372036854775807},
		{name: "rejects int64 plus one", in: "9223372036854775808", err: "too large"},
		{name: "rejects nineteen nines", in: "9999999999999999999", err: "too large"},
		{name: "rejects trailing separator", in: "12,", err: "expected digits"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got, err := ParseCount(tc.in)
			if tc.err != "" || tc.blank {
				checkErr(t, tc.in, "count", err, tc.err, tc.blank)
				return
			}
			if err != nil || got != tc.want {
				t.Errorf("ParseCount(%q) = %v, %v; want %v", tc.in, got, err, tc.want)
			}
		})
	}
}

func TestErrorMessage(t *testing.T) {
	_, err := ParseResistance("4x99")
	want := `units: cannot read "4x99" as resistance: unknown unit or prefix "x99"; write it like 4.99k, 4k99 or 4990`
	if err == nil || err.Error() != want {
		t.Errorf("got %v\nwant %s", err, want)
	}
	e := &Error{Input: "x", Quantity: "something new", Reason: "bad"}
	if got := e.Error(); got != `units: cannot read "x" as something new: bad` {
		t.Errorf("unknown quantity message %q", got)
	}
}
