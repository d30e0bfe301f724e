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
// values and cheaper parts, so the rank-1 design of the larger catalog should
// never cost more than that of the smaller one it contains, and whatever the
// smaller one can build the larger one should build too. It holds for the
// single values of difference, non-inverting, inverting and divider stages
// (offering only the two values either side of the target, as the search
// did before parts were priced one by one, fails seed 393 there).
//
// It does not hold yet where the search picks a value by a rule that a
// larger catalog can change: series and parallel pairs (the partner values
// are the ones nearer the target than the best single value and cheaper
// than those between, so a new value can push a usable pair out: seed 26
// has a design from the smaller catalog and none from the larger), the
// in-amp's second stage and the level shift's Rg = Rf (one value per
// grade, the one nearest the middle of the resistor window: a new, dearer
// value nearer the middle replaces a cheaper one; in-amp seeds 3, 19, 77,
// 123, 164, 193, level-shift seeds 117 and 12, 37, 78, 101). Those cases
// are listed with the gap they show and skipped (PLUMB_SUPERSET_GAPS=1
// runs them), so that the property is checked as soon as the search offers
// every value they need.
func TestLargerCatalogNeverDearer(t *testing.T) {
	tests := []struct {
		name   string
		gen    func(*rand.Rand) Problem
		combos bool
		stream uint64
		cases  uint64
		gap    string // why the property does not hold yet ("": it does)
	}{
		{"single values", genProblem, false, 23, 500, ""},
		{"series and parallel pairs", genProblem, true, 24, 300, "pairs are chosen relative to the best single value"},
		{"in-amp and its second stage", genInAmpProblem, false, 25, 200, "one second-stage value per grade, nearest the middle of the window"},
		{"level shift, reference into the non-inverting node", genLevelShiftProblem, false, 26, 200, "one Rg = Rf value per grade, nearest the middle of the window"},
		{"level shift, reference into the inverting node", genLevelShiftInvProblem, false, 27, 200, "one Rg = Rf value per grade, nearest the middle of the window"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if tc.gap != "" && os.Getenv("PLUMB_SUPERSET_GAPS") == "" {
				t.Skipf("known gap (issue 11): %s", tc.gap)
			}
			largerNeverDearer(t, tc.gen, tc.combos, tc.stream, tc.cases)
		})
	}
}

func largerNeverDearer(t *testing.T, gen func(*rand.Rand) Problem, combos bool, stream, cases uint64) {
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
	if feasible < int(cases)/5 {
		t.Errorf("only %d of %d cases are feasible: the property has no teeth", feasible, cases)
	}
	t.Logf("%d of %d cases feasible", feasible, cases)
}
