package catalog

import (
	"bytes"
	"context"
	"encoding/csv"
	"errors"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"slices"
	"strings"
	"sync"
	"testing"
	"time"
)

// normalise clears the store's row ids and puts each kind in part-number
// order, the order Snapshot returns.
// unknownAsSentinel replaces each NaN float of the part structs in v (a
// slice) with -0.5e300, so reflect.DeepEqual, for which NaN differs from
// itself, compares unknown figures as equal.
func unknownAsSentinel(v reflect.Value) {
	var walk func(reflect.Value)
	walk = func(v reflect.Value) {
		switch v.Kind() {
		case reflect.Struct:
			for i := range v.NumField() {
				walk(v.Field(i))
			}
		case reflect.Float64:
			if math.IsNaN(v.Float()) && v.CanSet() {
				v.SetFloat(-0.5e300)
			}
		}
	}
	for i := range v.Len() {
		walk(v.Index(i))
	}
}

func normalise(s *Snapshot) *Snapshot {
	out := *s
	defer func() {
		unknownAsSentinel(reflect.ValueOf(out.ResistorSeries))
		unknownAsSentinel(reflect.ValueOf(out.Resistors))
		unknownAsSentinel(reflect.ValueOf(out.Networks))
		unknownAsSentinel(reflect.ValueOf(out.Amplifiers))
		unknownAsSentinel(reflect.ValueOf(out.References))
	}()
	out.Format, out.SchemaVersion = "", 0
	out.ResistorSeries = slices.Clone(s.ResistorSeries)
	out.Resistors = slices.Clone(s.Resistors)
	out.Networks = slices.Clone(s.Networks)
	out.Amplifiers = slices.Clone(s.Amplifiers)
	out.References = slices.Clone(s.References)
	// An empty list and no list are the same catalog content.
	if len(out.ResistorSeries) == 0 {
		out.ResistorSeries = nil
	}
	if len(out.Resistors) == 0 {
		out.Resistors = nil
	}
	if len(out.Networks) == 0 {
		out.Networks = nil
	}
	if len(out.Amplifiers) == 0 {
		out.Amplifiers = nil
	}
	if len(out.References) == 0 {
		out.References = nil
	}
	for i := range out.ResistorSeries {
		out.ResistorSeries[i].ID = 0
	}
	for i := range out.Resistors {
		out.Resistors[i].ID = 0
	}
	for i := range out.Networks {
		out.Networks[i].ID = 0
	}
	for i := range out.Amplifiers {
		out.Amplifiers[i].ID = 0
	}
	for i := range out.References {
		out.References[i].ID = 0
	}
	slices.SortFunc(out.ResistorSeries, func(a, b ResistorSeries) int { return strings.Compare(a.Part, b.Part) })
	slices.SortFunc(out.Resistors, func(a, b Resistor) int { return strings.Compare(a.Part, b.Part) })
	slices.SortFunc(out.Networks, func(a, b Network) int { return strings.Compare(a.Part, b.Part) })
	slices.SortFunc(out.Amplifiers, func(a, b Amplifier) int { return strings.Compare(a.Part, b.Part) })
	slices.SortFunc(out.References, func(a, b Reference) int { return strings.Compare(a.Part, b.Part) })
	return &out
}

func memStore(t *testing.T) *Store {
	t.Helper()
	s, err := OpenMemory()
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { s.Close() })
	return s
}

func mustUpsert(t *testing.T, s *Store, b *Snapshot, opt UpsertOptions) []UpsertResult {
	t.Helper()
	res, err := s.Upsert(context.Background(), b, opt)
	if err != nil {
		t.Fatal(err)
	}
	return res
}

func mustSnapshot(t *testing.T, s *Store) *Snapshot {
	t.Helper()
	snap, err := s.Snapshot(context.Background())
	if err != nil {
		t.Fatal(err)
	}
	return snap
}

// TestSampleSetsEveryField guards the round-trip tests: a zero field in the
// sample would let a column that is never written pass unnoticed.
func TestSampleSetsEveryField(t *testing.T) {
	b := sampleBatch()
	check := func(name string, v any, allowZero ...string) {
		rv := reflect.ValueOf(v)
		var walk func(reflect.Value, string)
		walk = func(v reflect.Value, path string) {
			for i := range v.NumField() {
				f, ft := v.Field(i), v.Type().Field(i)
				p := path + "." + ft.Name
				if ft.Anonymous {
					walk(f, p)
					continue
				}
				if ft.Name == "ID" || slices.Contains(allowZero, ft.Name) {
					continue
				}
				if f.IsZero() {
					t.Errorf("%s: sample leaves %s zero", name, p)
				}
			}
		}
		walk(rv, name)
	}
	check("series", b.ResistorSeries[0])
	check("resistor", b.Resistors[0], "SeriesPart", "MaxVoltageV")
	check("network", b.Networks[0], "MinOrder")
	check("opamp", b.Amplifiers[0], "Gains", "GainErrorMax", "GainDriftPPM", "InNegV", "InPosV", "InternalOhm", "Network")
	check("matched", b.Amplifiers[1], "IbA", "IosA", "NoiseAHz", "TypicalOnly", "MinOrder", "Stock", "RailToRail")
	check("reference", b.References[0])
}

func TestRoundTripUpsertSnapshot(t *testing.T) {
	s := memStore(t)
	want := sampleBatch()
	res := mustUpsert(t, s, want, UpsertOptions{Source: "unused: parts carry their own", Now: testTime})
	for _, r := range res {
		if r.Outcome != Added {
			t.Errorf("%s: outcome %s, want added", r.Part, r.Outcome)
		}
	}
	got := mustSnapshot(t, s)
	if got.Format != SnapshotFormat || got.SchemaVersion != SchemaVersionCurrent {
		t.Errorf("header %q %d", got.Format, got.SchemaVersion)
	}
	if g, w := normalise(got), normalise(want); !reflect.DeepEqual(g, w) {
		t.Errorf("snapshot differs from batch:\n got %+v\nwant %+v", g, w)
	}
}

func TestRoundTripJSON(t *testing.T) {
	ctx := context.Background()
	a := memStore(t)
	mustUpsert(t, a, sampleBatch(), UpsertOptions{Now: testTime})
	var buf bytes.Buffer
	if err := a.WriteJSON(ctx, &buf); err != nil {
		t.Fatal(err)
	}
	read, err := ReadSnapshotJSON(bytes.NewReader(buf.Bytes()))
	if err != nil {
		t.Fatal(err)
	}
	b := memStore(t)
	mustUpsert(t, b, read, UpsertOptions{Source: "second import", Now: testTime.Add(time.Hour)})
	if g, w := normalise(mustSnapshot(t, b)), normalise(mustSnapshot(t, a)); !reflect.DeepEqual(g, w) {
		t.Errorf("JSON round trip differs:\n got %+v\nwant %+v", g, w)
	}
	// Stable order: a second export is byte for byte the same.
	var again bytes.Buffer
	if err := b.WriteJSON(ctx, &again); err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(buf.Bytes(), again.Bytes()) {
		t.Error("second export differs from the first")
	}
}

func TestUpsertProvenanceDefaults(t *testing.T) {
	s := memStore(t)
	b := bigBatch(3, "PV")
	mustUpsert(t, s, b, UpsertOptions{Source: "distributor export", Now: testTime.In(time.FixedZone("X", 3600))})
	for _, r := range mustSnapshot(t, s).Resistors {
		if r.Source != "distributor export" || !r.ImportedAt.Equal(testTime) || r.ImportedAt.Location() != time.UTC {
			t.Errorf("%s: provenance %+v, want the options' source and time in UTC", r.Part, r.Provenance)
		}
	}
}

func TestUpsertOutcomes(t *testing.T) {
	tests := []struct {
		name    string
		change  func(b *Snapshot)
		outcome Outcome
		changes []string
		// stored checks the catalog after the second import.
		stored func(t *testing.T, snap *Snapshot)
	}{
		{
			name:    "same batch again",
			change:  func(b *Snapshot) {},
			outcome: Unchanged,
		},
		{
			name:    "new import time only",
			change:  func(b *Snapshot) { b.Resistors[0].ImportedAt = testTime.Add(24 * time.Hour) },
			outcome: Unchanged,
		},
		{
			name:    "price change",
			change:  func(b *Snapshot) { b.Resistors[0].PriceBreaks[2].UnitPrice = 0.4 },
			outcome: Updated,
			changes: []string{"price_breaks 1=0.9 USD; 10=0.7200000000000001 USD; 100=0.45 USD -> 1=0.9 USD; 10=0.7200000000000001 USD; 100=0.4 USD"},
			stored: func(t *testing.T, snap *Snapshot) {
				if p, _, _ := snap.Resistors[0].UnitPrice(100); p != 0.4 {
					t.Errorf("price at 100 is %g, want the new 0.4", p)
				}
			},
		},
		{
			name:    "stock change",
			change:  func(b *Snapshot) { b.Resistors[0].Stock = 7 },
			outcome: Updated,
			changes: []string{"stock -1 -> 7"},
			stored: func(t *testing.T, snap *Snapshot) {
				if snap.Resistors[0].Stock != 7 {
					t.Errorf("stock %d, want 7", snap.Resistors[0].Stock)
				}
			},
		},
		{
			name:    "tolerance change",
			change:  func(b *Snapshot) { b.Resistors[0].Tolerance = 0.005; b.Resistors[0].Stock = 3 },
			outcome: SpecChanged,
			changes: []string{"tolerance 0.01 -> 0.005"},
			stored: func(t *testing.T, snap *Snapshot) {
				if r := snap.Resistors[0]; r.Tolerance != 0.01 || r.Stock != -1 {
					t.Errorf("tolerance %g stock %d: a spec-changed part must not be overwritten", r.Tolerance, r.Stock)
				}
			},
		},
		{
			name:    "network values change",
			change:  func(b *Snapshot) { b.Networks[0].Values[3] = 20e3 },
			outcome: SpecChanged,
			changes: []string{"values_ohm [1000 10000 1000 10000] -> [1000 10000 1000 20000]"},
		},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s := memStore(t)
			mustUpsert(t, s, sampleBatch(), UpsertOptions{Now: testTime})
			b := sampleBatch()
			tc.change(b)
			res := mustUpsert(t, s, b, UpsertOptions{Source: "second", Now: testTime.Add(time.Hour)})
			var target string
			for _, r := range res {
				changed := (r.Part == "TS-SH10" && tc.name != "network values change") || (r.Part == "TS-NW4" && tc.name == "network values change")
				if changed && tc.outcome != Unchanged {
					target = r.Part
					if r.Outcome != tc.outcome || !slices.Equal(r.Changes, tc.changes) {
						t.Errorf("%s: %s %q, want %s %q", r.Part, r.Outcome, r.Changes, tc.outcome, tc.changes)
					}
				} else if r.Outcome != Unchanged {
					t.Errorf("%s: %s %q, want unchanged", r.Part, r.Outcome, r.Changes)
				}
			}
			if tc.stored != nil {
				tc.stored(t, mustSnapshot(t, s))
			}
			if target != "" {
				h, err := s.History(context.Background(), target)
				if err != nil {
					t.Fatal(err)
				}
				if len(h) != 2 || h[0].Outcome != Added || h[1].Outcome != tc.outcome || !slices.Equal(h[1].Changes, tc.changes) {
					t.Errorf("history %+v, want added then %s", h, tc.outcome)
				}
			}
		})
	}
}

func TestDryRunWritesNothing(t *testing.T) {
	s := memStore(t)
	res := mustUpsert(t, s, sampleBatch(), UpsertOptions{DryRun: true})
	if len(res) != 6 || res[0].Outcome != Added {
		t.Errorf("dry run results %+v", res)
	}
	if n := mustSnapshot(t, s).Len(); n != 0 {
		t.Errorf("dry run left %d parts", n)
	}
}

// countdownCtx reports cancellation after its Err method has been asked n
// times: a deterministic "cancelled mid-batch".
type countdownCtx struct {
	context.Context
	mu sync.Mutex
	n  int
}

func (c *countdownCtx) Err() error {
	c.mu.Lock()
	defer c.mu.Unlock()
	if c.n--; c.n < 0 {
		return context.Canceled
	}
	return nil
}

func TestUpsertRollback(t *testing.T) {
	dup := sampleBatch()
	dup.Resistors = append(dup.Resistors, dup.Resistors[0])
	bad := sampleBatch()
	bad.Networks[0].RatioTolerance = 5
	badBreak := sampleBatch()
	badBreak.Amplifiers[1].PriceBreaks[0].Currency = "dollars"
	tests := []struct {
		name    string
		batch   *Snapshot
		ctx     context.Context
		wantErr error
		words   []string // the message names the part, the field and what to do
	}{
		{"duplicate part", dup, context.Background(), ErrInvalid, []string{"TS-SH10", "appears twice", "rows 1 and 2", "nothing was written"}},
		{"invalid figure", bad, context.Background(), ErrInvalid, []string{"TS-NW4", "ratio_tolerance", "0.001 for 0.1 %"}},
		{"invalid currency", badBreak, context.Background(), ErrInvalid, []string{"TS-DA1", "price_breaks", "USD"}},
		{"cancelled mid-batch", bigBatch(3000, "CX"), &countdownCtx{Context: context.Background(), n: 5}, context.Canceled, []string{"stopped at resistor row", "nothing was written"}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s := memStore(t)
			mustUpsert(t, s, bigBatch(10, "KEEP"), UpsertOptions{Now: testTime})
			before := mustSnapshot(t, s)
			_, err := s.Upsert(tc.ctx, tc.batch, UpsertOptions{Now: testTime})
			if !errors.Is(err, tc.wantErr) {
				t.Fatalf("error %v, want %v", err, tc.wantErr)
			}
			for _, w := range tc.words {
				if !strings.Contains(err.Error(), w) {
					t.Errorf("error %q does not say %q", err, w)
				}
			}
			if after := mustSnapshot(t, s); !reflect.DeepEqual(after, before) {
				t.Errorf("store changed by a failed batch: %d parts before, %d after", before.Len(), after.Len())
			}
			if h, _ := s.History(context.Background(), "CX-000001"); len(h) != 0 {
				t.Errorf("history kept %d rows of a failed batch", len(h))
			}
		})
	}
}

func TestUnitPricePicksBreak(t *testing.T) {
	// Fact of the trade (common practice): a distributor's price break
	// applies from its quantity upward, so 99 pieces are priced at the
	// 10-piece break and 100 at the 100-piece break; below the first break
	// there is no price.
	o := Offer{PriceBreaks: []PriceBreak{
		{MinQty: 1000, UnitPrice: 0.01, Currency: "USD"},
		{MinQty: 1, UnitPrice: 0.10, Currency: "USD"},
		{MinQty: 100, UnitPrice: 0.03, Currency: "USD"},
		{MinQty: 10, UnitPrice: 0.06, Currency: "USD"},
	}}
	tests := []struct {
		name  string
		qty   int
		price float64
		ok    bool
	}{
		{"below first break", 0, 0, false},
		{"one piece", 1, 0.10, true},
		{"just below ten", 9, 0.10, true},
		{"ten", 10, 0.06, true},
		{"ninety-nine", 99, 0.06, true},
		{"hundred", 100, 0.03, true},
		{"large", 250000, 0.01, true},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			p, cur, ok := o.UnitPrice(tc.qty)
			if ok != tc.ok || p != tc.price || (ok && cur != "USD") {
				t.Errorf("UnitPrice(%d) = %g %q %v, want %g %v", tc.qty, p, cur, ok, tc.price, tc.ok)
			}
		})
	}
	// The same through the store, whose breaks come back sorted.
	s := memStore(t)
	b := bigBatch(1, "UP")
	b.Resistors[0].PriceBreaks = o.PriceBreaks
	mustUpsert(t, s, b, UpsertOptions{})
	got := mustSnapshot(t, s).Resistors[0]
	if p, _, _ := got.UnitPrice(99); p != 0.06 {
		t.Errorf("stored part: 99 pieces at %g, want 0.06", p)
	}
	if !slices.IsSortedFunc(got.PriceBreaks, func(a, b PriceBreak) int { return a.MinQty - b.MinQty }) {
		t.Errorf("breaks not in quantity order: %+v", got.PriceBreaks)
	}
}

func TestFind(t *testing.T) {
	s := memStore(t)
	mustUpsert(t, s, sampleBatch(), UpsertOptions{Now: testTime})
	tests := []struct {
		name     string
		part     string
		kind     Kind
		valueOhm float64 // for resistors
	}{
		{"series stem", "TS-TF01", KindSeries, 0},
		{"series value", "TS-TF01-4K99", KindResistor, 4990},
		{"series value at the top of the range", "TS-TF01-100K", KindResistor, 100e3},
		{"series value, short form", "TS-TF01-10K", KindResistor, 10e3},
		{"resistor", "TS-SH10", KindResistor, 0.01},
		{"network", "TS-NW4", KindNetwork, 0},
		{"amplifier", "TS-DA1", KindAmplifier, 0},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			kind, v, err := s.Find(context.Background(), tc.part)
			if err != nil {
				t.Fatal(err)
			}
			if kind != tc.kind {
				t.Fatalf("kind %s, want %s", kind, tc.kind)
			}
			if r, ok := v.(*Resistor); ok && r.ValueOhm != tc.valueOhm {
				t.Errorf("value %g, want %g", r.ValueOhm, tc.valueOhm)
			}
		})
	}
	notFound := []struct {
		name, part, hint string
	}{
		{"typo", "TS-SH1O", "TS-SH10"},
		// E96 (IEC 60063) has 4.99 and 5.11 either side of 5.00.
		{"value not in the series", "TS-TF01-5K00", "series TS-TF01 (E96, 100R to 100K) has no value 5K00; the nearest it makes: TS-TF01-4K99, TS-TF01-5K11"},
		{"value out of range", "TS-TF01-1M00", "has no value 1M00; the nearest it makes: TS-TF01-100K"},
		{"value below the range", "TS-TF01-10R0", "has no value 10R0; the nearest it makes: TS-TF01-100R"},
		{"nothing close", "ZZZZZZZZZZZZ", "plumb catalog list"},
	}
	for _, tc := range notFound {
		t.Run(tc.name, func(t *testing.T) {
			_, _, err := s.Find(context.Background(), tc.part)
			if !errors.Is(err, ErrNotFound) || !strings.Contains(err.Error(), tc.hint) {
				t.Errorf("error %v, want ErrNotFound naming %q", err, tc.hint)
			}
		})
	}
}

// TestNotFoundNamesTheCatalog checks that a part missing from the catalog
// is reported once, naming the catalog as the user knows it (its path, or
// its label for one opened without a path), with one hint.
func TestNotFoundNamesTheCatalog(t *testing.T) {
	path := filepath.Join(t.TempDir(), "parts.db")
	file, err := Create(path, false)
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { file.Close() })
	labelled := memStore(t)
	labelled.SetLabel("the embedded demo catalog")
	tests := []struct {
		name string
		st   *Store
		want string
	}{
		{"file", file, "catalog: part not found: ZZ-NONE is not in catalog " + path +
			": check the part number, or look for it with `plumb catalog list --part PATTERN`"},
		{"labelled", labelled, "catalog: part not found: ZZ-NONE is not in the embedded demo catalog" +
			": check the part number, or look for it with `plumb catalog list --part PATTERN`"},
		{"in memory", memStore(t), "catalog: part not found: ZZ-NONE is not in catalog (in memory)" +
			": check the part number, or look for it with `plumb catalog list --part PATTERN`"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			_, _, err := tc.st.Find(context.Background(), "ZZ-NONE")
			if !errors.Is(err, ErrNotFound) || err.Error() != tc.want {
				t.Errorf("error\n  %v\nwant\n  %s", err, tc.want)
			}
		})
	}
}

func TestHistoryOfSeriesValue(t *testing.T) {
	s := memStore(t)
	mustUpsert(t, s, sampleBatch(), UpsertOptions{Now: testTime})
	h, err := s.History(context.Background(), "TS-TF01-4K99")
	if err != nil {
		t.Fatal(err)
	}
	if len(h) != 1 || h[0].Part != "TS-TF01" || h[0].Source != "sample series" || !h[0].ImportedAt.Equal(testTime) {
		t.Fatalf("history %+v, want the series' added row", h)
	}
	if !strings.Contains(h[0].Figures, `"tolerance":0.001`) || !strings.Contains(h[0].Figures, `"e_series":"E96"`) {
		t.Errorf("figures %s lack the series' figures", h[0].Figures)
	}
	notFound := []struct{ name, part string }{
		{"unknown part", "NO-SUCH"},
		{"value off the series' E-series", "TS-TF01-5K00"},
		{"value above the series' range", "TS-TF01-1M00"},
		{"unknown stem with a value code", "TS-XX01-4K99"},
	}
	for _, tc := range notFound {
		t.Run(tc.name, func(t *testing.T) {
			if h, err := s.History(context.Background(), tc.part); !errors.Is(err, ErrNotFound) {
				t.Errorf("history of %s: %v, %v, want ErrNotFound", tc.part, h, err)
			}
		})
	}
}

func TestList(t *testing.T) {
	s := memStore(t)
	mustUpsert(t, s, sampleBatch(), UpsertOptions{Now: testTime})
	tests := []struct {
		name  string
		f     Filter
		parts []string
	}{
		{"everything", Filter{}, []string{"TS-TF01", "TS-SH10", "TS-NW4", "TS-DA1", "TS-OA1"}},
		{"kind", Filter{Kind: KindAmplifier}, []string{"TS-DA1", "TS-OA1"}},
		{"series overlapping range", Filter{MinOhm: 50e3, MaxOhm: 1e6}, []string{"TS-TF01"}},
		{"low values", Filter{MaxOhm: 1}, []string{"TS-SH10"}},
		{"network element in range", Filter{MinOhm: 9e3, MaxOhm: 11e3}, []string{"TS-TF01", "TS-NW4"}},
		{"tolerance", Filter{MaxTolerance: 0.001}, []string{"TS-TF01", "TS-NW4"}},
		{"tempco", Filter{MaxTCR: 30}, []string{"TS-TF01", "TS-NW4"}},
		{"technology ignores case", Filter{Technology: "METAL-STRIP"}, []string{"TS-SH10"}},
		{"package", Filter{Package: "soic-8"}, []string{"TS-OA1"}},
		{"maker", Filter{Maker: "testmaker analog"}, []string{"TS-DA1", "TS-OA1"}},
		{"part substring", Filter{PartLike: "nw"}, []string{"TS-NW4"}},
		{"part glob", Filter{PartLike: "TS-?A1"}, []string{"TS-DA1", "TS-OA1"}},
		{"percent is literal", Filter{PartLike: "%"}, nil},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			snap, err := s.List(context.Background(), tc.f)
			if err != nil {
				t.Fatal(err)
			}
			var got []string
			for _, p := range snap.ResistorSeries {
				got = append(got, p.Part)
			}
			for _, p := range snap.Resistors {
				got = append(got, p.Part)
			}
			for _, p := range snap.Networks {
				got = append(got, p.Part)
			}
			for _, p := range snap.Amplifiers {
				got = append(got, p.Part)
			}
			if !slices.Equal(got, tc.parts) {
				t.Errorf("got %q, want %q", got, tc.parts)
			}
		})
	}
	if _, err := s.List(context.Background(), Filter{Kind: "capacitor"}); err == nil || !strings.Contains(err.Error(), "capacitor") {
		t.Errorf("unknown kind: %v", err)
	}
}

func TestStats(t *testing.T) {
	s := memStore(t)
	mustUpsert(t, s, sampleBatch(), UpsertOptions{Now: testTime})
	st, err := s.Stats(context.Background())
	if err != nil {
		t.Fatal(err)
	}
	// E96 over 100 ohm .. 100 kohm: three decades of 96 values plus 100k
	// itself (IEC 60063: 96 values per decade).
	want := Stats{Series: 1, SeriesValues: 3*96 + 1, Resistors: 1, Networks: 1, Amplifiers: 2, References: 1, PriceBreaks: 18, NoStock: 1,
		Makers:     []string{"Testmaker Analog", "Testmaker Passives"},
		Currencies: []string{"USD"},
		Sources:    []string{"sample amplifier", "sample matched", "sample network", "sample reference", "sample resistor", "sample series"}}
	if !reflect.DeepEqual(st, want) {
		t.Errorf("stats %+v\nwant %+v", st, want)
	}
}

func TestWriteCSV(t *testing.T) {
	s := memStore(t)
	mustUpsert(t, s, sampleBatch(), UpsertOptions{Now: testTime})
	tests := []struct {
		kind  Kind
		rows  int
		check map[string]string // column -> value of the first row
	}{
		{KindSeries, 1, map[string]string{"part": "TS-TF01", "e_series": "E96", "tolerance": "0.001", "price_breaks": "1=0.12 USD; 10=0.096 USD; 100=0.06 USD"}},
		{KindResistor, 1, map[string]string{"value_ohm": "0.01", "stock": "-1", "imported_at": "2026-11-03T09:30:00Z"}},
		{KindNetwork, 1, map[string]string{"values_ohm": "1000;10000;1000;10000", "ratio_tolerance": "0.0005"}},
		{KindAmplifier, 2, map[string]string{"part": "TS-DA1", "gains": "1;2;5;10", "cm_pos_v": "-0.2"}},
	}
	for _, tc := range tests {
		t.Run(string(tc.kind), func(t *testing.T) {
			var buf bytes.Buffer
			if err := s.WriteCSV(context.Background(), &buf, tc.kind); err != nil {
				t.Fatal(err)
			}
			recs, err := csv.NewReader(&buf).ReadAll()
			if err != nil {
				t.Fatal(err)
			}
			if len(recs) != tc.rows+1 {
				t.Fatalf("%d records, want header + %d", len(recs), tc.rows)
			}
			for col, want := range tc.check {
				i := slices.Index(recs[0], col)
				if i < 0 {
					t.Fatalf("no column %q in %q", col, recs[0])
				}
				if recs[1][i] != want {
					t.Errorf("%s = %q, want %q", col, recs[1][i], want)
				}
			}
		})
	}
	if err := s.WriteCSV(context.Background(), &bytes.Buffer{}, "diode"); err == nil {
		t.Error("CSV of an unknown kind: no error")
	}
}

func TestReadSnapshotJSONErrors(t *testing.T) {
	tests := []struct {
		name    string
		file    string
		wantErr error
		words   []string
	}{
		{"wrong format", "wrong_format.json", ErrSnapshot, []string{`"format" is "spreadsheet"`, "catalog export"}},
		{"unknown field", "unknown_field.json", ErrSnapshot, []string{"tolerence"}},
		{"bad syntax", "bad_syntax.json", ErrSnapshot, []string{"line 4"}},
		{"wrong type", "wrong_type.json", ErrSnapshot, []string{"line 6", "value_ohm"}},
		{"newer schema", "newer_schema.json", ErrNewerSchema, []string{"schema version 99", "upgrade plumb"}},
		{"negative schema", "negative_schema.json", ErrSnapshot, []string{`"schema_version" is -1`}},
		{"invalid part", "invalid_part.json", ErrInvalid, []string{"BAD-1", "tolerance", "0.001 for 0.1 %"}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			f, err := os.Open(filepath.Join("testdata", tc.file))
			if err != nil {
				t.Fatal(err)
			}
			defer f.Close()
			_, err = ReadSnapshotJSON(f)
			if !errors.Is(err, tc.wantErr) {
				t.Fatalf("error %v, want %v", err, tc.wantErr)
			}
			for _, w := range tc.words {
				if !strings.Contains(err.Error(), w) {
					t.Errorf("error %q does not say %q", err, w)
				}
			}
		})
	}
}
