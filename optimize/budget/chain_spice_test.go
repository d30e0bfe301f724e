package budget

import (
	"math"
	"testing"

	"plumb/optimize/circuit"
	"plumb/optimize/family"
)

// cascadeNetlist joins two stage netlists into one: the second stage's
// elements and nodes are renamed with the prefix "s2_", its source "vp" is
// removed and its node joined to the first stage's output (the first
// stage drives the second's non-inverting input), and its output is the
// whole circuit's.
func cascadeNetlist(t *testing.T, n1, n2 *circuit.Netlist) *circuit.Netlist {
	t.Helper()
	out := n1.Clone()
	vp := n2.SourceIndex("vp")
	if vp < 0 {
		t.Fatal("second stage has no vp source")
	}
	idx := make([]int, len(n2.Nodes))
	for i, name := range n2.Nodes {
		switch {
		case i == 0:
			idx[i] = 0
		case i == n2.Sources[vp].Node:
			idx[i] = n1.Out
		default:
			out.Nodes = append(out.Nodes, "s2_"+name)
			idx[i] = len(out.Nodes) - 1
		}
	}
	for _, r := range n2.Resistors {
		out.Resistors = append(out.Resistors, circuit.Resistor{Name: "s2_" + r.Name, A: idx[r.A], B: idx[r.B], Ohm: r.Ohm})
	}
	for k, s := range n2.Sources {
		if k != vp {
			out.Sources = append(out.Sources, circuit.Source{Name: "s2_" + s.Name, Node: idx[s.Node], V: s.V})
		}
	}
	for _, c := range n2.Currents {
		out.Currents = append(out.Currents, circuit.CurrentSource{Name: "s2_" + c.Name, From: idx[c.From], To: idx[c.To], A: c.A})
	}
	for _, a := range n2.OpAmps {
		a.Name, a.Plus, a.Minus, a.Out = "s2_"+a.Name, idx[a.Plus], idx[a.Minus], idx[a.Out]
		out.OpAmps = append(out.OpAmps, a)
	}
	out.Out = idx[n2.Out]
	return out
}

// solveOut solves n with the project's solver and returns V(out).
func solveOut(t *testing.T, n *circuit.Netlist) float64 {
	t.Helper()
	s := circuit.NewSolver(n)
	if err := s.Factor(); err != nil {
		t.Fatal(err)
	}
	return s.SolveOut()
}

// TestCascadeAgainstNgspice builds an in-amp (gain about 100, mismatched
// resistors, offsets in every op-amp) and a difference stage (gain about
// 1.8 on a 2.048 V reference, mismatched) as the circuit package builds
// them, joins them into one netlist and hands it to ngspice (an
// independent simulator). Its output must equal the second stage solved
// alone on the first stage's solved output, which is what the chain's
// budget rests on (the cascade: stage 2 acts on stage 1's whole output,
// errors included), and the chain's output offset must be G2·o1 + o2
// with G2 the second stage's actual gain, inside the worst-case cascade
// bound |G2|(1 + e2)|o1| + |o2| of budget.Cascade.
func TestCascadeAgainstNgspice(t *testing.T) {
	path := ngspicePath(t)
	n1, err := circuit.New(circuit.Family(family.InAmp.Name), circuit.Options{})
	if err != nil {
		t.Fatal(err)
	}
	n2, err := circuit.New(circuit.Family(family.Difference.Name), circuit.Options{})
	if err != nil {
		t.Fatal(err)
	}
	set := func(n *circuit.Netlist, vals map[string]float64) {
		for name, v := range vals {
			k := n.Resistor(name)
			if k < 0 {
				t.Fatalf("no position %s in %s (has %v)", name, n.Family, n.Positions())
			}
			n.Resistors[k].Ohm = v
		}
	}
	// Gain 1 + 2·49.9k/1.01k ≈ 99.8 with a 0.1 % mismatch in the second stage.
	set(n1, map[string]float64{"Rf1": 49.9e3, "Rf2": 49.95e3, "Rg": 1.01e3, "R1": 10e3, "R2": 10.01e3, "R3": 10e3, "R4": 9.99e3})
	set(n2, map[string]float64{"R1": 20e3, "R2": 36.02e3, "R3": 20.01e3, "R4": 36e3})
	for i := range n1.OpAmps {
		n1.OpAmps[i].Gain, n1.OpAmps[i].Vos = 1e5, []float64{50e-6, -30e-6, 80e-6}[i%3]
	}
	n2.OpAmps[0].Gain, n2.OpAmps[0].Vos = 1e5, -200e-6
	src := func(n *circuit.Netlist, name string, v float64) {
		k := n.SourceIndex(name)
		if k < 0 {
			t.Fatalf("no source %s in %s", name, n.Family)
		}
		n.Sources[k].V = v
	}
	src(n1, "vref", 0)
	src(n2, "vn", 0)
	src(n2, "vref", 2.048)
	at := func(vd float64) (chain, composed, v1 float64) {
		src(n1, "vp", 2.5+vd/2)
		src(n1, "vn", 2.5-vd/2)
		v1 = solveOut(t, n1)
		src(n2, "vp", v1)
		composed = solveOut(t, n2)
		got, err := circuit.RunNgspice(path, t.TempDir(), cascadeNetlist(t, n1, n2))
		if err != nil {
			t.Fatal(err)
		}
		chain, ok := got["s2_out"]
		if !ok {
			t.Fatalf("ngspice printed no s2_out: %v", got)
		}
		return chain, composed, v1
	}
	for _, vd := range []float64{-10e-3, 0, 10e-3} {
		chain, composed, _ := at(vd)
		if math.Abs(chain-composed) > 1e-7 {
			t.Errorf("input %g V: ngspice chain output %.9g, stage 2 on stage 1's output %.9g", vd, chain, composed)
		}
	}
	// Offsets: stage 1's output at zero input, stage 2's with its input at
	// zero, and stage 2's actual gain from two solves.
	_, out0, o1 := at(0)
	src(n2, "vp", 0)
	o2 := solveOut(t, n2) - 2.048
	src(n2, "vp", 1)
	g2 := solveOut(t, n2) - 2.048 - o2
	off := out0 - 2.048
	if math.Abs(off-(g2*o1+o2)) > 1e-9 {
		t.Errorf("chain offset %.9g, G2·o1 + o2 = %.9g", off, g2*o1+o2)
	}
	e2 := math.Abs(g2/1.8 - 1)
	if bound := 1.8*(1+e2)*math.Abs(o1) + math.Abs(o2); math.Abs(off) > bound*(1+1e-12) {
		t.Errorf("chain offset %.6g outside the cascade bound %.6g", off, bound)
	}
}
