package spec

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestExamplesLoad loads every example file shipped in data/examples: spec
// files, and design files (named *-design.yaml).
func TestExamplesLoad(t *testing.T) {
	files, err := filepath.Glob(filepath.Join("..", "..", "data", "examples", "*.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	specs, designs := 0, 0
	for _, f := range files {
		t.Run(filepath.Base(f), func(t *testing.T) {
			data, err := os.ReadFile(f)
			if err != nil {
				t.Fatal(err)
			}
			if !strings.HasPrefix(string(data), "# ") {
				t.Error("first line must be a comment saying what the example is for")
			}
			if strings.HasSuffix(f, "-design.yaml") {
				designs++
				if _, err := ParseDesign(data, f); err != nil {
					t.Error(err)
				}
				return
			}
			specs++
			if _, err := Parse(data, f); err != nil {
				t.Error(err)
			}
		})
	}
	if specs < 5 || designs < 2 {
		t.Errorf("%d specs and %d designs in data/examples; want at least 5 and 2", specs, designs)
	}
}
