package main

import (
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
