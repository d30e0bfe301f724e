package cost

import (
	"errors"
	"fmt"
	"math"
	"testing"

	"plumb/catalog"
)

func breaks(cur string, qp ...float64) []catalog.PriceBreak {
	var out []catalog.PriceBreak
	for i := 0; i+1 < len(qp); i += 2 {
		out = append(out, catalog.PriceBreak{MinQty: int(qp[i]), UnitPrice: qp[i+1], Currency: cur})
	}
	return out
}

func near(a, b float64) bool { return math.Abs(a-b) <= 1e-9*math.Max(1, math.Abs(b)) }

// The hand-worked example below is common practice BOM arithmetic, done on
// paper: 100 stages, 2 % attrition.
//
//	A (placed 2 per stage): ceil(200 x 1.02) = 204 needed; 204 x 0.05 = 10.20,
//	  1000 x 0.01 = 10.00, so 1000 are bought for 10.00.
//	B (placed 2 per stage): 204 x 0.08 = 16.32, 500 x 0.03 = 15.00: 500 bought.
//	U (placed 1 per stage): ceil(100 x 1.02) = 102 at 1.50 = 153.00.
//	placements 5 x 100 x 0.01 = 5.00; 3 line items x 1.00 = 3.00.
//	total 10 + 15 + 153 + 5 + 3 = 186.00, per stage 1.86.
func TestPriceHandWorked(t *testing.T) {
	a := catalog.Offer{PriceBreaks: breaks("EUR", 1, 0.10, 100, 0.05, 1000, 0.01), Stock: -1}
	bo := catalog.Offer{PriceBreaks: breaks("EUR", 10, 0.08, 500, 0.03), Stock: 10000}
	u := catalog.Offer{PriceBreaks: breaks("EUR", 1, 2.00, 100, 1.50), Stock: 5000}
	uses := []Use{
		{Part: "A", Offer: &a, Placements: 1}, {Part: "B", Offer: &bo, Placements: 2},
		{Part: "A", Offer: &a, Placements: 1}, {Part: "U", Offer: &u, Placements: 1},
	}
	tests := []struct {
		name   string
		build  Build
		total  float64
		bought map[string]int
	}{
		{"buy up to cheaper breaks", Build{Quantity: 100, Attrition: 0.02, PerPlacement: 0.01, PerLineItem: 1},
			186, map[string]int{"A": 1000, "B": 500, "U": 102}},
		// 204 x 0.05 + 204 x 0.08 + 153 + 5 + 3 = 10.20 + 16.32 + 161 = 187.52
		{"exact quantities", Build{Quantity: 100, Attrition: 0.02, PerPlacement: 0.01, PerLineItem: 1, ExactQuantity: true},
			187.52, map[string]int{"A": 204, "B": 204, "U": 102}},
		// 2 x 0.10 + 2 x 0.08 ... B below its first break buys 10: 0.80; U 2.00.
		{"one stage, first break floor", Build{Quantity: 1},
			0.2 + 0.8 + 2.0, map[string]int{"A": 2, "B": 10, "U": 1}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			bd, err := Price(tc.build, uses)
			if err != nil {
				t.Fatal(err)
			}
			if !near(bd.Total, tc.total) {
				t.Errorf("total %.4f, want %.4f", bd.Total, tc.total)
			}
			if !near(bd.PerUnit, tc.total/float64(tc.build.Quantity)) {
				t.Errorf("per unit %.4f", bd.PerUnit)
			}
			if len(bd.Lines) != 3 {
				t.Fatalf("%d lines, want 3 (A shared by two positions)", len(bd.Lines))
			}
			for _, ln := range bd.Lines {
				if ln.Bought != tc.bought[ln.Part] {
					t.Errorf("%s bought %d, want %d", ln.Part, ln.Bought, tc.bought[ln.Part])
				}
			}
			var st float64
			for _, v := range bd.Stages {
				st += v
			}
			if !near(st, bd.PerUnit) {
				t.Errorf("stage costs sum to %.4f, per unit is %.4f", st, bd.PerUnit)
			}
		})
	}
}

func TestPriceErrors(t *testing.T) {
	eur := catalog.Offer{PriceBreaks: breaks("EUR", 1, 0.1), Stock: 5}
	usd := catalog.Offer{PriceBreaks: breaks("USD", 1, 0.1), Stock: -1}
	none := catalog.Offer{Stock: -1}
	tests := []struct {
		name  string
		build Build
		uses  []Use
		want  error
	}{
		{"mixed currencies", Build{Quantity: 1}, []Use{{Part: "E", Offer: &eur, Placements: 1}, {Part: "U", Offer: &usd, Placements: 1}}, ErrMixedCurrency},
		{"build currency differs", Build{Quantity: 1, Currency: "USD"}, []Use{{Part: "E", Offer: &eur, Placements: 1}}, ErrMixedCurrency},
		{"short stock excluded", Build{Quantity: 10, Stock: StockExclude}, []Use{{Part: "E", Offer: &eur, Placements: 1}}, ErrShortStock},
		{"no price list", Build{Quantity: 1}, []Use{{Part: "N", Offer: &none, Placements: 1}}, ErrNoPrice},
		{"zero quantity", Build{}, []Use{{Part: "E", Offer: &eur, Placements: 1}}, ErrBuild},
		{"negative attrition", Build{Quantity: 1, Attrition: -0.1}, nil, ErrBuild},
		{"use without offer", Build{Quantity: 1}, []Use{{Part: "E", Placements: 1}}, ErrBuild},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			_, err := Price(tc.build, tc.uses)
			if !errors.Is(err, tc.want) {
				t.Fatalf("error %v, want %v", err, tc.want)
			}
		})
	}
}

func TestStockFlagAndMinOrder(t *testing.T) {
	o := catalog.Offer{PriceBreaks: breaks("EUR", 1, 0.5), MinOrder: 25, Stock: 20}
	bd, err := Price(Build{Quantity: 3}, []Use{{Part: "M", Offer: &o, Placements: 2}})
	if err != nil {
		t.Fatal(err)
	}
	// 6 needed, minimum order 25: 25 x 0.5 = 12.5 (common practice arithmetic).
	if bd.Lines[0].Bought != 25 || !near(bd.Total, 12.5) {
		t.Errorf("bought %d for %.2f, want 25 for 12.50", bd.Lines[0].Bought, bd.Total)
	}
	if len(bd.Short) != 1 || bd.Short[0] != "M" {
		t.Errorf("short %v, want [M] (20 in stock, 25 bought)", bd.Short)
	}
}

func TestNeededRounding(t *testing.T) {
	tests := []struct {
		name  string
		b     Build
		place int
		want  int
	}{
		{"ten percent of 100 is 110, not 111", Build{Quantity: 100, Attrition: 0.1}, 1, 110},
		{"rounds up", Build{Quantity: 7, Attrition: 0.05}, 3, 23}, // 21 x 1.05 = 22.05 -> 23
		{"no attrition", Build{Quantity: 12}, 4, 48},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := tc.b.Needed(tc.place); got != tc.want {
				t.Errorf("Needed = %d, want %d", got, tc.want)
			}
		})
	}
}

func TestLineCostAgreesWithPrice(t *testing.T) {
	o := catalog.Offer{PriceBreaks: breaks("EUR", 1, 0.1, 100, 0.05, 1000, 0.01), Stock: -1}
	for q := 1; q <= 600; q += 37 {
		b := Build{Quantity: q, Attrition: 0.03}
		ext, _, _, err := b.LineCost(&o, 2)
		if err != nil {
			t.Fatal(err)
		}
		bd, err := Price(b, []Use{{Part: "X", Offer: &o, Placements: 2}})
		if err != nil {
			t.Fatal(err)
		}
		if !near(ext, bd.Parts) {
			t.Errorf("quantity %d: LineCost %.4f, Price %.4f", q, ext, bd.Parts)
		}
	}
}

func BenchmarkLineCost(b *testing.B) {
	o := catalog.Offer{PriceBreaks: breaks("EUR", 1, 0.1, 100, 0.05, 1000, 0.01, 5000, 0.008), Stock: -1}
	bl := Build{Quantity: 250, Attrition: 0.02}
	b.ReportAllocs()
	for b.Loop() {
		if _, _, _, err := bl.LineCost(&o, 2); err != nil {
			b.Fatal(err)
		}
	}
}

func ExamplePrice() {
	r := catalog.Offer{PriceBreaks: []catalog.PriceBreak{{MinQty: 1, UnitPrice: 0.10, Currency: "EUR"}, {MinQty: 100, UnitPrice: 0.04, Currency: "EUR"}}, Stock: -1}
	bd, _ := Price(Build{Quantity: 40, PerLineItem: 0.5}, []Use{{Part: "R-10K", Offer: &r, Placements: 2}})
	fmt.Printf("%d bought, total %.2f %s, %.4f per stage\n", bd.Lines[0].Bought, bd.Total, bd.Currency, bd.PerUnit)
	// Output: 100 bought, total 4.50 EUR, 0.1125 per stage
}
