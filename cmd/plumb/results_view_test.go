package main

import (
	"testing"

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
