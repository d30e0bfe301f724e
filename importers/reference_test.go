package importers

import (
	"context"
	"errors"
	"strings"
	"testing"

	"plumb/catalog"
)

func findRef(t *testing.T, b *Batch, part string) catalog.Reference {
	t.Helper()
	for _, r := range b.References {
		if r.Part == part {
			return r
		}
	}
	t.Fatalf("no reference %s", part)
	return catalog.Reference{}
}

// TestReferenceExport imports an invented distributor export of voltage
// references with no mapping: its kind is guessed from the header, units
// are read from cells and headers ("±0.05%", "3" under "Tempco (ppm/°C)",
// "10ppm/C", "7.5 µVp-p", "2.7V ~ 18V", "20 ppm/mA"), prices are in CHF
// from the header, a blank cell is unknown (never zero), an implausible
// accuracy is refused unless --allow-unusual, and a bare accuracy is
// refused as ambiguous.
func TestReferenceExport(t *testing.T) {
	u := catalog.Unknown()
	b, rep, err := Read(context.Background(), []string{"testdata/exports/ref_messy_chf.csv"}, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if len(b.References) != 4 || rep.Summary.Skipped != 2 {
		t.Fatalf("%d references, %d skipped, want 4 and 2:\n%s", len(b.References), rep.Summary.Skipped, problemText(rep))
	}
	for _, p := range rep.Problems {
		switch p.Part {
		case "VR50-X":
			if p.Line != 6 || p.Column != "Initial Accuracy" || !errors.Is(p.Err, ErrUnusual) {
				t.Errorf("VR50-X: %+v, want line 6, column Initial Accuracy, unusual", p)
			}
		case "VR50-Q":
			if p.Line != 7 || !strings.Contains(p.Reason, "ambiguous") {
				t.Errorf("VR50-Q: %+v, want line 7, ambiguous", p)
			}
		}
	}
	a, c, d, e := findRef(t, b, "VR25-A"), findRef(t, b, "VR25-C"), findRef(t, b, "VR41-B"), findRef(t, b, "VS12-E")
	if a.Topology != catalog.RefSeries || e.Topology != catalog.RefShunt || a.Package != "SOT-23-3" ||
		a.PriceBreaks[0].Currency != "CHF" || a.Stock != 1250 || d.MinOrder != 10 || d.Stock != 0 {
		t.Errorf("texts or offer: %+v %+v", a, e)
	}
	figs := []struct {
		name      string
		got, want float64
	}{
		{"A output", a.OutputV, 2.5},
		{"A accuracy ±0.05%", a.Tolerance, 0.0005},
		// ppm/°C is ppm/K: a temperature difference of 1 °C is 1 K
		// (SI brochure, the degree Celsius; common practice).
		{"A drift under a ppm/°C header", a.DriftPPM, 3},
		{"A range low", a.TempMinC, -40}, {"A range high", a.TempMaxC, 125},
		{"A noise 7.5 µVp-p", a.NoisePPV, 7.5e-6}, {"A density", a.NoiseVHz, 60e-9},
		{"A supply low", a.SupplyMinV, 2.7}, {"A supply high", a.SupplyMaxV, 18},
		{"A dropout 200mV", a.DropoutV, 0.2}, {"A source", a.LoadSourceA, 10e-3}, {"A sink", a.LoadSinkA, u},
		// Load regulation 20 ppm/mA at 2.5 V: 20e-6 × 2.5 V = 50 µV per
		// mA, 0.05 V/A = 0.05 Ω (definition of load regulation, common
		// practice).
		{"A output resistance", a.OutputOhm, 0.05},
		{"A long term", a.LongTermPPM, 25}, {"A iq", a.IqA, u},
		{"C accuracy ± 0.2 %", c.Tolerance, 0.002}, {"C noise blank", c.NoisePPV, u}, {"C range high", c.TempMaxC, 85},
		{"C dropout blank", c.DropoutV, u}, {"C output resistance blank", c.OutputOhm, u},
		{"D drift 10ppm/C", d.DriftPPM, 10}, {"D noise 12 uV p-p", d.NoisePPV, 12e-6},
		// 50 µV/mA = 0.05 V/A = 0.05 Ω.
		{"D output resistance", d.OutputOhm, 0.05}, {"D supply high", d.SupplyMaxV, 36},
		{"E noise 20µVpp", e.NoisePPV, 20e-6}, {"E supply unknown", e.SupplyMinV, u}, {"E range low", e.TempMinC, 0},
	}
	for _, f := range figs {
		if !near(f.got, f.want) {
			t.Errorf("%s = %g, want %g", f.name, f.got, f.want)
		}
	}

	b, rep, err = Read(context.Background(), []string{"testdata/exports/ref_messy_chf.csv"}, Options{AllowUnusual: true})
	if err != nil {
		t.Fatal(err)
	}
	if len(b.References) != 5 || rep.Count(Doubt) != 1 || findRef(t, b, "VR50-X").Tolerance != 0.1 {
		t.Errorf("with --allow-unusual: %d references, %d doubts, want 5 and 1:\n%s", len(b.References), rep.Count(Doubt), problemText(rep))
	}
}

// TestReferenceImportAllOrNothing stores the file's references in a
// catalog, and a strict import of the same file writes nothing.
func TestReferenceImportAllOrNothing(t *testing.T) {
	ctx := context.Background()
	st, _ := newCatalog(t)
	if _, err := Import(ctx, st, []string{"testdata/exports/ref_messy_chf.csv"}, Options{Now: testNow, Strict: true}); !errors.Is(err, ErrRowsSkipped) {
		t.Fatalf("strict import with skipped rows: %v", err)
	}
	if snap, _ := st.Snapshot(ctx); snap.Len() != 0 {
		t.Fatalf("a refused import wrote %d parts", snap.Len())
	}
	rep, err := Import(ctx, st, []string{"testdata/exports/ref_messy_chf.csv"}, Options{Now: testNow})
	if err != nil {
		t.Fatal(err)
	}
	snap, _ := st.Snapshot(ctx)
	if rep.Summary.Added != 4 || len(snap.References) != 4 || catalog.Known(snap.References[1].NoisePPV) {
		t.Errorf("summary %+v, stored %+v", rep.Summary, snap.References)
	}
}

// TestMatchedNetworkColumn imports matched amplifiers whose internal
// network is given in its text form, and reports a malformed or invalid
// one by file, line and column.
func TestMatchedNetworkColumn(t *testing.T) {
	b, rep, err := Read(context.Background(), []string{"testdata/exports/amp_network_eur.csv"}, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if len(b.Amplifiers) != 3 || rep.Summary.Skipped != 2 {
		t.Fatalf("%d amplifiers, %d skipped:\n%s", len(b.Amplifiers), rep.Summary.Skipped, problemText(rep))
	}
	for _, p := range rep.Problems {
		if p.Severity != Skip {
			continue
		}
		want := map[string]struct {
			line  int
			words string
		}{"DX-3": {4, `clause 2 "R2 25k INV OUT"`}, "DX-5": {6, "element R1: value 0 ohm"}}[p.Part]
		if p.Line != want.line || p.Column != "Internal Network" || !strings.Contains(p.Reason, want.words) ||
			!strings.Contains(p.Error(), "amp_network_eur.csv") {
			t.Errorf("%s: %q (line %d, column %q), want line %d, column Internal Network, saying %q", p.Part, p.Error(), p.Line, p.Column, want.line, want.words)
		}
	}
	n := findAmp(t, b, "DX-1").Network
	if n == nil || len(n.Elements) != 4 || n.Elements[3] != (catalog.MatchedElement{Name: "R4", Ohms: 25e3, A: "NI", B: "REF"}) ||
		!near(n.RatioTolerance, 0.0001) || n.RatioDriftPPM != 1 || catalog.Known(n.Tolerance) {
		t.Errorf("DX-1 network %+v", n)
	}
	if n := findAmp(t, b, "DX-2").Network; n == nil || catalog.Known(n.RatioTolerance) || catalog.Known(n.RatioDriftPPM) || len(n.Pins) != 5 {
		t.Errorf("DX-2 network %+v: blank tolerances must be unknown", n)
	}
	if findAmp(t, b, "DX-4").Network != nil {
		t.Error("DX-4 gives no network")
	}
}

func TestReferenceUnits(t *testing.T) {
	tests := []struct {
		in   string
		vout float64
		want float64
		fn   string
	}{
		{"10 µVp-p", 0, 10e-6, "pp"}, {"3 uV (p-p)", 0, 3e-6, "pp"}, {"1.5µVpp", 0, 1.5e-6, "pp"}, {"2 µV peak-to-peak", 0, 2e-6, "pp"},
		// ppm/mA × Vout: 10 ppm/mA at 5 V is 50 µV/mA = 0.05 Ω;
		// %/mA the same with 10^-2 (definition of load regulation,
		// common practice).
		{"10 ppm/mA", 5, 0.05, "reg"}, {"0.001 %/mA", 5, 0.05, "reg"}, {"50 µV/mA", 0, 0.05, "reg"},
		{"2 mV/A", 0, 0.002, "reg"}, {"0.1 Ω", 0, 0.1, "reg"},
		{"25 ppm/1000h", 0, 25, "lt"}, {"50 ppm/1000 hr", 0, 50, "lt"}, {"30 ppm", 0, 30, "lt"},
	}
	for _, tc := range tests {
		var got float64
		var err error
		switch tc.fn {
		case "pp":
			got, err = parsePeakToPeak(tc.in)
		case "reg":
			got, err = parseLoadRegulation(tc.in, tc.vout)
		default:
			got, err = parseLongTerm(tc.in)
		}
		if err != nil || !near(got, tc.want) {
			t.Errorf("%s %q = %g (%v), want %g", tc.fn, tc.in, got, err, tc.want)
		}
	}
	for _, bad := range []string{"3 µVrms"} {
		if _, err := parsePeakToPeak(bad); err == nil {
			t.Errorf("%q read as peak to peak", bad)
		}
	}
	if _, err := parseLoadRegulation("10 ppm/mA", catalog.Unknown()); err == nil {
		t.Error("ppm/mA read without an output voltage")
	}
	if _, err := parseLongTerm("25 ppm/year"); err == nil {
		t.Error("a drift per year read as per 1000 h")
	}
}
