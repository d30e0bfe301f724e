package catalog

import (
	"context"
	"fmt"
	"math/rand/v2"
	"reflect"
	"slices"
	"testing"
)

// rowsBatch is a random batch of resistors, every part with its own price
// breaks (some in another currency), stock (some zero or unknown) and
// minimum order, in a few grades, plus two series.
func rowsBatch(r *rand.Rand, n int) *Snapshot {
	b := sampleBatch()
	b.Resistors = nil
	b.ResistorSeries = append(b.ResistorSeries, ResistorSeries{Part: "TS-TK02", Maker: "Testmaker Passives", ESeries: "E24",
		MinOhm: 10, MaxOhm: 1e6, ResistorGrade: ResistorGrade{Technology: "thick-film", Package: "0402", Tolerance: 0.01, TCR: 100, PowerW: 0.063},
		Offer: Offer{PriceBreaks: breaks(0.01), Stock: 0}})
	techs := []string{"thin-film", "thick-film", "foil"}
	for i := range n {
		o := Offer{Stock: []int{-1, 0, 5, 5000}[r.IntN(4)], MinOrder: []int{0, 0, 100}[r.IntN(3)]}
		p, cur := 0.01+r.Float64(), []string{"USD", "USD", "USD", "EUR"}[r.IntN(4)]
		for _, q := range []int{1, 10, 100}[:1+r.IntN(3)] {
			o.PriceBreaks = append(o.PriceBreaks, PriceBreak{MinQty: q, UnitPrice: p, Currency: cur})
			p *= 0.7
		}
		b.Resistors = append(b.Resistors, Resistor{Part: fmt.Sprintf("TR-%05d", i), Maker: "Testmaker Passives",
			ValueOhm: []float64{10, 100, 1e3, 4.99e3, 10e3, 1e6, 2e6}[r.IntN(7)],
			ResistorGrade: ResistorGrade{Technology: techs[r.IntN(3)], Package: []string{"0402", "0603"}[r.IntN(2)],
				Tolerance: []float64{0.001, 0.01, 0.5}[r.IntN(3)], TCR: 25, PowerW: 0.1, MaxVoltageV: []float64{0, 50}[r.IntN(2)],
				ThermalResistance: []float64{0, 300}[r.IntN(2)], LoadLife: []float64{0, 0.001}[r.IntN(2)]},
			Offer: o})
	}
	return b
}

// collect returns every row a source streams for q, as text, sorted.
func collect(t *testing.T, src ResistorSource, q ResistorQuery) []string {
	t.Helper()
	var out []string
	err := src.EachResistor(context.Background(), q, func(r *ResistorRow) error {
		if r.ValueOhm < q.MinOhm || (q.MaxOhm > 0 && r.ValueOhm > q.MaxOhm) {
			t.Errorf("%s: %g ohm is outside the window", r.Part, r.ValueOhm)
		}
		out = append(out, fmt.Sprintf("%s %g %+v %d %d %v", r.Part, r.ValueOhm, r.Grade, r.Offer.MinOrder, r.Offer.Stock, r.Offer.PriceBreaks))
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	slices.Sort(out)
	return out
}

// TestEachResistorStoreMatchesSnapshot: the indexed query of a catalog
// file streams exactly the rows the in-memory snapshot does for the same
// parts, every figure and price break of each, under every filter.
func TestEachResistorStoreMatchesSnapshot(t *testing.T) {
	r := rand.New(rand.NewPCG(3, 3))
	b := rowsBatch(r, 400)
	st, err := OpenMemory()
	if err != nil {
		t.Fatal(err)
	}
	defer st.Close()
	if _, err := st.Upsert(context.Background(), b, UpsertOptions{Source: "test", Now: testTime}); err != nil {
		t.Fatal(err)
	}
	tests := []struct {
		name string
		q    ResistorQuery
	}{
		{"everything", ResistorQuery{}},
		{"window", ResistorQuery{MinOhm: 100, MaxOhm: 10e3}},
		{"tolerance below 50 %", ResistorQuery{MinOhm: 1, MaxOhm: 1e7, BelowTolerance: 0.5}},
		{"one currency", ResistorQuery{Currency: "EUR"}},
		{"stock on hand", ResistorQuery{MinOhm: 1e3, InStock: true}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got, want := collect(t, st, tc.q), collect(t, b, tc.q)
			if len(want) == 0 {
				t.Fatal("the query selects nothing: the test has no teeth")
			}
			if !reflect.DeepEqual(got, want) {
				t.Errorf("store streams %d rows, snapshot %d; first store row %q, first snapshot row %q", len(got), len(want), got[0], want[0])
			}
		})
	}
	// The bare scan reads one row per price break of the same parts.
	q := ResistorQuery{MinOhm: 100, MaxOhm: 10e3}
	n, err := st.ScanResistorRows(context.Background(), q)
	if err != nil {
		t.Fatal(err)
	}
	breaksIn := 0
	for _, rr := range b.Resistors {
		if rr.ValueOhm >= q.MinOhm && rr.ValueOhm <= q.MaxOhm {
			breaksIn += len(rr.PriceBreaks)
		}
	}
	if n != breaksIn {
		t.Errorf("bare scan read %d rows, want %d (one per price break)", n, breaksIn)
	}
}
