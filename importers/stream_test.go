package importers

import (
	"context"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"plumb/catalog"
	"plumb/catalog/eseries"
)

// appendLines appends text to a generated export.
func appendLines(t *testing.T, path, text string) {
	t.Helper()
	f, err := os.OpenFile(path, os.O_APPEND|os.O_WRONLY, 0)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := f.WriteString(text); err != nil {
		t.Fatal(err)
	}
	if err := f.Close(); err != nil {
		t.Fatal(err)
	}
}

// TestStreamingKeepsRunsAndRepeats writes a file whose series run straddles
// the first chunk boundary and whose last row repeats a part of the first
// chunk: the run is still one series, and the repeat is skipped and
// reported as in a file read whole.
func TestStreamingKeepsRunsAndRepeats(t *testing.T) {
	ctx := context.Background()
	file := filepath.Join(t.TempDir(), "stream.csv")
	lead := ChunkRows - 5
	writeBigExport(t, file, "ST", lead)
	var sb strings.Builder
	// One E12 decade (IEC 60063, from memory: 1.0 1.2 1.5 1.8 2.2 2.7 3.3
	// 3.9 4.7 5.6 6.8 8.2) at one grade and price: a series run of 12.
	vals := eseries.E12.Values(1000, 8200)
	for _, v := range vals {
		code := catalog.ValueCode(v)
		fmt.Fprintf(&sb, "SRX0603-%s,Quillon Passives,\"RES %s OHM 1%% 1/10W 100PPM 0603, thick film\",%s,±1%%,±100ppm/°C,0.1W,0603,thick film,500,$0.2,$0.1,$0.05\n", code, code, code)
	}
	// A repeat of a row of the first chunk.
	fmt.Fprintf(&sb, "ST0000001,Quillon Passives,\"RES 1K OHM 1%% 1/10W 100PPM 0603, thick film\",1K00,±1%%,±100ppm/°C,0.1W,0603,thick film,7,$1,$1,$1\n")
	appendLines(t, file, sb.String())

	want, wantRep, err := Read(ctx, []string{file}, Options{Now: testNow})
	if err != nil {
		t.Fatal(err)
	}
	st, _ := newCatalog(t)
	rep, err := Import(ctx, st, []string{file}, Options{Now: testNow})
	if err != nil {
		t.Fatal(err)
	}
	if len(vals) != 12 || len(want.Series) != 1 || rep.Summary.Series != 1 {
		t.Fatalf("%d series read whole, %d imported; want the one run of 12 as a series", len(want.Series), rep.Summary.Series)
	}
	s := rep.Summary
	if s.Added != lead+1 || s.Parts != lead+1 || s.Skipped != 1 || s.Imported != lead+1 {
		t.Errorf("summary %+v, want %d added and parts, 1 skipped", s, lead+1)
	}
	if s.Parts != wantRep.Summary.Parts || s.Skipped != wantRep.Summary.Skipped {
		t.Errorf("streamed summary %+v differs from the whole read's %+v", s, wantRep.Summary)
	}
	found := false
	for _, p := range rep.Problems {
		if errors.Is(p.Err, ErrDuplicate) && p.Part == "ST0000001" && p.Severity == Skip && p.Line == lead+14 {
			found = true
		}
	}
	if !found {
		t.Errorf("no skip for the repeated ST0000001 on line %d: %s", lead+14, problemText(rep))
	}
	snap := snapshot(t, st)
	if len(snap.Resistors) != lead || len(snap.ResistorSeries) != 1 {
		t.Errorf("catalog has %d resistors and %d series, want %d and 1", len(snap.Resistors), len(snap.ResistorSeries), lead)
	}
	if len(rep.Results) != 0 {
		t.Errorf("%d results kept; only spec changes should be", len(rep.Results))
	}
}

// TestBadRecordAfterChunksWritesNothing: a record the reader refuses
// three chunks into the file fails the whole import, and the chunks already
// handed to the store are rolled back with it.
func TestBadRecordAfterChunksWritesNothing(t *testing.T) {
	ctx := context.Background()
	st, _ := newCatalog(t)
	if _, err := Import(ctx, st, []string{"testdata/resistors_a.csv"}, Options{Now: testNow}); err != nil {
		t.Fatal(err)
	}
	before := snapshot(t, st)
	file := filepath.Join(t.TempDir(), "bad.csv")
	writeBigExport(t, file, "BX", 3*ChunkRows+100)
	appendLines(t, file, "BX9,\"an unclosed quote"+strings.Repeat("x", MaxRecordBytes+10)+"\n")
	wrote := 0
	_, err := Import(ctx, st, []string{file}, Options{Now: testNow, BeforeWrite: func(n int) { wrote = n }})
	if !errors.Is(err, ErrRecordTooLong) {
		t.Fatalf("err = %v, want ErrRecordTooLong", err)
	}
	if wrote == 0 {
		t.Fatal("no chunk reached the store before the bad record: the test proves nothing")
	}
	if after := snapshot(t, st); len(after.Resistors) != len(before.Resistors) || len(after.ResistorSeries) != len(before.ResistorSeries) {
		t.Errorf("catalog has %d resistors after a failed import, had %d", len(after.Resistors), len(before.Resistors))
	}
}
