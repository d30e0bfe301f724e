package main

import (
	"encoding/csv"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"
)

// TestSolveChainExplainBOM: --explain 1 on a chain prints chain 1 alone
// with the contributors to its limits and each stage's full budget, and
// --bom writes one purchasing list over both stages (positions written
// STAGE:POSITION, each part number once) whose extended prices add up to
// the build cost chain 1 is ranked by (the two-stage spec has no
// placement or line-item costs, so the parts are the whole build: common
// practice BOM arithmetic).
func TestSolveChainExplainBOM(t *testing.T) {
	clearPlumbEnv(t)
	f, _, _ := testFactory(t)
	path := filepath.Join(t.TempDir(), "chain-bom.csv")
	out, errOut, code := runPlumb(t, f, "solve two-stage --top 2 --explain 1 --bom "+path)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	for _, want := range []string{"Chain 1: ", "Contributors to total error:", "Stage 1\n", "Stage 2\n", "Budget of inamp"} {
		if !strings.Contains(out, want) {
			t.Errorf("--explain 1 lacks %q:\n%s", want, out)
		}
	}
	if strings.Contains(out, "Chain 2: ") || strings.Contains(out, "Near misses") {
		t.Errorf("--explain 1 prints more than chain 1:\n%s", out)
	}
	m := regexp.MustCompile(`Chain 1: [0-9.]+ USD per chain \(all stages\), ([0-9.]+) USD for the build`).FindStringSubmatch(out)
	if m == nil {
		t.Fatalf("no cost line for chain 1:\n%s", out)
	}
	total, _ := strconv.ParseFloat(m[1], 64)
	raw, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	rows, err := csv.NewReader(strings.NewReader(string(raw))).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	sum, stages, parts := 0.0, map[string]bool{}, map[string]bool{}
	for _, r := range rows[1:] {
		ext, err := strconv.ParseFloat(r[11], 64)
		if err != nil {
			t.Fatalf("row %v: %v", r, err)
		}
		sum += ext
		if parts[r[5]] {
			t.Errorf("part %s on two lines", r[5])
		}
		parts[r[5]] = true
		for _, pos := range strings.Fields(r[0]) {
			stage, _, ok := strings.Cut(pos, ":")
			if !ok {
				t.Errorf("position %q without its stage", pos)
			}
			stages[stage] = true
		}
	}
	if !stages["1"] || !stages["2"] {
		t.Errorf("the list covers stages %v, want 1 and 2", stages)
	}
	// The cost line prints six significant figures.
	if d := sum - total; d > 0.5e-5*total || d < -0.5e-5*total {
		t.Errorf("purchasing list totals %g, chain 1 costs %g", sum, total)
	}
}
