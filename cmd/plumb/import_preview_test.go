package main

import (
	"encoding/json"
	"path/filepath"
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

// TestImportFillUnknown: --fill-unknown fills figures the catalog holds as
// unknown and lists each change, which catalog history keeps; a known
// figure that differs writes nothing (exit 1) unless --overwrite-known
// confirms it, and that flag alone is a usage error.
func TestImportFillUnknown(t *testing.T) {
	db := filepath.Join(t.TempDir(), "parts.db")
	run := func(args string) (string, string, int) {
		f := fixtureFactory(t)
		f.Catalog = f.openConfigured
		return runPlumb(t, f, "--catalog "+db+" "+args)
	}
	const dir = "../../importers/testdata/exports/"
	steps := []struct {
		args string
		code int
		want []string
	}{
		{"catalog init " + db, exitOK, nil},
		{"import --allow-unusual " + dir + "ref_messy_chf.csv", exitOK, nil},
		{"import --overwrite-known " + dir + "ref_fill.csv", exitUsage, nil},
		{"import --fill-unknown " + dir + "ref_known.csv", exitError, []string{"drift_ppm 10 -> 8", "nothing was written",
			"refused, nothing written: would have imported", "figures would be updated (not written"}},
		{"import --fill-unknown " + dir + "ref_fill.csv", exitOK, []string{"1 with figures updated", "noise_pp_v unknown -> 9e-06"}},
		{"catalog history VR25-C", exitOK, []string{"figures-updated"}},
		{"import --fill-unknown --overwrite-known " + dir + "ref_known.csv", exitOK, []string{"drift_ppm 10 -> 8"}},
	}
	for _, s := range steps {
		out, errOut, code := run(s.args)
		if code != s.code {
			t.Fatalf("%s: exit %d, want %d: %s\n%s", s.args, code, s.code, errOut, out)
		}
		for _, w := range s.want {
			if all := strings.Join(strings.Fields(out+errOut), " "); !strings.Contains(all, w) {
				t.Errorf("%s: output lacks %q:\n%s%s", s.args, w, out, errOut)
			}
		}
	}
}
