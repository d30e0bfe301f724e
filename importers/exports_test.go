package importers

import (
	"context"
	"math"
	"testing"

	"plumb/catalog"
)

// near compares a stored figure with the expected one to 1e-9 relative
// (unit conversions multiply by powers of ten).
func near(got, want float64) bool {
	if math.IsNaN(want) {
		return math.IsNaN(got)
	}
	return math.Abs(got-want) <= 1e-9*math.Max(math.Abs(want), 1e-30)
}

// TestExportLayouts imports invented exports whose layouts differ from the
// catalog's own (other header words and units, semicolons and decimal
// commas, a tab file, currencies in cells, in headers and nowhere,
// rail-relative amplifier columns in both sign conventions, optional
// columns missing) with no mapping, and checks the figures stored.
func TestExportLayouts(t *testing.T) {
	u := catalog.Unknown()
	type fig struct {
		name      string
		got, want float64
	}
	tests := []struct {
		file     string
		currency string
		check    func(t *testing.T, b *Batch) []fig
	}{
		{"res_semicolon_eur.csv", "", func(t *testing.T, b *Batch) []fig {
			r := findResistor(t, b, "OR-0603-4K99-B")
			s := findResistor(t, b, "OR-1206-1R00-F")
			if r.PriceBreaks[0].Currency != "EUR" || r.Stock != 800 || s.Stock != 3000 || r.Package != "0603" {
				t.Errorf("offer %+v %+v", r.Offer, s.Offer)
			}
			return []fig{{"value", r.ValueOhm, 4990}, {"tolerance", r.Tolerance, 0.001}, {"tcr", r.TCR, 25}, {"power", r.PowerW, 0.1},
				{"price", r.PriceBreaks[0].UnitPrice, 0.38}, {"load life", r.LoadLife, u}, {"1R value", s.ValueOhm, 1}, {"1R power", s.PowerW, 0.25}}
		}},
		{"res_price_columns_no_currency.csv", "USD", func(t *testing.T, b *Batch) []fig {
			r := findResistor(t, b, "PB-2K20")
			if len(r.PriceBreaks) != 3 || r.PriceBreaks[2].MinQty != 1000 || r.PriceBreaks[0].Currency != "USD" || r.Technology != "" || r.Package != "" {
				t.Errorf("%+v", r)
			}
			return []fig{{"value", r.ValueOhm, 2200}, {"tolerance", r.Tolerance, 0.005}, {"tcr", r.TCR, u}, {"power", r.PowerW, u},
				{"price 1000", r.PriceBreaks[2].UnitPrice, 0.06}}
		}},
		{"res_tab_gbp.tsv", "", func(t *testing.T, b *Batch) []fig {
			r := findResistor(t, b, "TW-470K")
			if r.PriceBreaks[0].Currency != "GBP" || r.Stock != 15 || findResistor(t, b, "TW-47K").Stock != 1200 {
				t.Errorf("%+v", r.Offer)
			}
			return []fig{{"value", r.ValueOhm, 470e3}, {"tolerance", r.Tolerance, 0.01}, {"tcr", r.TCR, 100}, {"power", r.PowerW, 0.125}}
		}},
		{"amp_from_rails.csv", "", func(t *testing.T, b *Batch) []fig {
			a := findAmp(t, b, "ZA-101")
			if a.PriceBreaks[0].Currency != "USD" || a.Package != "" || a.RailToRail != "" {
				t.Errorf("%+v", a)
			}
			// "Input CM High (V from V+)" = -1.5: 1.5 V below V+; swing
			// "-0.2 from V+" is 0.2 V below it. 110 dB = 10^5.5 V/V.
			return []fig{{"cm neg", a.CMNegV, 0}, {"cm pos", a.CMPosV, 1.5}, {"swing neg", a.SwingNegV, 0.2}, {"swing pos", a.SwingPosV, 0.2},
				{"vos", a.VosV, 0.5e-3}, {"aol", a.AolVV, math.Pow(10, 5.5)}, {"slew", a.SlewVs, 2.5e6}, {"noise", a.NoiseVHz, 12e-9},
				{"gbw", a.GBWHz, 3e6}, {"cmrr", a.CMRRdB, 100}, {"ib", a.IbA, u}, {"ios", a.IosA, u}, {"102 cm pos (above V+)", findAmp(t, b, "ZA-102").CMPosV, -0.1}}
		}},
		{"amp_headroom_usd.csv", "", func(t *testing.T, b *Batch) []fig {
			a := findAmp(t, b, "HB-22")
			if a.RailToRail != catalog.RailOut || a.PriceBreaks[0].Currency != "USD" {
				t.Errorf("%+v", a)
			}
			// Distances inwards: 1.2 V below V+, 0.8 V above V-; a
			// rail-to-rail output with no swing figure stays unknown (the
			// solve takes its stated default). 200 V/mV = 2e5 V/V.
			return []fig{{"cm pos", a.CMPosV, 1.2}, {"cm neg", a.CMNegV, 0.8}, {"swing pos", a.SwingPosV, u}, {"swing neg", a.SwingNegV, u},
				{"aol", a.AolVV, 2e5}, {"vos", a.VosV, 3e-3}, {"ib", a.IbA, 80e-9}, {"cmrr", a.CMRRdB, 85}, {"gbw", a.GBWHz, 1e6}, {"slew", a.SlewVs, u}}
		}},
		{"net_matched_eur.csv", "", func(t *testing.T, b *Batch) []fig {
			if len(b.Networks) != 2 {
				t.Fatalf("%d networks", len(b.Networks))
			}
			n := b.Networks[1]
			if n.Part != "NM4-100K-A2" || len(n.Values) != 4 || n.PriceBreaks[0].Currency != "EUR" || n.Technology != "thin-film" {
				t.Errorf("%+v", n)
			}
			return []fig{{"element", n.Values[3], 100e3}, {"tolerance", n.Tolerance, 0.001}, {"ratio", n.RatioTolerance, 0.0002},
				{"tcr", n.TCR, 25}, {"tracking", n.TCRTracking, 3}, {"power", n.PowerW, u}}
		}},
	}
	for _, tc := range tests {
		t.Run(tc.file, func(t *testing.T) {
			b, rep, err := Read(context.Background(), []string{"testdata/exports/" + tc.file}, Options{Currency: tc.currency})
			if err != nil {
				t.Fatal(err)
			}
			if rep.Summary.Skipped != 0 || rep.Count(Doubt) != 0 {
				t.Errorf("problems:\n%s", problemText(rep))
			}
			for _, f := range tc.check(t, b) {
				if !near(f.got, f.want) {
					t.Errorf("%s = %g, want %g", f.name, f.got, f.want)
				}
			}
		})
	}
	// Without --currency the file with bare prices is refused before its
	// rows are read.
	if _, _, err := Read(context.Background(), []string{"testdata/exports/res_price_columns_no_currency.csv"}, Options{}); err == nil {
		t.Error("bare prices with no currency anywhere were read")
	}
}

func findAmp(t *testing.T, b *Batch, part string) catalog.Amplifier {
	t.Helper()
	for _, a := range b.Amplifiers {
		if a.Part == part {
			return a
		}
	}
	t.Fatalf("no amplifier %s", part)
	return catalog.Amplifier{}
}
