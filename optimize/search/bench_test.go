package search

import (
	"context"
	"math/rand/v2"
	"runtime"
	"testing"

	"plumb/catalog"
	"plumb/optimize/cost"
	"plumb/optimize/family"
	"plumb/optimize/spec"
)

// benchProblem is a gain-10 difference amplifier with worst-case limits
// that only precise grades meet.
func benchProblem() Problem {
	return Problem{
		Circuit: Difference, Gain: 10, SupplyNeg: -15, SupplyPos: 15,
		InMin: -1, InMax: 1, CMMin: -5, CMMax: 5, TMin: -40, TMax: 85, TRef: 25,
		Method: WorstCase,
		Limits: Limits{TotalGainError: 0.005, CMRRdB: 70, DriftPPM: 25, OffsetV: 0.01},
		Build:  cost.Build{Quantity: 500, Attrition: 0.02, PerPlacement: 0.005, PerLineItem: 0.5},
	}
}

// bigParts is an invented catalog of 100,000 resistor rows (60 series
// expanded to their E-series values plus individual rows over 150 grade
// and price groups), 200 networks and 2,000 amplifiers.
func bigParts() (*Parts, int) {
	r := rand.New(rand.NewPCG(7, 7))
	ps := genParts(r, 60, 0, 0, 200, 2000)
	p := benchProblem()
	p.normalize()
	seriesRows := 0
	for i := range ps.Series {
		s, _ := newSpace(context.Background(), &Parts{Series: ps.Series[i : i+1]}, &Problem{Circuit: Difference, Gain: 1, SupplyPos: 1, RMinOhm: 1e-3, RMaxOhm: 1e12, Method: WorstCase, Build: cost.Build{Quantity: 1}}, false)
		for _, g := range s.groups {
			seriesRows += len(g.values)
		}
	}
	extra := genParts(r, 0, 100000-seriesRows, 150, 0, 0)
	ps.Resistors = extra.Resistors
	return ps, seriesRows + len(ps.Resistors)
}

// benchSolve runs solve in the benchmark loop and reports the memory the
// process took from the system (peak, the runtime does not give it back
// within a run) and the size of the search.
func benchSolve(b *testing.B, solve func() (*Result, error)) {
	var res *Result
	b.ReportAllocs()
	for b.Loop() {
		var err error
		if res, err = solve(); err != nil {
			b.Fatal(err)
		}
	}
	var ms runtime.MemStats
	runtime.ReadMemStats(&ms)
	b.ReportMetric(float64(ms.Sys)/1e6, "MB-sys")
	b.ReportMetric(float64(ms.HeapSys)/1e6, "MB-heapsys")
	b.ReportMetric(float64(res.Search.Classes), "classes")
	b.ReportMetric(float64(res.Search.Visited), "visited")
	if len(res.Designs) != 10 {
		b.Fatalf("%d designs", len(res.Designs))
	}
}

func BenchmarkSolveDifferenceTop10(b *testing.B) {
	ps, rows := bigParts()
	b.Logf("%d resistor rows, %d networks, %d amplifiers", rows, len(ps.Networks), len(ps.Amplifiers))
	benchSolve(b, func() (*Result, error) {
		return SolveProblem(context.Background(), ps, benchProblem(), Options{Top: 10})
	})
}

// midParts is a catalog the exhaustive enumerator still finishes.
func midParts() *Parts {
	r := rand.New(rand.NewPCG(9, 9))
	return genParts(r, 20, 10000, 40, 20, 500)
}

// BenchmarkExhaustiveVsSearch runs both over the same prepared space (the
// value options are rebuilt every time, as a fresh search would) and checks
// they agree.
func BenchmarkExhaustiveVsSearch(b *testing.B) {
	ps := midParts()
	p := benchProblem()
	if err := p.normalize(); err != nil {
		b.Fatal(err)
	}
	s, err := newSpace(context.Background(), ps, &p, false)
	if err != nil {
		b.Fatal(err)
	}
	want, err := s.exhaustive(context.Background(), 10)
	if err != nil || len(want) == 0 {
		b.Fatalf("exhaustive: %v, %d designs", err, len(want))
	}
	b.Run("exhaustive", func(b *testing.B) {
		b.ReportAllocs()
		for b.Loop() {
			s.resetOptions()
			if _, err := s.exhaustive(context.Background(), 10); err != nil {
				b.Fatal(err)
			}
		}
		b.ReportMetric(float64(s.classCount()), "classes")
	})
	b.Run("search", func(b *testing.B) {
		b.ReportAllocs()
		for b.Loop() {
			s.resetOptions()
			got, _, err := s.branchAndBound(context.Background(), 10, nil)
			if err != nil {
				b.Fatal(err)
			}
			if len(got) != len(want) || got[0].id != want[0].id || got[0].cost != want[0].cost {
				b.Fatalf("search and enumeration disagree")
			}
		}
	})
}

// benchSpec is benchProblem as a spec, so that Solve also confirms the
// designs with the exact budget.
func benchSpec() *spec.Spec {
	return &spec.Spec{Name: "bench", Families: []string{family.Difference.Name, family.Matched.Name}, Gain: 10,
		Input: spec.Range{Min: -1, Max: 1}, Differential: true, CommonMode: spec.Range{Min: -5, Max: 5},
		Supply: spec.Range{Min: -15, Max: 15}, Temp: spec.Range{Min: -40, Max: 85}, TempRef: 25,
		Limits:   spec.Limits{GainError: 0.005, CMRRdB: 70, GainDrift: 25e-6, OutputOffsetV: 0.01},
		Analysis: spec.Analysis{Method: spec.WorstCase, Sigmas: 3}, Derating: 0.5,
		Build: spec.Build{Quantity: 500, Attrition: 0.02, PlacementCost: 0.005, LineItemCost: 0.5}}
}

// BenchmarkSolveSpecDifferenceTop10 is BenchmarkSolveDifferenceTop10
// through Solve: the search plus the exact budget of every design kept.
func BenchmarkSolveSpecDifferenceTop10(b *testing.B) {
	ps, _ := bigParts()
	snap := &catalog.Snapshot{ResistorSeries: ps.Series, Resistors: ps.Resistors, Networks: ps.Networks, Amplifiers: ps.Amplifiers}
	benchSolve(b, func() (*Result, error) {
		return Solve(context.Background(), snap, benchSpec(), Options{Top: 10})
	})
}

// BenchmarkSolveInAmpTop10 is a gain-100 instrumentation amplifier on
// midParts: one sub-search per second-stage gain, classes the product of
// the first-stage grade pairs, the second stages and the op-amps.
func BenchmarkSolveInAmpTop10(b *testing.B) {
	ps := midParts()
	p := Problem{Circuit: InAmp, Gain: 100, SupplyNeg: -15, SupplyPos: 15, InMin: -0.05, InMax: 0.05, CMMin: -5, CMMax: 5,
		TMin: -40, TMax: 85, TRef: 25, Method: WorstCase,
		Limits: Limits{TotalGainError: 0.01, CMRRdB: 80, DriftPPM: 50, OffsetV: 0.05},
		Build:  cost.Build{Quantity: 500, Attrition: 0.02, PerPlacement: 0.005, PerLineItem: 0.5}}
	benchSolve(b, func() (*Result, error) {
		return SolveProblem(context.Background(), ps, p, Options{Top: 10})
	})
}

// BenchmarkDiagnoseLevelShift solves the level shift whose reference error
// takes its offset budget (refLevelShift): the search finds no design and
// the diagnosis re-solves the spec with limits taken away and relaxed.
func BenchmarkDiagnoseLevelShift(b *testing.B) {
	snap := diagSnapshot()
	s, err := spec.Parse([]byte(refLevelShift), "bench.yaml")
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	for b.Loop() {
		if _, err := Solve(context.Background(), snap, s, Options{}); !IsInfeasible(err) {
			b.Fatalf("error %v, want an infeasible spec", err)
		}
	}
}
