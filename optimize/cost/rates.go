package cost

import (
	"fmt"
	"sort"
	"strings"

	"plumb/catalog"
)

// Rate is an exchange rate from the configuration: one unit of From is
// worth Rate units of To, as set on Date (the user's record of when; a
// rate is only as good as its date).
type Rate struct {
	From string  `json:"from"`
	To   string  `json:"to"`
	Rate float64 `json:"rate"`
	Date string  `json:"date"`
}

// Rates are the exchange rates a solve may convert prices with.
type Rates []Rate

// Find returns the factor that turns a price in from into one in to, and
// the rate it rests on: the rate as given, or the inverse of the opposite
// one. ok is false when the configuration has neither.
func (rs Rates) Find(from, to string) (factor float64, r Rate, ok bool) {
	for _, r := range rs {
		if r.From == from && r.To == to {
			return r.Rate, r, true
		}
	}
	for _, r := range rs {
		if r.From == to && r.To == from {
			return 1 / r.Rate, r, true
		}
	}
	return 0, Rate{}, false
}

// ParseRates reads rates written one per entry as "USD EUR 0.92 2026-11-30"
// (one USD is 0.92 EUR, set on 30 November 2026), entries separated by ';'
// or newlines. Every rate needs both codes, a positive figure and its
// date.
func ParseRates(s string) (Rates, error) {
	var out Rates
	for _, e := range strings.FieldsFunc(s, func(c rune) bool { return c == ';' || c == '\n' }) {
		f := strings.Fields(e)
		if len(f) == 0 {
			continue
		}
		if len(f) != 4 {
			return nil, fmt.Errorf("cost: rate %q: write FROM TO RATE DATE, for example \"USD EUR 0.92 2026-11-30\"", strings.TrimSpace(e))
		}
		r, err := NewRate(f[0], f[1], f[2], f[3])
		if err != nil {
			return nil, err
		}
		out = append(out, r)
	}
	return out, nil
}

// NewRate checks one rate given as text.
func NewRate(from, to, rate, date string) (Rate, error) {
	r := Rate{From: strings.ToUpper(strings.TrimSpace(from)), To: strings.ToUpper(strings.TrimSpace(to)), Date: strings.TrimSpace(date)}
	if !catalog.IsCurrencyCode(r.From) || !catalog.IsCurrencyCode(r.To) || r.From == r.To {
		return r, fmt.Errorf("cost: rate %s -> %s: give two different three-letter ISO 4217 codes such as USD and EUR", from, to)
	}
	if _, err := fmt.Sscanf(strings.TrimSpace(rate), "%g", &r.Rate); err != nil || !(r.Rate > 0) || r.Rate > 1e9 {
		return r, fmt.Errorf("cost: rate %s -> %s: %q is not a positive number", r.From, r.To, rate)
	}
	if len(r.Date) != len("2006-01-02") || r.Date[4] != '-' || r.Date[7] != '-' {
		return r, fmt.Errorf("cost: rate %s -> %s: date %q: give the date the rate was set, as YYYY-MM-DD", r.From, r.To, date)
	}
	return r, nil
}

// Conversion says how the prices of one currency were turned into the
// build currency for a solve, and how many parts it touched.
type Conversion struct {
	Rate
	Factor float64 `json:"factor"`
	Parts  int     `json:"parts"`
}

// Converter turns offers into one currency at the given rates, and keeps
// count of what it converted and what it could not.
type Converter struct {
	To    string
	Rates Rates
	used  map[string]*Conversion
	// seen holds the parts counted, so a part read again (a search reads
	// some rows once per value window) counts once.
	seen map[string]bool
	// missing counts, per currency with no rate, the parts left out, and
	// keeps the first few part numbers.
	missing map[string]*missingRate
}

type missingRate struct {
	n     int
	parts []string
}

// Offer returns o with its prices in c.To, and false when a price is in a
// currency that has no rate to c.To (the part is counted as left out).
func (c *Converter) Offer(part string, o catalog.Offer) (catalog.Offer, bool) {
	conv := false
	for _, b := range o.PriceBreaks {
		if b.Currency != c.To {
			conv = true
		}
	}
	if !conv {
		return o, true
	}
	if c.seen == nil {
		c.seen = map[string]bool{}
	}
	first := !c.seen[part]
	c.seen[part] = true
	out := o
	out.PriceBreaks = make([]catalog.PriceBreak, len(o.PriceBreaks))
	for i, b := range o.PriceBreaks {
		if b.Currency == c.To {
			out.PriceBreaks[i] = b
			continue
		}
		f, r, ok := c.Rates.Find(b.Currency, c.To)
		if !ok {
			if c.missing == nil {
				c.missing = map[string]*missingRate{}
			}
			m := c.missing[b.Currency]
			if m == nil {
				m = &missingRate{}
				c.missing[b.Currency] = m
			}
			if first {
				if m.n++; len(m.parts) < 5 {
					m.parts = append(m.parts, part)
				}
			}
			return o, false
		}
		if c.used == nil {
			c.used = map[string]*Conversion{}
		}
		u := c.used[b.Currency]
		if u == nil {
			u = &Conversion{Rate: r, Factor: f}
			c.used[b.Currency] = u
		}
		if first {
			first = false
			u.Parts++
		}
		out.PriceBreaks[i] = catalog.PriceBreak{MinQty: b.MinQty, UnitPrice: b.UnitPrice * f, Currency: c.To}
	}
	return out, true
}

// Conversions lists the conversions made, by currency.
func (c *Converter) Conversions() []Conversion {
	var out []Conversion
	for _, u := range c.used {
		out = append(out, *u)
	}
	sort.Slice(out, func(i, j int) bool { return out[i].From+out[i].To < out[j].From+out[j].To })
	return out
}

// Notes says in words what was converted and what was left out for want
// of a rate.
func (c *Converter) Notes() []string {
	var out []string
	for _, u := range c.Conversions() {
		from := u.From
		if from == c.To {
			from = u.To
		}
		out = append(out, fmt.Sprintf("prices in %s converted to %s at %.6g (rate %s -> %s %g, set %s): %d part(s)",
			from, c.To, u.Factor, u.From, u.To, u.Rate.Rate, u.Date, u.Parts))
	}
	var curs []string
	for cur := range c.missing {
		curs = append(curs, cur)
	}
	sort.Strings(curs)
	for _, cur := range curs {
		m := c.missing[cur]
		more := ""
		if m.n > len(m.parts) {
			more = fmt.Sprintf(" and %d more", m.n-len(m.parts))
		}
		out = append(out, fmt.Sprintf("%d part(s) left out: priced in %s, and currency.rates has no rate between %s and %s: %s%s; add one to price them",
			m.n, cur, cur, c.To, strings.Join(m.parts, ", "), more))
	}
	return out
}

// LeftOut counts the parts left out for want of a rate and names their
// currencies, sorted.
func (c *Converter) LeftOut() (n int, currencies []string) {
	for cur, m := range c.missing {
		n += m.n
		currencies = append(currencies, cur)
	}
	sort.Strings(currencies)
	return n, currencies
}

// Part returns a copy of a catalog part (a lookup's *Resistor, *Network,
// *Amplifier, *Reference) with its prices in c.To; ok is false when a price is in a
// currency with no rate. Other values are returned as they are.
func (c *Converter) Part(v any) (any, bool) {
	conv := func(part string, o *catalog.Offer) bool {
		out, ok := c.Offer(part, *o)
		*o = out
		return ok
	}
	switch p := v.(type) {
	case *catalog.Resistor:
		q := *p
		return &q, conv(q.Part, &q.Offer)
	case *catalog.Network:
		q := *p
		return &q, conv(q.Part, &q.Offer)
	case *catalog.Amplifier:
		q := *p
		return &q, conv(q.Part, &q.Offer)
	case *catalog.Reference:
		q := *p
		return &q, conv(q.Part, &q.Offer)
	}
	return v, true
}
