package assume

import (
	"math"
	"strings"
	"testing"

	"plumb/catalog"
)

func TestGradeDefaults(t *testing.T) {
	g := catalog.ResistorGrade{Technology: "thin-film", Package: "0603", Tolerance: 0.001,
		TCR: catalog.Unknown(), PowerW: catalog.Unknown(), MaxVoltageV: catalog.Unknown(),
		ThermalResistance: catalog.Unknown(), LoadLife: catalog.Unknown()}
	as := Grade("X-1", &g)
	want := map[string]float64{
		"tcr_ppm": 50, "power_w": 0.1, "max_voltage_v": 75, "load_life": 0.005,
		// 85 K from 70 °C rated ambient to 155 °C at 0.1 W (IEC 60115-1's
		// usual derating curve, from memory).
		"thermal_resistance_k_per_w": 850,
	}
	if len(as) != len(want) {
		t.Fatalf("%d assumptions, want %d: %+v", len(as), len(want), as)
	}
	for _, a := range as {
		if w, ok := want[a.Figure]; !ok || math.Abs(a.Value-w) > 1e-9*w || a.Part != "X-1" || a.Text == "" {
			t.Errorf("%+v, want %s = %g", a, a.Figure, w)
		}
	}
	if g.TCR != 50 || g.LoadLife != 0.005 {
		t.Errorf("grade not filled: %+v", g)
	}
	// Given figures are kept and assume nothing.
	if as := Grade("X-1", &g); len(as) != 0 {
		t.Errorf("known figures assumed again: %+v", as)
	}
}

func TestAmplifierRanges(t *testing.T) {
	blank := func(rr string) catalog.Amplifier {
		u := catalog.Unknown()
		return catalog.Amplifier{Part: "A", Type: catalog.OpAmp, SupplyMinV: 3, SupplyMaxV: 36, RailToRail: rr,
			CMNegV: u, CMPosV: u, SwingNegV: u, SwingPosV: u, VosV: u, VosDriftVK: u, IbA: u, IosA: u, AolVV: u, CMRRdB: u,
			GBWHz: u, SlewVs: u, NoiseVHz: u, NoiseAHz: u, IqA: u, GainErrorMax: u, GainDriftPPM: u, InNegV: u, InPosV: u, InternalOhm: u}
	}
	tests := []struct {
		rr          string
		cm, swing   float64
		mustMention string
	}{
		{"", HeadroomV, HeadroomV, "1.5 V"},
		// A rail-to-rail output still stops short of the rail (domain
		// notes §7): never a zero swing.
		{catalog.RailOut, HeadroomV, RailToRailSwingV, "rail-to-rail output"},
		{catalog.RailInOut, 0, RailToRailSwingV, "rail-to-rail input"},
	}
	for _, tc := range tests {
		a := blank(tc.rr)
		as := Amplifier(&a)
		if a.CMNegV != tc.cm || a.CMPosV != tc.cm || a.SwingNegV != tc.swing || a.SwingPosV != tc.swing {
			t.Errorf("%q: cm %g/%g swing %g/%g", tc.rr, a.CMNegV, a.CMPosV, a.SwingNegV, a.SwingPosV)
		}
		if a.SwingNegV <= 0 {
			t.Errorf("%q: zero swing", tc.rr)
		}
		if !strings.Contains(strings.Join(Notes(as), " "), tc.mustMention) {
			t.Errorf("%q: notes %q do not say %q", tc.rr, Notes(as), tc.mustMention)
		}
		if a.IosA != a.IbA || a.IbA != 1e-6 || a.GainErrorMax != 0 || math.IsNaN(a.SlewVs) {
			t.Errorf("%q: %+v", tc.rr, a)
		}
		for _, x := range []float64{a.VosV, a.VosDriftVK, a.AolVV, a.CMRRdB, a.GBWHz, a.NoiseVHz, a.NoiseAHz, a.IqA, a.InternalOhm} {
			if math.IsNaN(x) {
				t.Fatalf("%q: a figure left unknown: %+v", tc.rr, a)
			}
		}
	}
}

func TestNetworkTracking(t *testing.T) {
	// Two elements at opposite corners of a ±50 ppm/K box drift apart by
	// 100 ppm/K (domain notes §6, common practice arithmetic).
	n := catalog.Network{Part: "N", Technology: "thin-film", TCR: 50, TCRTracking: catalog.Unknown(), PowerW: 0.1, MaxVoltageV: 50}
	as := Network(&n)
	if n.TCRTracking != 100 || len(as) != 1 || as[0].Figure != "tcr_tracking_ppm" {
		t.Errorf("tracking %g, assumptions %+v", n.TCRTracking, as)
	}
}

func TestSnapshotLeavesTheOriginalAlone(t *testing.T) {
	snap := &catalog.Snapshot{ResistorSeries: []catalog.ResistorSeries{{Part: "S", ResistorGrade: catalog.ResistorGrade{
		Technology: "thick-film", Package: "0603", Tolerance: 0.01, TCR: 100, PowerW: 0.1, MaxVoltageV: 75,
		ThermalResistance: 500, LoadLife: catalog.Unknown()}}}}
	out, set := Snapshot(snap)
	if !math.IsNaN(snap.ResistorSeries[0].LoadLife) || out.ResistorSeries[0].LoadLife != 0.02 {
		t.Errorf("original %g, copy %g", snap.ResistorSeries[0].LoadLife, out.ResistorSeries[0].LoadLife)
	}
	// A value of the series (stem, dash, value code) has the series'
	// assumptions.
	if got := set.For("S-10K0", "S-4K99"); len(got) != 1 || got[0].Figure != "load_life" {
		t.Errorf("For = %+v", got)
	}
}
