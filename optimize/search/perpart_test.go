package search

import (
	"context"
	"fmt"
	"math/rand/v2"
	"os"
	"reflect"
	"testing"

	"plumb/catalog"
)

// genPerPart makes an invented catalog priced part by part, as distributor
// exports are: n resistors over a few grades and a few values each, so that
// many parts offer one value in one grade; every part has its own price
// breaks, stock and sometimes a minimum order, and about one in five copies
// the price list of an earlier part of its grade (equal prices, which the
// tie rules must settle the same way whatever the order of the rows).
func genPerPart(r *rand.Rand, n, grades, nNet, nAmp int) *Parts {
	ps := genParts(r, 0, 0, 0, nNet, nAmp)
	type gr struct {
		g    catalog.ResistorGrade
		base float64
	}
	var gs []gr
	for range grades {
		g, base := genGrade(r)
		gs = append(gs, gr{g, base})
	}
	// E96 values about the ratios the generated problems ask for (1, 2, 5,
	// 10, 20), dense enough that a ratio window holds several values.
	var values []float64
	for _, v := range []float64{1.00, 1.02, 1.05, 1.07, 1.10, 1.13, 1.15, 1.18, 1.21, 1.24, 1.27, 1.30,
		2.00, 2.05, 2.10, 2.15, 2.21, 2.26, 2.32, 2.37, 2.43, 2.49, 2.55, 2.61,
		4.99, 5.11, 5.23, 5.36, 5.49, 5.62, 5.76, 5.90, 6.04, 6.19, 6.34, 6.49} {
		values = append(values, v)
	}
	var last = map[int]catalog.Offer{}
	for i := range n {
		gi := r.IntN(len(gs))
		o := genOffer(r, gs[gi].base, "EUR")
		if prev, ok := last[gi]; ok && r.IntN(5) == 0 {
			o.PriceBreaks = prev.PriceBreaks
		}
		o.Stock = []int{-1, 0, 50, 400, 20000}[r.IntN(5)]
		last[gi] = o
		ps.Resistors = append(ps.Resistors, catalog.Resistor{
			Part: fmt.Sprintf("PP-%05d", i), Maker: "Quorra Resistive", ResistorGrade: gs[gi].g, Offer: o,
			ValueOhm: values[r.IntN(len(values))] * []float64{1e3, 1e4, 1e5}[r.IntN(3)],
		})
	}
	return ps
}

// TestPerPartBranchAndBoundMatchesExhaustive is the oracle property on
// catalogs priced part by part: the branch and bound and the enumeration of
// every value option agree on the top classes and on the ranked designs
// (family, cost, every part), including ties between equally priced parts
// and parts shared by positions that take one value.
func TestPerPartBranchAndBoundMatchesExhaustive(t *testing.T) {
	for seed := uint64(1); seed <= 120; seed++ {
		r := rand.New(rand.NewPCG(seed, 21))
		parts := genPerPart(r, 20+r.IntN(300), 1+r.IntN(4), r.IntN(4), 1+r.IntN(10))
		p := genProblem(r)
		combos := r.IntN(3) == 0
		n := 1 + r.IntN(5)
		q := p
		if err := q.normalize(); err != nil {
			t.Fatalf("seed %d: %v", seed, err)
		}
		s, err := newSpace(context.Background(), parts, &q, combos)
		if err != nil {
			t.Fatalf("seed %d: %v", seed, err)
		}
		want, err := s.exhaustive(context.Background(), n)
		if err != nil {
			t.Fatal(err)
		}
		s.resetOptions()
		got, _, err := s.branchAndBound(context.Background(), n, nil)
		if err != nil {
			t.Fatal(err)
		}
		sameTop(t, fmt.Sprintf("seed %d", seed), got, want)
		opt := Options{Top: n, Combos: combos}
		gr, gerr := SolveProblem(context.Background(), parts, p, opt)
		wr, werr := Exhaustive(context.Background(), parts, p, opt)
		if (gerr == nil) != (werr == nil) {
			t.Fatalf("seed %d: errors %v and %v", seed, gerr, werr)
		}
		if gr == nil || wr == nil {
			continue
		}
		sameDesigns(t, fmt.Sprintf("seed %d", seed), gr, wr)
	}
}

// sameDesigns reports where two results rank different designs.
func sameDesigns(t *testing.T, label string, got, want *Result) {
	t.Helper()
	if len(got.Designs) != len(want.Designs) {
		t.Errorf("%s: %d designs, want %d", label, len(got.Designs), len(want.Designs))
		return
	}
	for i := range want.Designs {
		g, w := got.Designs[i], want.Designs[i]
		if g.Family != w.Family || g.TotalCost != w.TotalCost || !reflect.DeepEqual(g.Parts, w.Parts) {
			t.Errorf("%s rank %d: %s %.4f %v, want %s %.4f %v", label, i+1, g.Family, g.TotalCost, g.Parts, w.Family, w.TotalCost, w.Parts)
		}
	}
}

// TestPerPartCatalogFileMatchesMemory: the same parts searched from a
// catalog database (indexed queries, rows in value order) and from memory
// (rows in catalog order) give the same designs, part numbers included:
// the choice among equally priced parts does not depend on the order the
// rows arrive in.
func TestPerPartCatalogFileMatchesMemory(t *testing.T) {
	for seed := uint64(1); seed <= 25; seed++ {
		r := rand.New(rand.NewPCG(seed, 22))
		parts := genPerPart(r, 50+r.IntN(300), 1+r.IntN(4), r.IntN(4), 1+r.IntN(10))
		p := genProblem(r)
		st, err := catalog.OpenMemory()
		if err != nil {
			t.Fatal(err)
		}
		b := &catalog.Batch{Resistors: parts.Resistors}
		if _, err := st.Upsert(context.Background(), b, catalog.UpsertOptions{Source: "test"}); err != nil {
			t.Fatalf("seed %d: %v", seed, err)
		}
		opt := Options{Top: 3}
		want, werr := SolveProblem(context.Background(), parts, p, opt)
		got, gerr := SolveProblem(context.Background(), &Parts{Networks: parts.Networks, Amplifiers: parts.Amplifiers, rows: st}, p, opt)
		st.Close()
		if (gerr == nil) != (werr == nil) {
			t.Fatalf("seed %d: errors %v and %v", seed, gerr, werr)
		}
		if got != nil && want != nil {
			sameDesigns(t, fmt.Sprintf("seed %d", seed), got, want)
		}
	}
}

// TestLargerCatalogNeverDearer: adding parts to a catalog can only add
// values and cheaper parts, so the rank-1 design of the larger catalog must
// never cost more than that of the smaller one it contains, and whatever the
// smaller one can build the larger one must build too. It holds where the
// search offers value sets that depend on the values alone, or on prices
// only through a dominance a larger catalog can only strengthen: every
// single value inside the window, and the in-amp second-stage values that
// are cheaper than every smaller one (stage2Values). Series and parallel
// pairs and the level shift's Rg = Rf do not keep it yet (pairGap, lsGap):
// their cases are skipped with the reason, PLUMB_SUPERSET_GAPS=1 runs them.
//
// Regression cases, each failing once: single values seed 393 (only the
// two values either side of the target were offered); in-amp seeds 3, 19,
// 77, 123, 164, 193 (one second-stage value per grade, the one nearest the
// middle of the window: 13.0k replaced a cheaper 12.7k); pairs seed 26;
// level shift seeds 117 and, reference into the inverting node, 12, 37,
// 78, 101.
func TestLargerCatalogNeverDearer(t *testing.T) {
	tests := []struct {
		name   string
		gen    func(*rand.Rand) Problem
		combos bool
		stream uint64
		cases  uint64
		least  int    // fewest feasible cases for the property to have teeth
		gap    string // why the property does not hold yet ("": it does)
	}{
		{"single values", genProblem, false, 23, 500, 100, ""},
		{"series and parallel pairs", genProblem, true, 24, 300, 60, pairGap},
		{"in-amp and its second stage", genInAmpProblem, false, 25, 200, 40, ""},
		// Few level shifts of the generated problems find values for both
		// their ratios in these catalogs: more cases.
		{"level shift, reference into the non-inverting node", genLevelShiftProblem, false, 26, 400, 40, lsGap},
		{"level shift, reference into the inverting node", genLevelShiftInvProblem, false, 27, 200, 40, lsGap},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if tc.gap != "" && os.Getenv("PLUMB_SUPERSET_GAPS") == "" {
				t.Skipf("known gap (issue 11): %s", tc.gap)
			}
			largerNeverDearer(t, tc.gen, tc.combos, tc.stream, tc.cases, tc.least)
		})
	}
}

// pairGap is why series and parallel pairs do not keep the property yet:
// the partner values are the ones nearer the target than the best single
// value and cheaper than those between, so a new value can push a usable
// pair out (seed 26). Offering every pair inside the window keeps it, but
// multiplies the options by the values of a decade and a half (the in-amp
// equivalence test on E96 series then needs gigabytes); a pair's figures
// depend on its total alone, so no smaller set is safe without pruning
// by the limits.
const pairGap = "pairs are chosen relative to the best single value"

// lsGap is why the level shift does not keep the property yet: one Rg = Rf
// value per grade, the one nearest the middle of the window, so a new,
// dearer value nearer the middle replaces a cheaper one. Offering every
// value multiplies the configurations by the values of a grade (the
// diagnosis's relaxed re-solves then run out of time and memory); the
// bias-current term Ib·|R+ - R-| is not monotonic in Rg∥Rf, so a Pareto
// set has to be taken per option (R+ known), not per grade.
// PLUMB_SUPERSET_GAPS=1 runs these cases.
const lsGap = "one Rg = Rf value per grade, nearest the middle of the window"

func largerNeverDearer(t *testing.T, gen func(*rand.Rand) Problem, combos bool, stream, cases uint64, least int) {
	feasible := 0
	for seed := uint64(1); seed <= cases; seed++ {
		r := rand.New(rand.NewPCG(seed, stream))
		big := genPerPart(r, 100+r.IntN(400), 1+r.IntN(3), r.IntN(4), 1+r.IntN(10))
		p := gen(r)
		small := *big
		small.Resistors = nil
		for _, res := range big.Resistors {
			if r.IntN(3) == 0 {
				small.Resistors = append(small.Resistors, res)
			}
		}
		opt := Options{Top: 1, Combos: combos}
		sr, serr := SolveProblem(context.Background(), &small, p, opt)
		if serr != nil {
			continue
		}
		feasible++
		br, berr := SolveProblem(context.Background(), big, p, opt)
		if berr != nil {
			t.Errorf("seed %d: the smaller catalog has a design (%.4f) and the larger none: %v", seed, sr.Designs[0].TotalCost, berr)
			continue
		}
		if b, s := br.Designs[0].TotalCost, sr.Designs[0].TotalCost; b > s*(1+1e-12) {
			t.Errorf("seed %d: rank 1 costs %.6f from the larger catalog (%v), %.6f from the smaller one inside it (%v)", seed, b, br.Designs[0].Parts, s, sr.Designs[0].Parts)
		}
	}
	if feasible < least {
		t.Errorf("only %d of %d cases are feasible: the property has no teeth", feasible, cases)
	}
	t.Logf("%d of %d cases feasible", feasible, cases)
}
