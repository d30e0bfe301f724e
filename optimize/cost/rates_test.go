package cost

import (
	"math"
	"strings"
	"testing"

	"plumb/catalog"
)

func TestRates(t *testing.T) {
	rs, err := ParseRates("USD EUR 0.92 2026-11-30; gbp eur 1.17 2026-11-28")
	if err != nil {
		t.Fatal(err)
	}
	if f, r, ok := rs.Find("USD", "EUR"); !ok || f != 0.92 || r.Date != "2026-11-30" {
		t.Errorf("USD->EUR %g %+v %v", f, r, ok)
	}
	// The opposite rate serves inverted: 1/0.92 USD per EUR.
	if f, _, ok := rs.Find("EUR", "USD"); !ok || math.Abs(f-1/0.92) > 1e-15 {
		t.Errorf("EUR->USD %g %v", f, ok)
	}
	if _, _, ok := rs.Find("USD", "GBP"); ok {
		t.Error("a rate found that was never given")
	}
	for _, bad := range []string{"USD EUR 0.92", "USD EUR -1 2026-11-30", "USD USD 1 2026-11-30", "US EUR 1 2026-11-30", "USD EUR 1 30.11.2026"} {
		if _, err := ParseRates(bad); err == nil {
			t.Errorf("%q accepted", bad)
		}
	}
	c := &Converter{To: "EUR", Rates: rs}
	o := catalog.Offer{PriceBreaks: []catalog.PriceBreak{{MinQty: 1, UnitPrice: 1, Currency: "USD"}, {MinQty: 100, UnitPrice: 0.5, Currency: "USD"}}}
	got, ok := c.Offer("A-1", o)
	if !ok || got.PriceBreaks[1].UnitPrice != 0.46 || got.PriceBreaks[1].Currency != "EUR" || o.PriceBreaks[1].Currency != "USD" {
		t.Errorf("converted %+v (original %+v)", got, o)
	}
	c.Offer("A-1", o) // the same part again counts once
	if _, ok := c.Offer("B-1", catalog.Offer{PriceBreaks: []catalog.PriceBreak{{MinQty: 1, UnitPrice: 1, Currency: "CHF"}}}); ok {
		t.Error("a CHF price converted with no rate")
	}
	if cs := c.Conversions(); len(cs) != 1 || cs[0].Parts != 1 {
		t.Errorf("conversions %+v", cs)
	}
	if notes := strings.Join(c.Notes(), "\n"); !strings.Contains(notes, "1 part(s) left out: priced in CHF") || !strings.Contains(notes, "B-1") {
		t.Errorf("notes %q", notes)
	}
}
