package search

import (
	"context"

	"math"
	"math/rand/v2"
	"plumb/catalog"
	"plumb/optimize/assume"
	"plumb/optimize/budget"
	"plumb/optimize/spec"
	"slices"
	"sort"
	"testing"
)

// TestTieDemoExactRatio is the equal-cost tie of the demo spec
// logger-channel: in the 0.1 % 25 ppm/K series with IM-JH36, 73.2 k/14.7 k
// (ratio 0.2008) and 100 k/20 k (exactly 0.2) cost the same. The first has
// 0.006 dB more CMRR (41.136 against 41.130 dB of 40 dB), the second a
// total gain error of 0.58 % instead of 0.87 % of 1 %: the gain error
// decides, the CMRR difference is far below a tenth of a dB. Rank 1 of
// the class is not 73.2 k/14.7 k, and its gain-error margin is materially
// the better one.
func TestTieDemoExactRatio(t *testing.T) {
	sp := exampleSpace(t, "logger-channel", false)
	ai := -1
	for i := range sp.amps {
		if sp.amps[i].a.Part == "IM-JH36" {
			ai = i
		}
	}
	if ai < 0 {
		t.Fatal("IM-JH36 not in the space")
	}
	type variant struct {
		rg, rf float64
		k      tieKey
		m      metrics
	}
	var found map[[2]float64]variant
	var best classBest
	for ci := range sp.cfgs {
		b, ok := sp.evalClass(ci, ai)
		if !ok || (best.cost > 0 && b.cost >= best.cost) {
			continue
		}
		c := &sp.cfgs[ci]
		opts := sp.options(c)
		vs := map[[2]float64]variant{}
		for i := range opts {
			o := &opts[i]
			if o.cost != opts[b.opt].cost || o.rf2 >= 0 {
				continue
			}
			var m metrics
			sp.evalOpt(c, o, &sp.amps[ai], &m)
			if !sp.pass(&m) {
				continue
			}
			rg, rf, _ := sp.values(c, o)
			vs[[2]float64{rg, rf}] = variant{rg, rf, sp.tie(c, o, &sp.amps[ai], &m), m}
		}
		best, found = b, vs
	}
	near, exact := found[[2]float64{73200, 14700}], found[[2]float64{100e3, 20e3}]
	if near.rg == 0 || exact.rg == 0 {
		t.Fatalf("the cheapest class lacks 73.2k/14.7k or 100k/20k among its equal-cost variants")
	}
	if d := near.m.cmrrDB - exact.m.cmrrDB; !(d > 0 && d < tieStepDB) {
		t.Errorf("CMRR difference %.4f dB, want a negligible advantage of 73.2k/14.7k", d)
	}
	if !exact.k.better(near.k) || near.k.better(exact.k) {
		t.Errorf("73.2k/14.7k (gain error %.4f) ranks with or above 100k/20k (%.4f)", near.m.totalErr, exact.m.totalErr)
	}
	c := &sp.cfgs[best.cfg]
	rg, rf, _ := sp.values(c, &sp.options(c)[best.opt])
	if rg == 73200 {
		t.Errorf("rank 1 of the class is still 73.2k/14.7k")
	}
	if lim := sp.p.Limits.TotalGainError; lim/best.m.totalErr < lim/near.m.totalErr+tieStepFrac*10 {
		t.Errorf("rank 1 %g/%g: gain-error margin %.3f, not materially above 73.2k/14.7k's %.3f", rg, rf, lim/best.m.totalErr, lim/near.m.totalErr)
	}
}

// TestTieRatioAfterMaterialMargins: among equal costs the material
// margins decide first; where they agree, the ratio nearer the gain asked
// for wins, before the fine margins and the stresses, with a gain-error
// limit set or not.
func TestTieRatioAfterMaterialMargins(t *testing.T) {
	key := func(margins []float64, ratio, power float64) tieKey {
		var k tieKey
		for i := range k.material {
			k.material[i], k.fine[i] = math.Inf(1), math.Inf(1)
		}
		for i, v := range margins {
			k.material[i], k.fine[i] = materialMargin(v, false), fineMargin(v)
		}
		sortMargins(k.material[:len(margins)])
		sortMargins(k.fine[:len(margins)])
		k.ratio, k.power = ratio, power
		return k
	}
	cases := []struct {
		name string
		a, b tieKey // a must rank first
	}{
		{"equal margins: the exact ratio", key([]float64{1.13, 1.2}, 0, 0.1), key([]float64{1.13, 1.2}, 2600, 0.1)},
		{"a hair of margin does not outweigh the ratio", key([]float64{1.13, 1.2}, 0, 0.1), key([]float64{1.13, 1.2001}, 2600, 0.1)},
		{"the ratio before the stress", key([]float64{1.5}, 10, 0.3), key([]float64{1.5}, 20, 0.1)},
		{"a material margin before the ratio", key([]float64{1.13, 1.3}, 2600, 0.1), key([]float64{1.13, 1.2}, 0, 0.1)},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if !c.a.better(c.b) || c.b.better(c.a) {
				t.Errorf("a does not rank strictly before b:\na %+v\nb %+v", c.a, c.b)
			}
		})
	}
}

// TestTieKeyOrdering checks on seeded random margin vectors that better is
// a strict weak ordering: irreflexive, asymmetric, transitive, with
// transitive incomparability; and that a stable sort with it gives the same
// order from every shuffle of the input. The vectors are built to tie
// often: margins drawn from a few values a hair apart (below the material
// step) and a few steps apart.
func TestTieKeyOrdering(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 1))
	base := []float64{1.02, 1.13, 1.2, 1.5, 3, math.Inf(1)}
	draw := func() tieKey {
		var k tieKey
		n := 0
		for i := 0; i < 4; i++ {
			v := base[r.IntN(len(base))] * (1 + 1e-4*float64(r.IntN(3)-1))
			k.material[n] = materialMargin(v, i == 0)
			k.fine[n] = fineMargin(v)
			n++
		}
		for i := n; i < numTieMargins; i++ {
			k.material[i], k.fine[i] = math.Inf(1), math.Inf(1)
		}
		sortMargins(k.material[:n])
		sortMargins(k.fine[:n])
		k.power = float64(r.IntN(3)) / 10
		k.voltage = float64(r.IntN(2)) / 10
		k.quant = float64(r.IntN(2))
		k.ratio = float64(r.IntN(2))
		return k
	}
	for round := 0; round < 200; round++ {
		keys := make([]tieKey, 12)
		for i := range keys {
			keys[i] = draw()
		}
		eq := func(a, b tieKey) bool { return !a.better(b) && !b.better(a) }
		for _, a := range keys {
			if a.better(a) {
				t.Fatalf("round %d: irreflexive fails for %+v", round, a)
			}
			for _, b := range keys {
				if a.better(b) && b.better(a) {
					t.Fatalf("round %d: asymmetric fails", round)
				}
				for _, c := range keys {
					if a.better(b) && b.better(c) && !a.better(c) {
						t.Fatalf("round %d: transitivity fails", round)
					}
					if eq(a, b) && eq(b, c) && !eq(a, c) {
						t.Fatalf("round %d: incomparability is not transitive", round)
					}
				}
			}
		}
		// Stable sort of (key, id): the order of ids among equal keys is
		// the input order, so compare the sequence of keys, and the ids
		// of a shuffle sorted with an id tie-break as less does.
		type item struct {
			k  tieKey
			id int
		}
		items := make([]item, len(keys))
		for i := range keys {
			items[i] = item{keys[i], i}
		}
		less := func(a, b item) bool {
			if a.k != b.k {
				return a.k.better(b.k)
			}
			return a.id < b.id
		}
		want := slices.Clone(items)
		sort.SliceStable(want, func(i, j int) bool { return less(want[i], want[j]) })
		for s := 0; s < 5; s++ {
			got := slices.Clone(items)
			r.Shuffle(len(got), func(i, j int) { got[i], got[j] = got[j], got[i] })
			sort.SliceStable(got, func(i, j int) bool { return less(got[i], got[j]) })
			for i := range got {
				if got[i].id != want[i].id {
					t.Fatalf("round %d: sorted order depends on the input order at %d", round, i)
				}
			}
		}
		// Stability: equal keys keep their input order.
		stable := slices.Clone(items)
		sort.SliceStable(stable, func(i, j int) bool { return stable[i].k.better(stable[j].k) })
		for i := 1; i < len(stable); i++ {
			if eq(stable[i-1].k, stable[i].k) && stable[i-1].id > stable[i].id {
				t.Fatalf("round %d: equal keys out of input order", round)
			}
		}
	}
}

// TestMaterialMargin checks the rounding steps: 0.006 dB of CMRR headroom
// is no difference, 0.2 dB is; 0.3 % of a limit is none, 5 % is.
func TestMaterialMargin(t *testing.T) {
	db := func(x float64) float64 { return math.Pow(10, x/20) }
	tests := []struct {
		name string
		a, b float64
		isDB bool
		same bool
	}{
		{"CMRR 1.136 vs 1.130 dB over", db(1.136), db(1.130), true, true},
		{"CMRR 1.1 vs 1.3 dB over", db(1.1), db(1.3), true, false},
		{"gain error 58.0 vs 58.3 % of the limit", 1 / 0.580, 1 / 0.583, false, true},
		{"gain error 58 vs 87 % of the limit", 1 / 0.58, 1 / 0.87, false, false},
		{"no limit", math.Inf(1), math.Inf(1), false, true},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := materialMargin(tc.a, tc.isDB) == materialMargin(tc.b, tc.isDB); got != tc.same {
				t.Errorf("same step %v, want %v", got, tc.same)
			}
		})
	}
	if materialMargin(math.NaN(), false) != 0 || !math.IsInf(fineMargin(math.NaN()), -1) {
		t.Error("NaN margin does not rank last")
	}
}

// exampleSpace is the search space of example spec name on the demo
// catalog (fixture: a spec of testdata on its small catalog), prepared as
// Solve prepares it.
func exampleSpace(t *testing.T, name string, fixture bool) *space {
	t.Helper()
	var sn = demoSnapshot(t)
	var s *spec.Spec
	if fixture {
		sn, s = loadFixture(t, name)
	} else {
		s = loadExample(t, name)
	}
	p, err := FromSpec(s)
	if err != nil {
		t.Fatal(err)
	}
	snap, _ := assume.Snapshot(sn)
	snap = convertSnapshot(snap, converterFor(s, Options{}))
	parts := (&Parts{Series: snap.ResistorSeries, Resistors: snap.Resistors, Networks: snap.Networks, Amplifiers: snap.Amplifiers}).forSearch()
	if err := p.normalize(); err != nil {
		t.Fatal(err)
	}
	sp, err := newSpace(context.Background(), parts, &p, true)
	if err != nil {
		t.Fatal(err)
	}
	return sp
}

// TestTieHeadroom: two op-amps of the same price and figures but for their
// output swing, one within 1.5 V of V+ and the other within 1 V. A
// non-inverting gain of 10 from 0..1 V on ±12 V must reach 10 V: the
// first leaves 12 - 1.5 - 10 = 0.5 V of headroom (margin 1 + 0.5/0.1 = 6,
// the budget's headroom margin), the second 1 V (margin 11); hand
// arithmetic, at the nominal gain (the exact budget's worst case takes a
// little more). Every other margin is the same, so the second must rank
// first although the catalog lists it second, and the exact budget's
// headroom of rank 1 is the larger.
func TestTieHeadroom(t *testing.T) {
	snap := diagSnapshot()
	tight := snap.Amplifiers[0]
	tight.Part, tight.SwingPosV = "DX-OA0", 1.5
	snap.Amplifiers = append([]catalog.Amplifier{tight}, snap.Amplifiers...)
	s := mustParseSpec(t, `name: head
about: equal-cost amplifiers that differ in output swing
family: noninverting
gain: 10
input: {single_ended: 0..1V}
supply: ±12V
temperature: {range: 20..30C}
limits: {gain_error: 5%}
build: {quantity: 100}
`)
	res, err := Solve(context.Background(), snap, s, Options{Top: 2})
	if err != nil {
		t.Fatal(err)
	}
	amp := func(d *Design) string { return d.Parts[len(d.Parts)-1].Part }
	if len(res.Designs) < 2 || amp(&res.Designs[0]) != "DX-OA1" || amp(&res.Designs[1]) != "DX-OA0" {
		var got []string
		for i := range res.Designs {
			got = append(got, amp(&res.Designs[i])+" "+units4(res.Designs[i].UnitCost))
		}
		t.Fatalf("ranks %q, want DX-OA1 (1 V of headroom) before DX-OA0 (0.5 V) at the same cost", got)
	}
	if res.Designs[0].UnitCost != res.Designs[1].UnitCost {
		t.Fatalf("costs %g and %g, want a tie", res.Designs[0].UnitCost, res.Designs[1].UnitCost)
	}
	h0, ok0 := findLimit(res.Designs[0].Limits, budget.LimitHeadroom)
	h1, ok1 := findLimit(res.Designs[1].Limits, budget.LimitHeadroom)
	if !ok0 || !ok1 || !(h0.Value > h1.Value+0.4) || !(h1.Value <= 0.5) {
		t.Errorf("headroom %+v then %+v, want near 1 V then at most 0.5 V", h0, h1)
	}
}
