package units

import "testing"

// sink keeps results alive so the compiler cannot drop the calls.
var sink float64

// benchParse measures parse on each input as a sub-benchmark.
func benchParse(b *testing.B, parse func(string) (float64, error), inputs ...string) {
	for _, in := range inputs {
		b.Run(in, func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				v, err := parse(in)
				if err != nil {
					b.Fatal(err)
				}
				sink += v
			}
		})
	}
}

func BenchmarkParseResistance(b *testing.B) {
	benchParse(b, ParseResistance, "4.99k", "4k99", "10R", "470", "10 kOhms", "2.2 MΩ", "0R1")
}

func BenchmarkParseFraction(b *testing.B) {
	benchParse(b, ParseFraction, "±0.1%", "1000ppm")
}

func BenchmarkFormatOhms(b *testing.B) {
	b.ReportAllocs()
	for b.Loop() {
		if FormatOhms(4990) == "" {
			b.Fatal("empty")
		}
	}
}

func BenchmarkParseStrict(b *testing.B) {
	benchParse(b, func(s string) (float64, error) { return ParseStrict(s, Voltage) }, "500mV", "-2.5 V")
	benchParse(b, func(s string) (float64, error) { return ParseStrict(s, Level) }, "80dB")
}

func BenchmarkParseFigures(b *testing.B) {
	benchParse(b, ParseDrift, "2 µV/°C")
	benchParse(b, ParseSlewRate, "0.5V/µs")
	benchParse(b, ParseOpenLoopGain, "120dB", "1000 V/mV")
	benchParse(b, ParseThermalResistance, "250K/W")
}

func BenchmarkParseRangeStrict(b *testing.B) {
	b.ReportAllocs()
	for b.Loop() {
		lo, hi, err := ParseRangeStrict("-500..500mV", Voltage)
		if err != nil {
			b.Fatal(err)
		}
		sink += lo + hi
	}
}
