package search

import (
	"context"
	"fmt"
	"math/rand/v2"
	"reflect"
	"testing"
)

// TestBranchAndBoundMatchesExhaustive checks the search against the
// exhaustive enumerator on many seeded random catalogs and requirements:
// the same rank-1 cost and the same top-N classes in the same order.
//
// Regression entries (random cases that once failed) are listed in
// regressions below with the seed and what went wrong.
func TestBranchAndBoundMatchesExhaustive(t *testing.T) {
	const cases = 300
	seeds := make([]uint64, 0, cases+len(regressions))
	for _, r := range regressions {
		seeds = append(seeds, r.seed)
	}
	for i := range uint64(cases) {
		seeds = append(seeds, 1000+i)
	}
	feasible, classes, visited := 0, 0, 0
	for _, seed := range seeds {
		r := rand.New(rand.NewPCG(seed, 1))
		parts := genParts(r, r.IntN(4), r.IntN(120), 1+r.IntN(5), r.IntN(6), 1+r.IntN(12))
		p := genProblem(r)
		combos := r.IntN(2) == 0
		if err := p.normalize(); err != nil {
			t.Fatalf("seed %d: %v", seed, err)
		}
		s, err := newSpace(context.Background(), parts, &p, combos)
		if err != nil {
			t.Fatalf("seed %d: %v", seed, err)
		}
		n := 1 + r.IntN(6)
		want, err := s.exhaustive(context.Background(), n)
		if err != nil {
			t.Fatal(err)
		}
		got, st, err := s.branchAndBound(context.Background(), n, nil)
		classes += st.classes
		visited += st.visited
		if err != nil {
			t.Fatal(err)
		}
		if len(want) > 0 {
			feasible++
		}
		sameTop(t, fmt.Sprintf("seed %d", seed), got, want)
	}
	// The property is only worth something if many cases have answers.
	if feasible < len(seeds)/4 {
		t.Errorf("only %d of %d random cases are feasible; the generator is too strict", feasible, len(seeds))
	}
	t.Logf("%d cases, %d feasible; the search visited %d of %d classes", len(seeds), feasible, visited, classes)
}

// TestExhaustiveAPIMatchesSolve compares the public entry points on seeded
// random cases: the same ranked designs (family, costs, parts) and the same
// infeasibility.
func TestExhaustiveAPIMatchesSolve(t *testing.T) {
	for seed := uint64(1); seed <= 60; seed++ {
		r := rand.New(rand.NewPCG(seed, 2))
		parts := genParts(r, r.IntN(4), r.IntN(120), 1+r.IntN(5), r.IntN(6), 1+r.IntN(12))
		p := genProblem(r)
		opt := Options{Top: 1 + r.IntN(5), Combos: r.IntN(2) == 0}
		got, gerr := SolveProblem(context.Background(), parts, p, opt)
		want, werr := Exhaustive(context.Background(), parts, p, opt)
		if (gerr == nil) != (werr == nil) {
			t.Fatalf("seed %d: errors %v and %v", seed, gerr, werr)
		}
		if gerr != nil && got == nil {
			continue
		}
		if len(got.Designs) != len(want.Designs) {
			t.Fatalf("seed %d: %d designs, exhaustive %d", seed, len(got.Designs), len(want.Designs))
		}
		for i := range want.Designs {
			g, w := got.Designs[i], want.Designs[i]
			if g.Family != w.Family || g.TotalCost != w.TotalCost || !reflect.DeepEqual(g.Parts, w.Parts) {
				t.Errorf("seed %d rank %d: %s %.4f %v, exhaustive %s %.4f %v", seed, i+1, g.Family, g.TotalCost, g.Parts, w.Family, w.TotalCost, w.Parts)
			}
		}
	}
}

// sameTop reports where the search's top classes differ from the
// enumeration's: count, class, cost or value option.
func sameTop(t *testing.T, label string, got, want []classBest) {
	t.Helper()
	if len(got) != len(want) {
		t.Errorf("%s: search found %d classes, exhaustive %d", label, len(got), len(want))
		return
	}
	for i := range want {
		if got[i].id != want[i].id || got[i].cost != want[i].cost || got[i].opt != want[i].opt {
			t.Errorf("%s rank %d: search %d/%.6f/opt %d, exhaustive %d/%.6f/opt %d",
				label, i+1, got[i].id, got[i].cost, got[i].opt, want[i].id, want[i].cost, want[i].opt)
		}
	}
}

// regressions are random cases that once made the search and the
// enumerator disagree, kept so they stay fixed. None has failed on the code
// as committed so far; a seed that does goes here with a note on the cause.
// (Deliberately breaking the CMRR bound, using the smallest ratio instead of
// the largest, makes 6 of the 300 generated seeds fail, so the property has
// teeth.)
var regressions = []struct {
	seed uint64
	note string
}{}
