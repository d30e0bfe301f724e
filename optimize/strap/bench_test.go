package strap

import "testing"

// BenchmarkEnumerate enumerates the eight-pin split-element network (seven
// free pins after the output, about 190,000 pin assignments) and solves each
// class of equivalent strappings.
func BenchmarkEnumerate(b *testing.B) {
	n := splitNet()
	b.ReportAllocs()
	for b.Loop() {
		if _, err := Enumerate(n); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkEvaluate evaluates one strapping of the split network from its
// connections, as a design check does.
func BenchmarkEvaluate(b *testing.B) {
	n := splitNet()
	c, err := Parse(n, "INA-=vn INB-=vn FB=out INA+=vp INB+=vp REF=ref")
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	for b.Loop() {
		if _, err := Evaluate(n, c); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkEnumerateNine enumerates the split network with its inverting
// input brought out too: nine pins, the most the enumeration takes.
func BenchmarkEnumerateNine(b *testing.B) {
	n := splitNet()
	n.Pins = append(n.Pins, "inv")
	b.ReportAllocs()
	for b.Loop() {
		if _, err := Enumerate(n); err != nil {
			b.Fatal(err)
		}
	}
}
