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
// amplifier at one corner: factor, gain, common-mode gain, base output and
// the op-amp's Vos and bias transfers.
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

// BenchmarkMonteCarlo100k runs 100,000 Monte Carlo trials of a difference
// amplifier over -40..85 C: each trial draws every parameter and solves
// the reference temperature and both range ends (three corner
// evaluations), then sorts the samples for the percentiles.
func BenchmarkMonteCarlo100k(b *testing.B) {
	e := benchEvaluator(b, "monte-carlo")
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := e.MonteCarlo(100000, 1, false); err != nil {
			b.Fatal(err)
		}
	}
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
