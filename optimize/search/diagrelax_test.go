package search

import (
	"context"
	"math"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"testing"

	"plumb/catalog"
	"plumb/optimize/budget"
	"plumb/optimize/spec"
)

// limitByName is the spec limit the diagnosis names name.
func limitByName(t *testing.T, name string) specLimit {
	t.Helper()
	for _, l := range specLimits {
		if l.name == name {
			return l
		}
	}
	t.Fatalf("no spec limit %q", name)
	return specLimit{}
}

// printedStep is the step of the figure budget.FormatFigure prints for v
// in unit: a tenth of a dB, else the fourth significant figure
// (units.Format and FormatPercent print four).
func printedStep(v float64, unit string) float64 {
	if unit == "dB" {
		return 0.1
	}
	return math.Pow(10, math.Floor(math.Log10(math.Abs(v)))-3)
}

// feasibleWith reports whether a design meets spec s on snap (Solve, the
// public search, with no near misses to look for).
func feasibleWith(t *testing.T, snap *catalog.Snapshot, s *spec.Spec) bool {
	t.Helper()
	res, err := Solve(context.Background(), snap, s, Options{Top: 1, quick: true})
	if err != nil && !IsInfeasible(err) {
		t.Fatal(err)
	}
	return err == nil && len(res.Designs) > 0
}

// checkRelaxation checks relaxation r of spec s by solving: with the limit
// at r.To as printed a design exists; one printed step tighter none does
// (with every other limit of s kept). best, when not NaN, is the best
// value the diagnosis reports, which the relaxation must not go past.
func checkRelaxation(t *testing.T, snap *catalog.Snapshot, s *spec.Spec, r Relaxation, best float64) {
	t.Helper()
	l := limitByName(t, r.Limit)
	sc := l.scaleOf(s)
	if got := budget.FormatFigure(r.To, r.Unit); budget.FormatFigure(r.To*(1+1e-12), r.Unit) != got {
		t.Errorf("%s: relaxation %g is not a printed figure (%s)", r.Limit, r.To, got)
	}
	if !math.IsNaN(best) && better(l, r.To, best) {
		t.Errorf("%s: relaxation to %s is tighter than the best value %s", r.Limit, budget.FormatFigure(r.To, r.Unit), budget.FormatFigure(best, r.Unit))
	}
	if !feasibleWith(t, snap, withLimit(s, l, r.To/sc)) {
		t.Errorf("%s relaxed to the printed %s: no design", r.Limit, budget.FormatFigure(r.To, r.Unit))
	}
	step := printedStep(r.To, r.Unit)
	tighter := r.To - step
	if !l.max {
		tighter = r.To + step
	}
	if feasibleWith(t, snap, withLimit(s, l, tighter/sc)) {
		t.Errorf("%s one printed step tighter (%s) still finds a design: the relaxation %s is not the smallest",
			r.Limit, budget.FormatFigure(tighter, r.Unit), budget.FormatFigure(r.To, r.Unit))
	}
}

// TestRelaxationVerifiedSourceImpedance: a gain-10 difference amplifier
// from a 10 Ω source with a 0.05 % gain-error limit on the demo catalog.
// The source resistance adds to R1 and R3 (G = R2/(R1+Rs), the difference
// amplifier's gain, domain notes), a 10 Ω / 1 kΩ error of 1 % at the
// smallest R1 the window allows, so the values that compensate it are
// E-series compromises: no design reaches 0.05 %. The diagnosis names the
// source impedance on the spec's side, reports a best value, and offers a
// relaxation that is at least that best value, passes when solved and
// fails one printed step tighter.
func TestRelaxationVerifiedSourceImpedance(t *testing.T) {
	snap := demoSnapshot(t)
	s := mustParseSpec(t, `name: src10
about: gain-10 difference amplifier from a 10 ohm source
family: difference
gain: 10
input: {differential: ±0.5V, common_mode: -1..1V}
supply: ±12V
source_impedance: 10
temperature: {range: 20..30C}
limits: {gain_error: 0.05%}
build: {quantity: 100}
`)
	res, err := Solve(context.Background(), snap, s, Options{})
	if !IsInfeasible(err) || res.Infeasible == nil || len(res.Infeasible.Limits) != 1 {
		t.Fatalf("err %v, diagnosis %+v: want the gain error alone", err, res.Infeasible)
	}
	il := res.Infeasible.Limits[0]
	if c, ok := causeNamed(il, "source impedance"); !ok || c.Side != "spec" || !(c.Value > 0) {
		t.Errorf("causes %+v: want the source impedance on the spec's side", il.SetBy)
	}
	for _, nm := range res.NearMisses {
		if g, ok := findLimit(nm.Limits, budget.LimitGainError); ok && g.Value < il.Best {
			t.Errorf("near miss %s reaches %s, better than the best value %s the diagnosis reports", partList(&nm.Design),
				budget.FormatFigure(g.Value, ""), budget.FormatFigure(il.Best, ""))
		}
	}
	if il.Relax == nil {
		t.Fatalf("no relaxation: %q", res.Infeasible.Lines())
	}
	checkRelaxation(t, snap, s, *il.Relax, il.Best)
}

// TestRelaxationVerifiedReference: the level shift whose 2.5 V reference
// (0.05 %, 10 ppm/K over -40..85 °C) takes more than the 2 mV offset
// budget (TestDiagnoseReference has the arithmetic): its relaxation of the
// output offset is at least the best value and is the smallest printed
// figure that solves.
func TestRelaxationVerifiedReference(t *testing.T) {
	snap := diagSnapshot()
	s := mustParseSpec(t, refLevelShift)
	res, err := Solve(context.Background(), snap, s, Options{})
	if !IsInfeasible(err) || res.Infeasible == nil || len(res.Infeasible.Limits) != 1 {
		t.Fatalf("err %v, diagnosis %+v: want the output offset alone", err, res.Infeasible)
	}
	il := res.Infeasible.Limits[0]
	if il.Relax == nil {
		t.Fatalf("no relaxation: %q", res.Infeasible.Lines())
	}
	checkRelaxation(t, snap, s, *il.Relax, il.Best)
}

// TestRelaxationVerifiedRails: the non-inverting gain of 5 from 0..1 V on
// a single 5 V supply (TestDiagnoseRails). The output must reach 0..5 V
// and the inputs sit at 0..1 V; the best op-amp of the catalog swings to
// 1 V of its rails and takes inputs to 1.5 V of them, so the diagnosis
// asks for V+ of at least 5 + 1 = 6 V and V- of at most 0 - 1.5 = -1.5 V
// (hand arithmetic). Solved with the rails at those printed figures a
// design exists; with either rail one printed step (1 mV) tighter none
// does.
func TestRelaxationVerifiedRails(t *testing.T) {
	snap := diagSnapshot()
	base := `name: rails
about: output range against the rails
family: noninverting
gain: 5
input: {single_ended: 0..1V}
supply: NEG..POS
temperature: {range: 0..50C}
limits: {gain_error: 1%}
build: {quantity: 100}
`
	with := func(neg, pos float64) *spec.Spec {
		y := strings.Replace(base, "NEG", strconv.FormatFloat(neg, 'g', -1, 64)+"V", 1)
		return mustParseSpec(t, strings.Replace(y, "POS", strconv.FormatFloat(pos, 'g', -1, 64)+"V", 1))
	}
	res, err := Solve(context.Background(), snap, with(0, 5), Options{})
	if !IsInfeasible(err) || res.Infeasible == nil {
		t.Fatalf("err %v: want an infeasible spec", err)
	}
	hard := strings.Join(res.Infeasible.Hard, "\n")
	figures := func(re string) []float64 {
		var out []float64
		for _, m := range regexp.MustCompile(re).FindAllStringSubmatch(hard, -1) {
			v, err := strconv.ParseFloat(m[1], 64)
			if err != nil {
				t.Fatal(err)
			}
			out = append(out, v)
		}
		return out
	}
	ups, downs := figures(`raise V\+ to at least (-?[0-9.]+) V`), figures(`lower V- to at most (-?[0-9.]+) V`)
	if len(ups) == 0 || len(downs) == 0 {
		t.Fatalf("the diagnosis does not say where both rails must go: %q", res.Infeasible.Hard)
	}
	pos, neg := slices.Max(ups), slices.Min(downs)
	// The worst-case gain of 1 % parts carries the output a little above
	// 5 V: V+ a little above 6 V.
	if !(pos >= 6 && pos < 6.1) || neg != -1.5 {
		t.Errorf("rails %g..%g V, want -1.5 V and 6..6.1 V", neg, pos)
	}
	if !feasibleWith(t, snap, with(neg, pos)) {
		t.Errorf("with the rails at the printed %g..%g V no design passes", neg, pos)
	}
	step := printedStep(pos, "V")
	if feasibleWith(t, snap, with(neg, pos-step)) {
		t.Errorf("with V+ a step under %g V a design still passes", pos)
	}
	if feasibleWith(t, snap, with(neg+printedStep(neg, "V"), pos)) {
		t.Errorf("with V- a step above %g V a design still passes", neg)
	}
}

// TestRelaxationVerifiedConflict: input impedance against noise density
// (TestDiagnoseConflict): each limit's relaxation, the other kept, solves
// as printed and fails one printed step tighter.
func TestRelaxationVerifiedConflict(t *testing.T) {
	snap := diagSnapshot()
	s := mustParseSpec(t, conflictSpec)
	res, err := Solve(context.Background(), snap, s, Options{})
	if !IsInfeasible(err) || res.Infeasible == nil || len(res.Infeasible.Relaxations) != 2 {
		t.Fatalf("err %v, diagnosis %+v: want two relaxations", err, res.Infeasible)
	}
	for _, r := range res.Infeasible.Relaxations {
		checkRelaxation(t, snap, s, r, math.NaN())
	}
}
