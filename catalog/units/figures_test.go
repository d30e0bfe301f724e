package units

import (
	"errors"
	"strings"
	"testing"
)

// µV/°C equals µV/K: a kelvin step equals a degree Celsius step (SI
// Brochure, 9th ed., 2.3.3, from memory).
func TestParseDrift(t *testing.T) {
	checkParse(t, "voltage drift", ParseDrift, []parseCase{
		{name: "micro per K", in: "2µV/K", want: 2e-6},
		{name: "u per degree C", in: "2 uV/°C", want: 2e-6},
		{name: "u per C", in: "0.5 uV/C", want: 0.5e-6},
		{name: "Greek mu", in: "1 μV/K", want: 1e-6},
		{name: "plus-minus dropped", in: "±1 µV/℃", want: 1e-6},
		{name: "negative", in: "-3nV/K", want: -3e-9},
		{name: "masculine ordinal", in: "5 µV/ºC", want: 5e-6},
		{name: "millivolt", in: "0.1 mV/K", want: 1e-4},
		{name: "rejects bare", in: "2", err: "a unit is needed"},
		{name: "rejects voltage only", in: "2 µV", err: "unknown unit"},
		{name: "rejects per F", in: "2 µV/F", err: "unknown unit"},
		{name: "rejects ppm", in: "2 ppm/K", err: "unknown unit"},
		{name: "blank", in: "-", blank: true},
	})
}

// 1 V/µs = 1e6 V/s (SI prefix µ = 1e-6, BIPM SI Brochure, from memory).
func TestParseSlewRate(t *testing.T) {
	checkParse(t, "slew rate", ParseSlewRate, []parseCase{
		{name: "per microsecond", in: "0.5V/µs", want: 0.5e6},
		{name: "us", in: "20 V/us", want: 20e6},
		{name: "Greek mu", in: "1.5 V/μs", want: 1.5e6},
		{name: "millivolt per microsecond", in: "500mV/µs", want: 0.5e6},
		{name: "per nanosecond", in: "2 V/ns", want: 2e9},
		{name: "per millisecond", in: "3 V/ms", want: 3e3},
		{name: "SI", in: "1e6 V/s", want: 1e6},
		{name: "kilovolt per second", in: "10 kV/s", want: 1e4},
		{name: "rejects bare", in: "0.5", err: "a unit is needed"},
		{name: "rejects volts", in: "0.5 V", err: "unknown unit"},
		{name: "rejects negative", in: "-1 V/µs", err: "cannot be negative"},
		{name: "blank", in: "n/a", blank: true},
	})
}

// 20·log10(1e6) = 120 dB and 1 V/mV = 1000 V/V (IEC 60027-3 field level,
// from memory).
func TestParseOpenLoopGain(t *testing.T) {
	checkParse(t, "open-loop gain", ParseOpenLoopGain, []parseCase{
		{name: "decibels", in: "120dB", want: 1e6},
		{name: "decibels spaced", in: "100 dB", want: 1e5},
		{name: "V per mV", in: "1000 V/mV", want: 1e6},
		{name: "V per µV", in: "1 V/µV", want: 1e6},
		{name: "V per uV", in: "2 V/uV", want: 2e6},
		{name: "V per V", in: "200000 V/V", want: 2e5},
		{name: "lower case", in: "120 db", want: 1e6},
		{name: "rejects bare", in: "120", err: "a unit is needed"},
		{name: "rejects negative dB", in: "-3 dB", err: "below 0 dB"},
		{name: "rejects negative ratio", in: "-5 V/V", err: "cannot be negative"},
		{name: "rejects huge dB", in: "1e9 dB", err: "out of range"},
		{name: "rejects dB junk", in: "x dB", err: "expected a number"},
		{name: "rejects kilo", in: "1k", err: "unknown unit"},
		{name: "blank", in: "", blank: true},
	})
}

// °C/W equals K/W (SI Brochure, 9th ed., 2.3.3, from memory).
func TestParseThermalResistance(t *testing.T) {
	checkParse(t, "thermal resistance", ParseThermalResistance, []parseCase{
		{name: "K per W", in: "250K/W", want: 250},
		{name: "degree C per W", in: "250 °C/W", want: 250},
		{name: "C per W", in: "40 C/W", want: 40},
		{name: "bare", in: "250", want: 250},
		{name: "rejects negative", in: "-5 K/W", err: "cannot be negative"},
		{name: "rejects per mW", in: "1 K/mW", err: "unknown unit"},
		{name: "rejects prefix", in: "1k", err: "unknown unit"},
	})
}

func TestParseGain(t *testing.T) {
	checkParse(t, "gain", ParseGain, []parseCase{
		{name: "bare", in: "10", want: 10},
		{name: "negative", in: "-2", want: -2},
		{name: "V per V", in: "0.25V/V", want: 0.25},
		{name: "x", in: "10x", want: 10},
		{name: "times sign", in: "10 ×", want: 10},
		{name: "rejects prefix", in: "1k", err: "unknown unit"},
		{name: "rejects dB", in: "20dB", err: "unknown unit"},
		{name: "rejects ±", in: "±2", err: "pair of values"},
	})
}

// One V/A is one ohm (SI derived unit, from memory).
func TestParseTransimpedance(t *testing.T) {
	checkParse(t, "transimpedance", ParseTransimpedance, []parseCase{
		{name: "V per A", in: "0.5V/A", want: 0.5},
		{name: "mV per A", in: "500 mV/A", want: 0.5},
		{name: "ohm", in: "0.5 Ω", want: 0.5},
		{name: "milliohm", in: "50mΩ", want: 0.05},
		{name: "kilo-ohm", in: "10 kohm", want: 1e4},
		{name: "bare", in: "2", want: 2},
		{name: "rejects amps", in: "2 A", err: "unknown unit"},
	})
}

func TestParseStrict(t *testing.T) {
	cases := []struct {
		name   string
		in     string
		q      Quantity
		want   float64
		err    string // fragment of the message; "" for success
		noUnit bool
	}{
		{name: "level", in: "80dB", q: Level, want: 80},
		{name: "level bare", in: "80", q: Level, err: "write it like 80dB", noUnit: true},
		{name: "voltage", in: "500mV", q: Voltage, want: 0.5},
		{name: "voltage bare", in: "2.5", q: Voltage, err: "a unit is needed (V, mV or µV)", noUnit: true},
		{name: "voltage bare prefix", in: "10m", q: Voltage, err: "after the prefix", noUnit: true},
		{name: "fraction", in: "±0.1%", q: Fraction, want: 0.001},
		{name: "fraction bare", in: "0.1", q: Fraction, err: "% or ppm", noUnit: true},
		{name: "tempco", in: "25ppm/K", q: Tempco, want: 25},
		{name: "tempco bare", in: "25", q: Tempco, noUnit: true, err: "ppm/K"},
		{name: "tempco ppm alone", in: "25 ppm", q: Tempco, err: "ppm alone does not say per kelvin"},
		{name: "resistance code", in: "4k7", q: Resistance, want: 4700},
		{name: "resistance R", in: "10R", q: Resistance, want: 10},
		{name: "resistance ohm", in: "10 kΩ", q: Resistance, want: 1e4},
		{name: "resistance bare prefix", in: "10k", q: Resistance, noUnit: true, err: "after the prefix"},
		{name: "resistance negative code", in: "-4k7", q: Resistance, err: "cannot be negative"},
		{name: "power fraction", in: "1/8W", q: Power, want: 0.125},
		{name: "power pair", in: "0.125W, 1/8W", q: Power, want: 0.125},
		{name: "power bare fraction", in: "1/8", q: Power, noUnit: true, err: "W or mW"},
		{name: "power pair bare half", in: "0.125W, 1/8", q: Power, noUnit: true},
		{name: "temperature", in: "-40C", q: Temperature, want: -40},
		{name: "temperature bare", in: "25", q: Temperature, noUnit: true},
		{name: "frequency", in: "10kHz", q: Frequency, want: 1e4},
		{name: "frequency bare", in: "1e6", q: Frequency, noUnit: true},
		{name: "current", in: "1uA", q: Current, want: 1e-6},
		{name: "drift", in: "10uV/K", q: Drift, want: 10e-6},
		{name: "open-loop gain", in: "110dB", q: OpenLoopGain, want: 316227.76601683791},
		{name: "gain", in: "2V/V", q: Gain, want: 2},
		{name: "gain bare", in: "2", q: Gain, noUnit: true},
		{name: "thermal", in: "250K/W", q: ThermalResistance, want: 250},
		{name: "thermal bare", in: "250", q: ThermalResistance, noUnit: true},
		{name: "transimpedance", in: "0.5V/A", q: Transimpedance, want: 0.5},
		{name: "noise", in: "20nV/rtHz", q: VoltageNoise, want: 20e-9},
		{name: "blank", in: "", q: Voltage, err: "no value given"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			got, err := ParseStrict(tc.in, tc.q)
			if tc.err == "" && !tc.noUnit {
				if err != nil || !close(got, tc.want, 1e-15) {
					t.Errorf("ParseStrict(%q, %v) = %v, %v; want %v", tc.in, tc.q, got, err, tc.want)
				}
				return
			}
			checkErr(t, tc.in, tc.q.String(), err, tc.err, tc.in == "")
			if errors.Is(err, ErrNoUnit) != tc.noUnit {
				t.Errorf("errors.Is(%v, ErrNoUnit) = %v, want %v", err, !tc.noUnit, tc.noUnit)
			}
		})
	}
}

func TestParseRangeStrict(t *testing.T) {
	cases := []struct {
		name   string
		in     string
		q      Quantity
		lo, hi float64
		err    string
		noUnit bool
	}{
		{name: "unit once", in: "-10..10V", q: Voltage, lo: -10, hi: 10},
		{name: "prefix once", in: "-500..500mV", q: Voltage, lo: -0.5, hi: 0.5},
		{name: "unit both ends", in: "-5V..5V", q: Voltage, lo: -5, hi: 5},
		{name: "to", in: "0 to 5 V", q: Voltage, lo: 0, hi: 5},
		{name: "symmetric", in: "±10V", q: Voltage, lo: -10, hi: 10},
		{name: "ascii symmetric", in: "+/-2.5 V", q: Voltage, lo: -2.5, hi: 2.5},
		{name: "single value", in: "5V", q: Voltage, lo: 5, hi: 5},
		{name: "equal ends", in: "5..5V", q: Voltage, lo: 5, hi: 5},
		{name: "temperature", in: "-40..85C", q: Temperature, lo: -40, hi: 85},
		{name: "current", in: "0..5A", q: Current, lo: 0, hi: 5},
		{name: "reversed", in: "5..-5V", q: Voltage, err: "runs from high to low"},
		{name: "no unit", in: "-10..10", q: Voltage, err: "upper end: a unit is needed", noUnit: true},
		{name: "symmetric no unit", in: "±1", q: Voltage, noUnit: true},
		{name: "single no unit", in: "5", q: Voltage, noUnit: true},
		{name: "sign after ±", in: "±-1V", q: Voltage, err: "sign after ±"},
		{name: "nothing after ±", in: "±", q: Voltage, err: "no value after ±"},
		{name: "open end", in: "1V..", q: Voltage, err: "missing"},
		{name: "wrong unit", in: "0..5A", q: Voltage, err: "upper end: unknown unit"},
		{name: "blank end", in: "1..-", q: Voltage, err: "upper end"},
		{name: "kelvin", in: "0..300K", q: Temperature, err: "kelvin"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			lo, hi, err := ParseRangeStrict(tc.in, tc.q)
			if tc.err == "" && !tc.noUnit {
				if err != nil || lo != tc.lo || hi != tc.hi {
					t.Errorf("ParseRangeStrict(%q) = %v, %v, %v; want %v, %v", tc.in, lo, hi, err, tc.lo, tc.hi)
				}
				return
			}
			checkErr(t, tc.in, tc.q.String()+" range", err, tc.err, false)
			if errors.Is(err, ErrNoUnit) != tc.noUnit {
				t.Errorf("errors.Is(%v, ErrNoUnit) = %v, want %v", err, !tc.noUnit, tc.noUnit)
			}
		})
	}
}

// The lenient range reads a unit written once after the upper end for both
// ends; before, "-500..500mV" read its lower end as -500 V.
func TestParseRangeUnitOnce(t *testing.T) {
	lo, hi, err := ParseRange("-500..500mV", "V")
	if err != nil || lo != -0.5 || hi != 0.5 {
		t.Errorf("ParseRange(-500..500mV) = %v, %v, %v; want -0.5, 0.5", lo, hi, err)
	}
}

func TestCountSeparators(t *testing.T) {
	tests := []struct {
		name string
		in   string
		want int
		err  string
	}{
		{name: "dot thousands", in: "1.234.567", want: 1234567},
		{name: "apostrophe", in: "12'345", want: 12345},
		{name: "right single quote", in: "1\u2019234\u2019567", want: 1234567},
		{name: "no-break space", in: "12\u00a0345", want: 12345},
		{name: "rejects one dot", in: "1.000", err: "could be a decimal point"},
		{name: "rejects dot grouping", in: "1.23.456", err: "groups of three"},
		{name: "rejects dot and comma", in: "1.234,567", err: "mixed"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got, err := ParseCount(tc.in)
			if tc.err != "" {
				checkErr(t, tc.in, "count", err, tc.err, false)
				return
			}
			if err != nil || got != tc.want {
				t.Errorf("ParseCount(%q) = %v, %v; want %v", tc.in, got, err, tc.want)
			}
		})
	}
}

// TestCountErrorOneHint: a count that cannot be read says how to write one
// once, not twice.
func TestCountErrorOneHint(t *testing.T) {
	for _, tc := range []struct{ name, in string }{
		{"one dot", "1.200"},
		{"dot grouping", "1.23.456"},
		{"negative", "-5"},
		{"prefix", "1.5k"},
		{"letters", "many"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, err := ParseCount(tc.in)
			if err == nil {
				t.Fatalf("ParseCount(%q) read it", tc.in)
			}
			if n := strings.Count(err.Error(), "write"); n != 1 {
				t.Errorf("ParseCount(%q): %q gives %d hints on how to write it, want 1", tc.in, err, n)
			}
		})
	}
}

func TestQuantityString(t *testing.T) {
	if Level.String() != "level in dB" || Quantity(0).String() != "unknown quantity" {
		t.Errorf("names: %q %q", Level, Quantity(0))
	}
	defer func() {
		if recover() == nil {
			t.Error("ParseStrict with Quantity(0) did not panic")
		}
	}()
	_, _ = ParseStrict("1", 0)
}
