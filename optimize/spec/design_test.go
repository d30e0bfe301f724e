package spec

import (
	"errors"
	"math"
	"strings"
	"testing"

	"plumb/catalog"
)

// fakeCatalog holds invented parts for the resolve tests.
func fakeCatalog(part string) (catalog.Kind, any, error) {
	switch part {
	case "TEST-R-10K":
		return catalog.KindResistor, catalog.Resistor{Part: part, ValueOhm: 10e3,
			ResistorGrade: catalog.ResistorGrade{Tolerance: 0.001, TCR: 25, PowerW: 0.1, MaxVoltageV: 50}}, nil
	case "TEST-NET":
		return catalog.KindNetwork, &catalog.Network{Part: part, Values: []float64{1e3, 10e3, 1e3, 10e3},
			Tolerance: 0.001, RatioTolerance: 0.0002, TCR: 25, TCRTracking: 2, PowerW: 0.05, MaxVoltageV: 50}, nil
	case "TEST-AMP":
		return catalog.KindAmplifier, catalog.Amplifier{Part: part, Type: catalog.OpAmp, AolVV: 1e6, GBWHz: 1e6}, nil
	case "TEST-MATCHED":
		return catalog.KindAmplifier, catalog.Amplifier{Part: part, Type: catalog.MatchedAmp, Gains: []float64{1, 2}}, nil
	}
	return "", nil, catalog.ErrNotFound
}

func TestDesignResolve(t *testing.T) {
	d, err := LoadDesign("testdata/good-design.yaml")
	if err != nil {
		t.Fatal(err)
	}
	if len(d.Unresolved()) != 4 {
		t.Errorf("unresolved before: %v", d.Unresolved())
	}
	if err := d.Resolve(fakeCatalog); err != nil {
		t.Fatal(err)
	}
	if u := d.Unresolved(); len(u) != 0 {
		t.Errorf("unresolved after: %v", u)
	}
	r2 := d.Position("R2").Elements[0]
	if r2.Ohm != 10e3 || r2.RatioTolerance != 0.0002 || math.Abs(r2.TCRTracking-2e-6) > 1e-18 {
		t.Errorf("network element: %+v", r2)
	}
	// Series pair 3.9k + 10k = 13.9k.
	if got := d.Position("R4").Ohm(); got != 13.9e3 {
		t.Errorf("series pair = %g, want 13900", got)
	}
	if d.Amplifier.Amp.AolVV != 1e6 {
		t.Errorf("amplifier not filled: %+v", d.Amplifier)
	}
}

const baseDesign = `family: difference
positions:
  R1: {part: TEST-R-10K}
  R2: {value: 10k, tolerance: 0.1%, tcr: 25ppm/K}
  R3: {network: TEST-NET, element: 1}
  R4: {network: TEST-NET, element: 2}
amplifier: {part: TEST-AMP}
`

func TestDesignErrors(t *testing.T) {
	cases := []struct {
		name    string
		edit    func(string) string
		resolve bool
		want    string
	}{
		{"no family", rep("family: difference\n", ""), false, "family: missing"},
		{"unknown field", add("colour: red\n"), false, "colour"},
		{"tolerance without unit", rep("tolerance: 0.1%", "tolerance: 0.1"), false, `positions.R2.tolerance: "0.1" has no unit`},
		{"inline without tcr", rep(", tcr: 25ppm/K", ""), false, "positions.R2.tcr: missing"},
		{"part and inline", rep("{part: TEST-R-10K}", "{part: TEST-R-10K, value: 10k}"), false, "also inline figures"},
		{"network without element", rep("{network: TEST-NET, element: 1}", "{network: TEST-NET}"), false, "positions.R3.element"},
		{"empty position", rep("{part: TEST-R-10K}", "{}"), false, "positions.R1: empty"},
		{"pair of three", rep("{part: TEST-R-10K}", "{series: [{part: A}, {part: B}, {part: C}]}"), false, "exactly two"},
		{"no amplifier", rep("amplifier: {part: TEST-AMP}\n", ""), false, "amplifier: missing"},
		{"gain on op-amp", rep("{part: TEST-AMP}", "{part: TEST-AMP, gain: 2}"), false, "amplifier.gain"},
		{"inline op-amp without aol", rep("{part: TEST-AMP}", "{gbw: 1MHz, vos: 1mV}"), false, "amplifier.aol: missing"},
		{"unknown part", rep("TEST-R-10K", "NOPE-1"), true, "positions.R1: NOPE-1"},
		{"element beyond network", rep("element: 2", "element: 9"), true, "beyond the 4 elements"},
		{"network named as part", rep("{part: TEST-R-10K}", "{part: TEST-NET}"), true, "is a network"},
		{"amplifier is a resistor", rep("{part: TEST-AMP}", "{part: TEST-R-10K}"), true, "not an amplifier"},
		{"matched amp in op-amp family", rep("{part: TEST-AMP}", "{part: TEST-MATCHED}"), true, "use family matched"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			d, err := ParseDesign([]byte(c.edit(baseDesign)), "d.yaml")
			if err == nil && c.resolve {
				before := d.Positions[0].Elements[0]
				err = d.Resolve(fakeCatalog)
				if d.Positions[0].Elements[0] != before {
					t.Error("a failed Resolve changed the design")
				}
			}
			if err == nil {
				t.Fatal("no error")
			}
			if !errors.Is(err, ErrInvalid) || !strings.Contains(err.Error(), c.want) || !strings.Contains(err.Error(), "d.yaml") {
				t.Errorf("error %q: want ErrInvalid naming d.yaml and saying %q", err, c.want)
			}
		})
	}
}

func TestMatchedDesign(t *testing.T) {
	src := "family: matched\namplifier: {part: TEST-MATCHED, gain: 2}\n"
	d, err := ParseDesign([]byte(src), "m.yaml")
	if err != nil {
		t.Fatal(err)
	}
	if err := d.Resolve(fakeCatalog); err != nil {
		t.Fatal(err)
	}
	d, _ = ParseDesign([]byte(strings.Replace(src, "gain: 2", "gain: 3", 1)), "m.yaml")
	if err := d.Resolve(fakeCatalog); err == nil || !strings.Contains(err.Error(), "not one of the gains") {
		t.Errorf("gain 3 accepted: %v", err)
	}
}

// FuzzDesignRoundTrip reads a design, writes it, reads it back and writes
// it again: the two writes must match and the second read must succeed.
func FuzzDesignRoundTrip(f *testing.F) {
	f.Add([]byte(baseDesign))
	f.Add([]byte("family: matched\namplifier: {part: TEST-MATCHED, gain: 2}\n"))
	f.Add([]byte("family: divider\npositions:\n  Rtop: {value: 210k, tolerance: 0.1%, tcr: 25ppm/K, power: 0.1W}\n  Rbot: {parallel: [{value: 60k, tolerance: 1%, tcr: 100ppm/K}, {part: A}]}\n"))
	f.Add([]byte("family: inverting\npositions:\n  Rf: {value: 10k, tolerance: 1%, tcr: 100ppm/K}\n  Rg: {value: 1k, tolerance: 1%, tcr: 100ppm/K}\namplifier: {aol: 120dB, gbw: 1MHz, vos: 1mV, noise: 10nV/rtHz}\n"))
	f.Fuzz(func(t *testing.T, b []byte) {
		d, err := ParseDesign(b, "fuzz.yaml")
		if err != nil {
			return
		}
		w1, err := d.Marshal()
		if err != nil {
			t.Fatal(err)
		}
		d2, err := ParseDesign(w1, "fuzz.yaml")
		if err != nil {
			t.Fatalf("written design does not read back: %v\n%s", err, w1)
		}
		w2, err := d2.Marshal()
		if err != nil {
			t.Fatal(err)
		}
		if string(w1) != string(w2) {
			t.Errorf("round trip changed the design:\n%s\n---\n%s", w1, w2)
		}
	})
}
