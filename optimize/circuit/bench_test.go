package circuit

import (
	"math/rand/v2"
	"testing"
)

// benchFactorSolve measures one Factor and one full Solve on netlist n with
// resistor values changed each iteration, as the budget layer does.
func benchFactorSolve(b *testing.B, f Family, o Options) {
	n := mustNew(f, o)
	randomize(n, rand.New(rand.NewPCG(1, 1)))
	s := NewSolver(n)
	v := make([]float64, len(n.Nodes))
	base := n.Clone()
	b.ReportAllocs()
	i := 0
	for b.Loop() {
		n.Resistors[i%len(n.Resistors)].Ohm = base.Resistors[i%len(n.Resistors)].Ohm * (1 + 1e-3*float64(i&7))
		if err := s.Factor(); err != nil {
			b.Fatal(err)
		}
		s.Solve(v)
		i++
	}
}

func BenchmarkFactorSolveDifference(b *testing.B) { benchFactorSolve(b, Difference, Options{}) }
func BenchmarkFactorSolveInAmp(b *testing.B)      { benchFactorSolve(b, InAmp, Options{}) }
func BenchmarkFactorSolveInAmpFull(b *testing.B) {
	benchFactorSolve(b, InAmp, Options{SourceImpedance: true, Load: true})
}

// BenchmarkEvaluateDifference is one budget-style evaluation of a difference
// amplifier: one Factor and eight output-only solves (gain, common mode,
// reference, offset and bias terms) with the excitations changed between
// them. Its ns/op sets the evaluations per second per core.
func BenchmarkEvaluateDifference(b *testing.B) {
	n := mustNew(Difference, Options{Load: true})
	s := NewSolver(n)
	vp, vn := n.SourceIndex("vp"), n.SourceIndex("vn")
	b.ReportAllocs()
	sum := 0.0
	for b.Loop() {
		if err := s.Factor(); err != nil {
			b.Fatal(err)
		}
		for k := range 8 {
			n.Sources[vp].V = float64(k)
			n.Sources[vn].V = -float64(k)
			sum += s.SolveOut()
		}
	}
	_ = sum
}

func BenchmarkSolveOutInAmp(b *testing.B) {
	n := mustNew(InAmp, Options{})
	s := NewSolver(n)
	if err := s.Factor(); err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	for b.Loop() {
		s.SolveOut()
	}
}

// BenchmarkFactorDifference and BenchmarkSolveDifference split
// BenchmarkFactorSolveDifference into its two halves.
func BenchmarkFactorDifference(b *testing.B) {
	n := mustNew(Difference, Options{})
	s := NewSolver(n)
	b.ReportAllocs()
	for b.Loop() {
		if err := s.Factor(); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkSolveDifference(b *testing.B) {
	n := mustNew(Difference, Options{})
	s := NewSolver(n)
	if err := s.Factor(); err != nil {
		b.Fatal(err)
	}
	v := make([]float64, len(n.Nodes))
	b.ReportAllocs()
	for b.Loop() {
		s.Solve(v)
	}
}

// BenchmarkFactorAdjointDifference is one Factor, one adjoint solve and the
// transfers of the two inputs, the reference and the op-amp's offset and
// bias currents of a difference amplifier: the budget layer's per-point
// work.
func BenchmarkFactorAdjointDifference(b *testing.B) {
	n := mustNew(Difference, Options{Load: true})
	s := NewSolver(n)
	b.ReportAllocs()
	sum := 0.0
	for b.Loop() {
		if err := s.Factor(); err != nil {
			b.Fatal(err)
		}
		s.Adjoint()
		for k := range n.Sources {
			sum += s.SourceTransfer(k)
		}
		v, p, m := s.AmpTransfers(0)
		sum += v + p + m
	}
	_ = sum
}
