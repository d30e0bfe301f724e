package units

import "testing"

// sink keeps results alive so the compiler cannot drop the calls.
var sink float64

func BenchmarkParseResistance(b *testing.B) {
	for _, in := range []string{"4.99k", "4k99", "10R", "470", "10 kOhms", "2.2 MΩ", "0R1"} {
		b.Run(in, func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				v, err := ParseResistance(in)
				if err != nil {
					b.Fatal(err)
				}
				sink += v
			}
		})
	}
}

func BenchmarkParseFraction(b *testing.B) {
	b.ReportAllocs()
	for b.Loop() {
		v, err := ParseFraction("±0.1%")
		if err != nil {
			b.Fatal(err)
		}
		sink += v
	}
}

func BenchmarkFormatOhms(b *testing.B) {
	b.ReportAllocs()
	for b.Loop() {
		if FormatOhms(4990) == "" {
			b.Fatal("empty")
		}
	}
}
