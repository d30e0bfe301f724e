package units

import (
	"math"
	"math/rand/v2"
	"testing"

	"plumb/catalog/eseries"
)

func TestFormatOhms(t *testing.T) {
	tests := []struct {
		name string
		v    float64
		want string
	}{
		{"E96 value", 4990, "4.99k"},
		{"round ten k", 10000, "10k"},
		{"hundred", 100, "100"},
		{"below one", 0.1, "0.1"},
		{"fifty milliohm", 0.05, "0.05"},
		{"milliohm", 1e-3, "0.001"},
		{"mega", 1e6, "1M"},
		{"2.2 mega", 2.2e6, "2.2M"},
		{"49.9", 49.9, "49.9"},
		{"one k", 1.0e3, "1k"},
		{"giga", 1e9, "1G"},
		{"keeps an odd value's digits", 4999, "4.999k"},
		{"inline value", 19047.6, "19.0476k"},
		{"rounds to six figures", 19047.619047, "19.0476k"},
		{"float residue", 4990.000000001, "4.99k"},
		{"rounds into next prefix", 999999.7, "1M"},
		{"100k", 100e3, "100k"},
		{"zero", 0, "0"},
		{"negative", -4990, "-4.99k"},
		{"above giga range", 1.5e12, "1.5e12"},
		{"tiny", 1.2e-7, "1.2e-7"},
		{"floating point noise", 0.1 * 3 * 1e4, "3k"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := FormatOhms(tc.v); got != tc.want {
				t.Errorf("FormatOhms(%v) = %q, want %q", tc.v, got, tc.want)
			}
		})
	}
}

func TestFormat(t *testing.T) {
	tests := []struct {
		name string
		v    float64
		unit string
		want string
	}{
		{"noise density", 2.5e-9, "V/√Hz", "2.5 nV/√Hz"},
		{"millivolt", 1e-3, "V", "1 mV"},
		{"four figures", 1234.56, "Hz", "1.235 kHz"},
		{"micro sign", 1e-6, "A", "1 µA"},
		{"pico", 0.5e-12, "A/√Hz", "500 fA/√Hz"},
		{"plain", 15, "V", "15 V"},
		{"negative", -5, "V", "-5 V"},
		{"zero", 0, "V", "0 V"},
		{"no unit", 4700, "", "4.7k"},
		{"rounds into next prefix", 999.96, "Hz", "1 kHz"},
		{"giga", 1.2e9, "Hz", "1.2 GHz"},
		{"femto", 1.5e-15, "A", "1.5 fA"},
		{"below femto", 1.5e-18, "A", "1.5e-18 A"},
		{"above giga", 2e12, "Hz", "2e12 Hz"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := Format(tc.v, tc.unit); got != tc.want {
				t.Errorf("Format(%v, %q) = %q, want %q", tc.v, tc.unit, got, tc.want)
			}
		})
	}
}

func TestFormatPercentPPM(t *testing.T) {
	tests := []struct {
		name string
		got  string
		want string
	}{
		{"0.1 %", FormatPercent(0.001), "0.1%"},
		{"0.05 %", FormatPercent(0.0005), "0.05%"},
		{"0.01 %", FormatPercent(1e-4), "0.01%"},
		{"1 %", FormatPercent(0.01), "1%"},
		{"25 %", FormatPercent(0.25), "25%"},
		{"negative", FormatPercent(-0.002), "-0.2%"},
		{"zero", FormatPercent(0), "0%"},
		{"four figures", FormatPercent(0.0012345678), "0.1235%"},
		{"25 ppm", FormatPPM(25), "25 ppm/K"},
		{"2.5 ppm", FormatPPM(2.5), "2.5 ppm/K"},
		{"negative ppm", FormatPPM(-10), "-10 ppm/K"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if tc.got != tc.want {
				t.Errorf("got %q, want %q", tc.got, tc.want)
			}
		})
	}
}

// Decibels of an amplitude ratio, 20·log10 (IEC 60027-3, from memory):
// ×10 is 20 dB, ×10^4 is 80 dB, ×2 is 6.0206 dB and -3 dB is 0.70795
// (common practice).
func TestDB(t *testing.T) {
	tests := []struct {
		name      string
		got, want float64
		tol       float64
	}{
		{"ten", DB(10), 20, 1e-12},
		{"ten thousand", DB(1e4), 80, 1e-12},
		{"two", DB(2), 6.0206, 1e-4},
		{"half power point", FromDB(-3), 0.70795, 1e-5},
		{"80 dB", FromDB(80), 1e4, 1e-8},
		{"CMRR of 50", DB(50), 33.98, 1e-2}, // unity-gain difference amp, 1 % parts: about 34 dB (domain notes §6, Franco, from memory)
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if math.Abs(tc.got-tc.want) > tc.tol {
				t.Errorf("got %v, want %v ± %v", tc.got, tc.want, tc.tol)
			}
		})
	}
	rng := rand.New(rand.NewPCG(1, 1))
	for range 1000 {
		r := math.Pow(10, 12*rng.Float64()-6)
		if back := FromDB(DB(r)); !close(back, r, 1e-12) {
			t.Fatalf("FromDB(DB(%v)) = %v", r, back)
		}
	}
}

// TestResistanceRoundTrip prints and reads back every E192 value (and those
// of the coarser series) from 1 Ω to 10 MΩ; both steps must be exact, since
// each value has at most three significant figures.
func TestResistanceRoundTrip(t *testing.T) {
	for _, s := range eseries.All() {
		t.Run(s.Name, func(t *testing.T) {
			for _, v := range s.Values(1, 10e6) {
				f := FormatOhms(v)
				got, err := ParseResistance(f)
				if err != nil || got != v {
					t.Fatalf("ParseResistance(FormatOhms(%v) = %q) = %v, %v", v, f, got, err)
				}
			}
		})
	}
	// The trade's infix form of every E96 value reads back too: 4990 as "4k99".
	for _, v := range eseries.E96.Values(1, 10e6) {
		f := infix(FormatOhms(v))
		if got, err := ParseResistance(f); err != nil || got != v {
			t.Fatalf("ParseResistance(%q) = %v, %v; want %v", f, got, err, v)
		}
	}
}

// infix turns "4.99k" into "4k99" and "49.9" into "49R9".
func infix(s string) string {
	letter := "R"
	if n := len(s); n > 0 && (s[n-1] == 'k' || s[n-1] == 'M' || s[n-1] == 'G') {
		letter, s = s[n-1:], s[:n-1]
	}
	for i := range len(s) {
		if s[i] == '.' {
			return s[:i] + letter + s[i+1:]
		}
	}
	return s + letter
}

// TestFormatRoundTrip reads back seeded random values printed by Format:
// four significant figures means a relative difference of at most 5e-4.
func TestFormatRoundTrip(t *testing.T) {
	tests := []struct {
		name  string
		unit  string
		parse func(string) (float64, error)
		sign  bool
	}{
		{"voltage", "V", ParseVoltage, true},
		{"current", "A", ParseCurrent, true},
		{"frequency", "Hz", ParseFrequency, false},
		{"power", "W", ParsePower, false},
		{"voltage noise", "V/√Hz", ParseVoltageNoise, false},
		{"current noise", "A/√Hz", ParseCurrentNoise, false},
	}
	rng := rand.New(rand.NewPCG(1, 1))
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			for range 2000 {
				v := math.Pow(10, 36*rng.Float64()-18)
				if tc.sign && rng.IntN(2) == 0 {
					v = -v
				}
				f := Format(v, tc.unit)
				got, err := tc.parse(f)
				if err != nil {
					t.Fatalf("parse(Format(%v) = %q): %v", v, f, err)
				}
				if !close(got, v, 5e-4) {
					t.Fatalf("parse(Format(%v) = %q) = %v", v, f, got)
				}
			}
		})
	}
}

func TestFormatExact(t *testing.T) {
	tests := []struct {
		name string
		v    float64
		unit string
		want string
	}{
		{name: "micro", v: 1e-5, unit: "V", want: "10 µV"},
		{name: "all digits", v: 1.2345678e-9, unit: "A", want: "1.2345678 nA"},
		{name: "mega", v: 1e6, unit: "Hz", want: "1 MHz"},
		{name: "negative", v: -14.5, unit: "V", want: "-14.5 V"},
		{name: "noise", v: 2e-8, unit: "V/rtHz", want: "20 nV/rtHz"},
		{name: "zero", v: 0, unit: "V", want: "0 V"},
		{name: "below femto", v: 1.5e-18, unit: "A", want: "1.5e-18 A"},
		{name: "no unit", v: 4700, unit: "", want: "4.7k"},
		// 0.1 + 0.2 in float64 arithmetic is 0.30000000000000004 (IEEE 754, common practice): every digit kept.
		{name: "binary residue", v: 0.30000000000000004, unit: "V", want: "300.00000000000004 mV"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := FormatExact(tc.v, tc.unit); got != tc.want {
				t.Errorf("FormatExact(%v, %q) = %q, want %q", tc.v, tc.unit, got, tc.want)
			}
		})
	}
}
