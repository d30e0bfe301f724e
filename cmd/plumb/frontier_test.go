package main

import (
	"encoding/json"
	"slices"
	"strings"
	"testing"
)

// TestSolveFrontierJSON: --frontier adds "frontier" to the JSON, each entry
// with the same fields as a design, by cost; the table lists it too.
func TestSolveFrontierJSON(t *testing.T) {
	f, _, _ := testFactory(t)
	out, errOut, code := runPlumb(t, f, "solve logger-channel --frontier --top 2 --format json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	var raw struct {
		Designs  []map[string]json.RawMessage `json:"designs"`
		Frontier []map[string]json.RawMessage `json:"frontier"`
	}
	if err := json.Unmarshal([]byte(out), &raw); err != nil {
		t.Fatal(err)
	}
	if len(raw.Frontier) == 0 || len(raw.Designs) == 0 {
		t.Fatalf("%d frontier entries, %d designs", len(raw.Frontier), len(raw.Designs))
	}
	keys := func(m map[string]json.RawMessage) []string {
		var k []string
		for key := range m {
			k = append(k, key)
		}
		slices.Sort(k)
		return k
	}
	want := keys(raw.Designs[0])
	last := 0.0
	for i, e := range raw.Frontier {
		for _, k := range want {
			if _, ok := e[k]; !ok && k != "short_stock" && k != "cautions" {
				t.Errorf("frontier entry %d lacks %q", i, k)
			}
		}
		var cost float64
		json.Unmarshal(e["total_cost"], &cost)
		if cost < last {
			t.Errorf("frontier entry %d costs %g, below the one before (%g)", i, cost, last)
		}
		last = cost
	}
	f2, _, _ := testFactory(t)
	table, _, code := runPlumb(t, f2, "solve logger-channel --frontier --top 2")
	if code != 0 || !strings.Contains(table, "Cost against margin") {
		t.Errorf("the table does not list the frontier (exit %d)", code)
	}
}
