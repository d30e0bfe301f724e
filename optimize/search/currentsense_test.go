package search

import (
	"context"
	"reflect"
	"strings"
	"testing"
)

// TestSolveCurrentSense: a 2 W shunt derated to 50 % carries 5 A only
// below 1/25 = 40 mOhm; behind it the amplifier needs gain 0.5/Rs, and
// OPQ-2's offset (200 uV + 2 uV/K x 65 K) x (1 + G) stays under 10 mV only
// for G below about 29, Rs above 17 mOhm. The shunt's 50 ppm/K leaves
// 50 ppm/K to the amplifier stage's ratio (common practice arithmetic
// throughout).
// Ranked on the screening figures (SolveProblem); see the report for the
// exact budget's view of this family.
func TestSolveCurrentSense(t *testing.T) {
	snap, s := loadFixture(t, "current_sense.yaml")
	p, err := FromSpec(s)
	if err != nil {
		t.Fatal(err)
	}
	parts := &Parts{Series: snap.ResistorSeries, Resistors: snap.Resistors, Networks: snap.Networks, Amplifiers: snap.Amplifiers}
	a, err := SolveProblem(context.Background(), parts, p, Options{Top: 3})
	if err != nil {
		t.Fatalf("%v %+v", err, a)
	}
	prev := 0.0
	for i, d := range a.Designs {
		if !strings.HasPrefix(d.Family, "current-sense-") || d.Parts[0].Position != "Rs" || !strings.HasPrefix(d.Parts[0].Part, "MSX-") {
			t.Fatalf("rank %d: %s %+v", i+1, d.Family, d.Parts[0])
		}
		if v := d.Parts[0].ValueOhm; v < 0.017 || v >= 0.04 {
			t.Errorf("rank %d: shunt %g ohm, want 17 to 40 mOhm", i+1, v)
		}
		if d.Metrics.GainError > 0.02 || d.Metrics.DriftPPMPerK > 100 || d.Metrics.OutputOffsetV > 0.01 || d.TotalCost < prev {
			t.Errorf("rank %d: %+v at %.2f", i+1, d.Metrics, d.TotalCost)
		}
		prev = d.TotalCost
		if !within(d.Metrics.Gain, 0.5, 0.02) {
			t.Errorf("rank %d: gain %.4g V/A", i+1, d.Metrics.Gain)
		}
	}
	// The merged search is exact: the same designs as the enumeration.
	b, err := Exhaustive(context.Background(), parts, p, Options{Top: 3})
	if err != nil {
		t.Fatal(err)
	}
	for i := range a.Designs {
		if a.Designs[i].TotalCost != b.Designs[i].TotalCost || !reflect.DeepEqual(a.Designs[i].Parts, b.Designs[i].Parts) {
			t.Errorf("rank %d: search %v, exhaustive %v", i+1, a.Designs[i].Parts, b.Designs[i].Parts)
		}
	}
}
