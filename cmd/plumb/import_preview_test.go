package main

import (
	"encoding/json"
	"strings"
	"testing"
)

// TestImportDryRunPreviewsEveryKind: a dry run shows the first parts as
// read for every kind of part, voltage references included (their preview
// once printed no rows).
func TestImportDryRunPreviewsEveryKind(t *testing.T) {
	tests := []struct {
		name  string
		file  string
		parts []string // part numbers the preview must show
	}{
		{"references", "../../importers/testdata/exports/ref_messy_chf.csv", []string{"VR25-A", "VR25-C", "VR41-B", "VS12-E"}},
		{"amplifiers", "../../importers/testdata/amplifiers.csv", nil},
		{"resistors", "../../importers/testdata/resistors_a.csv", nil},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			f := fixtureFactory(t)
			out, errOut, code := runPlumb(t, f, "import --dry-run "+tt.file)
			if code != exitOK {
				t.Fatalf("exit %d: %s\n%s", code, errOut, out)
			}
			_, preview, ok := strings.Cut(out, "as read:\n")
			if !ok {
				t.Fatalf("no preview:\n%s", out)
			}
			preview, _, _ = strings.Cut(preview, "\n\n")
			if rows := strings.Count(preview, "\n"); rows < 2 {
				t.Errorf("preview holds %d line(s), want the header and parts:\n%s", rows, preview)
			}
			for _, p := range tt.parts {
				if !strings.Contains(preview, p) {
					t.Errorf("preview lacks %s:\n%s", p, preview)
				}
			}
		})
	}
}

// TestImportSummaryNamesEverything: the summary names every column not
// read, with the reason, and each skipped row with the columns of all its
// problems; JSON carries both.
func TestImportSummaryNamesEverything(t *testing.T) {
	const many = "../../importers/testdata/exports/amp_many_problems.csv"
	const prices = "../../importers/testdata/exports/res_price_headers.csv"
	out, errOut, code := runPlumb(t, fixtureFactory(t), "import --dry-run "+many+" "+prices)
	if code != exitOK {
		t.Fatalf("exit %d: %s\n%s", code, errOut, out)
	}
	summary, _, _ := strings.Cut(out, "\n\n")
	summary = strings.Join(strings.Fields(summary), " ") // as if unwrapped
	for _, want := range []string{
		"skipped " + many + ":3 QA-12: Vs Min, Vos, GBW, Channels (4 problems)",
		`column "500+ (USD)" not read: price break from 500 in USD beside the EUR price breaks`,
		`column "Distributor Part Number" not read: a distributor's own code`,
	} {
		if !strings.Contains(summary, want) {
			t.Errorf("summary lacks %q:\n%s", want, summary)
		}
	}
	out, errOut, code = runPlumb(t, fixtureFactory(t), "import --dry-run --format json "+many+" "+prices)
	if code != exitOK {
		t.Fatalf("json: exit %d: %s", code, errOut)
	}
	var rep importJSON
	if err := json.Unmarshal([]byte(out), &rep); err != nil {
		t.Fatal(err)
	}
	if len(rep.SkippedRows) != 1 || len(rep.SkippedRows[0].Problems) != 4 || rep.SkippedRows[0].Part != "QA-12" {
		t.Errorf("skipped_rows %+v, want QA-12 with 4 problems", rep.SkippedRows)
	}
	if len(rep.Files) != 2 || len(rep.Files[1].Unused) != 2 || rep.Files[1].Unused[0].Column != "500+ (USD)" {
		t.Errorf("files %+v, want the price file's two unused columns", rep.Files)
	}
}
