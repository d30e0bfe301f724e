package importers

import (
	"errors"
	"reflect"
	"testing"

	"plumb/catalog"
)

func TestParsePrices(t *testing.T) {
	pb := func(q int, p float64, c string) catalog.PriceBreak {
		return catalog.PriceBreak{MinQty: q, UnitPrice: p, Currency: c}
	}
	tests := []struct {
		name  string
		cell  string
		comma bool
		curr  string
		want  []catalog.PriceBreak
		err   error
	}{
		{"single", "0.125", false, "USD", []catalog.PriceBreak{pb(1, 0.125, "USD")}, nil},
		{"dollar sign", "$0.125", false, "", []catalog.PriceBreak{pb(1, 0.125, "USD")}, nil},
		{"euro decimal comma", "0,125 €", true, "", []catalog.PriceBreak{pb(1, 0.125, "EUR")}, nil},
		{"code after", "0.125 GBP", false, "", []catalog.PriceBreak{pb(1, 0.125, "GBP")}, nil},
		{"packed colon semicolon", "1:0.10; 100:0.045; 1000:0.021", false, "USD",
			[]catalog.PriceBreak{pb(1, 0.10, "USD"), pb(100, 0.045, "USD"), pb(1000, 0.021, "USD")}, nil},
		{"packed plus and symbol", "1+ $0.10 | 100+ $0.045", false, "",
			[]catalog.PriceBreak{pb(1, 0.10, "USD"), pb(100, 0.045, "USD")}, nil},
		{"packed thousands in quantity", "1: $0.42, 1,000: $0.088", false, "",
			[]catalog.PriceBreak{pb(1, 0.42, "USD"), pb(1000, 0.088, "USD")}, nil},
		{"packed decimal comma", "1:0,42 | 100:0,19", true, "EUR",
			[]catalog.PriceBreak{pb(1, 0.42, "EUR"), pb(100, 0.19, "EUR")}, nil},
		{"unsorted", "100:0.05;1:0.1", false, "USD", []catalog.PriceBreak{pb(1, 0.1, "USD"), pb(100, 0.05, "USD")}, nil},
		{"blank", "-", false, "USD", nil, nil},
		{"mixed currencies", "1: $0.10; 100: 0.05 EUR", false, "", nil, ErrBadValue},
		{"words", "call for price", false, "USD", nil, ErrBadValue},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got, err := parsePrices(tc.cell, tc.comma, 1, tc.curr)
			if !errors.Is(err, tc.err) || tc.err == nil && err != nil {
				t.Fatalf("parsePrices(%q) error %v, want %v", tc.cell, err, tc.err)
			}
			if tc.err == nil && !reflect.DeepEqual(got, tc.want) {
				t.Errorf("parsePrices(%q) = %v, want %v", tc.cell, got, tc.want)
			}
		})
	}
}
