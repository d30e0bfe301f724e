package importers

import (
	"context"
	"errors"
	"strings"
	"testing"

	"plumb/catalog"
)

// TestFillUnknownFigures re-imports references whose catalog figures were
// unknown: by default that is a spec change and nothing is written; with
// catalog.FillUnknown the unknown figures are filled, each change listed
// and kept in the history, and figures the file leaves out stay as the
// catalog had them; a known figure that differs makes the whole import
// write nothing unless catalog.ReplaceFigures confirms it.
func TestFillUnknownFigures(t *testing.T) {
	ctx := context.Background()
	st, _ := newCatalog(t)
	if _, err := Import(ctx, st, []string{"testdata/exports/ref_messy_chf.csv"}, Options{Source: "first", Now: testNow, AllowUnusual: true}); err != nil {
		t.Fatal(err)
	}
	ref := func(part string) catalog.Reference {
		t.Helper()
		_, v, err := st.Find(ctx, part)
		if err != nil {
			t.Fatal(err)
		}
		return *v.(*catalog.Reference)
	}
	before := ref("VR25-C")
	if catalog.Known(before.NoisePPV) || catalog.Known(before.DropoutV) {
		t.Fatalf("fixture: VR25-C noise %g, dropout %g, want both unknown", before.NoisePPV, before.DropoutV)
	}

	// Default: a spec change, nothing of the part written.
	rep, err := Import(ctx, st, []string{"testdata/exports/ref_fill.csv"}, Options{Source: "second", Now: testNow})
	if err != nil {
		t.Fatal(err)
	}
	if rep.Summary.SpecChanged != 1 || catalog.Known(ref("VR25-C").NoisePPV) {
		t.Fatalf("default: %+v, noise %g; want spec-changed, still unknown", rep.Summary, ref("VR25-C").NoisePPV)
	}

	// A known figure differs (VR41-B drift 10 -> 8 ppm/K): nothing written.
	rep, err = Import(ctx, st, []string{"testdata/exports/ref_known.csv"}, Options{Source: "third", Now: testNow, Figures: catalog.FillUnknown})
	if !errors.Is(err, ErrKnownFigures) || rep == nil || rep.Summary.SpecChanged != 1 {
		t.Fatalf("known figure with FillUnknown: err %v, report %+v; want ErrKnownFigures and one spec change", err, rep)
	}
	if catalog.Known(ref("VR25-C").NoisePPV) {
		t.Fatal("an import refused for a known figure filled VR25-C's noise anyway")
	}

	// Only unknown figures differ: filled, each change listed.
	rep, err = Import(ctx, st, []string{"testdata/exports/ref_fill.csv"}, Options{Source: "fourth", Now: testNow, Figures: catalog.FillUnknown})
	if err != nil {
		t.Fatal(err)
	}
	after := ref("VR25-C")
	if rep.Summary.FiguresUpdated != 1 || !near(after.NoisePPV, 9e-6) || !near(after.DropoutV, 0.25) {
		t.Fatalf("fill: %+v; noise %g, dropout %g; want 9 µV and 0.25 V", rep.Summary, after.NoisePPV, after.DropoutV)
	}
	// The file leaves out the load current the catalog has: it stays.
	if !near(after.LoadSourceA, before.LoadSourceA) || after.PriceBreaks[0].UnitPrice != 1.05 || after.Stock != 900 {
		t.Errorf("fill lost a figure or the offer: source %g (was %g), %+v", after.LoadSourceA, before.LoadSourceA, after.Offer)
	}
	listed := ""
	for _, p := range rep.Problems {
		if p.Part == "VR25-C" {
			listed += p.Reason
		}
	}
	for _, want := range []string{"noise_pp_v unknown -> 9e-06", "dropout_v unknown -> 0.25"} {
		if !strings.Contains(listed, want) {
			t.Errorf("the report lacks %q: %q", want, listed)
		}
	}
	hist, err := st.History(ctx, "VR25-C")
	if err != nil {
		t.Fatal(err)
	}
	last := hist[len(hist)-1]
	if last.Outcome != catalog.FiguresUpdated || last.Source != "fourth" || !strings.Contains(strings.Join(last.Changes, ";"), "noise_pp_v") {
		t.Errorf("history's last entry %+v, want the figures update from fourth", last)
	}
	if strings.Contains(hist[0].Figures, "noise_pp_v") {
		t.Errorf("the added entry now shows the filled noise: %s", hist[0].Figures)
	}

	// Confirmed: the known drift changes too.
	rep, err = Import(ctx, st, []string{"testdata/exports/ref_known.csv"}, Options{Source: "fifth", Now: testNow, Figures: catalog.ReplaceFigures})
	if err != nil {
		t.Fatal(err)
	}
	if b := ref("VR41-B"); rep.Summary.FiguresUpdated != 1 || !near(b.DriftPPM, 8) || !near(b.OutputOhm, 0.05) {
		t.Errorf("replace: %+v; VR41-B drift %g, output %g Ω; want 8 ppm/K and the 0.05 Ω kept", rep.Summary, b.DriftPPM, b.OutputOhm)
	}
}

// TestRefusedImportSaysNothingWasWritten: an import refused as a whole
// (known figures differ under FillUnknown, or a row skipped under Strict)
// marks its report Refused and reports each part's figures as would-be
// updates, not as written; an import that goes through says "updated".
func TestRefusedImportSaysNothingWasWritten(t *testing.T) {
	for _, tt := range []struct {
		name       string
		file       string
		opt        Options
		wantErr    error
		refused    bool
		wantReason string // start of a figures-updated problem's reason, "" for none
	}{
		{"known figure differs under FillUnknown", "testdata/exports/ref_known.csv", Options{Figures: catalog.FillUnknown},
			ErrKnownFigures, true, "figures would be updated (not written: the import was refused): "},
		{"row skipped under Strict", "testdata/exports/ref_messy_chf.csv", Options{Strict: true},
			ErrRowsSkipped, true, ""},
		{"only unknown figures filled", "testdata/exports/ref_fill.csv", Options{Figures: catalog.FillUnknown},
			nil, false, "figures updated: "},
	} {
		t.Run(tt.name, func(t *testing.T) {
			ctx := context.Background()
			st, _ := newCatalog(t)
			if _, err := Import(ctx, st, []string{"testdata/exports/ref_messy_chf.csv"}, Options{Source: "first", Now: testNow, AllowUnusual: true}); err != nil {
				t.Fatal(err)
			}
			tt.opt.Now = testNow
			rep, err := Import(ctx, st, []string{tt.file}, tt.opt)
			if !errors.Is(err, tt.wantErr) || rep == nil {
				t.Fatalf("err %v, report %v; want %v and a report", err, rep, tt.wantErr)
			}
			if rep.Summary.Refused != tt.refused {
				t.Errorf("Refused %v, want %v (%+v)", rep.Summary.Refused, tt.refused, rep.Summary)
			}
			found := false
			for _, p := range rep.Problems {
				if p.Err != errFiguresUpdated {
					continue
				}
				found = true
				if !strings.HasPrefix(p.Reason, tt.wantReason) || tt.wantReason == "" {
					t.Errorf("reason %q, want it to begin %q", p.Reason, tt.wantReason)
				}
			}
			if found != (tt.wantReason != "") {
				t.Errorf("figures-updated problem found %v, want %v: %+v", found, tt.wantReason != "", rep.Problems)
			}
		})
	}
}
