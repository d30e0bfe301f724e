package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"plumb/catalog"
	"plumb/data"
)

// useSlipCatalog makes f open the demo catalog plus a copy of its cheapest
// resistor series imported with a unit slip: 50000 ppm/K for 50 ppm/K, at
// half the price.
func useSlipCatalog(f *Factory) {
	useSnapshotCatalog(f, "slip", func() (*catalog.Snapshot, error) {
		snap, err := data.DemoSnapshot()
		if err != nil {
			return nil, err
		}
		bad := snap.ResistorSeries[0]
		bad.Part, bad.TCR = "XX-SLIP", 50000
		bad.PriceBreaks = slices.Clone(bad.PriceBreaks)
		for i := range bad.PriceBreaks {
			bad.PriceBreaks[i].UnitPrice /= 2
		}
		snap.ResistorSeries = append(snap.ResistorSeries, bad)
		return snap, nil
	})
}

// TestOneVerdictAcrossOutputs is finding 1 of the hardening issue: with
// the slipped series in the catalog, solve ranked a design built on it
// first in the table and the BOM, the JSON output failed on +Inf and the
// report refused it. Every output of one search must now show the same
// design 1, and it must not use the broken part.
func TestOneVerdictAcrossOutputs(t *testing.T) {
	clearPlumbEnv(t)
	dir := t.TempDir()
	run := func(line string) string {
		t.Helper()
		f, _, _ := testFactory(t)
		useSlipCatalog(f)
		out, errOut, code := runPlumb(t, f, line)
		if code != exitOK {
			t.Fatalf("%s: exit %d: %s", line, code, errOut)
		}
		return out
	}
	var res struct {
		Designs []struct {
			Parts []struct {
				Part string `json:"part"`
			} `json:"parts"`
		} `json:"designs"`
	}
	if err := json.Unmarshal([]byte(run("solve logger-channel --top 3 --format json")), &res); err != nil {
		t.Fatal(err)
	}
	if len(res.Designs) == 0 {
		t.Fatal("no design ranked")
	}
	var parts []string
	for _, p := range res.Designs[0].Parts {
		parts = append(parts, p.Part)
	}
	table := run("solve logger-channel --top 3")
	bom := filepath.Join(dir, "bom.csv")
	run("solve logger-channel --top 3 --bom " + bom)
	md := filepath.Join(dir, "r.md")
	run("report logger-channel --top 3 -o " + md)
	recs, err := readCSVFile(bom)
	if err != nil {
		t.Fatal(err)
	}
	var bomParts []string
	for _, r := range recs[1:] {
		bomParts = append(bomParts, r[slices.Index(recs[0], "part")])
	}
	report, err := os.ReadFile(md)
	if err != nil {
		t.Fatal(err)
	}
	for _, out := range []struct{ name, text string }{{"table", table}, {"bom", strings.Join(bomParts, " ")}, {"report", string(report)}, {"json", strings.Join(parts, " ")}} {
		// Near misses may show the series with the budget's finite
		// figures; design 1 and its BOM may not use it.
		if strings.Contains(out.text, "Inf") || strings.Contains(out.text, "NaN") ||
			((out.name == "bom" || out.name == "json") && strings.Contains(out.text, "XX-SLIP")) {
			t.Errorf("the %s shows the broken series or an infinite figure: %s", out.name, out.text)
		}
		for _, p := range parts {
			if !strings.Contains(out.text, p) {
				t.Errorf("the %s lacks %s, a part of design 1 in the JSON output", out.name, p)
			}
		}
	}
}
