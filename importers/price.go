package importers

import (
	"fmt"
	"regexp"
	"sort"
	"strconv"
	"strings"
	"unicode"

	"plumb/catalog"
)

// priceRE finds one "qty: price" pair of a packed price column, in the
// shapes distributors print: "1:0.10", "100+ $0.045", "1000 @ 0.021 EUR",
// "1-9: 0,10 €". The quantity may carry thousands separators.
var priceRE = regexp.MustCompile(`(\d[\d,.' ]*?)\s*(?:-\s*\d[\d,.']*)?\s*(\+|pcs|pc)?\s*(?:[:=@]|\s)\s*([$€£¥]|usd|eur|gbp|chf|jpy)?\s*(\d[\d.,]*)\s*([$€£¥]|usd|eur|gbp|chf|jpy)?`)

// parsePrices reads a price cell: a single unit price ("0.125", "$0.125",
// "0,125 €") or a packed list of breaks ("1:0.10; 100:0.045; 1000:0.021").
// minQty is the quantity of a single price (the minimum order, or 1);
// defCurr is the currency from the header or mapping.
func parsePrices(cell string, decimalComma bool, minQty int, defCurr string) ([]catalog.PriceBreak, error) {
	s := strings.TrimSpace(strings.ToLower(cell))
	if s == "" || s == "-" {
		return nil, nil
	}
	if p, cur, err := parseMoney(s, decimalComma); err == nil {
		if cur == "" {
			cur = defCurr
		}
		return []catalog.PriceBreak{{MinQty: minQty, UnitPrice: p, Currency: cur}}, nil
	}
	pieces := splitPacked(s)
	var out []catalog.PriceBreak
	for _, piece := range pieces {
		piece = strings.TrimSpace(piece)
		if piece == "" {
			continue
		}
		m := priceRE.FindStringSubmatch(piece)
		if m == nil || strings.TrimSpace(piece[len(m[0]):]) != "" && !strings.HasPrefix(strings.TrimSpace(piece[len(m[0]):]), "/") {
			if len(pieces) == 1 {
				return nil, singlePriceError(cell, decimalComma)
			}
			return nil, fmt.Errorf("%w: price break %q is not \"quantity: price\"", ErrBadValue, piece)
		}
		q := qtyNumber(m[1], "")
		if q <= 0 {
			return nil, fmt.Errorf("%w: price break %q has no quantity", ErrBadValue, piece)
		}
		p, err := parseNumber(m[4], decimalComma)
		if err != nil {
			return nil, fmt.Errorf("%w: price in %q: %v", ErrBadValue, piece, err)
		}
		cur := currencyOf(m[3])
		if cur == "" {
			cur = currencyOf(m[5])
		}
		if cur == "" {
			cur = defCurr
		}
		out = append(out, catalog.PriceBreak{MinQty: q, UnitPrice: p, Currency: cur})
	}
	return normaliseBreaks(out)
}

// decimalCommaRE matches an amount written with a decimal comma ("0,12",
// "€ 1,5"): digits after the comma that are not exactly three, which could
// be a thousands group.
var decimalCommaRE = regexp.MustCompile(`^[^\d,]*\d+,(\d{1,2}|\d{4,})[^\d,]*$`)

// singlePriceError is the error for a price cell that reads neither as one
// price nor as a list of breaks. A decimal comma in a file read with
// decimal points (a comma-separated file whose cells quote "0,12") is named
// as such, with the mapping setting that reads it.
func singlePriceError(cell string, decimalComma bool) error {
	c := strings.TrimSpace(cell)
	if !decimalComma && decimalCommaRE.MatchString(c) {
		return fmt.Errorf("%w: price %q is written with a decimal comma, but this file's numbers were read with decimal points: describe the file in a mapping with decimal_comma: true (plumb help mapping)", ErrBadValue, c)
	}
	return fmt.Errorf("%w: cannot read %q as a price: write one price (0.125, $0.125, 0,125 €) or a list of breaks (1:0.10; 100:0.045)", ErrBadValue, c)
}

// splitPacked cuts a packed price list at ';', '|', newlines, or at ", "
// between pairs when the pairs use ':' (so "1,000:0.021" stays whole).
func splitPacked(s string) []string {
	f := strings.FieldsFunc(s, func(r rune) bool { return r == ';' || r == '|' || r == '\n' || r == '\r' })
	if len(f) > 1 {
		return f
	}
	return regexp.MustCompile(`,\s+`).Split(s, -1)
}

// normaliseBreaks sorts breaks by quantity and rejects repeated quantities,
// negative prices and mixed currencies.
func normaliseBreaks(b []catalog.PriceBreak) ([]catalog.PriceBreak, error) {
	sort.SliceStable(b, func(i, j int) bool { return b[i].MinQty < b[j].MinQty })
	for i := range b {
		if b[i].UnitPrice < 0 {
			return nil, fmt.Errorf("%w: negative price %g at %d pieces", ErrBadValue, b[i].UnitPrice, b[i].MinQty)
		}
		if i > 0 && b[i].MinQty == b[i-1].MinQty {
			return nil, fmt.Errorf("%w: two prices from %s on; keep one", ErrBadValue, pieces(b[i].MinQty))
		}
		if i > 0 && b[i].Currency != b[0].Currency {
			return nil, fmt.Errorf("%w: prices in both %s and %s", ErrBadValue, b[0].Currency, b[i].Currency)
		}
	}
	return b, nil
}

// parseMoney reads "0.125", "$0.125", "0,125 €", "0.125 EUR" as an amount
// and a currency code ("" when none is written).
func parseMoney(s string, decimalComma bool) (float64, string, error) {
	s = strings.TrimSpace(s)
	cur := ""
	if strings.IndexFunc(s, isCurrencySymbol) >= 0 {
		for _, sym := range []string{"$", "€", "£", "¥"} {
			if strings.Contains(s, sym) {
				cur = currencyMap[sym]
				s = strings.ReplaceAll(s, sym, "")
			}
		}
	}
	low := s
	if strings.IndexFunc(s, unicode.IsLetter) >= 0 {
		low = strings.ToLower(s)
		for code, c := range currencyMap {
			if len(code) == 3 && (strings.HasPrefix(low, code) || strings.HasSuffix(low, code)) {
				cur = c
				low = strings.TrimSpace(strings.TrimSuffix(strings.TrimPrefix(low, code), code))
				break
			}
		}
	}
	v, err := parseNumber(strings.TrimSpace(low), decimalComma)
	return v, cur, err
}

func isCurrencySymbol(r rune) bool { return r == '$' || r == '€' || r == '£' || r == '¥' }

// parseNumber reads a plain decimal number, with a decimal comma when the
// file uses one ("0,125"; "1.234,5" with '.' as thousands separator).
func parseNumber(s string, decimalComma bool) (float64, error) {
	s = strings.TrimSpace(s)
	if decimalComma && strings.IndexByte(s, ',') >= 0 {
		s = strings.ReplaceAll(strings.ReplaceAll(s, ".", ""), ",", ".")
	}
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		return 0, fmt.Errorf("%q is not a number", s)
	}
	return v, nil
}
