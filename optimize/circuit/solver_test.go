package circuit

import (
	"errors"
	"math"
	"math/rand/v2"
	"strings"
	"testing"
)

func TestFactorErrors(t *testing.T) {
	tests := []struct {
		name   string
		f      Family
		change func(n *Netlist)
		is     error
		want   string // substring of the message
	}{
		{"zero resistance", Inverting, func(n *Netlist) { n.Resistors[n.Resistor("Rg")].Ohm = 0 }, ErrSingular, `resistor "Rg" is 0 ohm`},
		{"negative resistance", Difference, func(n *Netlist) { n.Resistors[n.Resistor("R4")].Ohm = -10 }, ErrSingular, `resistor "R4" is -10 ohm`},
		{"NaN resistance", InAmp, func(n *Netlist) { n.Resistors[n.Resistor("Rf2")].Ohm = math.NaN() }, ErrSingular, `resistor "Rf2" is NaN ohm`},
		{"floating divider tap", Divider, func(n *Netlist) {
			n.Resistors[n.Resistor("Rtop")].Ohm = math.Inf(1)
			n.Resistors[n.Resistor("Rbot")].Ohm = math.Inf(1)
		}, ErrSingular, `node "out" has no DC path`},
		{"floating op-amp input", NonInverting, func(n *Netlist) {
			n.Resistors[n.Resistor("Rf")].Ohm = math.Inf(1)
			n.Resistors[n.Resistor("Rg")].Ohm = math.Inf(1)
		}, ErrSingular, "has no DC path"},
		{"zero gain", Inverting, func(n *Netlist) { n.OpAmps[0].Gain = 0 }, ErrSingular, `op-amp "A1" has open-loop gain 0`},
		{"negative gain", Inverting, func(n *Netlist) { n.OpAmps[0].Gain = -1e5 }, ErrSingular, `op-amp "A1" has open-loop gain -100000; it must be positive`},
		{"output on a source", Inverting, func(n *Netlist) { n.OpAmps[0].Out = n.Node("vin") }, ErrTopology, `op-amp "A1" drives node "vin"`},
		{"two sources on a node", Difference, func(n *Netlist) { n.Sources[1].Node = n.Sources[0].Node }, ErrTopology, "is driven by both"},
		{"source on ground", Inverting, func(n *Netlist) { n.Sources[0].Node = 0 }, ErrTopology, "must drive a node other than ground"},
		{"node out of range", Divider, func(n *Netlist) { n.Resistors[0].B = 99 }, ErrTopology, `resistor "Rtop" has a node index out of range`},
		{"two op-amps on a node", InAmp, func(n *Netlist) { n.OpAmps[1].Out = n.OpAmps[0].Out }, ErrTopology, `driven by op-amps "A1" and "A2"`},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			n := mustNew(tc.f, Options{})
			tc.change(n)
			err := NewSolver(n).Factor()
			if !errors.Is(err, tc.is) || !strings.Contains(err.Error(), tc.want) {
				t.Errorf("Factor error %v, want %v containing %q", err, tc.is, tc.want)
			}
		})
	}
}

func TestSolvePanics(t *testing.T) {
	n := mustNew(Difference, Options{})
	s := NewSolver(n)
	mustPanic := func(name string, f func()) {
		t.Helper()
		defer func() {
			if r := recover(); r == nil || !strings.HasPrefix(r.(string), "circuit: ") {
				t.Errorf("%s: panic %v, want one starting with circuit:", name, r)
			}
		}()
		f()
	}
	mustPanic("before Factor", func() { s.SolveOut() })
	if err := s.Factor(); err != nil {
		t.Fatal(err)
	}
	mustPanic("short slice", func() { s.Solve(make([]float64, 2)) })
	n.Resistors[0].Ohm = 0
	if s.Factor() == nil {
		t.Fatal("Factor accepted a zero resistance")
	}
	mustPanic("after a failed Factor", func() { s.SolveOut() })
}

// Superposition (linearity; any circuits textbook): the solution with every
// excitation on equals the sum of the solutions with one excitation on at a
// time: each source, each current source, each offset and each bias current.
func TestSuperposition(t *testing.T) {
	r := rand.New(rand.NewPCG(6, 2))
	for _, f := range Families() {
		for c, o := range variants(f) {
			n := mustNew(f, o)
			randomize(n, r)
			all, err := solveAll(n)
			if err != nil {
				t.Fatal(err)
			}
			zero := excite(n, exOffset)
			for i := range zero.OpAmps {
				zero.OpAmps[i].Vos, zero.OpAmps[i].IbPlus, zero.OpAmps[i].IbMinus = 0, 0, 0
			}
			var singles []*Netlist
			for i := range n.Sources {
				s := zero.Clone()
				s.Sources[i].V = n.Sources[i].V
				singles = append(singles, s)
			}
			for i := range n.Currents {
				s := zero.Clone()
				s.Currents[i].A = n.Currents[i].A
				singles = append(singles, s)
			}
			for i, a := range n.OpAmps {
				for k := range 3 {
					s := zero.Clone()
					switch k {
					case 0:
						s.OpAmps[i].Vos = a.Vos
					case 1:
						s.OpAmps[i].IbPlus = a.IbPlus
					case 2:
						s.OpAmps[i].IbMinus = a.IbMinus
					}
					singles = append(singles, s)
				}
			}
			sum := make([]float64, len(all))
			vmax := 0.0
			for _, s := range singles {
				v, err := solveAll(s)
				if err != nil {
					t.Fatal(err)
				}
				for k := range v {
					sum[k] += v[k]
					vmax = math.Max(vmax, math.Abs(v[k]))
				}
			}
			for k := range all {
				if e := relErr(sum[k], all[k], vmax); e > 1e-12 {
					t.Errorf("%s variant %d node %s: sum of single solves %.15g, all on %.15g", f, c, n.Nodes[k], sum[k], all[k])
				}
			}
		}
	}
}

// Scaling every resistance by k leaves every voltage set by voltage sources
// and offsets unchanged (node equations are homogeneous in the
// conductances), and scales voltages set by currents by k (Ohm's law).
func TestResistorScaling(t *testing.T) {
	r := rand.New(rand.NewPCG(7, 3))
	for _, f := range Families() {
		for _, k := range []float64{1e-3, 0.37, 7, 1e3} {
			n := mustNew(f, variants(f)[r.IntN(len(variants(f)))])
			randomize(n, r)
			volt := n.Clone()
			for i := range volt.Currents {
				volt.Currents[i].A = 0
			}
			for i := range volt.OpAmps {
				volt.OpAmps[i].IbPlus, volt.OpAmps[i].IbMinus = 0, 0
			}
			cur := excite(n, exOffset)
			for i := range cur.OpAmps {
				cur.OpAmps[i].Vos = 0
			}
			for i := range cur.Currents {
				cur.Currents[i].A = n.Currents[i].A
			}
			for _, tc := range []struct {
				name  string
				n     *Netlist
				scale float64
			}{{"voltage-driven", volt, 1}, {"current-driven", cur, k}} {
				before, err := solveAll(tc.n)
				if err != nil {
					t.Fatal(err)
				}
				s := tc.n.Clone()
				for i := range s.Resistors {
					s.Resistors[i].Ohm *= k
				}
				after, err := solveAll(s)
				if err != nil {
					t.Fatal(err)
				}
				vmax := 0.0
				for _, v := range before {
					vmax = math.Max(vmax, math.Abs(v))
				}
				for j := range before {
					if e := relErr(after[j], tc.scale*before[j], vmax*tc.scale); e > 1e-12 {
						t.Errorf("%s %s k=%g node %s: %.15g, want %.15g", f, tc.name, k, s.Nodes[j], after[j], tc.scale*before[j])
					}
				}
			}
		}
	}
}

// A netlist Clone shares nothing with the original.
func TestClone(t *testing.T) {
	n := mustNew(InAmp, Options{SourceImpedance: true})
	c := n.Clone()
	c.Resistors[0].Ohm = 1
	c.Sources[0].V = 9
	c.OpAmps[0].Vos = 1
	c.Nodes[1] = "x"
	if n.Resistors[0].Ohm == 1 || n.Sources[0].V == 9 || n.OpAmps[0].Vos == 1 || n.Nodes[1] == "x" {
		t.Error("Clone shares storage with the original")
	}
	if got := strings.Join(n.Positions(), ","); got != "Rsrcp,Rsrcn,Rf1,Rg,Rf2,R1,R2,R3,R4" {
		t.Errorf("Positions() = %s", got)
	}
	for _, name := range []string{"A1", "A2", "A3"} {
		if n.OpAmpIndex(name) < 0 {
			t.Errorf("no op-amp %s", name)
		}
	}
	if n.OpAmpIndex("A4") != -1 || n.Resistor("Rx") != -1 || n.SourceIndex("vx") != -1 || n.CurrentIndex("ix") != -1 || n.Node("zz") != -1 {
		t.Error("lookup of an absent name did not return -1")
	}
}

// Solve reads the values current at the call; Factor the resistances.
func TestValuesByIndex(t *testing.T) {
	n := mustNew(Inverting, Options{})
	setGain(n, math.Inf(1))
	s := NewSolver(n)
	if err := s.Factor(); err != nil {
		t.Fatal(err)
	}
	vin := n.SourceIndex("vin")
	for _, v := range []float64{1, -2, 0.5} {
		n.Sources[vin].V = v
		if got := s.SolveOut(); math.Abs(got+10*v) > 1e-12 {
			t.Errorf("vin %g: Vout %g, want %g", v, got, -10*v)
		}
	}
	n.Resistors[n.Resistor("Rf")].Ohm = 20e3
	if err := s.Factor(); err != nil {
		t.Fatal(err)
	}
	if got := s.SolveOut(); math.Abs(got+2*0.5) > 1e-12 {
		t.Errorf("after refactor: Vout %g, want -1", got)
	}
}

// The singularity test is relative to each column: a resistor ladder with
// no path to ground is singular (only rounding residue is left), while a
// gigaohm path behind milliohm resistors is a legitimate, tiny pivot whose
// node voltages the divider formula gives (Ohm's law).
func TestSingularThreshold(t *testing.T) {
	floating := &Netlist{
		Nodes:     []string{"0", "s", "x", "y", "z"},
		Sources:   []Source{{Name: "v", Node: 1, V: 1}},
		Resistors: []Resistor{{"R0", 1, 0, 1e3}, {"R1", 2, 3, 1e3}, {"R2", 3, 4, 2.2e3}, {"R3", 4, 2, 4.7e3}},
		Out:       2,
	}
	if err := NewSolver(floating).Factor(); !errors.Is(err, ErrSingular) {
		t.Errorf("floating ladder: Factor error %v, want ErrSingular", err)
	}
	ladder := &Netlist{
		Nodes:     []string{"0", "s", "x", "y"},
		Sources:   []Source{{Name: "v", Node: 1, V: 1}},
		Resistors: []Resistor{{"Ra", 1, 2, 1e-3}, {"Rb", 2, 3, 1e-3}, {"Rc", 3, 0, 1e9}},
		Out:       3,
	}
	v, err := solveAll(ladder)
	if err != nil {
		t.Fatalf("milliohm-gigaohm ladder: %v", err)
	}
	near(t, "V(y)", v[3], 1e9/(1e9+2e-3), 1e-15)
	near(t, "V(x)", v[2], (1e9+1e-3)/(1e9+2e-3), 1e-15)
}

// SolveOut stops after the output's back-substitution step; it must give
// exactly Solve's output voltage, and leave Solve's results intact after.
func TestSolveOutMatchesSolve(t *testing.T) {
	r := rand.New(rand.NewPCG(9, 4))
	for _, f := range Families() {
		for i, o := range variants(f) {
			n := mustNew(f, o)
			randomize(n, r)
			s := NewSolver(n)
			if err := s.Factor(); err != nil {
				t.Fatal(err)
			}
			out := s.SolveOut()
			v := make([]float64, len(n.Nodes))
			s.Solve(v)
			if out != v[n.Out] {
				t.Errorf("%s variant %d: SolveOut %.17g, Solve %.17g", f, i, out, v[n.Out])
			}
			if got := s.SolveOut(); got != out {
				t.Errorf("%s variant %d: second SolveOut %.17g", f, i, got)
			}
		}
	}
}

// TestReset rebinds one Solver to netlists of every family in turn (their
// topologies differ) and checks each solve against a fresh NewSolver, then
// that rebinding to a netlist no larger than one seen allocates nothing.
func TestReset(t *testing.T) {
	var nets []*Netlist
	for _, f := range Families() {
		nets = append(nets, mustNew(f, Options{}))
	}
	work := nets[0].Clone()
	s := NewSolver(work)
	for _, n := range append(nets, nets...) {
		*work = *n.Clone()
		s.Reset()
		fresh := NewSolver(n)
		if err := s.Factor(); err != nil {
			t.Fatalf("%s after Reset: %v", n.Family, err)
		}
		if err := fresh.Factor(); err != nil {
			t.Fatal(err)
		}
		got, want := make([]float64, len(n.Nodes)), make([]float64, len(n.Nodes))
		s.Solve(got)
		fresh.Solve(want)
		for k := range got {
			if got[k] != want[k] {
				t.Errorf("%s node %s: %g after Reset, %g from NewSolver", n.Family, n.Nodes[k], got[k], want[k])
			}
		}
	}
	*work = *nets[0].Clone()
	if a := testing.AllocsPerRun(20, s.Reset); a != 0 {
		t.Errorf("Reset allocates %v times per call", a)
	}
}
