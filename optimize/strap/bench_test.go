package strap

import "testing"

// BenchmarkEnumerate enumerates the eight-pin split-element network (seven
// free pins after the output, 190,000 pin assignments) and solves each
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
