package importers

import (
	"context"
	"os"
	"path/filepath"
	"testing"

	"plumb/catalog"
	"plumb/data"
)

// withoutProvenance clears what a re-import may change: row ids, source
// and import time.
func withoutProvenance(s *catalog.Snapshot) {
	for i := range s.ResistorSeries {
		s.ResistorSeries[i].ID, s.ResistorSeries[i].Provenance = 0, catalog.Provenance{}
	}
	for i := range s.Resistors {
		s.Resistors[i].ID, s.Resistors[i].Provenance = 0, catalog.Provenance{}
	}
	for i := range s.Networks {
		s.Networks[i].ID, s.Networks[i].Provenance = 0, catalog.Provenance{}
	}
	for i := range s.Amplifiers {
		s.Amplifiers[i].ID, s.Amplifiers[i].Provenance = 0, catalog.Provenance{}
	}
	for i := range s.References {
		s.References[i].ID, s.References[i].Provenance = 0, catalog.Provenance{}
	}
}

// TestExportReimports writes each kind of the demo catalog with
// catalog.WriteCSV and imports the file, with no mapping, into a fresh
// catalog: the parts must come back exactly (the export writes every
// figure in SI with the shortest exact decimal, strconv 'g' -1).
func TestExportReimports(t *testing.T) {
	ctx := context.Background()
	demo, err := data.Demo()
	if err != nil {
		t.Fatal(err)
	}
	defer demo.Close()
	tests := []struct {
		kind  catalog.Kind
		parts func(*catalog.Snapshot) any
		count func(*catalog.Snapshot) int
	}{
		{catalog.KindSeries, func(s *catalog.Snapshot) any { return s.ResistorSeries }, func(s *catalog.Snapshot) int { return len(s.ResistorSeries) }},
		{catalog.KindResistor, func(s *catalog.Snapshot) any { return s.Resistors }, func(s *catalog.Snapshot) int { return len(s.Resistors) }},
		{catalog.KindNetwork, func(s *catalog.Snapshot) any { return s.Networks }, func(s *catalog.Snapshot) int { return len(s.Networks) }},
		{catalog.KindAmplifier, func(s *catalog.Snapshot) any { return s.Amplifiers }, func(s *catalog.Snapshot) int { return len(s.Amplifiers) }},
		{catalog.KindReference, func(s *catalog.Snapshot) any { return s.References }, func(s *catalog.Snapshot) int { return len(s.References) }},
	}
	for _, tc := range tests {
		t.Run(string(tc.kind), func(t *testing.T) {
			want, err := demo.List(ctx, catalog.Filter{Kind: tc.kind})
			if err != nil {
				t.Fatal(err)
			}
			if tc.count(want) == 0 {
				t.Fatalf("the demo catalog has no %s to export", tc.kind)
			}
			file := filepath.Join(t.TempDir(), string(tc.kind)+".csv")
			f, err := os.Create(file)
			if err != nil {
				t.Fatal(err)
			}
			if err := demo.WriteCSV(ctx, f, tc.kind); err != nil {
				t.Fatal(err)
			}
			if err := f.Close(); err != nil {
				t.Fatal(err)
			}
			st, _ := newCatalog(t)
			rep, err := Import(ctx, st, []string{file}, Options{Now: testNow})
			if err != nil {
				t.Fatal(err)
			}
			if rep.Summary.Series != 0 {
				t.Errorf("%d series grouped from an export, whose rows the catalog already grouped", rep.Summary.Series)
			}
			if rep.Summary.Skipped != 0 || rep.Summary.Added != tc.count(want) {
				t.Errorf("summary %+v, want all %d added: %s", rep.Summary, tc.count(want), problemText(rep))
			}
			got := snapshot(t, st)
			withoutProvenance(got)
			withoutProvenance(want)
			if g, w := tc.parts(got), tc.parts(want); !catalog.SameFigures(g, w) {
				t.Errorf("re-imported %s differ:\n got %+v\nwant %+v", tc.kind, g, w)
			}
			if n := got.Len() - tc.count(got); n != 0 {
				t.Errorf("%d parts of other kinds in the re-import", n)
			}
		})
	}
}

// TestJSONExportReimports writes the whole demo catalog, with some figures
// made unknown, as the catalog's own JSON export and imports the file into
// a fresh catalog: every part comes back with the same figures, unknown
// ones still unknown.
func TestJSONExportReimports(t *testing.T) {
	ctx := context.Background()
	snap, err := data.DemoSnapshot()
	if err != nil {
		t.Fatal(err)
	}
	snap.ResistorSeries[0].LoadLife = catalog.Unknown()
	snap.Amplifiers[0].IosA, snap.Amplifiers[0].SwingPosV = catalog.Unknown(), catalog.Unknown()
	src, _ := newCatalog(t)
	if _, err := src.Upsert(ctx, snap, catalog.UpsertOptions{Now: testNow}); err != nil {
		t.Fatal(err)
	}
	file := filepath.Join(t.TempDir(), "catalog.json")
	f, err := os.Create(file)
	if err != nil {
		t.Fatal(err)
	}
	if err := src.WriteJSON(ctx, f); err != nil {
		t.Fatal(err)
	}
	if err := f.Close(); err != nil {
		t.Fatal(err)
	}
	st, _ := newCatalog(t)
	rep, err := Import(ctx, st, []string{file}, Options{Now: testNow})
	if err != nil {
		t.Fatal(err)
	}
	if rep.Summary.Skipped != 0 || rep.Summary.Added != snap.Len() {
		t.Errorf("summary %+v, want all %d added: %s", rep.Summary, snap.Len(), problemText(rep))
	}
	got, want := snapshot(t, st), snapshot(t, src)
	withoutProvenance(got)
	withoutProvenance(want)
	if !catalog.SameFigures(got, want) {
		t.Errorf("re-imported catalog differs:\n got %+v\nwant %+v", got, want)
	}
	for _, rs := range got.ResistorSeries {
		if rs.Part == snap.ResistorSeries[0].Part && catalog.Known(rs.LoadLife) {
			t.Error("an unknown load life came back known")
		}
	}
}
