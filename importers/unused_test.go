package importers

import (
	"context"
	"strings"
	"testing"

	"plumb/catalog"
)

// TestPriceColumnsByHeader: every price column whose header states its
// quantity ("Price (EUR) 1pc", "10+ (EUR)", "Unit Price @100") is a price
// break, whether the mapping is guessed or given with one price column;
// a break column with no currency in its header takes its neighbours'; a
// column in a second currency, and every other column not read, is named
// with the reason instead of being dropped without a word.
func TestPriceColumnsByHeader(t *testing.T) {
	given, err := LoadMapping("", "testdata/mappings/price_one_column.yaml")
	if err != nil {
		t.Fatal(err)
	}
	for _, tt := range []struct {
		name    string
		mapping *Mapping
	}{{"guessed", nil}, {"mapping with one price column", given}} {
		t.Run(tt.name, func(t *testing.T) {
			b, rep, err := Read(context.Background(), []string{"testdata/exports/res_price_headers.csv"}, Options{Mapping: tt.mapping})
			if err != nil {
				t.Fatal(err)
			}
			if len(b.Resistors) != 2 {
				t.Fatalf("%d resistors, want 2:\n%s", len(b.Resistors), problemText(rep))
			}
			r := findResistor(t, b, "KL-4992")
			want := []catalog.PriceBreak{{MinQty: 1, UnitPrice: 0.44, Currency: "EUR"}, {MinQty: 10, UnitPrice: 0.31, Currency: "EUR"},
				{MinQty: 100, UnitPrice: 0.22, Currency: "EUR"}}
			if len(r.PriceBreaks) != len(want) {
				t.Fatalf("price breaks %+v, want %+v", r.PriceBreaks, want)
			}
			for i, w := range want {
				if g := r.PriceBreaks[i]; g.MinQty != w.MinQty || !near(g.UnitPrice, w.UnitPrice) || g.Currency != w.Currency {
					t.Errorf("break %d = %+v, want %+v", i, g, w)
				}
			}
			unused := map[string]string{}
			for _, u := range rep.Files[0].Unused {
				unused[u.Column] = u.Why
			}
			if len(unused) != 2 || !strings.Contains(unused["500+ (USD)"], "one currency") ||
				!strings.Contains(unused["Distributor Part Number"], "distributor's own") {
				t.Errorf("unused columns %q, want 500+ (USD) (one currency) and Distributor Part Number", unused)
			}
		})
	}
}

// TestUnusedColumnReasons names why a column is not read: a figure of
// another kind, a second column for a field already read, an unknown
// header.
func TestUnusedColumnReasons(t *testing.T) {
	header := []string{"Part Number", "Manufacturer", "Vs Min", "Vs Max", "Operating Temp", "Offset Voltage", "Vos", "Colour"}
	m, err := GuessMapping(header, catalog.KindAmplifier)
	if err != nil {
		t.Fatal(err)
	}
	cols, breaks, err := m.resolve("f.csv", header)
	if err != nil {
		t.Fatal(err)
	}
	infos := make([]headerInfo, len(header))
	for i, h := range header {
		infos[i] = analyseHeader(h)
	}
	got := map[string]string{}
	for _, u := range unusedColumns(header, infos, catalog.KindAmplifier, cols, breaks, nil) {
		got[u.Column] = u.Why
	}
	for col, want := range map[string]string{
		"Operating Temp": "for references only",
		"Vos":            "also reads as vos, which is read from column \"Offset Voltage\"",
		"Colour":         "no field plumb knows",
	} {
		if !strings.Contains(got[col], want) {
			t.Errorf("column %q: %q, want it to say %q (all: %q)", col, got[col], want, got)
		}
	}
	if len(got) != 3 {
		t.Errorf("unused %q, want 3 columns", got)
	}
}

// TestUnusedExportProvenance: the catalog export's source and imported_at
// columns are named as the provenance the import replaces with its own,
// not as columns no field reads; a distributor's "Source" column keeps the
// general reason.
func TestUnusedExportProvenance(t *testing.T) {
	for _, tt := range []struct {
		name, file string
		want       map[string]string // column -> part of its reason
	}{
		{"catalog export", "testdata/exports/own_export_resistor.csv", map[string]string{
			"source": "provenance the catalog export wrote", "imported_at": "provenance the catalog export wrote"}},
		{"distributor export", "testdata/exports/res_source_column.csv", map[string]string{
			"Source": "no field plumb knows"}},
	} {
		t.Run(tt.name, func(t *testing.T) {
			b, rep, err := Read(context.Background(), []string{tt.file}, Options{})
			if err != nil {
				t.Fatal(err)
			}
			if len(b.Resistors) == 0 {
				t.Fatalf("no resistor read:\n%s", problemText(rep))
			}
			got := map[string]string{}
			for _, u := range rep.Files[0].Unused {
				got[u.Column] = u.Why
			}
			if len(got) != len(tt.want) {
				t.Errorf("unused columns %q, want %d", got, len(tt.want))
			}
			for col, want := range tt.want {
				if !strings.Contains(got[col], want) {
					t.Errorf("column %q: %q, want it to say %q", col, got[col], want)
				}
			}
		})
	}
}

// TestUnusedFieldOfTheSameKind: a column whose header another kind uses
// for a field this kind has too (a reference's bare "Noise": density or
// peak to peak?) is not called a figure "for amplifiers and references
// only, not for references"; it says the header is unclear and how to map
// it. A figure of another kind only keeps that reason.
func TestUnusedFieldOfTheSameKind(t *testing.T) {
	for _, tt := range []struct {
		name, file, column string
		want, not          string
	}{
		{"reference's bare Noise", "testdata/exports/ref_bare_noise.csv", "Noise",
			"name it in a mapping under columns: noise_v", "only, not for references"},
		{"amplifier's Operating Temp", "testdata/exports/amp_supply_span.csv", "Operating Temp",
			"for references only, not for amplifiers", "clearly enough"},
	} {
		t.Run(tt.name, func(t *testing.T) {
			_, rep, err := Read(context.Background(), []string{tt.file}, Options{})
			if err != nil {
				t.Fatal(err)
			}
			why := ""
			for _, u := range rep.Files[0].Unused {
				if u.Column == tt.column {
					why = u.Why
				}
			}
			if !strings.Contains(why, tt.want) || strings.Contains(why, tt.not) {
				t.Errorf("column %q: %q, want it to say %q and not %q", tt.column, why, tt.want, tt.not)
			}
		})
	}
}
