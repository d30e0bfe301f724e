package search

import (
	"context"
	"math"
	"sort"
	"strings"
	"testing"

	"plumb/optimize/budget"
	"plumb/optimize/spec"
)

// TestChainBranchAndBoundExhaustive: the chains the branch and bound
// ranks are the cheapest passing ones among every pair of the stages'
// candidates, each judged by the chain's budget (an exhaustive walk over
// all pairs is the oracle), and the ranked chain's figures are the cascade
// of its stages' exact budgets.
func TestChainBranchAndBoundExhaustive(t *testing.T) {
	s, err := spec.Load("../../data/examples/two-stage.yaml")
	if err != nil {
		t.Fatal(err)
	}
	snap := demoSnapshot(t)
	ctx := context.Background()
	solveStage := func(ctx context.Context, sub *spec.Spec, o Options) (*Result, error) { return Solve(ctx, snap, sub, o) }
	var res ChainResult
	lists, err := stageLists(ctx, s, Options{}, solveStage, &res)
	if err != nil {
		t.Fatal(err)
	}
	if len(lists[0]) < 2 || len(lists[1]) < 2 {
		t.Fatalf("too few candidates to compare: %d and %d", len(lists[0]), len(lists[1]))
	}
	var all []float64
	for _, a := range lists[0] {
		for _, b := range lists[1] {
			cd, err := chainDesign(s, []candidate{a, b})
			if err != nil {
				t.Fatal(err)
			}
			if cd.budget.Pass {
				all = append(all, cd.TotalCost)
			}
		}
	}
	sort.Float64s(all)
	for _, top := range []int{1, 5, 20} {
		var st ChainStats
		ranked, _, err := combineChains(ctx, s, lists, top, &st)
		if err != nil {
			t.Fatal(err)
		}
		if want := min(top, len(all)); len(ranked) != want {
			t.Fatalf("top %d: %d chains ranked, want %d", top, len(ranked), want)
		}
		for i, d := range ranked {
			if math.Abs(d.TotalCost-all[i]) > 1e-9 {
				t.Errorf("top %d: chain %d costs %g, the exhaustive walk's %d-th passing chain %g", top, i+1, d.TotalCost, i+1, all[i])
			}
		}
		if st.Evaluated+st.BoundPruned != len(lists[0])*len(lists[1]) {
			t.Errorf("top %d: %d evaluated and %d pruned of %d pairs", top, st.Evaluated, st.BoundPruned, len(lists[0])*len(lists[1]))
		}
	}
	ranked, _, err := combineChains(ctx, s, lists, 1, &ChainStats{})
	if err != nil || len(ranked) == 0 {
		t.Fatalf("no chain: %v", err)
	}
	d := ranked[0]
	// The chain's figures from its stages' exact budgets, by the cascade
	// equations written out here (worst case; see budget.Cascade).
	m1, m2 := d.Stages[0].Metrics, d.Stages[1].Metrics
	g2 := s.Stages[1].Gain
	if got, want := d.Metrics.GainError, m1.GainError+m2.GainError+m1.GainError*m2.GainError; math.Abs(got-want) > 1e-12 {
		t.Errorf("chain gain error %g, want %g", got, want)
	}
	if got, want := d.Metrics.OutputOffsetV, g2*(1+m2.GainError)*m1.OutputOffsetV+m2.OutputOffsetV; math.Abs(got-want) > 1e-12 {
		t.Errorf("chain offset %g, want %g", got, want)
	}
	if got, want := d.Metrics.Gain, m1.Gain*m2.Gain; math.Abs(got-want) > 1e-9*want {
		t.Errorf("chain gain %g, want %g", got, want)
	}
	if d.Channel == nil || d.Metrics.TotalErrorLSB <= 0 {
		t.Fatalf("chain into an ADC without a total error: %+v", d.Channel)
	}
	if l, ok := findLimit(d.Limits, budget.LimitTotalError); !ok || !l.Pass {
		t.Errorf("ranked chain's total error limit: %+v", l)
	}
}

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
		{"no pair", func(s *spec.Spec) { s.Limits.TotalError = 1e-5 }, "no pair of the stages' candidate designs"},
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

// BenchmarkChainCombine times the branch and bound over the two stages'
// candidate lists of the two-stage example (the stages' own searches are
// the other benchmarks' business).
func BenchmarkChainCombine(b *testing.B) {
	s, err := spec.Load("../../data/examples/two-stage.yaml")
	if err != nil {
		b.Fatal(err)
	}
	snap := demoSnapshot(b)
	ctx := context.Background()
	var res ChainResult
	lists, err := stageLists(ctx, s, Options{}, func(ctx context.Context, sub *spec.Spec, o Options) (*Result, error) { return Solve(ctx, snap, sub, o) }, &res)
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	for b.Loop() {
		if _, _, err := combineChains(ctx, s, lists, defaultTop, &ChainStats{}); err != nil {
			b.Fatal(err)
		}
	}
}
