package search

import (
	"context"
	"math"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"plumb/optimize/budget"
	"plumb/optimize/spec"
)

// TestDiagnoseTotalDriftRelaxation: the adc-channel example with its total
// drift tightened to 1.5 LSB (the demo catalog's TP-R41B given as the
// reference's figures) has no design. The diagnosis must name total drift
// in LSB, as the spec wrote it, with the best value any design reaches,
// its contributors on both sides, and the smallest relaxation.
//
// The relaxation is checked by hand, not by trusting the diagnosis: the
// printed figure (four significant figures, budget.FormatFigure) is parsed
// back as the spec's total_drift and the spec solved again: a design must
// exist and its total drift must lie within that limit. A limit one
// printed step tighter (8.076 -> 8.075) must stay infeasible, so the
// printed value is the least one to a step.
// A total drift is the temperature range's part of the channel's error
// (the reference's drift and the stage's and ADC's drifts times the worst
// excursion, domain notes §8), so making the range ideal removes all of
// it: the spec's side must say so.
func TestDiagnoseTotalDriftRelaxation(t *testing.T) {
	snap := demoSnapshot(t)
	base, err := spec.Load(filepath.Join("..", "..", "data", "examples", "adc-channel.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	// withDrift sets the total drift to the figure as printed ("8.076 LSB").
	withDrift := func(text string) *spec.Spec {
		s := *base
		s.Reference = &spec.Reference{V: 4.096, Tolerance: 0.0005, Drift: 5e-6}
		lsb, err := strconv.ParseFloat(strings.TrimSuffix(text, " LSB"), 64)
		if err != nil {
			t.Fatal(err)
		}
		s.Limits.TotalDrift, s.Limits.TotalDriftInLSB = lsb/s.ADC.Codes(), true
		return &s
	}
	ctx := context.Background()
	res, err := Solve(ctx, snap, withDrift("1.5 LSB"), Options{Top: 1})
	if !IsInfeasible(err) || res == nil || res.Infeasible == nil {
		t.Fatalf("1.5 LSB total drift: err %v, want an infeasible result with a diagnosis", err)
	}
	var il *InfeasibleLimit
	for i := range res.Infeasible.Limits {
		if res.Infeasible.Limits[i].Name == budget.LimitTotalDrift {
			il = &res.Infeasible.Limits[i]
		}
	}
	if il == nil {
		t.Fatalf("the diagnosis does not name total drift: %q", res.Infeasible.Lines())
	}
	if il.Unit != budget.UnitLSB || il.Limit != 1.5 || !(il.Best > 1.5) {
		t.Errorf("total drift: unit %q limit %g best %g, want LSB, 1.5 and a best above it", il.Unit, il.Limit, il.Best)
	}
	sides := map[string]bool{}
	temp := false
	for _, c := range il.SetBy {
		sides[c.Side] = true
		temp = temp || strings.HasPrefix(c.Name, "temperature range") && c.Side == "spec" && c.Value == il.Best
	}
	if !sides["catalog"] || !sides["spec"] || !temp {
		t.Errorf("total drift's causes %+v: want both sides, the temperature range taking all of it", il.SetBy)
	}
	if il.Relax == nil {
		t.Fatalf("no relaxation of total drift: %q", res.Infeasible.Lines())
	}
	printed := budget.FormatFigure(il.Relax.To, budget.UnitLSB)
	if !strings.Contains(strings.Join(res.Infeasible.Lines(), "\n"), "relax total drift to "+printed) {
		t.Errorf("the lines do not print the relaxation %s: %q", printed, res.Infeasible.Lines())
	}
	if il.Relax.To < il.Best || il.Relax.Parts == "" {
		t.Errorf("relaxation %s below the best value %g or without parts %q", printed, il.Best, il.Relax.Parts)
	}
	// Re-solved as the diagnosis re-solves (quick: no near misses, and the
	// search looks further down the cost ranking for a design the exact
	// budget confirms, where the channel's screening passes many it fails).
	again := Options{Top: 1, quick: true}
	ok, err := Solve(ctx, snap, withDrift(printed), again)
	if err != nil || len(ok.Designs) == 0 {
		t.Fatalf("total drift relaxed to the printed %s: err %v, want a design", printed, err)
	}
	if got := limitOf(ok.Designs[0].budget, budget.LimitTotalDrift); !got.Pass || got.Value > il.Relax.To*(1+1e-9) {
		t.Errorf("at %s the design's total drift is %g LSB (pass %v)", printed, got.Value, got.Pass)
	}
	// One step of the printed figure under it (four significant figures).
	tighter := il.Relax.To - math.Pow(10, math.Floor(math.Log10(il.Relax.To))-3)
	if _, err := Solve(ctx, snap, withDrift(budget.FormatFigure(tighter, budget.UnitLSB)), again); !IsInfeasible(err) {
		t.Errorf("total drift %.4g LSB, a printed step under the relaxation: err %v, want infeasible", tighter, err)
	}
}
