package spec

import (
	"bytes"
	"errors"
	"math"
	"os"
	"strings"
	"testing"
)

func TestParseGood(t *testing.T) {
	data, err := os.ReadFile("testdata/good.yaml")
	if err != nil {
		t.Fatal(err)
	}
	s, err := Parse(data, "good.yaml")
	if err != nil {
		t.Fatal(err)
	}
	checks := []struct {
		name      string
		got, want float64
	}{
		{"gain", s.Gain, 0.4},
		{"input min", s.Input.Min, -10},
		{"cm max", s.CommonMode.Max, 5},
		{"supply neg", s.Supply.Min, -15},
		{"ref tolerance", s.Reference.Tolerance, 0.001},
		{"ref drift", s.Reference.Drift, 10e-6},
		{"load", s.LoadOhm, 10e3},
		{"leakage", s.LeakageA, 1e-6},
		{"temp min", s.Temp.Min, -40},
		{"gain error", s.Limits.GainError, 0.001},
		{"cmrr", s.Limits.CMRRdB, 80},
		{"drift", s.Limits.GainDrift, 5e-6},
		{"offset", s.Limits.OutputOffsetV, 1e-3},
		{"offset drift", s.Limits.OffsetDriftVK, 10e-6},
		{"noise rms", s.Limits.NoiseRMSV, 100e-6},
		{"noise density", s.Limits.NoiseDensity, 200e-9},
		{"bandwidth", s.Limits.BandwidthHz, 10e3},
		{"yield", s.Analysis.Yield, 0.99},
		{"attrition", s.Build.Attrition, 0.02},
		{"impedance max", s.Impedance.Max, 1e6},
		{"derating", s.Derating, 0.5},
		// Worst excursion max(|85-25|, |-40-25|) = 65 K (domain notes §3).
		{"excursion", s.WorstExcursion(), 65},
	}
	for _, c := range checks {
		if math.Abs(c.got-c.want) > 1e-12*math.Max(1, math.Abs(c.want)) {
			t.Errorf("%s = %g, want %g", c.name, c.got, c.want)
		}
	}
	if !s.Differential || !s.Calibrate.Gain || s.Analysis.Seed != 7 || s.Analysis.Trials != 2000 || s.Build.Stock != "exclude" {
		t.Errorf("flags wrong: %+v", s)
	}
}

func TestLevelShiftDerivesGainAndOffset(t *testing.T) {
	src := `name: ls
about: level shift
family: level-shift
input: {single_ended: ±5V}
output: 0..2.5V
supply: 0..5V
reference: {voltage: 2.5V, tolerance: 0.05%, drift: 10ppm/K}
temperature: {range: 0..70C}
limits: {gain_error: 0.1%}
`
	s, err := Parse([]byte(src), "ls.yaml")
	if err != nil {
		t.Fatal(err)
	}
	// Mapping [-5, 5] onto [0, 2.5]: gain 2.5/10 = 0.25, offset 0 - 0.25*(-5) = 1.25 V.
	if s.Gain != 0.25 || s.Offset != 1.25 {
		t.Errorf("gain %g offset %g, want 0.25 and 1.25", s.Gain, s.Offset)
	}
}

// base is a valid spec the error cases edit.
const base = `name: t
about: test
family: difference
gain: 1
input: {differential: ±1V, common_mode: -5..5V}
supply: ±15V
temperature: {range: -40..85C}
limits: {cmrr: 60dB}
`

func TestParseErrors(t *testing.T) {
	cases := []struct {
		name string
		edit func(string) string
		want string // a fragment of the error
	}{
		{"cmrr without unit", rep("cmrr: 60dB", "cmrr: 60"), `limits.cmrr: "60" has no unit; write it like 80dB`},
		{"unknown field", add("colour: red\n"), "colour"},
		{"unknown nested field", rep("limits: {cmrr: 60dB}", "limits: {cmrr: 60dB, cmr: 3dB}"), "cmr"},
		{"missing name", rep("name: t\n", ""), "name: missing"},
		{"missing about", rep("about: test\n", ""), "about: missing"},
		{"no family", rep("family: difference\n", ""), "family: missing"},
		{"bad family", rep("family: difference", "family: diff"), `"diff" is not a family`},
		{"family and families", add("families: [inamp]\n"), "given together with families"},
		{"duplicate family", rep("family: difference", "families: [difference, difference]"), "listed twice"},
		{"missing gain", rep("gain: 1\n", ""), "gain: missing"},
		{"gain zero", rep("gain: 1", "gain: 0"), "gain: is zero"},
		{"gain sign vs inverting", func(s string) string {
			return rep("input: {differential: ±1V, common_mode: -5..5V}", "input: {single_ended: ±1V}")(rep("family: difference", "family: inverting")(s))
		}, "does not suit family inverting"},
		{"gain below one non-inverting", func(s string) string {
			return rep("input: {differential: ±1V, common_mode: -5..5V}", "input: {single_ended: ±1V}")(rep("family: difference", "family: noninverting")(rep("gain: 1", "gain: 0.5")(s)))
		}, "at least 1"},
		{"single-ended to difference", rep("differential: ±1V", "single_ended: ±1V"), "takes input.differential"},
		{"two inputs", rep("differential: ±1V", "differential: ±1V, single_ended: ±1V"), "not several"},
		{"no input", rep("input: {differential: ±1V, common_mode: -5..5V}", "input: {common_mode: -5..5V}"), "input: missing"},
		{"input single value", rep("±1V", "1V"), "single value"},
		{"range high to low", rep("-5..5V", "5..-5V"), "runs from high to low"},
		{"input without unit", rep("±1V", "±1"), "input.differential"},
		{"no supply", rep("supply: ±15V\n", ""), "supply: missing"},
		{"supply too small for output", rep("gain: 1", "gain: 20"), "the output must reach -20..20 V"},
		{"no temperature", rep("temperature: {range: -40..85C}\n", ""), "temperature.range: missing"},
		{"reference temperature outside", rep("{range: -40..85C}", "{range: -40..85C, reference: 100C}"), "outside the range"},
		{"no limits", rep("limits: {cmrr: 60dB}", "limits: {}"), "limits: none given"},
		{"negative limit", rep("cmrr: 60dB", "cmrr: -3dB"), "must be positive"},
		{"fraction without unit", rep("cmrr: 60dB", "gain_error: 0.1"), `limits.gain_error: "0.1" has no unit`},
		{"tempco without unit", rep("cmrr: 60dB", "gain_drift: 5"), `limits.gain_drift: "5" has no unit`},
		{"bad method", add("analysis: {method: guess}\n"), "analysis.method"},
		{"few trials", add("analysis: {method: monte-carlo, trials: 5}\n"), "at least 100"},
		{"yield without monte carlo", add("analysis: {yield: 99%}\n"), "needs method monte-carlo"},
		{"bad distribution", add("analysis: {distribution: flat}\n"), "analysis.distribution"},
		{"calibration with no gain limit", add("calibration: {gain: true}\n"), "calibration.gain: set, but limits give neither"},
		{"impedance min above max", add("impedance: {min: 1M, max: 1k}\n"), "impedance: min"},
		{"bad combo", add("combos: [triple]\n"), "combos[0]"},
		{"derating above one", add("derating: 150%\n"), "derating"},
		{"bad stock", add("build: {stock: maybe}\n"), "build.stock"},
		{"quantity zero", add("build: {quantity: 0}\n"), "build.quantity"},
		// Bounds on the numbers that size work or memory (hardening
		// finding 2): a billion trials once aborted the Go runtime out of
		// memory; a build of 10^18 stages was accepted.
		{"a billion trials", add("analysis: {method: monte-carlo, trials: 1000000000}\n"), `analysis.trials: "1000000000" is more than 1000000 trials, the most plumb runs`},
		{"trials past int64", add("analysis: {method: monte-carlo, trials: 99999999999999999999}\n"), "more than 1000000 trials"},
		{"negative trials", add("analysis: {method: monte-carlo, trials: -99999999999999999999}\n"), "whole number of trials, from 100 to 1000000"},
		{"quantity 10^18", add("build: {quantity: 1000000000000000000}\n"), `build.quantity: "1000000000000000000" is more than 10000000 stages`},
		{"too many families", rep("family: difference", "families: [difference, difference, difference, difference, difference, difference, difference, difference, difference, difference, difference]"), "families: lists 11 entries"},
		{"too many combos", add("combos: [series, parallel, series]\n"), "combos: lists 3 entries"},
		{"repeated combo", add("combos: [series, series]\n"), `combos[1]: "series" is listed twice`},
		{"level shift without output", func(s string) string {
			return rep("family: difference\ngain: 1\ninput: {differential: ±1V, common_mode: -5..5V}", "family: level-shift\ninput: {single_ended: ±1V}\nreference: {voltage: 2.5V}")(s)
		}, "output: missing"},
		{"level shift with gain", func(s string) string {
			return rep("family: difference\n", "family: level-shift\noutput: 0..2V\nreference: {voltage: 2.5V}\n")(rep("differential: ±1V, common_mode: -5..5V", "single_ended: ±1V")(s))
		}, "a level-shift gain follows from input and output"},
		{"level shift without reference", func(s string) string {
			return rep("family: difference\ngain: 1\ninput: {differential: ±1V, common_mode: -5..5V}", "family: level-shift\noutput: 0..2V\ninput: {single_ended: ±1V}")(s)
		}, "reference: missing"},
		{"current sense without current", rep("family: difference", "family: current-sense"), "takes input.current"},
		{"common mode on single-ended", func(s string) string {
			return rep("family: difference", "family: noninverting")(rep("differential: ±1V", "single_ended: ±1V")(s))
		}, "given for a single-ended stage"},
		{"empty file", func(string) string { return "" }, "file is empty"},
		{"reference on an inverting stage", func(s string) string {
			return rep("family: difference\ngain: 1\ninput: {differential: ±1V, common_mode: -5..5V}", "family: inverting\ngain: -1\ninput: {single_ended: ±1V}\nreference: {voltage: 1V}")(s)
		}, "has no reference input"},
		{"reference outside the rails", add("reference: {voltage: 20V}\n"), "outside the rails"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			src := c.edit(base)
			_, err := Parse([]byte(src), "x.yaml")
			if err == nil {
				t.Fatalf("no error for\n%s", src)
			}
			if !errors.Is(err, ErrInvalid) {
				t.Errorf("error does not wrap ErrInvalid: %v", err)
			}
			if !strings.Contains(err.Error(), c.want) || !strings.Contains(err.Error(), "x.yaml") {
				t.Errorf("error %q does not name the file and say %q", err, c.want)
			}
		})
	}
}

func TestBaseParses(t *testing.T) {
	if _, err := Parse([]byte(base), "base.yaml"); err != nil {
		t.Fatal(err)
	}
}

func rep(old, new string) func(string) string {
	return func(s string) string {
		if !strings.Contains(s, old) {
			panic("test edit does not apply: " + old)
		}
		return strings.Replace(s, old, new, 1)
	}
}

func add(line string) func(string) string {
	return func(s string) string { return s + line }
}

func TestQuantities(t *testing.T) {
	cases := []struct {
		name string
		in   string
		u    unit
		want float64
	}{
		{"kilo-ohm bare", "10k", uOhm, 10e3},
		{"ohm sign", "4.99kΩ", uOhm, 4990},
		{"millivolt", "500mV", uVolt, 0.5},
		{"microamp", "1uA", uAmp, 1e-6},
		{"micro sign", "2µA", uAmp, 2e-6},
		{"kilohertz", "10kHz", uHertz, 10e3},
		{"decibel", "80dB", uDB, 80},
		{"noise", "20nV/rtHz", uNoise, 20e-9},
		{"drift", "10uV/K", uVPerK, 10e-6},
		{"exponent", "1e3", uOhm, 1000},
		// Forms read through catalog/units that the spec's own parser lacked.
		// 20·log10(1e6) = 120 dB (IEC 60027-3 field level, from memory).
		{"aol in dB", "120dB", uAol, 1e6},
		// 1 V/mV = 1000 V/V (common practice).
		{"aol in V/mV", "1000V/mV", uAol, 1e6},
		{"aol bare is V/V, as Marshal writes it", "250000", uAol, 2.5e5},
		{"drift per degree C", "2uV/°C", uVPerK, 2e-6},
		// One V/A is one ohm (SI, from memory).
		{"transimpedance in milliohm", "50mΩ", uTransR, 0.05},
		{"thermal resistance in °C/W", "250°C/W", uKPerW, 250},
		{"resistance code", "4k99", uOhm, 4990},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			got, err := parseQuantity(c.in, c.u)
			if err != nil || math.Abs(got-c.want) > 1e-12*math.Abs(c.want) {
				t.Errorf("parseQuantity(%q) = %g, %v; want %g", c.in, got, err, c.want)
			}
		})
	}
	lo, hi, err := parseRange("-10..10V", uVolt)
	if err != nil || lo != -10 || hi != 10 {
		t.Errorf("range: %g %g %v", lo, hi, err)
	}
	if f, err := parseFraction("±0.05%"); err != nil || math.Abs(f-5e-4) > 1e-15 {
		t.Errorf("fraction: %g %v", f, err)
	}
}

// FuzzParse checks that no input panics, that accepted specs are sane and
// within the bounds on work, and that a refused one gets field errors of
// the file, at most maxProblems of them and a count, each at a line of the
// file or none. Its corpus (testdata/fuzz/FuzzParse) holds the examples
// and files that once went wrong; .ci/run fuzzes it for 30 s.
func FuzzParse(f *testing.F) {
	f.Add([]byte(base))
	data, _ := os.ReadFile("testdata/good.yaml")
	f.Add(data)
	f.Fuzz(func(t *testing.T, b []byte) {
		s, err := Parse(b, "fuzz.yaml")
		if err == nil {
			if s.Gain == 0 || s.Temp.Min > s.Temp.Max || len(s.Families) == 0 || s.Analysis.Trials > MaxTrials || s.Build.Quantity > MaxQuantity {
				t.Errorf("accepted an inconsistent spec: %+v", s)
			}
			return
		}
		fes := fieldErrors(t, err)
		if len(fes) > maxProblems+1 {
			t.Errorf("%d problems listed", len(fes))
		}
		// YAML breaks lines at LF, CRLF and a lone CR (YAML 1.2 §5.4).
		lines := bytes.Count(b, []byte("\n")) + bytes.Count(b, []byte("\r")) - bytes.Count(b, []byte("\r\n")) + 1
		for _, fe := range fes {
			if fe.File != "fuzz.yaml" || fe.Line < 0 || fe.Line > lines || (fe.Line > 0) != (fe.Column > 0) {
				t.Errorf("problem %q at %d:%d of a %d-line file", fe.Msg, fe.Line, fe.Column, lines)
			}
		}
	})
}

// fieldErrors lists the problems of an error from Parse or ParseDesign.
func fieldErrors(t *testing.T, err error) []*FieldError {
	t.Helper()
	var out []*FieldError
	var walk func(error)
	walk = func(err error) {
		if j, ok := err.(interface{ Unwrap() []error }); ok {
			for _, e := range j.Unwrap() {
				walk(e)
			}
			return
		}
		var fe *FieldError
		if !errors.As(err, &fe) {
			t.Fatalf("%v is not a *FieldError", err)
		}
		out = append(out, fe)
	}
	walk(err)
	return out
}

// checkOneFieldError requires err to hold exactly one problem, in file, at
// field, whose message holds advice: a bad field gives one error, not one
// more for every check that depended on it.
func checkOneFieldError(t *testing.T, err error, file, field, advice string) {
	t.Helper()
	if err == nil {
		t.Fatal("no error")
	}
	if !errors.Is(err, ErrInvalid) {
		t.Errorf("error does not wrap ErrInvalid: %v", err)
	}
	fes := fieldErrors(t, err)
	if len(fes) != 1 {
		t.Fatalf("%d errors, want 1 at %q:\n%v", len(fes), field, err)
	}
	fe := fes[0]
	if fe.File != file || fe.Field != field || !strings.Contains(fe.Msg, advice) {
		t.Errorf("error %q: want file %s, field %q and advice %q", fe, file, field, advice)
	}
}

func TestParseFieldErrors(t *testing.T) {
	cases := []struct {
		name   string
		edit   func(string) string
		field  string // the exact field path of the one error
		advice string // a fragment of its message
	}{
		// Datasheet maximums are magnitudes.
		{"negative reference tolerance", add("reference: {voltage: 2V, tolerance: -0.1%}\n"),
			"reference.tolerance", `"-0.1%" must not be negative: a datasheet maximum is a magnitude; write 0.1%`},
		{"negative reference drift", add("reference: {voltage: 2V, drift: -10ppm/K}\n"),
			"reference.drift", "must not be negative: a datasheet maximum is a magnitude; write 10ppm/K"},
		{"negative source impedance", add("source_impedance: -100\n"), "source_impedance", "cannot be negative"},
		// A build currency is an ISO 4217 code, as the catalog's prices
		// and currency.rates are (ISO 4217: three capital letters).
		{"currency as a word", add("build: {currency: EURO}\n"), "build.currency", `"EURO" is not an ISO 4217 currency code; write the three capital letters, such as EUR`},
		{"currency as a symbol", add("build: {currency: €}\n"), "build.currency", "not an ISO 4217 currency code"},
		{"currency in lower case", add("build: {currency: eur}\n"), "build.currency", "three capital letters"},
		// A single temperature is no range (item 4 of the review).
		{"single temperature", rep("range: -40..85C", "range: 25C"),
			"temperature.range", `"25C" is a single temperature; a range needs two ends, e.g. -40..85C`},
		{"single temperature away from the reference", rep("range: -40..85C", "range: 85C"),
			"temperature.range", "a range needs two ends"},
		{"single temperature with a degree sign", rep("range: -40..85C", "range: 25 °C"), "temperature.range", "a range needs two ends"},
		{"below absolute zero", rep("range: -40..85C", "range: -300..85C"), "temperature.range", "below absolute zero"},
		// One bad field, one error.
		{"bad temperature range", rep("range: -40..85C", "range: hot"), "temperature.range", "write it like 25C or -40C"},
		{"temperature range without unit", rep("range: -40..85C", "range: -40..85"), "temperature.range", "has no unit"},
		{"bad reference temperature", rep("{range: -40..85C}", "{range: 30..85C, reference: warm}"), "temperature.reference", "is not a temperature"},
		{"reference temperature outside", rep("{range: -40..85C}", "{range: 30..85C}"), "temperature.reference", "25 C lies outside the range 30..85 C; give a reference inside"},
		{"supply without unit", rep("supply: ±15V", "supply: ±15"), "supply", `"±15" has no unit`},
		{"supply of zero", rep("supply: ±15V", "supply: 0V"), "supply", "gives no supply span; write e.g. ±15V"},
		{"supply away from ground", rep("supply: ±15V", "supply: 5..15V"), "supply", "does not include ground"},
		{"input without unit", rep("±1V", "±1"), "input.differential", "has no unit"},
		{"input single value", rep("±1V", "1V"), "input.differential", "range is a single value"},
		{"bad family", rep("family: difference", "family: diff"), "family", `"diff" is not a family; use one of`},
		{"bad family with a transimpedance", func(s string) string {
			return rep("family: difference", "family: current-sens")(rep("gain: 1", "gain: 0.5V/A")(s))
		}, "family", `"current-sens" is not a family`},
		{"bad family without gain", func(s string) string {
			return rep("family: difference", "family: level-shfit")(rep("gain: 1\n", "")(s))
		}, "family", "is not a family"},
		{"bad entry of families", rep("family: difference", "families: [difference, inampp]"), "families[1]", `"inampp" is not a family`},
		{"bad gain", rep("gain: 1", "gain: one"), "gain", "is not a gain"},
		{"bad load", add("load: {resistance: 10x}\n"), "load.resistance", "is not a resistance"},
		{"bad derating", add("derating: half\n"), "derating", "is not a fraction"},
		{"bad sigmas", add("analysis: {sigmas: three}\n"), "analysis.sigmas", "is not a number"},
		{"bad yield", add("analysis: {method: monte-carlo, yield: most}\n"), "analysis.yield", "is not a fraction"},
		{"bad method with a yield", add("analysis: {method: monte-carl, yield: 99%}\n"), "analysis.method", `"monte-carl" is not a method`},
		{"bad attrition", add("build: {attrition: some}\n"), "build.attrition", "is not a fraction"},
		{"bad impedance window", add("impedance: {min: 1x, max: 1k}\n"), "impedance.min", "is not a resistance"},
		// K is kilo only in resistances and frequencies (catalog/units doc).
		{"capital K on volts", rep("supply: ±15V", "supply: ±1KV"), "supply", "kilo is a small k here; a capital K means kilo only in resistances and frequencies"},
		// YAML type errors, placed at their field.
		{"bool not true or false", add("calibration: {gain: maybe}\n"), "calibration.gain", `"maybe" is not a yes-or-no value; write true or false`},
		{"bool on its own line", add("calibration:\n  offset: sometimes\n"), "calibration.offset", "write true or false"},
		{"scalar for families", rep("family: difference", "families: difference"), "families", "is given where a list belongs; write a list, e.g. [difference]"},
		{"scalar for a group", rep("input: {differential: ±1V, common_mode: -5..5V}", "input: ±1V"), "input",
			"input takes differential, single_ended, current, common_mode, written as {field: value, ...} or on indented lines below, e.g. {differential: ±1V}"},
		{"list for a quantity", rep("supply: ±15V", "supply: [-15V, 15V]"), "supply", "a list is given where one value belongs; write a single value"},
		{"mapping for a quantity", rep("gain: 1", "gain: {value: 1}"), "gain", "a group of fields is given where one value belongs"},
		{"unknown nested field", rep("limits: {cmrr: 60dB}", "limits: {cmrr: 60dB, cmr: 3dB}"), "limits.cmr",
			"is not a known field (check the spelling against the README of the examples); the fields here are gain_error, cmrr,"},
		{"unknown top-level field", add("colour: red\n"), "colour", "the fields here are name, about, family, families"},
		{"field given twice", add("name: u\n"), "name", "given twice (also at line 1); keep one"},
		{"not a mapping", func(string) string { return "just words\n" }, "", "is \"just words\", not a mapping of fields; write one field per line (name, about,"},
		{"empty file", func(string) string { return "" }, "", "file is empty"},
		{"syntax error", func(string) string { return "name: [t\n" }, "", "check the indentation and quoting"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := Parse([]byte(c.edit(base)), "x.yaml")
			checkOneFieldError(t, err, "x.yaml", c.field, c.advice)
		})
	}
}

// Two equal ends are a deliberate one-temperature range (optimize/budget's
// tests evaluate at 25..25C to see the tolerances alone); only a single
// value is refused.
func TestParseOneTemperatureRange(t *testing.T) {
	s, err := Parse([]byte(rep("range: -40..85C", "range: 25..25C")(base)), "x.yaml")
	if err != nil {
		t.Fatal(err)
	}
	if s.Temp.Min != 25 || s.Temp.Max != 25 || s.WorstExcursion() != 0 {
		t.Errorf("temperature %v, excursion %g; want 25..25 and 0 K", s.Temp, s.WorstExcursion())
	}
}

// Signed figures stay signed: rails and range ends may be negative.
func TestParseSignedFiguresAccepted(t *testing.T) {
	src := rep("reference: {voltage: 20V}\n", "reference: {voltage: -2.5V, tolerance: 0.1%}\n")(add("reference: {voltage: 20V}\n")(base))
	src = rep("range: -40..85C", "range: -55..-10C, reference: -20C")(src)
	s, err := Parse([]byte(src), "x.yaml")
	if err != nil {
		t.Fatal(err)
	}
	if s.Reference.V != -2.5 || s.Temp.Min != -55 || s.Temp.Max != -10 || s.TempRef != -20 || s.Supply.Min != -15 {
		t.Errorf("signed figures changed: ref %g, temp %v ref %g, supply %v", s.Reference.V, s.Temp, s.TempRef, s.Supply)
	}
}
