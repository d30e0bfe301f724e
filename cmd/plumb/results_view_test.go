package main

import (
	"strings"
	"testing"

	"plumb/optimize/assume"
	"plumb/optimize/search"
)

// TestCountOf: a count takes the singular noun for one only (English
// grammar), as in the solve header's "1 design class".
func TestCountOf(t *testing.T) {
	for _, tc := range []struct {
		n    int
		want string
	}{
		{0, "0 design classes"},
		{1, "1 design class"},
		{2, "2 design classes"},
		{148, "148 design classes"},
	} {
		if got := countOf(tc.n, "design class", "design classes"); got != tc.want {
			t.Errorf("countOf(%d) = %q, want %q", tc.n, got, tc.want)
		}
	}
}

// TestSolveCSVRowsLeaveNoFigureBlankAsZero: the solve CSV leaves the
// resistance, tolerance and tempco of a part that has none (an op-amp;
// a reference has no resistance) blank, as the JSON leaves them out,
// instead of writing 0.
func TestSolveCSVRowsLeaveNoFigureBlankAsZero(t *testing.T) {
	r := &search.Result{Designs: []search.Design{{Rank: 1, Family: "difference-discrete", Parts: []search.Part{
		{Position: "R1", Kind: "resistor", Part: "QX-TF-10K0", Quantity: 1, ValueOhm: 10e3, Tolerance: 0.001, TCRppm: 25, UnitPrice: 0.05},
		{Position: "U1", Kind: "amplifier", Part: "QX-OA1", Quantity: 1, UnitPrice: 0.4},
		{Position: "REF", Kind: "reference", Part: "QX-VR41", Quantity: 1, Tolerance: 0.0005, TCRppm: 5, UnitPrice: 1.2},
	}}}}
	want := map[string][3]string{
		"R1":  {"10000", "0.001", "25"},
		"U1":  {"", "", ""},
		"REF": {"", "0.0005", "5"},
	}
	col := map[string]int{}
	for i, h := range solveCSVHeader {
		col[h] = i
	}
	rows := solveCSVRows(r)
	if len(rows) != len(want) {
		t.Fatalf("%d rows, want %d", len(rows), len(want))
	}
	for _, row := range rows {
		pos := row[col["position"]]
		got := [3]string{row[col["value_ohm"]], row[col["tolerance"]], row[col["tcr_ppm"]]}
		if got != want[pos] {
			t.Errorf("%s: value_ohm, tolerance, tcr_ppm = %q, want %q", pos, got, want[pos])
		}
	}
}

// TestNearMissNotes: the figures a near miss's verdict rests on that the
// catalog does not give are noted once per part in the text (JSON has them
// per near miss), except those the ranked designs' notes already cover.
func TestNearMissNotes(t *testing.T) {
	loadLife := func(part string) assume.Assumption {
		return assume.Assumption{Part: part, Figure: "load_life", Value: 0.005, Text: "load life not given: taken as 0.5 %"}
	}
	ranked := search.Design{Rank: 1, Family: "difference-discrete", Assumptions: []assume.Assumption{loadLife("QX-TF-10K0")}}
	near := func(parts ...string) search.NearMiss {
		var as []assume.Assumption
		for _, p := range parts {
			as = append(as, loadLife(p))
		}
		return search.NearMiss{Design: search.Design{Family: "difference-discrete", Assumptions: as}}
	}
	for _, tc := range []struct {
		name    string
		r       search.Result
		want    []string
		wantNot []string
	}{
		{"a near miss's own assumed figure", search.Result{Designs: []search.Design{ranked}, NearMisses: []search.NearMiss{near("QX-TF-10K0", "QX-TK-90K9")}},
			[]string{"note: near miss QX-TK-90K9: assumed, not in the catalog: load life not given: taken as 0.5 %"},
			[]string{"near miss QX-TF-10K0"}},
		{"two near misses share a part: noted once", search.Result{NearMisses: []search.NearMiss{near("QX-TK-90K9"), near("QX-TK-90K9", "QX-TK-18K2")}},
			[]string{"near miss QX-TK-18K2: assumed", "near miss QX-TK-90K9: assumed"}, nil},
		{"no assumption, no note", search.Result{Designs: []search.Design{{Rank: 1}}, NearMisses: []search.NearMiss{near()}},
			nil, []string{"near miss"}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			ios, _, out, _ := TestIO()
			if err := writeSolveTable(ios.Out, ios, "Designs for fixture", &tc.r, 0); err != nil {
				t.Fatal(err)
			}
			text := strings.Join(strings.Fields(out.String()), " ")
			for _, w := range tc.want {
				if strings.Count(text, w) != 1 {
					t.Errorf("output has %q %d times, want once:\n%s", w, strings.Count(text, w), out)
				}
			}
			for _, w := range tc.wantNot {
				if strings.Contains(text, w) {
					t.Errorf("output has %q:\n%s", w, out)
				}
			}
		})
	}
}
