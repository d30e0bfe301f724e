package search

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"sort"
	"testing"
	"time"

	"plumb/catalog"
	"plumb/optimize/assume"
	"plumb/optimize/budget"
	"plumb/optimize/cost"
	"plumb/optimize/family"
	"plumb/optimize/spec"
)

// genChain makes a random two-stage chain on a differential input: an
// in-amp or a difference stage, then a difference, non-inverting or
// inverting stage, with limits loose enough that some chains pass and
// tight enough that the cheapest pair of stage designs often does not.
func genChain(r *rand.Rand) *spec.Spec {
	first := []string{family.InAmp.Name, family.Difference.Name}[r.IntN(2)]
	second := []string{family.Difference.Name, family.NonInverting.Name, family.Inverting.Name}[r.IntN(3)]
	g1 := []float64{5, 10, 20}[r.IntN(3)]
	if first == family.InAmp.Name {
		g1 = []float64{10, 20, 50}[r.IntN(3)]
	}
	g2 := []float64{1, 2, 5}[r.IntN(3)]
	switch second {
	case family.NonInverting.Name:
		g2 = []float64{2, 5}[r.IntN(2)]
	case family.Inverting.Name:
		g2 = -g2
	}
	method := []string{spec.WorstCase, spec.RSS}[r.IntN(2)]
	vin := []float64{0.02, 0.05, 0.1}[r.IntN(3)]
	s := &spec.Spec{Name: "chain", Families: []string{first}, Gain: g1 * g2,
		Stages: []spec.Stage{{Families: []string{first}, Gain: g1}, {Families: []string{second}, Gain: g2}},
		Input:  spec.Range{Min: -vin / g1 / math.Abs(g2) * 8, Max: vin / g1 / math.Abs(g2) * 8}, Differential: true,
		CommonMode: spec.Range{Min: -1, Max: 1}, Supply: spec.Range{Min: -12, Max: 12},
		Temp: spec.Range{Min: 0, Max: 70}, TempRef: 25,
		Limits: spec.Limits{GainError: []float64{0.005, 0.01, 0.02, 0.05}[r.IntN(4)], GainDrift: []float64{50e-6, 200e-6, 500e-6}[r.IntN(3)],
			OutputOffsetV: []float64{0.02, 0.1, 0.3}[r.IntN(3)], CMRRdB: []float64{0, 40, 60}[r.IntN(3)]},
		Analysis: spec.Analysis{Method: method, Sigmas: 3}, Derating: 0.5,
		Build: spec.Build{Quantity: []int{1, 10, 250}[r.IntN(3)]}}
	s.Families = s.Stages[0].Families
	// Line items and attrition make sharing a part number between the
	// stages pay; stock exclude makes it fail where the joint quantity is
	// short.
	s.Build.LineItemCost = []float64{0, 0.5}[r.IntN(2)]
	s.Build.Attrition = []float64{0, 0.02}[r.IntN(2)]
	s.Build.Stock = []string{"flag", "exclude"}[r.IntN(2)]
	return s
}

// chainOracle ranks every passing chain the slow way: each stage's every
// design within its hard limits (the exhaustive walk of every class and
// every value option, with no error limit screening), each confirmed by
// its exact budget under the stage's problem, every pair judged by the
// chain's budget and priced as one build by cost.StagesBOM (a part number
// both stages use bought once, at the joint quantity). It returns the
// costs of the passing chains, cheapest first, how many of them cost less
// than their stages priced apart or were left out because the joint
// quantity is short of stock (they share a part number), and false when
// the stages have more than maxOracle designs between them (the case is
// then too slow to check).
func chainOracle(t *testing.T, snap *catalog.Snapshot, s *spec.Spec, maxOracle int) ([]float64, int, bool) {
	t.Helper()
	ctx := context.Background()
	snap, _ = assume.Snapshot(snap)
	parts := (&Parts{Series: snap.ResistorSeries, Resistors: snap.Resistors, Networks: snap.Networks, Amplifiers: snap.Amplifiers}).forSearch()
	lists := make([][]candidate, 2)
	results := make([]*Result, 2)
	for i := range s.Stages {
		p, err := FromSpec(s.StageSpec(i))
		if err != nil {
			t.Fatal(err)
		}
		r, err := solve(ctx, parts, p, Options{ceiling: math.Inf(1)}, nil, true)
		if err != nil {
			t.Fatal(err)
		}
		if r.cut {
			t.Fatal("the oracle's stage list is cut")
		}
		results[i] = r
	}
	if len(results[0].Designs)+len(results[1].Designs) > maxOracle {
		return nil, 0, false
	}
	for i, r := range results {
		for j := range r.Designs {
			br, err := budget.EvaluateContext(ctx, s.StageProblem(i), r.designs[j], nil)
			if err != nil {
				t.Fatal(err)
			}
			if br.Pass {
				lists[i] = append(lists[i], candidate{d: &r.Designs[j], sd: r.designs[j], br: br})
			}
		}
	}
	find, err := spec.SnapshotLookup(snap)
	if err != nil {
		t.Fatal(err)
	}
	build, err := cost.BuildOf(s.Build)
	if err != nil {
		t.Fatal(err)
	}
	var costs []float64
	sharing := 0
	for _, a := range lists[0] {
		for _, b := range lists[1] {
			cd, err := chainDesign(s, []candidate{a, b})
			if err != nil {
				t.Fatal(err)
			}
			if !cd.budget.Pass {
				continue
			}
			bm, err := cost.StagesBOM([]*spec.Design{a.sd, b.sd}, find, build)
			if errors.Is(err, cost.ErrShortStock) {
				sharing++
				continue
			}
			if err != nil {
				t.Fatal(err)
			}
			if bm.Total < a.d.TotalCost+b.d.TotalCost-1e-9 {
				sharing++
			}
			costs = append(costs, bm.Total)
		}
	}
	sort.Float64s(costs)
	return costs, sharing, true
}

// TestChainSearchMatchesOracle: on seeded random chains over small
// invented catalogs, the chain search ranks the same costs as the oracle
// (chainOracle: every design of each stage within its hard limits, every
// pair judged), and is infeasible exactly when the oracle finds no chain.
// The oracle screens no stage by its share of the chain's limits, so the
// test also checks that spec.StageLimits and budget.BestOf prune nothing
// that could pass.
func TestChainSearchMatchesOracle(t *testing.T) {
	const cases = 40
	feasible, checked, sharing, nearFixes := 0, 0, 0, 0
	for seed := uint64(1); seed <= cases; seed++ {
		if only := os.Getenv("CHAIN_SEED"); only != "" && only != fmt.Sprint(seed) {
			continue
		}
		r := rand.New(rand.NewPCG(seed, 16))
		parts := genParts(r, 0, 40+r.IntN(60), 1+r.IntN(3), r.IntN(2), 2+r.IntN(3))
		for i := range parts.Amplifiers {
			// Rails of ±12 V: every generated amplifier takes them.
			parts.Amplifiers[i].SupplyMaxV = 36
		}
		snap := &catalog.Snapshot{Resistors: parts.Resistors, Networks: parts.Networks, Amplifiers: parts.Amplifiers}
		s := genChain(r)
		top := 1 + r.IntN(5)
		t0 := time.Now()
		want, shared, ok := chainOracle(t, snap, s, 350)
		if !ok {
			continue
		}
		if shared > 0 {
			sharing++
		}
		checked++
		t1 := time.Now()
		got, err := SolveChain(context.Background(), snap, s, Options{Top: top})
		name := fmt.Sprintf("seed %d (%s then %s, %s)", seed, s.Stages[0].Families[0], s.Stages[1].Families[0], s.Analysis.Method)
		if testing.Verbose() {
			t.Logf("%s: oracle %v, search %v", name, t1.Sub(t0), time.Since(t1))
		}
		if len(want) == 0 {
			if testing.Verbose() && got != nil {
				t.Logf("%s: %s", name, got.Infeasible)
			}
			if !IsInfeasible(err) {
				t.Errorf("%s: the oracle finds no chain, the search: %v", name, err)
			}
			continue
		}
		if err != nil {
			t.Errorf("%s: %v; the oracle's cheapest chain costs %g", name, err, want[0])
			continue
		}
		feasible++
		if n := min(top, len(want)); len(got.Designs) != n {
			t.Errorf("%s: %d chains ranked, the oracle %d", name, len(got.Designs), n)
			continue
		}
		for i, d := range got.Designs {
			if math.Abs(d.TotalCost-want[i]) > 1e-9*want[i] {
				t.Errorf("%s: chain %d costs %g, the oracle's %g", name, i+1, d.TotalCost, want[i])
			}
		}
		if st := got.Designs[0].Stages; st[0].TotalCost > got.Designs[0].TotalCost-st[1].TotalCost+1e-9 {
			t.Errorf("%s: stage costs do not add up", name)
		}
		// A ranked chain's purchasing list comes to its cost.
		find, _ := spec.SnapshotLookup(snap)
		build, _ := cost.BuildOf(s.Build)
		for _, d := range got.Designs {
			bm, err := cost.StagesBOM(d.Designs(), find, build)
			if err != nil || math.Abs(bm.Total-d.TotalCost) > 1e-9*d.TotalCost {
				t.Errorf("%s: chain %d costs %g, its purchasing list %v (%v)", name, d.Rank, d.TotalCost, bm, err)
			}
		}
		if testing.Verbose() {
			t.Logf("%s: %d near misses", name, len(got.NearMisses))
		}
		// Near misses cost less than rank 1 and fail; a fix is a passing
		// chain, so it costs no less than the oracle's cheapest.
		for _, nm := range got.NearMisses {
			if nm.TotalCost >= want[0] || nm.budget.Pass || len(nm.Fails) == 0 || nm.Shortfall <= 1 {
				t.Errorf("%s: near miss at %g (rank 1 %g) passes %v, fails %v, shortfall %g", name, nm.TotalCost, want[0], nm.budget.Pass, nm.Fails, nm.Shortfall)
			}
			if nm.Fix != nil && (nm.Fix.TotalCost < want[0]*(1-1e-9) || len(nm.Fix.Changes) == 0) {
				t.Errorf("%s: near miss fix %+v costs less than the cheapest passing chain %g", name, nm.Fix, want[0])
			}
			if nm.Fix != nil {
				nearFixes++
			}
		}
	}
	if checked < cases/2 || feasible < checked/4 {
		t.Errorf("%d of %d random chains checked, %d feasible; the generator is too strict or too large", checked, cases, feasible)
	}
	// Chains whose stages share a part number must be among the cases, or
	// the joint pricing goes unchecked.
	if sharing < 3 {
		t.Errorf("%d of the checked cases have passing chains that share a part number; the generator should make more", sharing)
	}
	if nearFixes == 0 {
		t.Error("no near miss with a fix among the cases")
	}
	t.Logf("%d of %d random chains checked, %d feasible, %d with chains sharing a part number, %d near misses fixed", checked, cases, feasible, sharing, nearFixes)
}
