package importers

import (
	"context"
	"plumb/catalog"
	"strings"
	"testing"
)

// TestParseSupplyRange reads supply ranges written in one cell. A split
// supply ±V spans 2V from rail to rail (the total supply a single-supply
// figure states; common practice), so "±1.35 V to ±18 V" is the same part
// as "2.7 V to 36 V".
func TestParseSupplyRange(t *testing.T) {
	tests := []struct {
		name, cell, hint string
		lo, hi           float64
		err              string
	}{
		{"to", "2.7 V to 36 V", "", 2.7, 36, ""},
		{"tilde and split supply", "±1.35V ~ ±18V", "", 2.7, 36, ""},
		{"tilde no spaces", "3V~5.5V", "", 3, 5.5, ""},
		{"hyphen", "4.5-36V", "", 4.5, 36, ""},
		{"en dash", "4.5 – 36 V", "", 4.5, 36, ""},
		{"plus/minus spelt", "+/-2.25 V to +/-18 V", "", 4.5, 36, ""},
		{"unit once", "2.7 to 5.5 V", "", 2.7, 5.5, ""},
		{"bare numbers take the header's unit", "1800 to 5500", "mV", 1.8, 5.5, ""},
		{"both forms agree", "2.7 V to 36 V (±1.35 V to ±18 V)", "", 2.7, 36, ""},
		{"forms disagree", "2.7 V to 36 V (±2.5 V to ±18 V)", "", 0, 0, "disagree"},
		{"mixed split", "±1.35 V to 36 V", "", 0, 0, "split supply"},
		{"one figure", "36 V", "", 0, 0, "lowest and highest"},
		{"reversed", "5 V to 3 V", "", 0, 0, "not below"},
		{"zero end", "0 V to 5 V", "", 0, 0, "above zero"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			lo, hi, err := parseSupplyRange(tt.cell, tt.hint, false)
			if tt.err != "" {
				if err == nil || !strings.Contains(err.Error(), tt.err) {
					t.Fatalf("%q: err %v, want one saying %q", tt.cell, err, tt.err)
				}
				return
			}
			if err != nil || !near(lo, tt.lo) || !near(hi, tt.hi) {
				t.Fatalf("%q = %g..%g, %v; want %g..%g", tt.cell, lo, hi, err, tt.lo, tt.hi)
			}
		})
	}
}

// TestSupplyRangeColumn imports an invented amplifier export whose supply
// range is one column, and a reference export whose temperature range is
// headed "Operating Temp" and whose input range is one cell.
func TestSupplyRangeColumn(t *testing.T) {
	b, rep, err := Read(context.Background(), []string{"testdata/exports/amp_supply_span.csv"}, Options{})
	if err != nil {
		t.Fatal(err)
	}
	want := map[string][2]float64{"TS-101": {2.7, 36}, "TS-102": {2.7, 36}, "TS-103": {3, 5.5}, "TS-104": {4.5, 36}, "TS-105": {2.7, 36}}
	if len(b.Amplifiers) != len(want) {
		t.Fatalf("%d amplifiers, want %d:\n%s", len(b.Amplifiers), len(want), problemText(rep))
	}
	for _, a := range b.Amplifiers {
		w := want[a.Part]
		if !near(a.SupplyMinV, w[0]) || !near(a.SupplyMaxV, w[1]) {
			t.Errorf("%s supply %g..%g V, want %g..%g V", a.Part, a.SupplyMinV, a.SupplyMaxV, w[0], w[1])
		}
	}
	skipped := map[string]string{}
	for _, p := range rep.Problems {
		if p.Severity == Skip {
			if p.Column != "Supply Voltage Range" {
				t.Errorf("%s skipped at column %q, want Supply Voltage Range: %s", p.Part, p.Column, p.Reason)
			}
			skipped[p.Part] = p.Reason
		}
	}
	for _, part := range []string{"TS-106", "TS-107", "TS-108", "TS-109"} {
		if skipped[part] == "" {
			t.Errorf("%s not skipped:\n%s", part, problemText(rep))
		}
	}

	b, rep, err = Read(context.Background(), []string{"testdata/exports/ref_temp_columns.csv"}, Options{})
	if err != nil {
		t.Fatal(err)
	}
	type span struct{ tlo, thi, slo, shi float64 }
	refs := map[string]span{
		"TR-25A": {-40, 125, 2.7, 18},
		"TR-25B": {-40, 85, 3, 18},
		"TR-41C": {0, 70, 4.5, 36},
	}
	for part, w := range refs {
		r := findRef(t, b, part)
		if !near(r.TempMinC, w.tlo) || !near(r.TempMaxC, w.thi) || !near(r.SupplyMinV, w.slo) || !near(r.SupplyMaxV, w.shi) {
			t.Errorf("%s: %g..%g °C, supply %g..%g V; want %+v", part, r.TempMinC, r.TempMaxC, r.SupplyMinV, r.SupplyMaxV, w)
		}
	}
	d := findRef(t, b, "TR-50D")
	if !near(d.TempMinC, -40) || !near(d.TempMaxC, 105) || !near(d.SupplyMinV, catalog.Unknown()) {
		t.Errorf("TR-50D: %g..%g °C, supply low %g; want -40..105 and unknown", d.TempMinC, d.TempMaxC, d.SupplyMinV)
	}
	found := false
	for _, p := range rep.Problems {
		if p.Part == "TR-50E" && p.Severity == Skip && p.Column == "Operating Temp" {
			found = true
		}
	}
	if !found {
		t.Errorf("TR-50E (temperature \"hot\") not skipped at column Operating Temp:\n%s", problemText(rep))
	}
}
