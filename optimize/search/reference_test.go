package search

import (
	"context"
	"math"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"

	"plumb/catalog"
	"plumb/optimize/budget"
	"plumb/optimize/cost"
	"plumb/optimize/spec"
)

// testRefs are invented references: three of 4.096 V from loose and cheap
// to tight and dear, and one of 2.5 V the 4.096 V spec must not pick.
func testRefs() []catalog.Reference {
	offer := func(p float64) catalog.Offer {
		return catalog.Offer{PriceBreaks: []catalog.PriceBreak{{MinQty: 1, UnitPrice: p, Currency: "USD"}}, Stock: 100000}
	}
	ref := func(part string, v, tol, ppm, price float64) catalog.Reference {
		u := catalog.Unknown()
		return catalog.Reference{Part: part, Maker: "Testwick Labs", Package: "SOT-23", OutputV: v, Tolerance: tol, DriftPPM: ppm,
			TempMinC: -40, TempMaxC: 125, NoisePPV: u, NoiseVHz: u, SupplyMinV: u, SupplyMaxV: u, DropoutV: u,
			LoadSourceA: u, LoadSinkA: u, OutputOhm: u, LongTermPPM: u, IqA: u, Offer: offer(price)}
	}
	return []catalog.Reference{
		ref("TST-REF-LOOSE", 4.096, 0.002, 50, 0.3),
		ref("TST-REF-MID", 4.096, 0.0005, 10, 1.2),
		ref("TST-REF-TIGHT", 4.096, 0.0002, 3, 4),
		ref("TST-REF-2V5", 2.5, 0.0001, 1, 0.01),
	}
}

// autoRefExample is the demo catalog with testRefs and the adc-channel
// example with reference.part auto.
func autoRefExample(t *testing.T) (*catalog.Snapshot, *spec.Spec) {
	t.Helper()
	snap := demoSnapshot(t)
	snap.References = testRefs()
	s, err := spec.Load(filepath.Join("..", "..", "data", "examples", "adc-channel.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	s.Reference.Part, s.Reference.Tolerance, s.Reference.Drift = spec.RefAuto, 0, 0
	return snap, s
}

// TestReferencePicked: with reference.part auto the search's rank 1 is the
// cheapest, over the catalog's references of the spec's voltage, of the
// reference's price (one per stage at the build quantity, through
// cost.Price) plus the cheapest stage that passes with that reference's
// figures; the design carries the part at position REF, and its exact
// budget (ExplainN) uses that part's tolerance.
func TestReferencePicked(t *testing.T) {
	snap, s := autoRefExample(t)
	ctx := context.Background()
	r, err := Solve(ctx, snap, s, Options{Top: 3})
	if err != nil {
		t.Fatal(err)
	}
	b, err := cost.BuildOf(s.Build)
	if err != nil {
		t.Fatal(err)
	}
	want, wantPart := math.Inf(1), ""
	for _, ref := range testRefs()[:3] {
		fixed := *s
		fr := *s.Reference
		fr.Part, fr.Tolerance, fr.Drift = "", ref.Tolerance, ref.DriftPPM*1e-6
		fixed.Reference = &fr
		one, err := Solve(ctx, snap, &fixed, Options{Top: 1})
		if err != nil {
			continue
		}
		br, err := cost.Price(b, []cost.Use{{Part: ref.Part, Offer: &ref.Offer, Placements: 1}})
		if err != nil {
			t.Fatal(err)
		}
		if c := one.Designs[0].TotalCost + br.Total; c < want {
			want, wantPart = c, ref.Part
		}
	}
	d := r.Designs[0]
	if math.Abs(d.TotalCost-want) > 1e-6*want {
		t.Errorf("rank 1 costs %.4f, the cheapest reference plus stage %.4f (%s)", d.TotalCost, want, wantPart)
	}
	var ref *Part
	for i := range d.Parts {
		if d.Parts[i].Position == "REF" {
			ref = &d.Parts[i]
		}
	}
	if ref == nil || ref.Part != wantPart || ref.Kind != string(catalog.KindReference) {
		t.Fatalf("rank 1's reference %+v, want %s", ref, wantPart)
	}
	for i := 1; i < len(r.Designs); i++ {
		if r.Designs[i].TotalCost < r.Designs[i-1].TotalCost || r.Designs[i].Rank != i+1 {
			t.Errorf("design %d (%.4f) out of order after %.4f", r.Designs[i].Rank, r.Designs[i].TotalCost, r.Designs[i-1].TotalCost)
		}
	}
	br, err := r.ExplainN(1)
	if err != nil {
		t.Fatal(err)
	}
	if !br.Pass {
		t.Errorf("rank 1 fails its exact budget: %+v", br.Limits)
	}
	tol := map[string]float64{"TST-REF-LOOSE": 0.002, "TST-REF-MID": 0.0005, "TST-REF-TIGHT": 0.0002}[wantPart]
	for _, c := range br.Channel.Error {
		if c.Name == "reference (ratiometric: the signal's share) tolerance" {
			// The signal's 1.95 V share of 4.096 V, read against the
			// reference at its low end (ratiometric, see budget.Channel).
			if w := 1.95 / 4.096 * (1/(1-tol) - 1); math.Abs(c.Value-w) > 1e-12 {
				t.Errorf("reference tolerance term %g FS, want %g FS for %s", c.Value, w, wantPart)
			}
		}
	}
	if _, err := budget.Evaluate(s, r.designs[0]); err != nil {
		t.Errorf("the design's own budget against the auto spec: %v", err)
	}
}

// TestReferencePickedFromStore: SolveCatalog reads the references from
// the catalog file and ranks the same designs as Solve on the same parts,
// and a ranked design's reference resolves through the store's Find for
// its exact budget.
func TestReferencePickedFromStore(t *testing.T) {
	ctx := context.Background()
	snap := demoSnapshot(t)
	snap.References = testRefs()
	st, err := catalog.OpenMemory()
	if err != nil {
		t.Fatal(err)
	}
	defer st.Close()
	if _, err := st.Upsert(ctx, snap, catalog.UpsertOptions{Source: "test"}); err != nil {
		t.Fatal(err)
	}
	s, err := spec.Load(filepath.Join("..", "..", "data", "examples", "adc-channel.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	s.Reference.Part, s.Reference.Tolerance, s.Reference.Drift = spec.RefAuto, 0, 0
	fromSnap, err := Solve(ctx, snap, s, Options{Top: 2})
	if err != nil {
		t.Fatal(err)
	}
	fromStore, err := SolveCatalog(ctx, st, s, Options{Top: 2})
	if err != nil {
		t.Fatal(err)
	}
	for i := range fromSnap.Designs {
		a, b := fromSnap.Designs[i], fromStore.Designs[i]
		if math.Abs(a.TotalCost-b.TotalCost) > 1e-9 || partList(&a) != partList(&b) {
			t.Errorf("design %d: snapshot %s at %.4f, store %s at %.4f", i+1, partList(&a), a.TotalCost, partList(&b), b.TotalCost)
		}
	}
	d, err := fromStore.DesignN(1)
	if err != nil {
		t.Fatal(err)
	}
	out, err := d.Marshal()
	if err != nil {
		t.Fatal(err)
	}
	again, err := spec.ParseDesign(out, "again.yaml")
	if err != nil {
		t.Fatal(err)
	}
	if err := again.Resolve(func(part string) (catalog.Kind, any, error) { return st.Find(ctx, part) }); err != nil {
		t.Fatal(err)
	}
	res, err := budget.Evaluate(s, again)
	if err != nil {
		t.Fatal(err)
	}
	if !res.Pass || math.Abs(res.Metrics.TotalErrorFS-fromStore.Designs[0].Metrics.TotalErrorFS) > 1e-15 {
		t.Errorf("the design written and read back: pass %v, total error %g FS against %g", res.Pass, res.Metrics.TotalErrorFS, fromStore.Designs[0].Metrics.TotalErrorFS)
	}
}

// TestReferenceSupply: a reference the spec's positive rail cannot run is
// left out of the pick and named in a note. A series reference needs its
// minimum input voltage, and at least its output plus its dropout, and no
// more than its maximum input; with none of those known, more than its
// output (no reference makes a voltage from a lower input: common
// practice).
func TestReferenceSupply(t *testing.T) {
	u := catalog.Unknown()
	tests := []struct {
		name                  string
		out, smin, smax, drop float64
		vplus                 float64
		want                  string
	}{
		{"runs", 4.096, 4.5, 18, u, 5, ""},
		{"below its minimum input", 5, 5.3, 15, u, 5, "needs at least 5.3 V in"},
		{"above its maximum input", 2.5, 3, 5.5, u, 12, "takes at most 5.5 V in"},
		{"inside its dropout", 4.096, u, u, 0.2, 4.2, "needs 4.296 V in"},
		{"at its dropout", 4.096, u, u, 0.2, 4.296, ""},
		{"nothing known, rail at the output", 5, u, u, u, 5, "cannot make 5 V"},
		{"nothing known, rail above", 2.5, u, u, u, 5, ""},
	}
	for _, tc := range tests {
		r := catalog.Reference{Part: "TST-R", OutputV: tc.out, SupplyMinV: tc.smin, SupplyMaxV: tc.smax, DropoutV: tc.drop}
		got := refSupplyProblem(r, tc.vplus)
		if (tc.want == "") != (got == "") || !strings.Contains(got, tc.want) {
			t.Errorf("%s: %q, want %q", tc.name, got, tc.want)
		}
	}

	// End to end: the tight grade needs 7 V in, the adc-channel spec's
	// rail is 5 V, so the pick is among the other two and a note says why.
	snap := demoSnapshot(t)
	snap.References = testRefs()
	snap.References[2].SupplyMinV = 7
	s, err := spec.Load(filepath.Join("..", "..", "data", "examples", "adc-channel.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	s.Reference.Part, s.Reference.Tolerance, s.Reference.Drift = spec.RefAuto, 0, 0
	r, err := Solve(context.Background(), snap, s, Options{Top: 5})
	if err != nil {
		t.Fatal(err)
	}
	for _, d := range r.Designs {
		for _, p := range d.Parts {
			if p.Part == "TST-REF-TIGHT" {
				t.Errorf("design %d uses TST-REF-TIGHT, which cannot run from 5 V", d.Rank)
			}
		}
	}
	if !slices.ContainsFunc(r.Notes, func(n string) bool { return strings.Contains(n, "TST-REF-TIGHT needs at least 7 V in") }) {
		t.Errorf("no note names the reference left out by the supply: %q", r.Notes)
	}
}

// TestReferenceNearMissesOverEveryReference: with reference.part auto the
// near misses are those of every reference's search, not of one: the
// closest (by shortfall) of all references' near misses cheaper than the
// merged rank 1, each carrying its own reference at REF. The oracle
// solves the spec once per reference with that reference's figures and
// adds its price (cost.Price), as TestReferencePicked does for rank 1.
func TestReferenceNearMissesOverEveryReference(t *testing.T) {
	snap, s := autoRefExample(t)
	ctx := context.Background()
	r, err := Solve(ctx, snap, s, Options{Top: 1})
	if err != nil {
		t.Fatal(err)
	}
	b, err := cost.BuildOf(s.Build)
	if err != nil {
		t.Fatal(err)
	}
	type miss struct {
		short float64
		ref   string
	}
	var want []miss
	for _, ref := range testRefs()[:3] {
		fixed := *s
		fr := *s.Reference
		fr.Part, fr.Tolerance, fr.Drift = "", ref.Tolerance, ref.DriftPPM*1e-6
		fixed.Reference = &fr
		one, err := Solve(ctx, snap, &fixed, Options{Top: 1})
		if err != nil && !IsInfeasible(err) {
			t.Fatal(err)
		}
		br, err := cost.Price(b, []cost.Use{{Part: ref.Part, Offer: &ref.Offer, Placements: 1}})
		if err != nil {
			t.Fatal(err)
		}
		for _, nm := range one.NearMisses {
			if nm.TotalCost+br.Total < r.Designs[0].TotalCost {
				want = append(want, miss{nm.Shortfall, ref.Part})
			}
		}
	}
	slices.SortStableFunc(want, func(a, b miss) int { return cmpCost(a.short, b.short) })
	want = want[:min(len(want), maxNearMisses)]
	if len(r.NearMisses) != len(want) {
		t.Fatalf("%d near misses, the references' searches give %d: %+v", len(r.NearMisses), len(want), want)
	}
	for i, nm := range r.NearMisses {
		ref := ""
		for _, p := range nm.Parts {
			if p.Position == "REF" {
				ref = p.Part
			}
		}
		if math.Abs(nm.Shortfall-want[i].short) > 1e-9*want[i].short || ref != want[i].ref {
			t.Errorf("near miss %d: shortfall %g with %s, want %g with %s", i+1, nm.Shortfall, ref, want[i].short, want[i].ref)
		}
		if nm.TotalCost >= r.Designs[0].TotalCost {
			t.Errorf("near miss %d costs %g, rank 1 %g", i+1, nm.TotalCost, r.Designs[0].TotalCost)
		}
	}
	t.Logf("near misses from %v", want)
}

// TestMergeFailing: the merge of the references' near misses keeps those
// cheaper than the cheapest passing design of any reference, closest
// first whichever reference they use, and lists as cheapest failing only
// designs not already near misses, cheapest first.
func TestMergeFailing(t *testing.T) {
	nm := func(ref string, cost, short float64) NearMiss {
		r1 := "X-" + strconv.FormatFloat(cost, 'g', -1, 64)
		return NearMiss{Design: Design{TotalCost: cost, Parts: []Part{{Position: "R1", Part: r1}, {Position: "REF", Part: ref}}}, Shortfall: short}
	}
	nears := []NearMiss{nm("A", 10, 1.5), nm("A", 11, 1.2), nm("B", 12, 1.1), nm("B", 30, 1.01), nm("C", 9, 2), nm("C", 8, 1.3)}
	cheaps := []NearMiss{nm("A", 5, 4), nm("B", 12, 1.1), nm("C", 6, 3)}
	res := &Result{}
	mergeFailing(res, nears, cheaps, 20, 3)
	var got []string
	for _, m := range res.NearMisses {
		got = append(got, m.Parts[1].Part)
	}
	// By shortfall: B 1.1, A 1.2, C 1.3 (B at 30 costs more than the
	// cheapest passing design, 20).
	if strings.Join(got, " ") != "B A C" || res.NearMisses[0].TotalCost != 12 {
		t.Errorf("near misses %v, want B A C", got)
	}
	if len(res.CheapestFailing) != 1 || res.CheapestFailing[0].TotalCost != 5 {
		t.Errorf("cheapest failing %+v, want the one at 5", res.CheapestFailing)
	}
	mergeFailing(res, nears, nil, math.Inf(1), 3)
	if len(res.NearMisses) != maxNearMisses || res.NearMisses[0].Shortfall != 1.01 {
		t.Errorf("with nothing passing, near misses %+v, want the closest of all", res.NearMisses)
	}
}
