package main

import (
	"strings"
	"testing"

	"plumb/catalog"
	"plumb/optimize/cost"
)

// TestBOMCSVRowsLeaveNoFigureBlankAsZero: the purchasing list's CSV writes
// a resistor's tolerance and tempco and a matched amplifier's gain error
// and drift as the catalog gives them, and leaves an op-amp's (which has
// none) blank rather than 0, as the JSON leaves them out.
func TestBOMCSVRowsLeaveNoFigureBlankAsZero(t *testing.T) {
	tests := []struct {
		name     string
		line     cost.BOMLine
		tol, tcr string
	}{
		{"resistor", cost.BOMLine{Positions: []string{"R1", "R3"}, Kind: catalog.KindResistor, Part: "QX-TF-10K0", Value: "10k",
			Tolerance: 0.001, TCR: 25}, "0.001", "25"},
		{"op-amp", cost.BOMLine{Positions: []string{"U1"}, Kind: catalog.KindAmplifier, Part: "QX-OA1", Value: "opamp"}, "", ""},
		{"matched amplifier", cost.BOMLine{Positions: []string{"U1"}, Kind: catalog.KindAmplifier, Part: "QX-DA10", Value: "matched",
			Tolerance: 0.0002, TCR: 1}, "0.0002", "1"},
	}
	col := map[string]int{}
	for i, h := range bomCSVHeader {
		col[h] = i
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			rows := bomCSVRows(&cost.BOM{Lines: []cost.BOMLine{tc.line}})
			if len(rows) != 1 || len(rows[0]) != len(bomCSVHeader) {
				t.Fatalf("rows %q, want one of %d cells", rows, len(bomCSVHeader))
			}
			r := rows[0]
			if r[col["tolerance"]] != tc.tol || r[col["tcr_ppm"]] != tc.tcr {
				t.Errorf("tolerance %q, tcr_ppm %q; want %q, %q", r[col["tolerance"]], r[col["tcr_ppm"]], tc.tol, tc.tcr)
			}
			if r[col["positions"]] != strings.Join(tc.line.Positions, " ") || r[col["part"]] != tc.line.Part {
				t.Errorf("row %q does not carry the line's positions and part", r)
			}
		})
	}
}
