package importers

import (
	"math"
	"testing"
)

// The sign convention is catalog.Amplifier's: the inputs work from
// V- + CMNegV to V+ - CMPosV, so a bound below V- or above V+ is a
// negative headroom. Datasheets write ranges as "(V-) - 0.1 V to (V+) -
// 1.5 V" (common practice); the expected figures are that arithmetic.
func TestParseHeadroom(t *testing.T) {
	tests := []struct {
		name     string
		cell     string
		hint     string
		comma    bool
		neg, pos float64
		bad      bool
	}{
		{"rail relative, below V-", "(V-) - 0.1 V to (V+) - 1.5 V", "V", false, -0.1, 1.5, false},
		{"rail relative, no brackets", "V- + 0.2 to V+ - 1.2", "V", false, 0.2, 1.2, false},
		{"supply names, above V+", "Vee + 0.2 to Vcc + 0.1", "V", false, 0.2, -0.1, false},
		{"millivolts in the cell", "V- + 50 mV to V+ - 100 mV", "V", false, 0.05, 0.1, false},
		{"a rail alone is the rail", "V- to V+ - 1", "V", false, 0, 1, false},
		{"rail-to-rail", "Rail-to-Rail", "V", false, 0, 0, false},
		{"two figures, header unit", "20 / 35", "mV", false, 0.02, 0.035, false},
		{"one figure for both rails", "0.8 V", "V", false, 0.8, 0.8, false},
		{"decimal comma", "0,1 / 1,5", "V", true, 0.1, 1.5, false},
		{"one rail named only", "V+ - 1.5", "V", false, 0, 0, true},
		{"words", "see datasheet", "V", false, 0, 0, true},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			neg, pos, err := parseHeadroom(tc.cell, tc.hint, tc.comma)
			if tc.bad {
				if err == nil {
					t.Fatalf("read %q as %g, %g; want an error", tc.cell, neg, pos)
				}
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			if math.Abs(neg-tc.neg) > 1e-12 || math.Abs(pos-tc.pos) > 1e-12 {
				t.Errorf("%q: headroom %g, %g; want %g, %g", tc.cell, neg, pos, tc.neg, tc.pos)
			}
		})
	}
}

// TestRangeColumns reads the trade headers "Input Common Mode Range" and
// "Output Swing to Rail (mV)" from a guessed mapping.
func TestRangeColumns(t *testing.T) {
	b, rep := mustRead(t, "testdata/amplifiers_ranges.csv")
	if len(b.Amplifiers) != 3 {
		t.Fatalf("%d amplifiers: %s", len(b.Amplifiers), problemText(rep))
	}
	want := [][4]float64{ // CMNeg, CMPos, SwingNeg, SwingPos
		{-0.1, 1.5, 0.05, 0.05},
		{0, 0, 0.02, 0.035},
		{0.2, -0.1, 0.8, 0.8},
	}
	for i, a := range b.Amplifiers {
		got := [4]float64{a.CMNegV, a.CMPosV, a.SwingNegV, a.SwingPosV}
		for j := range got {
			if math.Abs(got[j]-want[i][j]) > 1e-12 {
				t.Errorf("%s: ranges %v, want %v", a.Part, got, want[i])
				break
			}
		}
	}
	for _, p := range rep.Problems {
		if p.Column == "Rail-to-Rail" || p.Column == string(FieldRailToRail) {
			t.Errorf("headroom assumed although the file gives it: %s", p.Reason)
		}
	}
}

func TestGuessRangeHeaders(t *testing.T) {
	tests := []struct {
		header string
		want   Field
	}{
		{"Input Common Mode Range", FieldCMRange},
		{"Vicm", FieldCMRange},
		{"Output Swing to Rail (mV)", FieldSwing},
		{"Output Voltage Swing", FieldSwing},
		{"cm_neg_v", FieldCMNeg},
		{"swing_pos_v", FieldSwingPos},
	}
	for _, tc := range tests {
		t.Run(tc.header, func(t *testing.T) {
			m, err := GuessMapping([]string{"Part Number", "Vos max", "GBW", "Slew Rate", tc.header}, "amplifier")
			if err != nil {
				t.Fatal(err)
			}
			if got := m.Columns[tc.want]; got != tc.header {
				t.Errorf("%s read from %q, want %q (mapping %v)", tc.want, got, tc.header, m.Columns)
			}
		})
	}
}

// FuzzParseHeadroom: any cell either reads as two finite headrooms or is
// refused with an error; it never panics.
func FuzzParseHeadroom(f *testing.F) {
	for _, s := range []string{"(V-) - 0.1 V to (V+) - 1.5 V", "Vee + 0.2 to Vcc + 0.1", "20 / 35", "0.8 V", "rail-to-rail", "V+ - 1", "-Vs + 1e-3 to +Vs - 2"} {
		f.Add(s, false)
	}
	f.Fuzz(func(t *testing.T, s string, comma bool) {
		neg, pos, err := parseHeadroom(s, "V", comma)
		if err == nil && (math.IsNaN(neg) || math.IsNaN(pos) || math.IsInf(neg, 0) || math.IsInf(pos, 0)) {
			t.Fatalf("%q read as %g, %g", s, neg, pos)
		}
	})
}

// TestSnakeCaseColumns reads a file in the catalog's column names without
// the rest of its export (no price_breaks, imported_at): bare numbers take
// the unit the name ends with, and the one-side range columns are read
// signed (a negative headroom is beyond the rail).
func TestSnakeCaseColumns(t *testing.T) {
	b, rep := mustRead(t, "testdata/amplifiers_snake.csv")
	if len(b.Amplifiers) != 1 {
		t.Fatalf("%d amplifiers: %s", len(b.Amplifiers), problemText(rep))
	}
	a := b.Amplifiers[0]
	tests := []struct {
		name      string
		got, want float64
	}{
		{"cm_neg_v below the rail", a.CMNegV, -0.1},
		{"cm_pos_v", a.CMPosV, 1.5},
		{"swing_neg_v", a.SwingNegV, 0.05},
		{"swing_pos_v", a.SwingPosV, 0.1},
		{"vos_v", a.VosV, 25e-6},
		{"vos_drift_v_per_k", a.VosDriftVK, 0.3e-6},
		{"ib_a", a.IbA, 1e-9},
		{"aol_v_per_v", a.AolVV, 1e6},
		{"gbw_hz", a.GBWHz, 10e6},
		{"slew_v_per_s", a.SlewVs, 2.5e6},
		{"noise_v_per_rthz", a.NoiseVHz, 8e-9},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if math.Abs(tc.got-tc.want) > 1e-9*math.Abs(tc.want) {
				t.Errorf("got %g, want %g", tc.got, tc.want)
			}
		})
	}
}
