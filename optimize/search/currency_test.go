package search_test

import (
	"context"
	"fmt"
	"io/fs"
	"strings"
	"testing"

	"plumb/data"
	"plumb/optimize/cost"
	"plumb/optimize/search"
	"plumb/optimize/spec"
)

// TestSolveConvertsCurrencies prices the demo's resistors in EUR and keeps
// its amplifiers in USD: with a rate the solve converts the USD prices
// into the EUR build currency and says so; without one it leaves the
// amplifiers out with their own reason, never blamed on another limit.
func TestSolveConvertsCurrencies(t *testing.T) {
	snap, err := data.DemoSnapshot()
	if err != nil {
		t.Fatal(err)
	}
	for i := range snap.ResistorSeries {
		for j := range snap.ResistorSeries[i].PriceBreaks {
			snap.ResistorSeries[i].PriceBreaks[j].Currency = "EUR"
		}
	}
	for i := range snap.Resistors {
		for j := range snap.Resistors[i].PriceBreaks {
			snap.Resistors[i].PriceBreaks[j].Currency = "EUR"
		}
	}
	for i := range snap.Networks {
		for j := range snap.Networks[i].PriceBreaks {
			snap.Networks[i].PriceBreaks[j].Currency = "EUR"
		}
	}
	raw, err := fs.ReadFile(data.Examples(), "logger-channel.yaml")
	if err != nil {
		t.Fatal(err)
	}
	s, err := spec.Parse(raw, "logger-channel.yaml")
	if err != nil {
		t.Fatal(err)
	}
	s.Build.Currency = "EUR"
	rate, err := cost.NewRate("USD", "EUR", "0.9", "2026-11-30")
	if err != nil {
		t.Fatal(err)
	}
	res, err := search.Solve(context.Background(), snap, s, search.Options{Top: 3, Rates: cost.Rates{rate}})
	if err != nil {
		t.Fatal(err)
	}
	if len(res.Designs) == 0 || res.Designs[0].Currency != "EUR" {
		t.Fatalf("designs %+v", res.Designs)
	}
	if len(res.Conversions) != 1 || res.Conversions[0].From != "USD" || res.Conversions[0].Parts != len(snap.Amplifiers) || res.Conversions[0].Date != "2026-11-30" {
		t.Errorf("conversions %+v", res.Conversions)
	}
	if !strings.Contains(strings.Join(res.Notes, "\n"), "converted to EUR at 0.9") {
		t.Errorf("notes do not say so: %q", res.Notes)
	}
	// A design's amplifier price is the USD price times the rate.
	for _, p := range res.Designs[0].Parts {
		if p.Kind != "amplifier" {
			continue
		}
		for _, a := range snap.Amplifiers {
			if a.Part == p.Part && p.UnitPrice > a.PriceBreaks[0].UnitPrice*0.9+1e-12 {
				t.Errorf("%s at %g EUR, dearer than its 1-off USD price converted", p.Part, p.UnitPrice)
			}
		}
	}

	// The inverse rate serves too (EUR -> USD 1/0.9).
	inv, _ := cost.NewRate("EUR", "USD", "1.111111111", "2026-11-30")
	if res, err := search.Solve(context.Background(), snap, s, search.Options{Top: 1, Rates: cost.Rates{inv}}); err != nil || len(res.Conversions) != 1 {
		t.Errorf("inverse rate: %v %+v", err, res)
	}

	// No rate: the amplifiers are left out, counted and named.
	res, err = search.Solve(context.Background(), snap, s, search.Options{Top: 3})
	if res == nil {
		t.Fatalf("no result: %v", err)
	}
	notes := strings.Join(res.Notes, "\n")
	if !strings.Contains(notes, "left out: priced in USD") || !strings.Contains(notes, snap.Amplifiers[0].Part) {
		t.Errorf("notes do not count and name the parts left out: %s", notes)
	}
	// The missing rate leads the diagnosis, before anything found among
	// the parts that were left.
	if res.Infeasible == nil {
		t.Fatalf("no diagnosis: %v", err)
	}
	first := res.Infeasible.Lines()[0]
	if want := fmt.Sprintf("%d part(s) priced in USD were left out, as currency.rates has no rate to EUR", len(snap.Amplifiers)); !strings.HasPrefix(first, search.NoDesign+": "+want) {
		t.Errorf("diagnosis does not lead with the missing rate:\n%s\nwant it to start %q", first, want)
	}
}
