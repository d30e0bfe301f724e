package importers

import (
	"context"
	"slices"
	"testing"
)

// TestSkippedRowNamesEveryProblem: an amplifier row with four problems
// (no minimum supply, an offset in an unknown unit, a bandwidth in words,
// nine thousand channels) is reported with all four, and SkippedRows names
// the row once with every column.
func TestSkippedRowNamesEveryProblem(t *testing.T) {
	b, rep, err := Read(context.Background(), []string{"testdata/exports/amp_many_problems.csv"}, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if len(b.Amplifiers) != 1 {
		t.Fatalf("%d amplifiers, want 1:\n%s", len(b.Amplifiers), problemText(rep))
	}
	rows := rep.SkippedRows()
	if len(rows) != 1 || rows[0].Line != 3 || rows[0].Part != "QA-12" {
		t.Fatalf("skipped rows %+v, want line 3, QA-12", rows)
	}
	want := []string{"Vs Min", "Vos", "GBW", "Channels"}
	if got := rows[0].Columns(); !slices.Equal(got, want) {
		t.Errorf("columns %q, want %q:\n%s", got, want, problemText(rep))
	}
}
