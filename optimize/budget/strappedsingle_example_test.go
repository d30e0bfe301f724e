package budget

import (
	"math"
	"testing"

	"plumb/data"
	"plumb/optimize/spec"
)

// TestStrappedSingleExample checks the strapped-single example design by
// hand: KA-HV5's elements (R1 = R3 = 380k, R2 = R4 = 76k) with IN- and REF
// at ground and the input on IN+ through the spec's 1 kΩ source make the
// non-inverting stage behind a divider, whose exact transfer with a
// single-pole op-amp of open-loop gain A is
//
//	G = R4/(Rs + R3 + R4) · NG/(1 + NG/A),  NG = 1 + R2/R1 = 1.2
//
// (the difference amplifier's equation with its inverting input grounded,
// the source in series with R3, and the finite-gain closed loop
// G_ideal/(1 + NG/A): domain notes §2 after S. Franco, "Design with
// Operational Amplifiers and Analog Integrated Circuits", ch. 1 and the
// difference-amplifier chapter, from memory). Ideal, 76/456 · 1.2 = 0.2,
// the gain the spec asks for. The source costs Rs/(Rs + R3 + R4) =
// 1/457 of the gain, and the output offset is the op-amp's Vos and its
// drift over the 45 K excursion times the noise gain: 500 µV · 1.2 =
// 600 µV and 5 µV/K · 45 K · 1.2 = 270 µV.
func TestStrappedSingleExample(t *testing.T) {
	_, _, res := evaluateExample(t, "strapped-single.yaml", "strapped-single-design.yaml")
	if !res.Pass {
		t.Fatalf("the example design fails: %+v", res.Limits)
	}
	const r1, r2, r3, r4, rs, aol = 380e3, 76e3, 380e3, 76e3, 1e3, 1e5 // KA-HV5 in the demo catalog, the spec's source
	ng := 1 + r2/r1
	want := r4 / (rs + r3 + r4) * ng / (1 + ng/aol)
	if math.Abs(res.Metrics.Gain-want) > 1e-9*want {
		t.Errorf("nominal gain %.9g, by hand %.9g", res.Metrics.Gain, want)
	}
	if ideal := r4 / (r3 + r4) * ng; math.Abs(ideal-0.2) > 1e-12 {
		t.Errorf("ideal strapped gain %g, want the spec's 0.2", ideal)
	}
	terms := map[string]float64{}
	for _, l := range res.Limits {
		for _, c := range l.Contributors {
			terms[l.Name+": "+c.Name] = c.Value
		}
	}
	for name, v := range map[string]float64{
		LimitGainError + ": nominal ratio with source": rs / (rs + r3 + r4),
		LimitGainError + ": A1 open-loop gain":         1 - 1/(1+ng/aol),
		LimitOutputOffset + ": A1 Vos":                 500e-6 * ng,
		LimitOutputOffset + ": A1 Vos drift":           5e-6 * 45 * ng,
	} {
		got, ok := terms[name]
		if !ok || math.Abs(got-v) > 2e-3*v {
			t.Errorf("%s = %g (listed %v), by hand %g", name, got, ok, v)
		}
	}
	// Output headroom: the swing reaches 0.1 V from each ±15 V rail, and
	// the output peaks at 50 V · G, a little more at the worst corner.
	for _, l := range res.Limits {
		if l.Name == LimitHeadroom && !(l.Value > 0 && l.Value <= 14.9-50*want+1e-9) {
			t.Errorf("headroom %g V, want above 0 and at most 14.9 - 50·G = %g V", l.Value, 14.9-50*want)
		}
	}
}

// evaluateExample is the budget of an example design against an example
// spec (both returned), its parts resolved in the demo catalog.
func evaluateExample(t *testing.T, specFile, designFile string) (*spec.Spec, *spec.Design, *Result) {
	t.Helper()
	snap, err := data.DemoSnapshot()
	if err != nil {
		t.Fatal(err)
	}
	lookup, err := spec.SnapshotLookup(snap)
	if err != nil {
		t.Fatal(err)
	}
	s := loadExample(t, specFile)
	d := loadExampleDesign(t, designFile)
	if err := d.Resolve(lookup); err != nil {
		t.Fatal(err)
	}
	res, err := Evaluate(s, d)
	if err != nil {
		t.Fatal(err)
	}
	return s, d, res
}
