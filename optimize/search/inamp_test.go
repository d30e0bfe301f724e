package search

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"reflect"
	"testing"

	"plumb/catalog"
	"plumb/optimize/spec"
)

// genInAmpProblem makes a random instrumentation-amplifier requirement:
// a small differential signal on a common mode inside the rails.
func genInAmpProblem(r *rand.Rand) Problem {
	p := genProblem(r)
	p.Circuit = InAmp
	p.Gain = []float64{3, 10, 30, 100}[r.IntN(4)]
	span := p.SupplyPos - p.SupplyNeg
	mid := (p.SupplyPos + p.SupplyNeg) / 2
	p.Ref = mid
	p.InMin, p.InMax = -0.1*span/(2*p.Gain), 0.1*span/(2*p.Gain)
	p.CMMin, p.CMMax = mid-0.05*span, mid+0.05*span
	p.ZinMinOhm = 0
	// Offset and noise scale with the gain; the limits follow.
	p.Limits.OffsetV *= p.Gain
	p.Limits.OffsetDriftVK *= p.Gain
	p.Limits.NoiseDensity *= p.Gain
	p.Limits.NoiseRMS *= p.Gain
	return p
}

// TestInAmpBranchAndBoundMatchesExhaustive is the property test of the
// instrumentation amplifier: in every second-stage sub-search of many
// seeded random catalogs and requirements, the branch and bound returns
// the same top-N classes, in the same order, as the enumeration of every
// value option of every class.
func TestInAmpBranchAndBoundMatchesExhaustive(t *testing.T) {
	feasible, spaces, classes, visited := 0, 0, 0, 0
	for seed := uint64(1); seed <= 150; seed++ {
		r := rand.New(rand.NewPCG(seed, 7))
		parts := genParts(r, r.IntN(3), r.IntN(80), 1+r.IntN(4), r.IntN(5), 1+r.IntN(8))
		p := genInAmpProblem(r)
		combos := r.IntN(2) == 0
		if err := p.normalize(); err != nil {
			t.Fatalf("seed %d: %v", seed, err)
		}
		n := 1 + r.IntN(5)
		for _, k2 := range inampStage2Gains(parts, &p) {
			q := p
			q.k2 = k2
			s, err := newSpace(context.Background(), parts, &q, combos)
			if err != nil {
				t.Fatalf("seed %d: %v", seed, err)
			}
			spaces++
			want, err := s.exhaustive(context.Background(), n)
			if err != nil {
				t.Fatal(err)
			}
			got, st, err := s.branchAndBound(context.Background(), n, nil)
			if err != nil {
				t.Fatal(err)
			}
			classes += st.classes
			visited += st.visited
			if len(want) > 0 {
				feasible++
			}
			sameTop(t, fmt.Sprintf("seed %d k2 %g", seed, k2), got, want)
		}
	}
	if feasible < spaces/4 {
		t.Errorf("only %d of %d random sub-searches are feasible; the generator is too strict", feasible, spaces)
	}
	t.Logf("%d sub-searches, %d feasible; the search visited %d of %d classes", spaces, feasible, visited, classes)
}

// TestInAmpAPIMatchesExhaustive compares the public entry points on the
// merged in-amp search: the same ranked designs and parts.
func TestInAmpAPIMatchesExhaustive(t *testing.T) {
	found := 0
	for seed := uint64(1); seed <= 40; seed++ {
		r := rand.New(rand.NewPCG(seed, 8))
		parts := genParts(r, r.IntN(3), r.IntN(80), 1+r.IntN(4), r.IntN(5), 1+r.IntN(8))
		p := genInAmpProblem(r)
		opt := Options{Top: 1 + r.IntN(5), Combos: r.IntN(2) == 0}
		got, gerr := SolveProblem(context.Background(), parts, p, opt)
		want, werr := Exhaustive(context.Background(), parts, p, opt)
		if (gerr == nil) != (werr == nil) {
			t.Fatalf("seed %d: errors %v and %v", seed, gerr, werr)
		}
		if gerr != nil {
			continue
		}
		found++
		if len(got.Designs) != len(want.Designs) {
			t.Fatalf("seed %d: %d designs, exhaustive %d", seed, len(got.Designs), len(want.Designs))
		}
		for i := range want.Designs {
			g, w := got.Designs[i], want.Designs[i]
			if g.Family != w.Family || g.TotalCost != w.TotalCost || !reflect.DeepEqual(g.Parts, w.Parts) {
				t.Errorf("seed %d rank %d: %s %.4f, exhaustive %s %.4f", seed, i+1, g.Family, g.TotalCost, w.Family, w.TotalCost)
			}
			if i > 0 && g.TotalCost < got.Designs[i-1].TotalCost {
				t.Errorf("seed %d rank %d: cheaper than rank %d", seed, i+1, i)
			}
		}
	}
	if found < 10 {
		t.Errorf("only %d of 40 random in-amp cases have designs", found)
	}
}

// TestInAmpBoundIsLowerBound checks on random in-amp classes that the
// bound the search prunes with is never worse than a design of the class.
func TestInAmpBoundIsLowerBound(t *testing.T) {
	r := rand.New(rand.NewPCG(5, 5))
	tols := []float64{0.0001, 0.001, 0.01, 0.05}
	for i := 0; i < 5000; i++ {
		k2 := []float64{1, 2, 10}[r.IntN(3)]
		s := testSpace(InAmp, k2*(1.1+500*r.Float64()), []Method{WorstCase, RSS}[r.IntN(2)])
		s.k2 = k2
		s.p.k2 = s.k2
		s.k = s.p.ratio()
		s.p.CalGain, s.p.CalOffset = r.IntN(4) == 0, r.IntN(4) == 0
		s.p.SourceOhm = 1000 * r.Float64()
		st := &stage2{r1: 1e4, r2: 1e4 * s.k2}
		if r.IntN(2) == 0 {
			t2 := tols[r.IntN(4)]
			st.g = discreteGrades(t2, 50*r.Float64(), 0.001*r.Float64(), t2, 50*r.Float64(), 0.001*r.Float64(), s.dT)
		} else {
			st.g = networkGrades(tols[r.IntN(4)], 10*r.Float64(), s.dT)
		}
		g := discreteGrades(tols[r.IntN(4)], 100*r.Float64(), 0.002*r.Float64(), tols[r.IntN(4)], 100*r.Float64(), 0.002*r.Float64(), s.dT)
		g.s2 = st
		a := &amp{a: &catalog.Amplifier{AolVV: math.Pow(10, 3+4*r.Float64()), VosV: 1e-3 * r.Float64(), VosDriftVK: 1e-5 * r.Float64(),
			IbA: 1e-7 * r.Float64(), IosA: 1e-8 * r.Float64(), NoiseVHz: 1e-8 * r.Float64(), NoiseAHz: 1e-12 * r.Float64(), GBWHz: 1e6}, ainv: 1e-4 * r.Float64()}
		k0 := s.k * (1 + s.w*(2*r.Float64()-1))
		rp := 1e3 + 1e5*r.Float64()
		var m, lb metrics
		s.eval(&g, k0, rp, a, &m)
		s.bound(&g, a, &lb)
		if !below(&lb, &m) {
			t.Fatalf("case %d (G %.3f, k2 %g, k0 %.5f): bound %+v is not below design %+v", i, s.p.Gain, s.k2, k0, lb, m)
		}
	}
}

// TestInAmpCheckValues checks the screening model against textbook
// figures of the three-op-amp instrumentation amplifier.
func TestInAmpCheckValues(t *testing.T) {
	ideal := &amp{a: &catalog.Amplifier{}}
	tests := []struct {
		name     string
		gain, k0 float64
		t2       float64 // second-stage resistor tolerance
		wantG    float64
		wantCMRR float64 // dB
	}{
		// G = 1 + 2Rf/Rg: Rf = 100k, Rg = 1k gives 201 (domain notes §2;
		// S. Franco, instrumentation-amplifier section, from memory).
		// Resistor-limited CMRR of the unity second stage with 0.1 %
		// parts is (1+1)/(4 x 0.001) = 500 (Franco, difference-amplifier
		// chapter, from memory), raised by the first stage's gain:
		// 500 x 201 = 100500, 100.04 dB.
		{"gain 201, 0.1 % second stage", 201, 100, 0.001, 201, 20 * math.Log10(500*201)},
		// Rf = Rg/2 (k0 = 0.5): G1 = 2; 1 % second stage: 50 x 2 = 100, 40 dB
		// (Franco: unity gain with 1 % resistors gives 50, about 34 dB).
		{"gain 2, 1 % second stage", 2, 0.5, 0.01, 2, 40},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s := testSpace(InAmp, tc.gain, WorstCase)
			s.k2, s.dT = 1, 0
			g := discreteGrades(0, 0, 0, 0, 0, 0, 0)
			g.s2 = &stage2{r1: 1e4, r2: 1e4, g: discreteGrades(tc.t2, 0, 0, tc.t2, 0, 0, 0)}
			var m metrics
			s.eval(&g, tc.k0, 1e5*1e3/(1e5+1e3), ideal, &m)
			if !within(m.gain, tc.wantG, 1e-12) {
				t.Errorf("gain %.6g, want %.6g", m.gain, tc.wantG)
			}
			// The exact |Acm/Adm| differs from (1+G)/(4t) at second order.
			if math.Abs(m.cmrrDB-tc.wantCMRR) > 0.1 {
				t.Errorf("CMRR %.3f dB, want %.3f dB", m.cmrrDB, tc.wantCMRR)
			}
		})
	}
}

// TestInAmpPackages: three op-amps need three single parts, two duals or
// one quad (common practice).
func TestInAmpPackages(t *testing.T) {
	p := &Problem{Circuit: InAmp}
	for _, tc := range []struct {
		name     string
		channels int
		want     int
	}{{"single", 1, 3}, {"dual", 2, 2}, {"quad", 4, 1}, {"unknown count", 0, 3}} {
		if got := packages(p, &catalog.Amplifier{Channels: tc.channels}); got != tc.want {
			t.Errorf("%s: %d packages, want %d", tc.name, got, tc.want)
		}
	}
	if got := packages(&Problem{Circuit: Difference}, &catalog.Amplifier{Channels: 2}); got != 1 {
		t.Errorf("difference stage: %d packages, want 1", got)
	}
}

// TestSolveLoadCellExample solves the in-amp example spec on the demo
// catalog: designs ranked by cost, each confirmed by the exact budget,
// every one an in-amp with Rf1 = Rf2 and R1 = R3, R2 = R4.
func TestSolveLoadCellExample(t *testing.T) {
	snap := demoSnapshot(t)
	s, err := spec.Load("../../data/examples/load-cell.yaml")
	if err != nil {
		t.Fatal(err)
	}
	res, err := Solve(context.Background(), snap, s, Options{Top: 3})
	if err != nil {
		t.Fatalf("%v: %+v", err, res.Infeasible)
	}
	for i, d := range res.Designs {
		vals := map[string]float64{}
		for _, pt := range d.Parts {
			vals[pt.Position] = pt.ValueOhm
		}
		if vals["Rf1"] != vals["Rf2"] || vals["R1"] != vals["R3"] || vals["R2"] != vals["R4"] || vals["Rg"] == 0 {
			t.Errorf("rank %d: values %v", i+1, vals)
		}
		g := (1 + 2*vals["Rf1"]/vals["Rg"]) * vals["R2"] / vals["R1"]
		if !within(g, 200, 0.05) {
			t.Errorf("rank %d: gain %.4g, want 200 within the 5 %% calibration window", i+1, g)
		}
		if i > 0 && d.TotalCost < res.Designs[i-1].TotalCost {
			t.Errorf("rank %d cheaper than rank %d", i+1, i)
		}
		br, err := res.ExplainN(i + 1)
		if err != nil {
			t.Fatal(err)
		}
		if !br.Pass {
			t.Errorf("rank %d fails the exact budget", i+1)
		}
	}
}

// demoSnapshot reads the demo catalog the example specs are written for.
func demoSnapshot(t testing.TB) *catalog.Snapshot {
	t.Helper()
	f, err := os.Open("../../data/demo.json")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	snap, err := catalog.ReadSnapshotJSON(f)
	if err != nil {
		t.Fatal(err)
	}
	return snap
}
