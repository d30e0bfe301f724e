package circuit

import (
	"math"
	"math/rand/v2"
	"testing"
)

// adjointOut factors n, solves its adjoint and returns V(out) as the sum of
// every excitation times its transfer.
func adjointOut(n *Netlist) (float64, error) {
	s := NewSolver(n)
	if err := s.Factor(); err != nil {
		return 0, err
	}
	s.Adjoint()
	out := 0.0
	for k, v := range n.Sources {
		out += s.SourceTransfer(k) * v.V
	}
	for k, i := range n.Currents {
		out += s.CurrentTransfer(k) * i.A
	}
	for k, a := range n.OpAmps {
		tv, tp, tm := s.AmpTransfers(k)
		out += tv*a.Vos + tp*a.IbPlus + tm*a.IbMinus
	}
	return out, nil
}

// unitExcitation is one excitation of a netlist: a copy with it at 1 (V or
// A) and every other excitation at 0, and the solver's transfer for it.
type unitExcitation struct {
	name     string
	perAmp   bool // V/A (a current) rather than V/V
	net      *Netlist
	transfer func(*Solver) float64
}

// unitExcitations lists every excitation of n.
func unitExcitations(n *Netlist) []unitExcitation {
	zero := func() *Netlist {
		c := n.Clone()
		for i := range c.Sources {
			c.Sources[i].V = 0
		}
		for i := range c.Currents {
			c.Currents[i].A = 0
		}
		for i := range c.OpAmps {
			c.OpAmps[i].Vos, c.OpAmps[i].IbPlus, c.OpAmps[i].IbMinus = 0, 0, 0
		}
		return c
	}
	var out []unitExcitation
	for k := range n.Sources {
		c := zero()
		c.Sources[k].V = 1
		out = append(out, unitExcitation{"source " + n.Sources[k].Name, false, c, func(s *Solver) float64 { return s.SourceTransfer(k) }})
	}
	for k := range n.Currents {
		c := zero()
		c.Currents[k].A = 1
		out = append(out, unitExcitation{"current " + n.Currents[k].Name, true, c, func(s *Solver) float64 { return s.CurrentTransfer(k) }})
	}
	for k := range n.OpAmps {
		name := n.OpAmps[k].Name
		c := zero()
		c.OpAmps[k].Vos = 1
		out = append(out, unitExcitation{name + " Vos", false, c, func(s *Solver) float64 { v, _, _ := s.AmpTransfers(k); return v }})
		c = zero()
		c.OpAmps[k].IbPlus = 1
		out = append(out, unitExcitation{name + " Ib+", true, c, func(s *Solver) float64 { _, v, _ := s.AmpTransfers(k); return v }})
		c = zero()
		c.OpAmps[k].IbMinus = 1
		out = append(out, unitExcitation{name + " Ib-", true, c, func(s *Solver) float64 { _, _, v := s.AmpTransfers(k); return v }})
	}
	return out
}

// TestAdjointAgainstGonumMNA checks every transfer of the adjoint solve
// against the output of gonum's full MNA solve (an independent
// implementation, see fullMNA) with that one excitation at 1, on 200
// seeded random circuits per family over every option combination; and
// that the transfers, applied to the random excitations, give the output
// the forward solve finds (superposition of a linear circuit).
func TestAdjointAgainstGonumMNA(t *testing.T) {
	const cases = 200
	const tol = 1e-9
	r := rand.New(rand.NewPCG(5, 8))
	for _, f := range Families() {
		t.Run(string(f), func(t *testing.T) {
			worst := 0.0
			for c := range cases {
				n := randomCase(f, c, r)
				s := NewSolver(n)
				if err := s.Factor(); err != nil {
					t.Fatalf("case %d: %v", c, err)
				}
				s.Adjoint()
				ex := unitExcitations(n)
				want := make([]float64, len(ex))
				var scale [2]float64 // V/V and V/A transfers, each against its own scale
				for i, u := range ex {
					v, err := fullMNA(u.net)
					if err != nil {
						t.Fatalf("case %d %s: %v", c, u.name, err)
					}
					want[i] = v[u.net.Out]
					k := 0
					if u.perAmp {
						k = 1
					}
					scale[k] = math.Max(scale[k], math.Abs(want[i]))
				}
				for i, u := range ex {
					k := 0
					if u.perAmp {
						k = 1
					}
					got := u.transfer(s)
					e := relErr(got, want[i], 1e-9*scale[k])
					worst = math.Max(worst, e)
					if e > tol {
						t.Errorf("case %d %s: adjoint %.15g, gonum %.15g (rel %.2g)", c, u.name, got, want[i], e)
					}
				}
				// Superposition: Σ transfer x excitation = V(out) of the forward solve.
				out, err := adjointOut(n)
				if err != nil {
					t.Fatal(err)
				}
				v := make([]float64, len(n.Nodes))
				s.Solve(v)
				vmax := 0.0
				for _, x := range v {
					vmax = math.Max(vmax, math.Abs(x))
				}
				if e := relErr(out, v[n.Out], vmax); e > 1e-12 {
					t.Errorf("case %d: Σ transfers x excitations %.15g, Solve %.15g (rel %.2g)", c, out, v[n.Out], e)
				}
			}
			t.Logf("worst relative difference %.3g over %d cases", worst, cases)
		})
	}
}

// TestAdjointOutputDriven covers an output fixed by a source (only that
// source reaches it, with transfer 1) and a plain divider by two (Ohm's
// law).
func TestAdjointOutputDriven(t *testing.T) {
	n := &Netlist{Nodes: []string{"0", "a", "b"},
		Resistors: []Resistor{{Name: "R1", A: 1, B: 2, Ohm: 1e3}, {Name: "R2", A: 2, B: 0, Ohm: 1e3}},
		Sources:   []Source{{Name: "v", Node: 1}}, Out: 1}
	s := NewSolver(n)
	if err := s.Factor(); err != nil {
		t.Fatal(err)
	}
	s.Adjoint()
	if got := s.SourceTransfer(0); got != 1 {
		t.Errorf("transfer of the source driving the output = %g, want 1", got)
	}
	n.Out = 2
	s = NewSolver(n)
	if err := s.Factor(); err != nil {
		t.Fatal(err)
	}
	s.Adjoint()
	if got := s.SourceTransfer(0); math.Abs(got-0.5) > 1e-15 {
		t.Errorf("divider transfer = %.17g, want 0.5", got)
	}
}

// TestAdjointPanics: Adjoint needs a successful Factor.
func TestAdjointPanics(t *testing.T) {
	s := NewSolver(mustNew(Difference, Options{}))
	defer func() {
		if recover() == nil {
			t.Error("Adjoint before Factor: no panic")
		}
	}()
	s.Adjoint()
}
