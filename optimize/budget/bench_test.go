package budget

import (
	"strings"
	"testing"

	"plumb/optimize/family"
	"plumb/optimize/spec"
)

func benchEvaluator(b testing.TB, method string) *Evaluator {
	s := mustSpec(b, strings.Replace(diffSpec(1, method), "25..25C", "-40..85C", 1))
	e, err := NewEvaluator(s, family.Difference.Name, spec.Options{})
	if err != nil {
		b.Fatal(err)
	}
	amp := idealAmpFigures()
	amp.VosV, amp.IbA, amp.IosA, amp.VosDriftVK, amp.CMRRdB, amp.AolVV = 1e-3, 1e-9, 1e-10, 5e-6, 90, 1e5
	f := Fig{Label: "b", Ohm: 10e3, Tolerance: 0.001, TCR: 25e-6}
	if err := e.SetCandidate(&Candidate{Figs: []Fig{f, f, f, f}, Amp: &amp}); err != nil {
		b.Fatal(err)
	}
	return e
}

// BenchmarkEvaluateDifferenceCorner is one exact evaluation of every
// varying metric of a difference amplifier (four discrete resistors, one
// op-amp with every error term, -40..85 C) at one tolerance corner, every
// parameter at +1: the work the worst-case method does per corner it
// enumerates. It sums the parameters into the resistor values once, then at
// each temperature point (25 C as built, -40 C, 85 C; gain and offset drift
// need all three) writes the values, factors the nodal matrix and solves
// the adjoint system once for the signal, common-mode, reference and
// amplifier transfers; then gain error, CMRR, output offset, gain drift and
// offset drift. The same corner is repeated every iteration, so caches and
// branch predictors are as warm as they get. Target: at least 10^6 per
// second per core, at most 1000 ns/op.
func BenchmarkEvaluateDifferenceCorner(b *testing.B) {
	e := benchEvaluator(b, "worst-case")
	x := make([]float64, e.NumParams())
	for i := range x {
		x[i] = 1
	}
	var a agg
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if err := e.metricsAt(x, false, &a); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkEvaluateDifferencePoint is the same stage at the same corner at
// one temperature point only, Corner(x, 85): gain, CMRR and output offset
// without the drifts, which need the other temperature points. A Monte
// Carlo trial does this work three times over, plus the draws.
func BenchmarkEvaluateDifferencePoint(b *testing.B) {
	e := benchEvaluator(b, "worst-case")
	x := make([]float64, e.NumParams())
	for i := range x {
		x[i] = 1
	}
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, _, _, err := e.Corner(x, 85); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkMonteCarlo100k is one MonteCarlo call of 100,000 trials on the
// same stage as BenchmarkEvaluateDifferenceCorner, without keeping samples.
// Each trial draws every parameter (truncated normal, by rejection), then
// does a corner's work at the drawn point (three factorizations, three
// adjoint solves) and checks the limits; after the loop come the yields and
// the percentiles of five metrics. All of it is timed: ns/trial (ns/op /
// 100,000) is the whole call per trial, the figure to compare with the
// corner's ns/op (target: at most 3 corners per trial). The first run also
// allocates the sample buffer, later runs reuse it.
func BenchmarkMonteCarlo100k(b *testing.B) {
	const trials = 100000
	e := benchEvaluator(b, "monte-carlo")
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := e.MonteCarlo(trials, 1, false); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N*trials), "ns/trial")
}

// BenchmarkScoreWorstCase is the search's call: one candidate scored under
// the worst-case method with sign-guided corners.
func BenchmarkScoreWorstCase(b *testing.B) {
	e := benchEvaluator(b, "worst-case")
	amp := *e.c.Amp
	c := &Candidate{Figs: append([]Fig(nil), e.c.Figs...), Amp: &amp}
	var sc Score
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if err := e.Score(c, &sc); err != nil {
			b.Fatal(err)
		}
	}
}
