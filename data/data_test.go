package data

import (
	"context"
	"io/fs"
	"math"
	"slices"
	"strings"
	"testing"

	"plumb/catalog"
)

func demo(t *testing.T) (*catalog.Store, *catalog.Snapshot) {
	t.Helper()
	st, err := Demo()
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { st.Close() })
	snap, err := st.Snapshot(context.Background())
	if err != nil {
		t.Fatal(err)
	}
	return st, snap
}

func TestDemoLoads(t *testing.T) {
	st, snap := demo(t)
	want := map[string]int{"series": 7, "resistors": 9, "networks": 3, "amplifiers": 13, "references": 7}
	got := map[string]int{"series": len(snap.ResistorSeries), "resistors": len(snap.Resistors),
		"networks": len(snap.Networks), "amplifiers": len(snap.Amplifiers), "references": len(snap.References)}
	for k, n := range want {
		if got[k] != n {
			t.Errorf("%d %s, want %d", got[k], k, n)
		}
	}
	stats, err := st.Stats(context.Background())
	if err != nil {
		t.Fatal(err)
	}
	if !slices.Equal(stats.Currencies, []string{"USD"}) || !slices.Equal(stats.Sources, []string{DemoSource}) {
		t.Errorf("currencies %q sources %q", stats.Currencies, stats.Sources)
	}
	// Values the series cover, counted from IEC 60063 (n values per
	// decade, 10^(i/n) rounded to three figures; E96 includes 2.00, E192
	// stops at 4.99 below 5): FP-TK1, AR-TN5, AR-TP1 E96 10..1M: 5*96+1
	// each; AR-TP1W E192 10..1M: 5*192+1; AR-TU05 E192 100..500k:
	// 3*192+135; AR-TU02 E96 100..200k: 3*96+30; TB-FX2 E24 100..100k:
	// 3*24+1.
	if want := 3*(5*96+1) + (5*192 + 1) + (3*192 + 135) + (3*96 + 30) + (3*24 + 1); stats.SeriesValues != want {
		t.Errorf("series cover %d values, want %d", stats.SeriesValues, want)
	}
	if stats.PriceBreaks != 5*(7+9+3+13+7) {
		t.Errorf("%d price breaks, want five per part", stats.PriceBreaks)
	}
}

// offers returns every part's offer by part number.
func offers(snap *catalog.Snapshot) map[string]catalog.Offer {
	out := map[string]catalog.Offer{}
	for _, p := range snap.ResistorSeries {
		out[p.Part] = p.Offer
	}
	for _, p := range snap.Resistors {
		out[p.Part] = p.Offer
	}
	for _, p := range snap.Networks {
		out[p.Part] = p.Offer
	}
	for _, p := range snap.Amplifiers {
		out[p.Part] = p.Offer
	}
	return out
}

func TestDemoPriceBreaks(t *testing.T) {
	_, snap := demo(t)
	lowStock := 0
	for part, o := range offers(snap) {
		var qty []int
		for i, b := range o.PriceBreaks {
			qty = append(qty, b.MinQty)
			// Common practice: unit prices fall as the quantity rises.
			if i > 0 && !(b.UnitPrice < o.PriceBreaks[i-1].UnitPrice) {
				t.Errorf("%s: %g at %d is not below %g at %d", part, b.UnitPrice, b.MinQty,
					o.PriceBreaks[i-1].UnitPrice, o.PriceBreaks[i-1].MinQty)
			}
			if b.Currency != "USD" {
				t.Errorf("%s: currency %s", part, b.Currency)
			}
		}
		if !slices.Equal(qty, []int{1, 10, 100, 1000, 5000}) {
			t.Errorf("%s: breaks at %v, want 1, 10, 100, 1000, 5000", part, qty)
		}
		if o.Stock < 100 {
			lowStock++
		}
	}
	if lowStock < 2 {
		t.Errorf("%d parts with low stock, want a few to exercise stock checks", lowStock)
	}
}

func TestDemoGrades(t *testing.T) {
	_, snap := demo(t)
	// The series span the grades from 1 %/100 ppm thick film to
	// 0.01 %/2 ppm foil.
	var tols, tcrs []float64
	for _, s := range snap.ResistorSeries {
		tols = append(tols, s.Tolerance)
		tcrs = append(tcrs, s.TCR)
		if _, err := catalog.ExpandSeries(s); err != nil {
			t.Errorf("%s: %v", s.Part, err)
		}
	}
	if slices.Max(tols) != 0.01 || slices.Min(tols) != 0.0001 || slices.Max(tcrs) != 100 || slices.Min(tcrs) != 2 {
		t.Errorf("tolerances %v tempcos %v", tols, tcrs)
	}
	for _, n := range snap.Networks {
		// A network's point is matching: its ratio figures beat its
		// absolute ones (common practice for thin-film and foil arrays).
		if !(n.RatioTolerance < n.Tolerance) || !(n.TCRTracking < n.TCR) {
			t.Errorf("%s: ratio %g / tracking %g not better than absolute %g / %g", n.Part,
				n.RatioTolerance, n.TCRTracking, n.Tolerance, n.TCR)
		}
	}
}

func TestDemoAmplifiers(t *testing.T) {
	_, snap := demo(t)
	var aboveRail, matched, wideInput, typical, highVoltage int
	for _, a := range snap.Amplifiers {
		if a.CMPosV < 0 {
			aboveRail++
		}
		if a.Type == catalog.MatchedAmp {
			matched++
			if a.InNegV < 0 && a.InPosV < 0 {
				wideInput++
			}
		}
		if len(a.TypicalOnly) > 0 {
			typical++
		}
		if a.SupplyMaxV >= 36 {
			highVoltage++
		}
	}
	if aboveRail < 1 || matched < 2 || wideInput < 1 || typical < 1 || highVoltage < 1 {
		t.Errorf("above-rail inputs %d, matched %d (wide input %d), typical-only %d, 36 V %d", aboveRail, matched, wideInput, typical, highVoltage)
	}
}

func TestDemoIsInvented(t *testing.T) {
	_, snap := demo(t)
	makers := map[string]bool{}
	for _, p := range snap.ResistorSeries {
		makers[p.Maker] = true
	}
	for _, p := range snap.Resistors {
		makers[p.Maker] = true
	}
	for _, p := range snap.Networks {
		makers[p.Maker] = true
	}
	for _, p := range snap.Amplifiers {
		makers[p.Maker] = true
	}
	invented := []string{"Fenwright Passives", "Amberlode Resistive", "Tollbridge Foilworks", "Kestrelmoor Analog", "Ivelwood Microsystems"}
	for m := range makers {
		if !slices.Contains(invented, m) {
			t.Errorf("maker %q is not one of the invented demo makers", m)
		}
	}
}

func TestExamples(t *testing.T) {
	names, err := fs.Glob(Examples(), "*.yaml")
	if err != nil {
		t.Fatal(err)
	}
	if len(names) == 0 {
		t.Skip("no example files yet")
	}
	for _, n := range names {
		b, err := fs.ReadFile(Examples(), n)
		if err != nil || !strings.Contains(string(b), ":") {
			t.Errorf("%s: %v", n, err)
		}
	}
}

func BenchmarkDemo(b *testing.B) {
	b.ReportAllocs()
	for b.Loop() {
		st, err := Demo()
		if err != nil {
			b.Fatal(err)
		}
		st.Close()
	}
}

// TestDemoMatchedNetworks checks the demo's matched networks against the
// gains their parts list: a difference amplifier's gain is Rf/Rin, with
// R4/R3 = Rf/Rin on the other side (any op-amp textbook's difference
// amplifier), and elements strapped in parallel combine as R1·R2/(R1+R2).
func TestDemoMatchedNetworks(t *testing.T) {
	_, snap := demo(t)
	ohms := map[string]map[string]float64{}
	for _, a := range snap.Amplifiers {
		if a.Network == nil {
			continue
		}
		ohms[a.Part] = map[string]float64{}
		for _, e := range a.Network.Elements {
			ohms[a.Part][e.Name] = e.Ohms
		}
	}
	par := func(a, b float64) float64 { return a * b / (a + b) }
	tests := []struct {
		part      string
		gain      float64
		rf, rin   float64
		r4, r3    float64
		strapping string
	}{
		{"KA-DM1", 1, ohms["KA-DM1"]["R2"], ohms["KA-DM1"]["R1"], ohms["KA-DM1"]["R4"], ohms["KA-DM1"]["R3"], "SENSE to OUT"},
		{"KA-HV5", 0.2, ohms["KA-HV5"]["R2"], ohms["KA-HV5"]["R1"], ohms["KA-HV5"]["R4"], ohms["KA-HV5"]["R3"], "as pinned"},
		{"KA-SX2", 1, ohms["KA-SX2"]["R3"], ohms["KA-SX2"]["R1"], ohms["KA-SX2"]["R6"], ohms["KA-SX2"]["R4"], "INA, FB to OUT"},
		{"KA-SX2", 2, ohms["KA-SX2"]["R3"], par(ohms["KA-SX2"]["R1"], ohms["KA-SX2"]["R2"]),
			ohms["KA-SX2"]["R6"], par(ohms["KA-SX2"]["R4"], ohms["KA-SX2"]["R5"]), "INA with INB, FB to OUT"},
		{"KA-SX2", 0.5, par(ohms["KA-SX2"]["R3"], ohms["KA-SX2"]["R2"]), ohms["KA-SX2"]["R1"],
			par(ohms["KA-SX2"]["R6"], ohms["KA-SX2"]["R5"]), ohms["KA-SX2"]["R4"], "INA, INB and FB to OUT, INB+ to REF"},
		{"KA-SX3", 4, ohms["KA-SX3"]["R3"], ohms["KA-SX3"]["R1"], ohms["KA-SX3"]["R6"], ohms["KA-SX3"]["R4"], "INA, FB to OUT"},
		{"KA-SX3", 2, ohms["KA-SX3"]["R3"], ohms["KA-SX3"]["R2"], ohms["KA-SX3"]["R6"], ohms["KA-SX3"]["R5"], "INB, FB to OUT"},
	}
	for _, tc := range tests {
		if !(tc.rin > 0) || math.Abs(tc.rf/tc.rin-tc.gain) > 1e-12 || math.Abs(tc.r4/tc.r3-tc.gain) > 1e-12 {
			t.Errorf("%s strapped %s: Rf/Rin = %g, R4/R3 = %g, want the listed gain %g", tc.part, tc.strapping, tc.rf/tc.rin, tc.r4/tc.r3, tc.gain)
		}
		found := false
		for _, a := range snap.Amplifiers {
			if a.Part == tc.part && slices.Contains(a.Gains, tc.gain) {
				found = true
			}
		}
		if !found {
			t.Errorf("%s does not list gain %g", tc.part, tc.gain)
		}
	}
}

// TestDemoStrappedOnlyGain checks by hand the gain the strapped-gain
// example needs: KA-SX3 with both input pairs tied (INA- with INB-, INA+
// with INB+) and FB to OUT is a difference amplifier of Rf = R3 and
// Rin = R1||R2, R4/R3 matched on the other side, so its gain is
// 40k/(10k||20k) = 40k/6.667k = 6 (any op-amp textbook's difference
// amplifier), a gain its front page does not list.
func TestDemoStrappedOnlyGain(t *testing.T) {
	_, snap := demo(t)
	for _, a := range snap.Amplifiers {
		if a.Part != "KA-SX3" {
			continue
		}
		r := map[string]float64{}
		for _, e := range a.Network.Elements {
			r[e.Name] = e.Ohms
		}
		par := func(x, y float64) float64 { return x * y / (x + y) }
		if g := r["R3"] / par(r["R1"], r["R2"]); math.Abs(g-6) > 1e-12 {
			t.Errorf("KA-SX3 inputs tied: R3/(R1||R2) = %g, want 6", g)
		}
		if g := r["R6"] / par(r["R4"], r["R5"]); math.Abs(g-6) > 1e-12 {
			t.Errorf("KA-SX3 inputs tied: R6/(R4||R5) = %g, want 6", g)
		}
		if slices.Contains(a.Gains, 6) {
			t.Errorf("KA-SX3 lists gain 6; the strapped-gain example needs a gain only a strapping reaches")
		}
		return
	}
	t.Fatal("the demo catalog has no KA-SX3")
}

// TestDemoReferences checks the demo's references are plausible: each
// voltage offered in a precise and a cheap grade, the precise grade dearer
// at every break, and every grade within what the trade sells (initial
// accuracy 0.02 % to 0.5 %, drift 2 to 50 ppm/K; common practice).
func TestDemoReferences(t *testing.T) {
	_, snap := demo(t)
	byV := map[float64][]catalog.Reference{}
	for _, r := range snap.References {
		if r.Tolerance < 0.0002 || r.Tolerance > 0.005 || r.DriftPPM < 2 || r.DriftPPM > 50 {
			t.Errorf("%s: %g %% and %g ppm/K outside the demo's grades", r.Part, 100*r.Tolerance, r.DriftPPM)
		}
		byV[r.OutputV] = append(byV[r.OutputV], r)
	}
	for _, v := range []float64{2.5, 4.096, 5} {
		rs := byV[v]
		if len(rs) < 2 {
			t.Errorf("%g V: %d grades, want a precise and a cheap one", v, len(rs))
			continue
		}
		slices.SortFunc(rs, func(a, b catalog.Reference) int { return int(math.Copysign(1, a.Tolerance-b.Tolerance)) })
		for i := range rs[0].PriceBreaks {
			if rs[0].PriceBreaks[i].UnitPrice <= rs[len(rs)-1].PriceBreaks[i].UnitPrice {
				t.Errorf("%g V: the precise %s is not dearer than %s at %d pieces", v, rs[0].Part, rs[len(rs)-1].Part, rs[0].PriceBreaks[i].MinQty)
			}
		}
	}
}
