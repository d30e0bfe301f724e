package circuit

import (
	"errors"
	"math"
	"testing"
)

// FuzzParseFamily: any string either parses to a family whose name is the
// trimmed, lower-cased input (read, write, read again gives the same
// family) or fails with ErrFamily.
func FuzzParseFamily(f *testing.F) {
	for _, s := range []string{"inverting", " InAmp ", "level-shift", "", "bridge", "current_sense"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		fam, err := ParseFamily(s)
		if err != nil {
			if !errors.Is(err, ErrFamily) {
				t.Fatalf("ParseFamily(%q) error %v does not wrap ErrFamily", s, err)
			}
			return
		}
		again, err := ParseFamily(string(fam))
		if err != nil || again != fam {
			t.Fatalf("round trip of %q: %q, %v", fam, again, err)
		}
	})
}

// FuzzFactorSolve: arbitrary resistor values, gains and inputs of a loaded
// difference amplifier never panic, Factor fails only with ErrSingular, and
// with sane values and an ideal op-amp the output is the difference-
// amplifier equation (domain notes §2; Franco, from memory).
func FuzzFactorSolve(f *testing.F) {
	f.Add(1e3, 1e4, 1e3, 1e4, 1e6, 1.0, -1.0)
	f.Add(0.0, 1e4, 1e3, 1e4, 1e6, 1.0, -1.0)
	f.Add(math.Inf(1), 1e4, 1e3, math.NaN(), 0.0, 1.0, -1.0)
	f.Add(1e-300, 1e300, 1e3, 1e4, -1e6, 1e300, -1.0)
	f.Fuzz(func(t *testing.T, r1, r2, r3, r4, gain, vp, vn float64) {
		n := mustNew(Difference, Options{Load: true})
		for i, v := range []float64{r1, r2, r3, r4} {
			n.Resistors[n.Resistor("R"+string(rune('1'+i)))].Ohm = v
		}
		n.OpAmps[0].Gain = gain
		n.Sources[n.SourceIndex("vp")].V = vp
		n.Sources[n.SourceIndex("vn")].V = vn
		s := NewSolver(n)
		if err := s.Factor(); err != nil {
			if !errors.Is(err, ErrSingular) {
				t.Fatalf("Factor error %v does not wrap ErrSingular", err)
			}
			return
		}
		v := make([]float64, len(n.Nodes))
		s.Solve(v)
		sane := true
		for _, x := range []float64{r1, r2, r3, r4} {
			sane = sane && x >= 1 && x <= 1e7
		}
		sane = sane && math.IsInf(gain, 1) && math.Abs(vp) < 1e3 && math.Abs(vn) < 1e3
		if sane {
			want := diffVout(r1, r2, r3, r4, vp, vn, 0)
			if relErr(v[n.Out], want, 1e-6) > 1e-9 {
				t.Fatalf("Vout %g, equation %g", v[n.Out], want)
			}
		}
	})
}
