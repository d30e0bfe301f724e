package search

import (
	"context"
	"errors"
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

// genLevelShiftInvProblem makes a random level shift with a negative
// offset: a unipolar input from 10 % or 25 % of its span up to it onto a
// window inside [0, Vref] starting 0.1 or 0.25 V above 0 V (nearer, most
// designs' errors take the output past the amplifier's swing), so b = lo - m·Vin,min < 0 and
// the reference enters the inverting input.
func genLevelShiftInvProblem(r *rand.Rand) Problem {
	p := genLevelShiftProblem(r)
	in := []float64{2.5, 4.5, 10}[r.IntN(3)]
	p.InMin, p.InMax = in*[]float64{0.1, 0.25}[r.IntN(2)], in
	lo, hi := []float64{0.1, 0.25}[r.IntN(2)], p.Ref*[]float64{0.9, 0.5}[r.IntN(2)]
	p.Gain = (hi - lo) / (p.InMax - p.InMin)
	p.Shift = lo - p.Gain*p.InMin
	return p
}

// TestLevelShiftBranchAndBoundMatchesExhaustive is the property test of
// the level shift, with the reference into either input: on seeded random
// catalogs and requirements the branch and bound returns the same top-N
// classes as the enumeration.
func TestLevelShiftBranchAndBoundMatchesExhaustive(t *testing.T) {
	tests := []struct {
		name   string
		gen    func(*rand.Rand) Problem
		stream uint64
	}{
		{"reference into the non-inverting node", genLevelShiftProblem, 9},
		{"reference into the inverting node", genLevelShiftInvProblem, 10},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) { levelShiftMatchesExhaustive(t, tc.gen, tc.stream) })
	}
}

func levelShiftMatchesExhaustive(t *testing.T, gen func(*rand.Rand) Problem, stream uint64) {
	feasible, cases := 0, 100
	for seed := uint64(1); seed <= uint64(cases); seed++ {
		r := rand.New(rand.NewPCG(seed, stream))
		parts := genParts(r, r.IntN(3), r.IntN(80), 1+r.IntN(4), 0, 1+r.IntN(8))
		p := gen(r)
		if err := p.normalize(); err != nil {
			t.Fatalf("seed %d: %v", seed, err)
		}
		s, err := newSpace(context.Background(), parts, &p, false)
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
}

// TestLevelShiftInvertingCheckValues checks the inverting-reference
// transfer against the node equation at the inverting input, Vout =
// Vin·R3/(R1+R3)·(1 + Rf/Rg + Rf/R2) - Vref·Rf/R2 (S. Franco, summing
// amplifier, from memory), on 0.5..4.5 V onto 0..3.3 V with Vref = 2.5 V
// (hand arithmetic): m = 3.3/4 = 0.825, b = -0.825·0.5 = -0.4125 V,
// β = Rf/R2 = 0.4125/2.5 = 0.165, so Rg = Rf = 10k, R2 = 10k/0.165 =
// 60.606k, NG = 2.165, a = 0.825/2.165 and R3/R1 = a/(1-a) = 0.825/1.34 =
// 0.615672 (R1 = 10k, R3 = 6.15672k); then Vout(0.5 V) = 0 and
// Vout(4.5 V) = 3.3 V.
func TestLevelShiftInvertingCheckValues(t *testing.T) {
	p := &Problem{Circuit: LevelShift, Gain: 0.825, Shift: -0.4125, Ref: 2.5}
	s := &space{p: p}
	ones := [5]float64{1, 1, 1, 1, 1}
	slope, rg := s.lsShares(&lsValues{r1: 10e3, r2: 10e3 / 0.165, r3: 6.15672e3, rfb: 10e3}, &ones)
	q2, q3 := p.lsRatios()
	tests := []struct {
		name      string
		got, want float64
	}{
		{"slope", slope, 0.825},
		{"offset", rg * p.Ref, -0.4125},
		{"Vout at 0.5 V", slope*0.5 + rg*p.Ref, 0},
		{"Vout at 4.5 V", slope*4.5 + rg*p.Ref, 3.3},
		{"R2/Rf", q2, 1 / 0.165},
		{"R3/R1", q3, 0.615672},
		{"noise gain", p.lsNG(), 2.165},
		{"amplifier inputs at 4.5 V", p.lsNode(4.5), 4.5 * 0.825 / 2.165},
	}
	for _, tc := range tests {
		if math.Abs(tc.got-tc.want) > 1e-4*math.Max(1, math.Abs(tc.want)) {
			t.Errorf("%s: %.6g, want %.6g", tc.name, tc.got, tc.want)
		}
	}
	refused := []struct {
		name string
		p    Problem
	}{
		{"zero offset", Problem{Circuit: LevelShift, Gain: 0.8, Shift: 0, Ref: 2.5}},
		{"gain above 2 + β", Problem{Circuit: LevelShift, Gain: 3.9, Shift: -3.8, Ref: 2.5}},
	}
	for _, tc := range refused {
		if err := tc.p.lsCheck(); !errors.Is(err, ErrProblem) {
			t.Errorf("%s: %v, want ErrProblem", tc.name, err)
		}
	}
	if err := (&Problem{Circuit: LevelShift, Gain: 0.8, Shift: -0.35, Ref: 2.5}).lsCheck(); err != nil {
		t.Errorf("negative offset refused: %v", err)
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

// TestSolveLevelShiftInverting solves a negative-offset level shift
// (testdata/level_shift_inverting.yaml: 0.5..4.5 V onto 0.05..3.25 V, gain
// 0.8, offset -0.35 V) on the demo catalog: the reference enters the
// inverting input, and every design passes the exact budget, whose nodal
// solve of the OffsetToInverting netlist is independent of the search's
// closed form.
func TestSolveLevelShiftInverting(t *testing.T) {
	snap := demoSnapshot(t)
	s, err := spec.Load("testdata/level_shift_inverting.yaml")
	if err != nil {
		t.Fatal(err)
	}
	if !(s.Offset < 0) {
		t.Fatalf("fixture offset %g V, want negative", s.Offset)
	}
	res, err := Solve(context.Background(), snap, s, Options{Top: 3})
	if err != nil {
		t.Fatalf("%v: %+v", err, res.Infeasible)
	}
	for i, d := range res.Designs {
		sd, err := res.DesignN(i + 1)
		if err != nil {
			t.Fatal(err)
		}
		if !sd.Options.OffsetToInverting {
			t.Errorf("rank %d: design without the reference at the inverting input", i+1)
		}
		br, err := res.ExplainN(i + 1)
		if err != nil {
			t.Fatal(err)
		}
		if !br.Pass {
			t.Errorf("rank %d fails the exact budget: %+v", i+1, br.Limits)
		}
		if g := br.Metrics.Gain; math.Abs(g/s.Gain-1) > s.Limits.GainError {
			t.Errorf("rank %d: budget gain %.6g, want %.6g within %g", i+1, g, s.Gain, s.Limits.GainError)
		}
		t.Logf("rank %d: %.4g %v", i+1, d.TotalCost, partList(&d))
	}
}

// lsCornersEnumerated is the worst case of lsCorners by enumeration: the
// slope and offset at all 32 corners of the five resistors and both
// corners of the reference.
func (s *space) lsCornersEnumerated(v *lsValues, e *[5]float64, rho, refErr float64) (slopeErr, offErr float64) {
	p := s.p
	var f [5]float64
	for c := 0; c < 32; c++ {
		for i := range f {
			f[i] = 1 + e[i]
			if c&(1<<i) != 0 {
				f[i] = 1 - e[i]
			}
		}
		sl, rg := s.lsShares(v, &f)
		slopeErr = math.Max(slopeErr, math.Abs(rho*sl/p.Gain-1))
		for _, r := range [2]float64{1 + refErr, 1 - refErr} {
			offErr = math.Max(offErr, math.Abs(rho*rg*p.Ref*r-p.Shift))
		}
	}
	return slopeErr, offErr
}

// TestLevelShiftCornersMatchEnumeration: the worst case lsCorners finds
// from the two corners its monotonicity argument picks equals the largest
// over all 32 corners, for random values, grades, source resistances and
// scalings, with the reference into either input (the worst case is the
// one a design review computes by enumerating every corner, common
// practice).
func TestLevelShiftCornersMatchEnumeration(t *testing.T) {
	r := rand.New(rand.NewPCG(3, 31))
	for i := range 4000 {
		var p Problem
		if i%2 == 0 {
			p = genLevelShiftProblem(r)
		} else {
			p = genLevelShiftInvProblem(r)
		}
		if err := p.normalize(); err != nil {
			t.Fatal(err)
		}
		p.SourceOhm = []float64{0, 50, 1e3, 1e5}[r.IntN(4)]
		s := &space{p: &p}
		val := func() float64 { return math.Pow(10, 2+4*r.Float64()) }
		v := lsValues{r1: val(), r2: val(), r3: val(), rfb: val()}
		var e [5]float64
		for j := range e {
			e[j] = []float64{0, 1e-4, 1e-3, 0.01, 0.05, 0.2}[r.IntN(6)]
		}
		rho := []float64{1, 0.999, 1.01, -0.7}[r.IntN(4)]
		refErr := []float64{0, 0.001, 0.02}[r.IntN(3)]
		gs, go_ := s.lsCorners(&v, &e, rho, refErr)
		ws, wo := s.lsCornersEnumerated(&v, &e, rho, refErr)
		if gs != ws || go_ != wo {
			t.Fatalf("case %d (inverting %v): slope %.17g offset %.17g, enumeration %.17g %.17g", i, p.lsInv(), gs, go_, ws, wo)
		}
	}
}
