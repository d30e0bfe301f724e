package report

import (
	"context"
	"io"
	"testing"
)

// BenchmarkBuildDemoReport builds and writes the demo report: the search of
// the embedded demo catalog for three designs, each design's exact budget,
// a Monte Carlo run of DefaultTrials trials, the temperature sweep, every
// plot, and the HTML.
func BenchmarkBuildDemoReport(b *testing.B) {
	in := demoInput(b)
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		r, err := Build(context.Background(), in)
		if err != nil {
			b.Fatal(err)
		}
		if err := r.WriteHTML(io.Discard); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkWriteHTML writes an already built demo report.
func BenchmarkWriteHTML(b *testing.B) {
	r := buildDemo(b)
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if err := r.WriteHTML(io.Discard); err != nil {
			b.Fatal(err)
		}
	}
}
