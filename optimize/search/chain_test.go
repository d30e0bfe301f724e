package search

import (
	"context"
	"strings"
	"testing"

	"plumb/optimize/spec"
)

// TestChainInfeasible: a chain no pair of candidates meets, and a chain
// whose first stage alone cannot meet its share, are infeasible with the
// reason, not an empty success.
func TestChainInfeasible(t *testing.T) {
	snap := demoSnapshot(t)
	for _, c := range []struct {
		name string
		set  func(*spec.Spec)
		want string
	}{
		{"no pair", func(s *spec.Spec) { s.Limits.TotalError = 1e-5 }, "no pair of the stages' designs meets"},
		{"stage alone", func(s *spec.Spec) { s.Limits.GainError = 1e-7 }, "stage 1 alone has no design"},
	} {
		t.Run(c.name, func(t *testing.T) {
			s, err := spec.Load("../../data/examples/two-stage.yaml")
			if err != nil {
				t.Fatal(err)
			}
			c.set(s)
			res, err := SolveChain(context.Background(), snap, s, Options{})
			if !IsInfeasible(err) || res == nil || len(res.Designs) != 0 || !strings.Contains(res.Infeasible, c.want) {
				t.Fatalf("err %v, result %+v; want infeasible: %s", err, res, c.want)
			}
		})
	}
}

// BenchmarkSolveChain times the exact chain search of the two-stage
// example on the demo catalog: each stage's designs listed, the screening
// floors, the exact stage budgets of the designs left and the pairs.
func BenchmarkSolveChain(b *testing.B) {
	s, err := spec.Load("../../data/examples/two-stage.yaml")
	if err != nil {
		b.Fatal(err)
	}
	snap := demoSnapshot(b)
	b.ReportAllocs()
	for b.Loop() {
		if _, err := SolveChain(context.Background(), snap, s, Options{}); err != nil {
			b.Fatal(err)
		}
	}
}
