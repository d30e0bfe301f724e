package catalog

import (
	"errors"
	"math"
	"strings"
	"testing"
)

func TestValidate(t *testing.T) {
	tests := []struct {
		name  string
		edit  func(b *Snapshot)
		words []string // the error names the part, the field and the problem
	}{
		{"empty part number", func(b *Snapshot) { b.Resistors[0].Part = "" }, []string{"(no part number)", "part", "order code"}},
		{"space in part number", func(b *Snapshot) { b.Resistors[0].Part = "TS SH10" }, []string{"white space"}},
		{"comma in part number", func(b *Snapshot) { b.Networks[0].Part = "TS,NW4" }, []string{"comma"}},
		{"no maker", func(b *Snapshot) { b.Amplifiers[0].Maker = " " }, []string{"TS-OA1", "maker", "empty"}},
		{"zero value", func(b *Snapshot) { b.Resistors[0].ValueOhm = 0 }, []string{"value_ohm", "positive"}},
		{"infinite power", func(b *Snapshot) { b.Resistors[0].PowerW = math.Inf(1) }, []string{"power_w"}},
		{"negative tempco", func(b *Snapshot) { b.Resistors[0].TCR = -25 }, []string{"tcr_ppm", "zero or a positive"}},
		{"tolerance in percent", func(b *Snapshot) { b.ResistorSeries[0].Tolerance = 0.1 * 100 }, []string{"TS-TF01", "tolerance", "0.001 for 0.1 %"}},
		{"unknown E-series", func(b *Snapshot) { b.ResistorSeries[0].ESeries = "E100" }, []string{"e_series", "E96"}},
		{"inverted range", func(b *Snapshot) { b.ResistorSeries[0].MaxOhm = 10 }, []string{"max_ohm", "below min_ohm"}},
		{"range without values", func(b *Snapshot) {
			b.ResistorSeries[0].ESeries, b.ResistorSeries[0].MinOhm, b.ResistorSeries[0].MaxOhm = "E3", 2.3e3, 4.6e3
		}, []string{"no E3 value"}},
		{"one-element network", func(b *Snapshot) { b.Networks[0].Values = []float64{10e3} }, []string{"at least two"}},
		{"NaN element", func(b *Snapshot) { b.Networks[0].Values[1] = math.NaN() }, []string{"values_ohm"}},
		{"unknown amplifier type", func(b *Snapshot) { b.Amplifiers[0].Type = "comparator" }, []string{"type", "comparator"}},
		{"op-amp with gains", func(b *Snapshot) { b.Amplifiers[0].Gains = []float64{2} }, []string{"gains", "matched"}},
		{"matched without gains", func(b *Snapshot) { b.Amplifiers[1].Gains = nil }, []string{"TS-DA1", "gains"}},
		{"no channels", func(b *Snapshot) { b.Amplifiers[0].Channels = 0 }, []string{"channels"}},
		{"supply range inverted", func(b *Snapshot) { b.Amplifiers[0].SupplyMaxV = 2 }, []string{"supply_max_v", "below"}},
		{"infinite headroom", func(b *Snapshot) { b.Amplifiers[0].CMPosV = math.Inf(-1) }, []string{"cm_pos_v", "finite"}},
		{"typical-only of no figure", func(b *Snapshot) { b.Amplifiers[0].TypicalOnly = []string{"price"} }, []string{"typical_only", "price"}},
		{"stock below -1", func(b *Snapshot) { b.Resistors[0].Stock = -5 }, []string{"stock", "-1 for unknown"}},
		{"negative minimum order", func(b *Snapshot) { b.Resistors[0].MinOrder = -1 }, []string{"min_order"}},
		{"break at zero pieces", func(b *Snapshot) { b.Resistors[0].PriceBreaks[0].MinQty = 0 }, []string{"price_breaks", "below 1"}},
		{"two breaks at one quantity", func(b *Snapshot) { b.Resistors[0].PriceBreaks[1].MinQty = 100 }, []string{"two breaks at quantity 100"}},
		{"currency not letters", func(b *Snapshot) { b.Resistors[0].PriceBreaks[0].Currency = "U$D" }, []string{"ISO 4217"}},
		{"negative price", func(b *Snapshot) { b.Resistors[0].PriceBreaks[1].UnitPrice = -1 }, []string{"not a price"}},
		{"reference without output", func(b *Snapshot) { b.References[0].OutputV = 0 }, []string{"reference TS-REF25", "output_v", "positive"}},
		{"reference tolerance as percent", func(b *Snapshot) { b.References[0].Tolerance = 5 }, []string{"tolerance", "fraction"}},
		{"reference negative drift", func(b *Snapshot) { b.References[0].DriftPPM = -3 }, []string{"drift_ppm", "zero or a positive"}},
		{"reference half a range", func(b *Snapshot) { b.References[0].TempMaxC = math.NaN() }, []string{"temp_min_c", "both ends"}},
		{"reference range inverted", func(b *Snapshot) { b.References[0].TempMinC = 150 }, []string{"temp_max_c", "not above"}},
		{"reference range below absolute zero", func(b *Snapshot) { b.References[0].TempMinC = -300 }, []string{"temp_min_c", "outside"}},
		{"reference supply inverted", func(b *Snapshot) { b.References[0].SupplyMaxV = 2 }, []string{"supply_max_v", "below"}},
		{"reference topology", func(b *Snapshot) { b.References[0].Topology = "buried" }, []string{"topology", "series"}},
		{"reference negative noise", func(b *Snapshot) { b.References[0].NoisePPV = -1e-6 }, []string{"noise_pp_v"}},
		{"duplicate reference", func(b *Snapshot) { b.References = append(b.References, b.References[0]) }, []string{"reference TS-REF25", "twice"}},
		{"duplicate series", func(b *Snapshot) { b.ResistorSeries = append(b.ResistorSeries, b.ResistorSeries[0]) }, []string{"series TS-TF01", "twice"}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			b := sampleBatch()
			tc.edit(b)
			err := b.Validate()
			if !errors.Is(err, ErrInvalid) {
				t.Fatalf("error %v, want ErrInvalid", err)
			}
			for _, w := range tc.words {
				if !strings.Contains(err.Error(), w) {
					t.Errorf("error %q does not say %q", err, w)
				}
			}
		})
	}
	if err := sampleBatch().Validate(); err != nil {
		t.Errorf("sample batch: %v", err)
	}
}

func TestBadPaths(t *testing.T) {
	for _, p := range []string{"", "parts?.db", "a#b.db"} {
		if _, err := Open(p); err == nil {
			t.Errorf("Open(%q): no error", p)
		}
		if _, err := Create(p, false); err == nil {
			t.Errorf("Create(%q): no error", p)
		}
	}
}
