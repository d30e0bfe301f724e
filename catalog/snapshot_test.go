package catalog

import (
	"bytes"
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"reflect"
	"testing"

	"plumb/catalog/eseries"
)

func TestValueCode(t *testing.T) {
	tests := []struct {
		name string
		v    float64
		code string
	}{
		// Letter-for-decimal-point codes as printed on parts and in order
		// codes (IEC 60062 letter code, from memory): R for ohm, K for kilo,
		// M for mega, standing where the decimal point goes.
		{"sub-ohm shunt", 0.001, "R00100"},
		{"sub-ohm", 0.0499, "R0499"},
		{"tenth", 0.1, "R100"},
		{"units", 4.7, "4R70"},
		{"tens", 49.9, "49R9"},
		{"hundreds", 100, "100R"},
		{"kilo", 4990, "4K99"},
		{"ten kilo", 10e3, "10K0"},
		{"hundred kilo", 100e3, "100K"},
		{"mega", 1e6, "1M00"},
		{"giga", 2.2e9, "2G20"},
		{"E192 value", 9.20e3, "9K20"},
		{"zero", 0, ""},
		{"negative", -10, ""},
		{"not a number", math.NaN(), ""},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := ValueCode(tc.v); got != tc.code {
				t.Errorf("ValueCode(%g) = %q, want %q", tc.v, got, tc.code)
			}
			if tc.code == "" {
				return
			}
			if v, ok := ParseValueCode(tc.code); !ok || v != tc.v {
				t.Errorf("ParseValueCode(%q) = %g %v, want %g", tc.code, v, ok, tc.v)
			}
		})
	}
	short := []struct {
		code string
		v    float64
	}{{"4K7", 4700}, {"10R", 10}, {"R47", 0.47}, {"1M", 1e6}, {"2K2", 2200}}
	for _, tc := range short {
		if v, ok := ParseValueCode(tc.code); !ok || v != tc.v {
			t.Errorf("ParseValueCode(%q) = %g %v, want %g", tc.code, v, ok, tc.v)
		}
	}
	for _, bad := range []string{"", "K", "4K7K", "4.7K", "abc", "-4K7", "4K7x", "R"} {
		if v, ok := ParseValueCode(bad); ok {
			t.Errorf("ParseValueCode(%q) = %g, want not a code", bad, v)
		}
	}
}

// TestValueCodeEverySeriesValue checks that every E192 and E24 value from
// 0.1 ohm to 10 Mohm (IEC 60063 values, from package eseries) has a
// distinct code that reads back to exactly the value.
func TestValueCodeEverySeriesValue(t *testing.T) {
	for _, name := range []string{"E24", "E192"} {
		es, err := eseries.ByName(name)
		if err != nil {
			t.Fatal(err)
		}
		seen := map[string]float64{}
		for _, v := range es.Values(0.1, 10e6) {
			code := ValueCode(v)
			if w, dup := seen[code]; dup {
				t.Errorf("%s: %g and %g share code %s", name, w, v, code)
			}
			seen[code] = v
			if back, ok := ParseValueCode(code); !ok || back != v {
				t.Errorf("%s: %g -> %s -> %g", name, v, code, back)
			}
		}
	}
}

func TestExpandSeries(t *testing.T) {
	tests := []struct {
		name       string
		es         string
		lo, hi     float64
		n          int
		first, end string
	}{
		// IEC 60063: E96 has 96 values per decade, E24 has 24.
		{"E96 three decades and the end point", "E96", 100, 100e3, 3*96 + 1, "X-100R", "X-100K"},
		{"E24 one decade", "E24", 1e3, 9.1e3, 24, "X-1K00", "X-9K10"},
		{"E192 bounds between values", "E192", 1005, 1020, 2, "X-1K01", "X-1K02"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			rs := sampleBatch().ResistorSeries[0]
			rs.Part, rs.ESeries, rs.MinOhm, rs.MaxOhm = "X", tc.es, tc.lo, tc.hi
			got, err := ExpandSeries(rs)
			if err != nil {
				t.Fatal(err)
			}
			if len(got) != tc.n || got[0].Part != tc.first || got[len(got)-1].Part != tc.end {
				t.Fatalf("%d values %s..%s, want %d %s..%s", len(got), got[0].Part, got[len(got)-1].Part, tc.n, tc.first, tc.end)
			}
			r := got[0]
			if r.SeriesPart != "X" || r.ResistorGrade != rs.ResistorGrade || !reflect.DeepEqual(r.Offer, rs.Offer) ||
				r.Provenance != rs.Provenance || r.Maker != rs.Maker || r.Line != rs.Line {
				t.Errorf("expanded value %+v does not carry the series' grade, offer and provenance", r)
			}
		})
	}
	rs := sampleBatch().ResistorSeries[0]
	rs.ESeries = "E7"
	if _, err := ExpandSeries(rs); err == nil {
		t.Error("unknown series: no error")
	}
	rs.ESeries, rs.MinOhm, rs.MaxOhm = "E3", 2.3e3, 4.6e3
	if _, err := ExpandSeries(rs); err == nil {
		t.Error("empty range: no error")
	}
}

// TestFiguresRoundTripExactly stores seeded random figures and checks they
// come back bit for bit (SQLite REAL is an IEEE 754 double).
func TestFiguresRoundTripExactly(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 1))
	b := bigBatch(200, "RND")
	for i := range b.Resistors {
		r := &b.Resistors[i]
		r.ValueOhm = math.Exp(rng.Float64() * 30)
		r.Tolerance = rng.Float64() * 0.05
		r.TCR = rng.Float64() * 200
		r.PriceBreaks[3].UnitPrice = rng.Float64() / 3
	}
	s := memStore(t)
	mustUpsert(t, s, b, UpsertOptions{})
	got := normalise(mustSnapshot(t, s)).Resistors
	want := normalise(b).Resistors
	for i := range want {
		g, w := got[i], want[i]
		g.Provenance, w.Provenance = Provenance{}, Provenance{}
		if !reflect.DeepEqual(g, w) {
			t.Fatalf("row %d: got %+v, want %+v", i, g, w)
		}
	}
	// And once more with the same figures: nothing differs.
	for _, r := range mustUpsert(t, s, b, UpsertOptions{}) {
		if r.Outcome != Unchanged {
			t.Fatalf("%s: %s %q after storing exact figures", r.Part, r.Outcome, r.Changes)
		}
	}
}

func FuzzParseValueCode(f *testing.F) {
	for _, s := range []string{"4K99", "R00100", "100R", "1M00", "4K7", "R", "K1", "9G99"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, code string) {
		v, ok := ParseValueCode(code)
		if !ok || v >= 1e15 || v < 1e-12 {
			return
		}
		// Write and read again: the code of a parsed value reads back to
		// the value rounded to three significant figures.
		again := ValueCode(v)
		w, ok := ParseValueCode(again)
		if !ok {
			t.Fatalf("%q -> %g -> %q does not parse", code, v, again)
		}
		if math.Abs(w-v) > 0.005*v {
			t.Fatalf("%q -> %g -> %q -> %g", code, v, again, w)
		}
		if ValueCode(w) != again {
			t.Fatalf("%q -> %g -> %q -> %g -> %q", code, v, again, w, ValueCode(w))
		}
	})
}

func FuzzReadSnapshotJSON(f *testing.F) {
	var buf bytes.Buffer
	if err := WriteSnapshotJSON(&buf, sampleBatch()); err != nil {
		f.Fatal(err)
	}
	f.Add(buf.Bytes())
	f.Add([]byte(`{"format":"plumb-catalog-snapshot","schema_version":1}`))
	f.Fuzz(func(t *testing.T, data []byte) {
		s, err := ReadSnapshotJSON(bytes.NewReader(data))
		if err != nil {
			return
		}
		var out bytes.Buffer
		if err := WriteSnapshotJSON(&out, s); err != nil {
			t.Fatal(err)
		}
		again, err := ReadSnapshotJSON(&out)
		if err != nil {
			t.Fatalf("re-read of written snapshot: %v", err)
		}
		if !reflect.DeepEqual(normalise(again), normalise(s)) {
			t.Fatal("snapshot changed across write and read")
		}
	})
}

func ExampleValueCode() {
	for _, v := range []float64{0.01, 4.7, 100, 4990, 10e3, 1e6} {
		fmt.Println(ValueCode(v))
	}
	// Output:
	// R0100
	// 4R70
	// 100R
	// 4K99
	// 10K0
	// 1M00
}

func ExampleExpandSeries() {
	rs := ResistorSeries{Part: "DEMO-TF", ESeries: "E24", MinOhm: 1e3, MaxOhm: 1.5e3}
	values, err := ExpandSeries(rs)
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, r := range values {
		fmt.Println(r.Part, r.ValueOhm)
	}
	// Output:
	// DEMO-TF-1K00 1000
	// DEMO-TF-1K10 1100
	// DEMO-TF-1K20 1200
	// DEMO-TF-1K30 1300
	// DEMO-TF-1K50 1500
}

func ExampleStore_Upsert() {
	st, err := OpenMemory()
	if err != nil {
		fmt.Println(err)
		return
	}
	defer st.Close()
	ctx := context.Background()
	b := bigBatch(1, "EX")
	res, _ := st.Upsert(ctx, b, UpsertOptions{Source: "first export"})
	fmt.Println(res[0].Part, res[0].Outcome)
	b.Resistors[0].Stock = 20
	res, _ = st.Upsert(ctx, b, UpsertOptions{Source: "first export"})
	fmt.Println(res[0].Part, res[0].Outcome, res[0].Changes)
	b.Resistors[0].Tolerance = 0.001
	res, _ = st.Upsert(ctx, b, UpsertOptions{Source: "second export"})
	fmt.Println(res[0].Part, res[0].Outcome, res[0].Changes)
	// Output:
	// EX-000000 added
	// EX-000000 updated [stock 1000 -> 20]
	// EX-000000 spec-changed [tolerance 0.01 -> 0.001]
}
