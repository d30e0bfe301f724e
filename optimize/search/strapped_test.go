package search

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"plumb/catalog"
	"plumb/optimize/budget"
	"plumb/optimize/cost"
	"plumb/optimize/family"
	"plumb/optimize/spec"
	"plumb/optimize/strap"
)

// strappedFamily is the registry's family whose parts are strapped.
func strappedFamily(t testing.TB) *family.Family {
	t.Helper()
	for _, f := range family.All() {
		if f.Search.Strappings {
			return f
		}
	}
	t.Fatal("no family with strappings in the registry")
	return nil
}

// genNetwork draws an invented matched network (no real part) of one of
// three shapes: a difference amplifier of ratio r2/r1 with its feedback
// element on FB, four equal elements with a sense pin, or split inputs of
// two elements on each side; element values from a short list, ratio
// tolerance 0.01 % to 0.2 %, tracking 1 to 10 ppm/K.
func genNetwork(r *rand.Rand) *catalog.MatchedNetwork {
	v := func() float64 { return []float64{10e3, 20e3, 40e3, 60e3}[r.IntN(4)] }
	n := &catalog.MatchedNetwork{OpAmpInv: "inv", OpAmpNonInv: "ni", OpAmpOut: "OUT",
		Tolerance: []float64{0.001, 0.005, 0.01}[r.IntN(3)], RatioTolerance: []float64{0.0001, 0.0002, 0.0005, 0.001, 0.002}[r.IntN(5)],
		RatioDriftPPM: []float64{1, 2, 5, 10}[r.IntN(4)]}
	switch r.IntN(3) {
	case 0:
		r1, r2 := v(), v()
		n.Elements = []catalog.MatchedElement{{Name: "Ra", Ohms: r1, A: "IN-", B: "inv"}, {Name: "Rb", Ohms: r2, A: "inv", B: "FB"},
			{Name: "Rc", Ohms: r1, A: "IN+", B: "ni"}, {Name: "Rd", Ohms: r2, A: "ni", B: "REF"}}
		n.Pins = []string{"IN-", "IN+", "FB", "REF", "OUT"}
	case 1:
		x := v()
		n.Elements = []catalog.MatchedElement{{Name: "R1", Ohms: x, A: "IN-", B: "inv"}, {Name: "R2", Ohms: x, A: "inv", B: "SENSE"},
			{Name: "R3", Ohms: x, A: "IN+", B: "ni"}, {Name: "R4", Ohms: x, A: "ni", B: "REF"}}
		n.Pins = []string{"IN-", "IN+", "REF", "SENSE", "OUT"}
	default:
		x := v()
		n.Elements = []catalog.MatchedElement{{Name: "R1", Ohms: x, A: "A-", B: "inv"}, {Name: "R2", Ohms: x, A: "B-", B: "inv"},
			{Name: "R3", Ohms: x, A: "inv", B: "FB"}, {Name: "R4", Ohms: x, A: "A+", B: "ni"}, {Name: "R5", Ohms: x, A: "B+", B: "ni"},
			{Name: "R6", Ohms: x, A: "ni", B: "REF"}}
		n.Pins = []string{"A-", "B-", "FB", "OUT", "A+", "B+", "REF"}
	}
	return n
}

// genStrappedSnapshot is an invented catalog of n strappable amplifiers
// with random op-amp figures and prices, and one without a network.
func genStrappedSnapshot(r *rand.Rand, n int) *catalog.Snapshot {
	snap := &catalog.Snapshot{}
	for i := range n + 1 {
		a := catalog.Amplifier{Part: fmt.Sprintf("ST-%03d", i), Maker: "Quorra Linear", Type: catalog.MatchedAmp, Channels: 1,
			SupplyMinV: 4, SupplyMaxV: 36, CMNegV: 1.5, CMPosV: 1.5, SwingNegV: 1, SwingPosV: 1,
			VosV: []float64{50e-6, 200e-6, 1e-3}[r.IntN(3)], VosDriftVK: 2e-6, IbA: 20e-9, IosA: 2e-9, AolVV: 1e6,
			CMRRdB: []float64{80, 90, 100}[r.IntN(3)], GBWHz: 1e6, NoiseVHz: 30e-9, NoiseAHz: 0.2e-12,
			Gains: []float64{1}, GainErrorMax: 0.001, GainDriftPPM: 5, InNegV: 1.5, InPosV: 1.5, InternalOhm: 20e3,
			Offer: genOffer(r, 1+3*r.Float64(), "USD")}
		if i < n {
			a.Network = genNetwork(r)
		}
		snap.Amplifiers = append(snap.Amplifiers, a)
	}
	return snap
}

// bruteStrapped is the oracle: every strapping of family fam's input kind
// (differential, or single-ended from vp) of every
// amplifier in snap, each budgeted exactly (budget.Evaluate on the design
// a design file would give) and priced (cost.Price); it returns the least
// total cost of a passing design and the designs at that cost
// ("PART STRAPPING"), or +Inf.
func bruteStrapped(t *testing.T, snap *catalog.Snapshot, s *spec.Spec, fam string) (float64, []string) {
	t.Helper()
	b, err := cost.BuildOf(s.Build)
	if err != nil {
		t.Fatal(err)
	}
	lookup := func(part string) (catalog.Kind, any, error) {
		for i := range snap.Amplifiers {
			if snap.Amplifiers[i].Part == part {
				return catalog.KindAmplifier, snap.Amplifiers[i], nil
			}
		}
		return "", nil, catalog.ErrNotFound
	}
	best, at := math.Inf(1), []string(nil)
	for i := range snap.Amplifiers {
		a := &snap.Amplifiers[i]
		if a.Network == nil {
			continue
		}
		list, err := strap.Enumerate(a.Network)
		if err != nil {
			t.Fatal(err)
		}
		kind := strap.Differential
		if family.Lookup(fam).Input != family.Differential {
			kind = strap.FromPlus
		}
		for _, st := range list {
			if st.Kind != kind {
				continue
			}
			d := &spec.Design{Family: fam, Amplifier: spec.AmplifierChoice{Part: a.Part, Strapping: st.Text}}
			if err := d.Resolve(lookup); err != nil {
				t.Fatalf("%s %s: %v", a.Part, st.Text, err)
			}
			res, err := budget.Evaluate(s, d)
			if err != nil {
				t.Fatalf("%s %s: %v", a.Part, st.Text, err)
			}
			if !res.Pass {
				continue
			}
			bd, err := cost.Price(b, []cost.Use{{Part: a.Part, Offer: &a.Offer, Placements: 1}})
			if err != nil {
				t.Fatal(err)
			}
			key := a.Part + " " + st.Text
			switch {
			case bd.Total < best-1e-9:
				best, at = bd.Total, []string{key}
			case math.Abs(bd.Total-best) <= 1e-9:
				at = append(at, key)
			}
		}
	}
	return best, at
}

// TestStrappedMatchesBruteForce is the exhaustive-equivalence property of
// the strapped family: on small generated catalogs and specs (gains 1/2,
// 1, 2 and 3, limits drawn around what the parts reach), the search's
// rank 1 costs what the cheapest passing design of the brute force over
// every strapping of every part costs, and is one of those designs; when
// the brute force finds none the search is infeasible.
func TestStrappedMatchesBruteForce(t *testing.T) {
	fam := strappedFamily(t)
	checkStrappedBruteForce(t, fam.Name, 16, func(r *rand.Rand) string {
		return fmt.Sprintf(`gain: %s
input: {differential: ±1V, common_mode: -3..3V}
limits: {gain_error: %s, cmrr: %s, output_offset: %s}
`, []string{"0.5", "1", "2", "3"}[r.IntN(4)], []string{"0.1%", "0.3%", "1%", "2%"}[r.IntN(4)],
			[]string{"50dB", "60dB", "70dB"}[r.IntN(3)], []string{"3mV", "10mV", "30mV"}[r.IntN(3)])
	})
}

// TestStrappedSingleMatchesBruteForce is the same property for the
// single-ended strappings (family strapped-single): inverting,
// attenuating and non-inverting gains of either sign, with a source
// resistance that the screening must carry.
func TestStrappedSingleMatchesBruteForce(t *testing.T) {
	checkStrappedBruteForce(t, family.StrappedSingle.Name, 17, func(r *rand.Rand) string {
		return fmt.Sprintf(`gain: %s
input: {single_ended: ±1V}
source_impedance: %s
limits: {gain_error: %s, output_offset: %s}
`, []string{"-2", "-1", "-0.5", "0.5", "1", "2", "3"}[r.IntN(7)], []string{"0", "100", "2k"}[r.IntN(3)],
			[]string{"0.1%", "0.3%", "1%", "2%"}[r.IntN(4)], []string{"3mV", "10mV", "30mV"}[r.IntN(3)])
	})
}

// checkStrappedBruteForce runs the exhaustive-equivalence property of a
// strapped family on small generated catalogs and specs (the spec's gain,
// input and limits from gen, drawn around what the parts reach): the
// search's rank 1 costs what the cheapest passing design of the brute
// force over every strapping of every part costs, and is one of those
// designs; when the brute force finds none the search is infeasible.
func checkStrappedBruteForce(t *testing.T, fam string, seed uint64, gen func(r *rand.Rand) string) {
	r := rand.New(rand.NewPCG(seed, 1))
	cases := 12
	if testing.Short() {
		cases = 4
	}
	feasible := 0
	for c := range cases {
		snap := genStrappedSnapshot(r, 4)
		src := fmt.Sprintf(`name: strapped-gen
about: generated strapped case
families: [%s]
supply: ±12V
temperature: {range: -20..70C}
build: {quantity: %d}
`, fam, []int{1, 100, 1000}[r.IntN(3)]) + gen(r)
		s, err := spec.Parse([]byte(src), "gen.yaml")
		if err != nil {
			t.Fatal(err)
		}
		t.Run(fmt.Sprint(c), func(t *testing.T) {
			best, at := bruteStrapped(t, snap, s, fam)
			res, err := Solve(context.Background(), snap, s, Options{Top: 1})
			if math.IsInf(best, 1) {
				if !errors.Is(err, ErrInfeasible) {
					t.Fatalf("brute force finds no design; search: %v, %d designs", err, len(res.Designs))
				}
				return
			}
			if err != nil {
				t.Fatalf("brute force finds %v at %.4g; search: %v", at, best, err)
			}
			feasible++
			d := res.Designs[0]
			var key string
			for _, p := range d.Parts {
				if p.Strapping != "" {
					key = p.Part + " " + p.Strapping
				}
			}
			if math.Abs(d.TotalCost-best) > 1e-9 || !strings.Contains(strings.Join(at, "|"), key) || key == "" {
				t.Errorf("search rank 1 %q at %.6g; brute force %v at %.6g", key, d.TotalCost, at, best)
			}
		})
	}
	// The draw must exercise the ranking, not only the infeasible verdict.
	if feasible < cases/3 {
		t.Errorf("only %d of %d generated cases have a passing design", feasible, cases)
	}
}

// BenchmarkSolveStrapped solves a gain-2 strapped spec on a generated
// catalog of eight strappable parts: the enumeration of each part's
// strappings (once per search), the screening and the exact budgets that
// confirm the designs.
func BenchmarkSolveStrapped(b *testing.B) {
	fam := strappedFamily(b)
	snap := genStrappedSnapshot(rand.New(rand.NewPCG(16, 2)), 8)
	s, err := spec.Parse([]byte(`name: strapped-bench
about: strapped benchmark
families: [`+fam.Name+`]
gain: 2
input: {differential: ±1V, common_mode: -3..3V}
supply: ±12V
temperature: {range: -20..70C}
limits: {gain_error: 1%, cmrr: 50dB}
`), "bench.yaml")
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	for b.Loop() {
		if _, err := Solve(context.Background(), snap, s, Options{Top: 3}); err != nil && !errors.Is(err, ErrInfeasible) {
			b.Fatal(err)
		}
	}
}
