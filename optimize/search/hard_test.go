package search

import (
	"context"
	"errors"
	"math/rand/v2"
	"testing"

	"plumb/catalog"
	"plumb/optimize/cost"
)

func TestHardLimits(t *testing.T) {
	p := &Problem{Circuit: Difference, Gain: 10, SupplyNeg: -15, SupplyPos: 15, InMin: -1, InMax: 1, CMMin: -5, CMMax: 5, BandwidthHz: 10e3}
	good := catalog.Amplifier{Type: catalog.OpAmp, SupplyMinV: 4.5, SupplyMaxV: 36, CMNegV: 1.5, CMPosV: 1.5, SwingNegV: 1.2, SwingPosV: 1.2, GBWHz: 1e6}
	tests := []struct {
		name string
		edit func(a *catalog.Amplifier)
		want string
	}{
		{"passes", func(*catalog.Amplifier) {}, ""},
		// 30 V span on a 5.5 V part.
		{"supply", func(a *catalog.Amplifier) { a.SupplyMaxV = 5.5 }, "supply range"},
		// Pins reach (5 + 0.5) x 10/11 = 5 V; a 10.5 V margin to the rail leaves 4.5 V.
		{"pin headroom", func(a *catalog.Amplifier) { a.CMPosV = 10.5 }, "input headroom"},
		// The output must reach ±10 V; 5.1 V from the rails leaves ±9.9 V.
		{"output swing", func(a *catalog.Amplifier) { a.SwingNegV = 5.1 }, "output swing"},
		// GBW / NG = 100 kHz / 11 = 9.1 kHz < 10 kHz.
		{"bandwidth", func(a *catalog.Amplifier) { a.GBWHz = 100e3 }, "bandwidth"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			a := good
			tc.edit(&a)
			if got := hardAmp(p, &a, 10, nil); got != tc.want {
				t.Errorf("hardAmp = %q, want %q", got, tc.want)
			}
		})
	}
}

func TestRatings(t *testing.T) {
	s := &space{p: &Problem{Derating: 0.5}}
	tests := []struct {
		name        string
		power, maxV float64
		r, v        float64
		ok          bool
	}{
		// 10 V on 1 k is 0.1 W; 0.125 W derated to 50 % is 62.5 mW.
		{"dissipation", 0.125, 0, 1e3, 10, false},
		{"dissipation within", 0.25, 0, 1e3, 10, true},
		// U = sqrt(P R) = sqrt(0.1 x 1 M) = 316 V, capped at 75 V (IEC 60115-1, from memory).
		{"element voltage", 0.1, 75, 1e6, 100, false},
		{"rated voltage", 0.1, 400, 1e6, 200, true},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := s.ratingOK(tc.power, tc.maxV, tc.r, tc.v); got != tc.ok {
				t.Errorf("ratingOK = %v, want %v", got, tc.ok)
			}
		})
	}
}

func TestProgressAndCancel(t *testing.T) {
	r := rand.New(rand.NewPCG(5, 5))
	parts := genParts(r, 20, 2000, 20, 10, 300)
	p := benchProblem()
	p.Limits.CMRRdB = 200 // nothing passes: the search walks every pair
	calls, last := 0, 0
	_, err := SolveProblem(context.Background(), parts, p, Options{Progress: func(done, total int) {
		calls++
		if done < last || done > total {
			t.Errorf("progress %d of %d after %d", done, total, last)
		}
		last = done
	}})
	if !errors.Is(err, ErrInfeasible) {
		t.Fatalf("error %v, want ErrInfeasible", err)
	}
	if calls == 0 || last == 0 {
		t.Errorf("progress called %d times, last %d", calls, last)
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err = SolveProblem(ctx, parts, benchProblem(), Options{}); !errors.Is(err, context.Canceled) {
		t.Fatalf("cancelled search: %v, want context.Canceled", err)
	}
}

func TestCurrencies(t *testing.T) {
	offer := func(cur string, p float64) catalog.Offer {
		return catalog.Offer{PriceBreaks: []catalog.PriceBreak{{MinQty: 1, UnitPrice: p, Currency: cur}}, Stock: -1}
	}
	grade := catalog.ResistorGrade{Technology: "thin-film", Tolerance: 0.001, TCR: 10, PowerW: 0.1}
	amp := catalog.Amplifier{Part: "OPC", Type: catalog.OpAmp, SupplyMinV: 3, SupplyMaxV: 36, CMNegV: 1, CMPosV: 1, SwingNegV: 1, SwingPosV: 1,
		AolVV: 1e6, CMRRdB: 110, GBWHz: 1e6, Offer: offer("EUR", 0.5)}
	parts := &Parts{
		Series:     []catalog.ResistorSeries{{Part: "EU", ESeries: "E24", MinOhm: 1e3, MaxOhm: 1e5, ResistorGrade: grade, Offer: offer("EUR", 0.05)}},
		Resistors:  []catalog.Resistor{{Part: "US-10K", ValueOhm: 10e3, ResistorGrade: grade, Offer: offer("USD", 0.01)}},
		Amplifiers: []catalog.Amplifier{amp},
	}
	p := Problem{Circuit: Difference, Gain: 1, SupplyNeg: -12, SupplyPos: 12, InMin: -1, InMax: 1, TMin: 25, TMax: 25, TRef: 25}
	if _, err := SolveProblem(context.Background(), parts, p, Options{}); !errors.Is(err, cost.ErrMixedCurrency) {
		t.Errorf("no build currency: error %v, want cost.ErrMixedCurrency", err)
	}
	p.Build.Currency = "EUR"
	res, err := SolveProblem(context.Background(), parts, p, Options{})
	if err != nil {
		t.Fatal(err)
	}
	for _, d := range res.Designs {
		for _, pt := range d.Parts {
			if pt.Part == "US-10K" || d.Currency != "EUR" {
				t.Errorf("design %d uses %s in %s", d.Rank, pt.Part, d.Currency)
			}
		}
	}
}
