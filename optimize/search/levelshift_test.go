package search

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"reflect"
	"testing"

	"plumb/optimize/spec"
)

// genLevelShiftProblem makes a random level shift of a bipolar input onto
// a window inside [0, Vref].
func genLevelShiftProblem(r *rand.Rand) Problem {
	p := genProblem(r)
	p.Circuit = LevelShift
	p.SupplyNeg, p.SupplyPos = []float64{0, -5}[r.IntN(2)], []float64{5, 15}[r.IntN(2)]
	p.Ref = []float64{2.5, 4.096}[r.IntN(2)]
	in := []float64{2.5, 5, 10}[r.IntN(3)]
	p.InMin, p.InMax = -in, in
	lo, hi := 0.1, p.Ref*[]float64{0.9, 0.5}[r.IntN(2)]
	p.Gain = (hi - lo) / (2 * in)
	p.Shift = lo + p.Gain*in
	p.RefTol, p.RefDrift = []float64{0, 0.001}[r.IntN(2)], []float64{0, 20e-6}[r.IntN(2)]
	p.Limits.CMRRdB = 0
	p.Limits.OffsetV = []float64{0, 0.05, 0.2}[r.IntN(3)]
	p.Limits.GainError = []float64{0, 0.01, 0.03}[r.IntN(3)]
	p.Limits.TotalGainError = []float64{0, 0.03}[r.IntN(2)]
	p.Limits.DriftPPM = []float64{0, 100, 300}[r.IntN(3)]
	p.ZinMinOhm = 0
	return p
}

// TestLevelShiftBranchAndBoundMatchesExhaustive is the property test of
// the level shift: on seeded random catalogs and requirements the branch
// and bound returns the same top-N classes as the enumeration.
func TestLevelShiftBranchAndBoundMatchesExhaustive(t *testing.T) {
	feasible, cases := 0, 100
	for seed := uint64(1); seed <= uint64(cases); seed++ {
		r := rand.New(rand.NewPCG(seed, 9))
		parts := genParts(r, r.IntN(3), r.IntN(80), 1+r.IntN(4), 0, 1+r.IntN(8))
		p := genLevelShiftProblem(r)
		if err := p.normalize(); err != nil {
			t.Fatalf("seed %d: %v", seed, err)
		}
		s, err := newSpace(parts, &p, false)
		if err != nil {
			t.Fatalf("seed %d: %v", seed, err)
		}
		n := 1 + r.IntN(5)
		want, err := s.exhaustive(context.Background(), n)
		if err != nil {
			t.Fatal(err)
		}
		got, _, err := s.branchAndBound(context.Background(), n, nil)
		if err != nil {
			t.Fatal(err)
		}
		if len(want) > 0 {
			feasible++
		}
		sameTop(t, fmt.Sprintf("seed %d", seed), got, want)
		// The public entry points agree too.
		opt := Options{Top: n}
		a, aerr := SolveProblem(context.Background(), parts, p, opt)
		b, berr := Exhaustive(context.Background(), parts, p, opt)
		if (aerr == nil) != (berr == nil) || (aerr == nil && !reflect.DeepEqual(a.Designs[0].Parts, b.Designs[0].Parts)) {
			t.Errorf("seed %d: SolveProblem and Exhaustive differ: %v, %v", seed, aerr, berr)
		}
	}
	if feasible < cases/4 {
		t.Errorf("only %d of %d random level shifts are feasible; the generator is too strict", feasible, cases)
	}
}

// TestLevelShiftCheckValues checks the transfer against the summing-node
// equation Vout = NG·(Vin/R1 + Vref/R2)/(1/R1 + 1/R2 + 1/R3) (S. Franco,
// summing amplifier, from memory): R1 = 160k, R2 = 40k, R3 = 14.545k and
// NG = 2 take -10..10 V onto 0..2.5 V with Vref = 2.5 V, conductances
// 0.00625 + 0.025 + 0.06875 = 0.1 mS, slope 2 x 0.0625 = 0.125, offset
// 2 x 0.25 x 2.5 = 1.25 V (hand arithmetic); the target ratios are then
// R2/R1 = 0.25 and R3/R1 = 0.0625/0.6875.
func TestLevelShiftCheckValues(t *testing.T) {
	p := &Problem{Circuit: LevelShift, Gain: 0.125, Shift: 1.25, Ref: 2.5}
	s := &space{p: p}
	ones := [5]float64{1, 1, 1, 1, 1}
	slope, rg := s.lsShares(&lsValues{r1: 160e3, r2: 40e3, r3: 14.545e3, rfb: 10e3}, &ones)
	tests := []struct {
		name      string
		got, want float64
	}{
		{"slope", slope, 0.125},
		{"offset", rg * p.Ref, 1.25},
	}
	q2, q3 := p.lsRatios()
	tests = append(tests, struct {
		name      string
		got, want float64
	}{"R2/R1", q2, 0.25}, struct {
		name      string
		got, want float64
	}{"R3/R1", q3, 0.0625 / 0.6875})
	for _, tc := range tests {
		if !within(tc.got, tc.want, 1e-4) {
			t.Errorf("%s: %.6g, want %.6g", tc.name, tc.got, tc.want)
		}
	}
	if err := (&Problem{Circuit: LevelShift, Gain: 0.125, Shift: -1, Ref: 2.5}).lsCheck(); err == nil {
		t.Error("a negative offset is accepted; the search builds positive offsets only")
	}
}

// TestSolveLevelShift solves the level-shift example with its output kept
// 50 mV inside the 0 V rail (testdata/level_shift.yaml; the example's
// 0..2.5 V output reaches the rail, which no op-amp of the demo catalog
// swings to) on the demo catalog: ranked by cost, every design confirmed
// by the exact budget.
func TestSolveLevelShift(t *testing.T) {
	snap := demoSnapshot(t)
	s, err := spec.Load("testdata/level_shift.yaml")
	if err != nil {
		t.Fatal(err)
	}
	res, err := Solve(context.Background(), snap, s, Options{Top: 3})
	if err != nil {
		t.Fatalf("%v: %+v", err, res.Infeasible)
	}
	for i, d := range res.Designs {
		if d.Family != string(DiscreteLevelShift) || math.Abs(d.Metrics.Gain/s.Gain-1) > s.Limits.GainError {
			t.Errorf("rank %d: %s gain %.5g, want %.5g", i+1, d.Family, d.Metrics.Gain, s.Gain)
		}
		br, err := res.ExplainN(i + 1)
		if err != nil {
			t.Fatal(err)
		}
		if !br.Pass {
			t.Errorf("rank %d fails the exact budget: %+v", i+1, br.Limits)
		}
		if g := br.Metrics.Gain; !within(g, d.Metrics.Gain, 1e-3) {
			t.Errorf("rank %d: budget gain %.6g, screening %.6g", i+1, g, d.Metrics.Gain)
		}
	}
	// The example itself asks for an output reaching the 0 V rail of a
	// 0..5 V supply: every op-amp of the demo catalog is refused on its
	// output swing (or supply or input range), none by the search's model.
	ex, err := spec.Load("../../data/examples/level-shift.yaml")
	if err != nil {
		t.Fatal(err)
	}
	if r, err := Solve(context.Background(), snap, ex, Options{}); IsInfeasible(err) {
		if r.Infeasible.HardLimits["output swing"] == 0 {
			t.Errorf("the example is infeasible but not for output swing: %+v", r.Infeasible)
		}
	} else if err != nil {
		t.Fatal(err)
	}
}
