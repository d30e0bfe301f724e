package budget

import (
	"strings"
	"testing"

	"plumb/optimize/spec"
)

func benchEvaluator(b testing.TB, method string) *Evaluator {
	s := mustSpec(b, strings.Replace(diffSpec(1, method), "25..25C", "-40..85C", 1))
	e, err := NewEvaluator(s, spec.Difference, spec.Options{})
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

// BenchmarkEvaluateDifferenceCorner is one exact evaluation of a difference
// amplifier (four discrete resistors, one op-amp with every error term,
// -40..85 C) at one corner, Corner(x, 85) with every parameter at +1: sum
// the parameters into the resistor values, factor the nodal matrix, solve
// gain, common-mode gain and base output (three solves), then CMRR and the
// output offset from the amplifier transfers solved once per candidate.
// This is the per-point work a Monte Carlo trial does at each of its three
// temperature points; the same point is repeated every iteration, so caches
// and branch predictors are as warm as they get.
func BenchmarkEvaluateDifferenceCorner(b *testing.B) {
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
// Each trial draws every parameter (truncated normal, by rejection), sums
// them into the resistor values once and solves the reference temperature
// and both range ends exactly (three factorizations, nine solves), then
// checks the limits; after the loop come the yields and the percentiles
// of five metrics (by selectSampled, about one pass each). All of it
// is timed: ns/trial (ns/op / 100,000) is the whole call per trial, the
// figure to compare with the corner's ns/op (target: at most 3 corners per
// trial). The first run also allocates the sample buffer, later runs reuse
// it.
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
