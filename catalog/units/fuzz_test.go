package units

import (
	"errors"
	"math"
	"strconv"
	"strings"
	"testing"
)

// The fuzz targets check that no input panics, that every failure is an
// *Error quoting the input, and that a value read successfully survives
// printing and reading again: parse(format(v)) ≈ v, within the rounding of
// the printer's significant figures, and printing that again gives the same
// text.

// checkFailure checks the contract every error must meet.
func checkFailure(t *testing.T, in string, err error) {
	t.Helper()
	var ue *Error
	if !errors.As(err, &ue) {
		t.Fatalf("parse(%q) error %T %v, want *Error", in, err, err)
	}
	if ue.Input != in || ue.Reason == "" || ue.Quantity == "" {
		t.Fatalf("parse(%q) error %+v lacks input, quantity or reason", in, ue)
	}
}

// roundTrip fuzzes parse against format; rel is the rounding of format's
// significant figures (0.5 in the last place).
func roundTrip(t *testing.T, in string, parse func(string) (float64, error), format func(float64) string, rel float64) {
	v, err := parse(in)
	if err != nil {
		checkFailure(t, in, err)
		return
	}
	if math.IsNaN(v) || math.IsInf(v, 0) {
		t.Fatalf("parse(%q) = %v", in, v)
	}
	f := format(v)
	v2, err := parse(f)
	if err != nil {
		t.Fatalf("parse(%q) = %v, but its printed form %q does not read back: %v", in, v, f, err)
	}
	// Below the normal range float64 has too few digits for a relative bound.
	if math.Abs(v) > 1e-300 && !close(v2, v, rel) {
		t.Fatalf("parse(%q) = %v, printed %q, read back %v", in, v, f, v2)
	}
	if f2 := format(v2); f2 != f {
		t.Fatalf("printing is not stable: %v -> %q, %v -> %q", v, f, v2, f2)
	}
}

func addSeeds(f *testing.F, seeds ...string) {
	for _, s := range seeds {
		f.Add(s)
	}
}

func FuzzParseResistance(f *testing.F) {
	addSeeds(f, "4k99", "4.99k", "4K99", "10R", "0R1", "1M", "470", "2.2 MOhm", "10 kΩ",
		"10 kOhms", "4.99 kohm", "1mΩ", "1m", "1G", "0.05", "50 mΩ", "1,5k", "4x99", "k",
		"1..", "ten", "%", "4.99.1k", "∞", "-", "1e3", "1,000",
		"2.2 MEG", "1meg", "4.7 Megohm", "2M2", "4K7", "1R5", "1MEGA")
	f.Fuzz(func(t *testing.T, in string) {
		roundTrip(t, in, ParseResistance, FormatOhms, 5.01e-3)
	})
}

func FuzzParseFraction(f *testing.F) {
	addSeeds(f, "0.1%", "±1 %", "+/-0.05%", "± 0.01 %", "1000ppm", "0.001", "%", "-0.2%")
	f.Fuzz(func(t *testing.T, in string) {
		roundTrip(t, in, ParseFraction, FormatPercent, 5.01e-4)
	})
}

func FuzzParsePercent(f *testing.F) {
	addSeeds(f, "0.1", "1%", "±5", "50 ppm")
	f.Fuzz(func(t *testing.T, in string) {
		roundTrip(t, in, ParsePercent, FormatPercent, 5.01e-4)
	})
}

func FuzzParsePPM(f *testing.F) {
	addSeeds(f, "±25ppm/°C", "25 ppm/K", "25ppm/C", "25 ppm", "±25", "25ppm/ºC", "5e-6/K")
	f.Fuzz(func(t *testing.T, in string) {
		roundTrip(t, in, ParsePPM, FormatPPM, 5.01e-4)
	})
}

func FuzzParsePower(f *testing.F) {
	addSeeds(f, "0.125W", "1/8W", "125mW", "0.125W, 1/8W", "1/10 W", "0.1", "1/0W", "0.063W, 1/16W")
	f.Fuzz(func(t *testing.T, in string) {
		roundTrip(t, in, ParsePower, si("W"), 5.01e-4)
	})
}

func FuzzParseVoltage(f *testing.F) {
	addSeeds(f, "15V", "-5 V", "500mV", "2.5", "±15V", "−5 V", "25 µV")
	f.Fuzz(func(t *testing.T, in string) {
		roundTrip(t, in, ParseVoltage, si("V"), 5.01e-4)
	})
}

func FuzzParseCurrent(f *testing.F) {
	addSeeds(f, "1nA", "2 pA", "5A", "1.5 uA", "1.5 µA", "20 fA")
	f.Fuzz(func(t *testing.T, in string) {
		roundTrip(t, in, ParseCurrent, si("A"), 5.01e-4)
	})
}

func FuzzParseFrequency(f *testing.F) {
	addSeeds(f, "10kHz", "1.2 MHz", "100Hz", "1e6", "10KHz")
	f.Fuzz(func(t *testing.T, in string) {
		roundTrip(t, in, ParseFrequency, si("Hz"), 5.01e-4)
	})
}

func FuzzParseVoltageNoise(f *testing.F) {
	addSeeds(f, "4.5nV/√Hz", "4.5 nV/rtHz", "4.5nV/sqrt(Hz)", "4.5 nV / √Hz")
	f.Fuzz(func(t *testing.T, in string) {
		roundTrip(t, in, ParseVoltageNoise, si("V/√Hz"), 5.01e-4)
	})
}

func FuzzParseCurrentNoise(f *testing.F) {
	addSeeds(f, "0.5 pA/√Hz", "100 fA/rtHz")
	f.Fuzz(func(t *testing.T, in string) {
		roundTrip(t, in, ParseCurrentNoise, si("A/√Hz"), 5.01e-4)
	})
}

// si prints with Format in unit, for the round trips.
func si(unit string) func(float64) string {
	return func(v float64) string { return Format(v, unit) }
}

// exact prints with all the digits float64 needs, for the parsers that have
// no printer of their own.
func exact(unit string) func(float64) string {
	return func(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) + unit }
}

func FuzzParseDB(f *testing.F) {
	addSeeds(f, "80dB", "80 dB", "80", "-3 dB")
	f.Fuzz(func(t *testing.T, in string) {
		roundTrip(t, in, ParseDB, exact(" dB"), 0)
	})
}

func FuzzParseTemperature(f *testing.F) {
	addSeeds(f, "25C", "25 °C", "-40", "+125℃", "300K")
	f.Fuzz(func(t *testing.T, in string) {
		roundTrip(t, in, ParseTemperature, exact(" °C"), 0)
	})
}

func FuzzParseQuantity(f *testing.F) {
	addSeeds(f, "2.2 mA", "3", "3m", "1GA")
	f.Fuzz(func(t *testing.T, in string) {
		roundTrip(t, in, func(s string) (float64, error) { return ParseQuantity(s, "A") },
			si("A"), 5.01e-4)
	})
}

// pairTrip fuzzes a two-value parser: lo < hi when it succeeds, and the pair
// printed with all digits reads back exactly.
func pairTrip(t *testing.T, in string, parse func(string) (float64, float64, error), format func(lo, hi float64) string, ordered bool) {
	lo, hi, err := parse(in)
	if err != nil {
		checkFailure(t, in, err)
		return
	}
	if math.IsNaN(lo) || math.IsNaN(hi) || (ordered && !(lo < hi)) || (!ordered && lo != -hi) {
		t.Fatalf("parse(%q) = %v, %v", in, lo, hi)
	}
	f := format(lo, hi)
	lo2, hi2, err := parse(f)
	if err != nil || lo2 != lo || hi2 != hi {
		t.Fatalf("parse(%q) = %v, %v; printed %q reads back %v, %v, %v", in, lo, hi, f, lo2, hi2, err)
	}
}

func g(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

func FuzzParseTemperatureRange(f *testing.F) {
	addSeeds(f, "-40..85C", "-40 to 85 °C", "0..70", "-40…+125°C", "1..", "85..-40")
	f.Fuzz(func(t *testing.T, in string) {
		pairTrip(t, in, ParseTemperatureRange, func(lo, hi float64) string { return g(lo) + ".." + g(hi) + "°C" }, true)
	})
}

func FuzzParseRange(f *testing.F) {
	addSeeds(f, "-10..10V", "0..2.5 V", "-5V..5V", "0 to 3.3 V")
	f.Fuzz(func(t *testing.T, in string) {
		parse := func(s string) (float64, float64, error) { return ParseRange(s, "V") }
		pairTrip(t, in, parse, func(lo, hi float64) string { return g(lo) + "V .. " + g(hi) + "V" }, true)
	})
}

func FuzzParseSymmetric(f *testing.F) {
	addSeeds(f, "±15V", "+/-15 V", "± 2.5", "15V", "±-15V")
	f.Fuzz(func(t *testing.T, in string) {
		parse := func(s string) (float64, float64, error) { return ParseSymmetric(s, "V") }
		pairTrip(t, in, parse, func(lo, hi float64) string { return "±" + g(hi) + " V" }, false)
	})
}

func FuzzParseCount(f *testing.F) {
	addSeeds(f, "12,345", "12 345", "12345", "-", "1.2k", "1,000,000")
	f.Fuzz(func(t *testing.T, in string) {
		n, err := ParseCount(in)
		if err != nil {
			checkFailure(t, in, err)
			return
		}
		if n < 0 {
			t.Fatalf("ParseCount(%q) = %d", in, n)
		}
		for _, s := range []string{strconv.Itoa(n), grouped(n, ","), grouped(n, "\u00a0")} {
			if m, err := ParseCount(s); err != nil || m != n {
				t.Fatalf("ParseCount(%q) = %d; printed %q reads back %d, %v", in, n, s, m, err)
			}
		}
	})
}

// grouped writes n with sep between groups of three digits.
func grouped(n int, sep string) string {
	s := strconv.Itoa(n)
	out := ""
	for len(s) > 3 {
		out = sep + s[len(s)-3:] + out
		s = s[:len(s)-3]
	}
	return s + out
}

func FuzzParseDrift(f *testing.F) {
	addSeeds(f, "2µV/K", "2 uV/°C", "0.5 uV/C", "±1 µV/℃", "-3nV/K", "2", "2 µV")
	f.Fuzz(func(t *testing.T, in string) {
		roundTrip(t, in, ParseDrift, si("V/K"), 5.01e-4)
	})
}

func FuzzParseSlewRate(f *testing.F) {
	addSeeds(f, "0.5V/µs", "20 V/us", "500mV/µs", "2 V/ns", "1e6 V/s", "0.5")
	f.Fuzz(func(t *testing.T, in string) {
		roundTrip(t, in, ParseSlewRate, si("V/s"), 5.01e-4)
	})
}

func FuzzParseOpenLoopGain(f *testing.F) {
	addSeeds(f, "120dB", "1000 V/mV", "1 V/µV", "200000 V/V", "120", "-3 dB")
	f.Fuzz(func(t *testing.T, in string) {
		roundTrip(t, in, ParseOpenLoopGain, exact(" V/V"), 0)
	})
}

func FuzzParseThermalResistance(f *testing.F) {
	addSeeds(f, "250K/W", "250 °C/W", "40 C/W", "250", "-5 K/W")
	f.Fuzz(func(t *testing.T, in string) {
		roundTrip(t, in, ParseThermalResistance, exact(" K/W"), 0)
	})
}

func FuzzParseGain(f *testing.F) {
	addSeeds(f, "10", "-2", "0.25V/V", "10x", "10 ×", "1k")
	f.Fuzz(func(t *testing.T, in string) {
		roundTrip(t, in, ParseGain, exact(" V/V"), 0)
	})
}

func FuzzParseTransimpedance(f *testing.F) {
	addSeeds(f, "0.5V/A", "500 mV/A", "0.5 Ω", "50mΩ", "2")
	f.Fuzz(func(t *testing.T, in string) {
		roundTrip(t, in, ParseTransimpedance, si("V/A"), 5.01e-4)
	})
}

// FuzzParseStrict checks, for every Quantity, that the strict reading of a
// value agrees with the lenient one wherever it succeeds, and that a strict
// failure the lenient parser accepts is a missing unit (ErrNoUnit) or a
// lenient-only symbol ("25 ppm" for a tempco).
func FuzzParseStrict(f *testing.F) {
	addSeeds(f, "80dB", "80", "10k", "4k7", "25 ppm", "1/8", "0.1%", "2.5", "10m", "250K/W")
	lenient := [...]func(string) (float64, error){
		Resistance: ParseResistance, Fraction: ParseFraction, Tempco: ParsePPM, Power: ParsePower,
		Voltage: ParseVoltage, Current: ParseCurrent, Frequency: ParseFrequency,
		VoltageNoise: ParseVoltageNoise, CurrentNoise: ParseCurrentNoise, Level: ParseDB,
		Temperature: ParseTemperature, Drift: ParseDrift, SlewRate: ParseSlewRate,
		OpenLoopGain: ParseOpenLoopGain, ThermalResistance: ParseThermalResistance, Gain: ParseGain,
		Transimpedance: ParseTransimpedance,
	}
	f.Fuzz(func(t *testing.T, in string) {
		for q := Resistance; q <= Transimpedance; q++ {
			v, err := ParseStrict(in, q)
			lv, lerr := lenient[q](in)
			switch {
			case err == nil && (lerr != nil || v != lv):
				t.Fatalf("%v: strict %q = %v but lenient = %v, %v", q, in, v, lv, lerr)
			case err != nil:
				checkFailure(t, in, err)
				if lerr == nil && !errors.Is(err, ErrNoUnit) && !(q == Tempco && strings.Contains(err.Error(), "ppm alone")) {
					t.Fatalf("%v: lenient reads %q as %v, strict refuses it for another reason: %v", q, in, lv, err)
				}
			}
		}
	})
}

// FuzzParseRangeStrict checks lo <= hi on success and that the range printed
// with all digits and the unit reads back exactly.
func FuzzParseRangeStrict(f *testing.F) {
	addSeeds(f, "-10..10V", "-500..500mV", "±10V", "5V", "0 to 5 V", "5..-5V", "-10..10", "±")
	f.Fuzz(func(t *testing.T, in string) {
		lo, hi, err := ParseRangeStrict(in, Voltage)
		if err != nil {
			checkFailure(t, in, err)
			return
		}
		if math.IsNaN(lo) || math.IsNaN(hi) || lo > hi {
			t.Fatalf("ParseRangeStrict(%q) = %v, %v", in, lo, hi)
		}
		f := g(lo) + "V.." + g(hi) + "V"
		lo2, hi2, err := ParseRangeStrict(f, Voltage)
		if err != nil || lo2 != lo || hi2 != hi {
			t.Fatalf("ParseRangeStrict(%q) = %v, %v; printed %q reads back %v, %v, %v", in, lo, hi, f, lo2, hi2, err)
		}
	})
}

// FuzzFormatExact checks that what FormatExact writes reads back to the
// same float64.
func FuzzFormatExact(f *testing.F) {
	for _, v := range []float64{1e-5, 1.2345678e-9, -14.5, 1e6, 0.30000000000000004, 5e-324, 1.7976931348623157e308} {
		f.Add(v)
	}
	f.Fuzz(func(t *testing.T, v float64) {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return
		}
		s := FormatExact(v, "V")
		got, err := ParseVoltage(s)
		if err != nil || got != v {
			t.Fatalf("FormatExact(%v) = %q reads back %v, %v", v, s, got, err)
		}
	})
}
