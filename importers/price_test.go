package importers

import (
	"errors"
	"reflect"
	"strings"
	"testing"

	"plumb/catalog"
)

// TestPriceErrorMessages: a price cell that does not read says what it
// took the cell for: one price, a list of breaks, or an amount with a
// decimal comma in a file read with decimal points.
func TestPriceErrorMessages(t *testing.T) {
	for _, tc := range []struct {
		name, cell string
		comma      bool
		want       string
	}{
		{"words", "call for price", false, `cannot read "call for price" as a price`},
		{"letters in a number", "abc", false, `cannot read "abc" as a price`},
		{"decimal comma in a decimal-point file", "0,12", false, "decimal comma"},
		{"decimal comma with a symbol", "€ 1,5", false, "decimal comma"},
		{"thousands group is not called a decimal comma", "1,000x", false, "as a price"},
		{"a bad break in a list", "1:0.10; lots", false, `price break "lots" is not "quantity: price"`},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, err := parsePrices(tc.cell, tc.comma, 1, "EUR")
			if !errors.Is(err, ErrBadValue) || !strings.Contains(err.Error(), tc.want) {
				t.Errorf("parsePrices(%q): %v, want ErrBadValue saying %q", tc.cell, err, tc.want)
			}
			if strings.Contains(err.Error(), "quantity: price") != strings.Contains(tc.want, "quantity: price") {
				t.Errorf("parsePrices(%q): %v names a price break where the cell is one price, or the other way", tc.cell, err)
			}
		})
	}
}

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
