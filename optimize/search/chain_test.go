package search

import (
	"context"
	"math"
	"sort"
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
