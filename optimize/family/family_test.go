package family

import (
	"errors"
	"slices"
	"testing"
)

// graph is a Builder that keeps what a netlist is made of by name.
type graph struct {
	res     map[string][2]string
	sources map[string]string
	current map[string][2]string
	amps    map[string][3]string
}

func newGraph() *graph {
	return &graph{res: map[string][2]string{}, sources: map[string]string{}, current: map[string][2]string{}, amps: map[string][3]string{}}
}

func (g *graph) Resistor(name, a, b string, _ float64) { g.res[name] = [2]string{a, b} }
func (g *graph) Source(name, node string, _ float64)   { g.sources[name] = node }
func (g *graph) Current(name, from, to string, _ float64) {
	g.current[name] = [2]string{from, to}
}
func (g *graph) OpAmp(name, plus, minus, out string) { g.amps[name] = [3]string{plus, minus, out} }

func TestRegistry(t *testing.T) {
	names := Names()
	if len(names) != len(All()) || len(names) == 0 {
		t.Fatalf("names %v", names)
	}
	for i, n := range names {
		if slices.Index(names, n) != i {
			t.Errorf("%q listed twice", n)
		}
		if Lookup(n) == nil || Lookup(n).Name != n {
			t.Errorf("Lookup(%q) = %v", n, Lookup(n))
		}
		f, err := Parse(" " + n + " ")
		if err != nil || f.Name != n {
			t.Errorf("Parse(%q) = %v, %v", n, f, err)
		}
		if Lookup(n).GainProblem == nil || Lookup(n).About == "" {
			t.Errorf("%s: no GainProblem or About", n)
		}
	}
	if _, err := Parse("bridge"); !errors.Is(err, ErrUnknown) {
		t.Errorf("Parse(bridge) error %v, want ErrUnknown", err)
	}
}

// TestNetlistConventions: every netlist keeps the conventions of Family's
// doc, which the budget reads it by: an output node "out" driven by an
// amplifier or a resistor, the signal source its Input names, the
// reference source when it uses one, the shunt across the current input,
// and every option it allows builds while every other is refused.
func TestNetlistConventions(t *testing.T) {
	all := []Options{{}, {Load: true}, {RefDivider: true}, {SourceImpedance: true}, {Buffer: true}, {RefImpedance: true}, {OffsetToInverting: true}}
	for _, f := range All() {
		if f.Datasheet() {
			if err := f.Build(newGraph(), Options{}); !errors.Is(err, ErrNoNetlist) {
				t.Errorf("%s: Build error %v, want ErrNoNetlist", f.Name, err)
			}
			continue
		}
		for _, o := range all {
			g := newGraph()
			err := f.Build(g, o)
			if errors.Is(err, ErrOption) {
				continue
			}
			if err != nil {
				t.Fatalf("%s %+v: %v", f.Name, o, err)
			}
			outDriven := false
			for _, a := range g.amps {
				outDriven = outDriven || a[2] == "out"
			}
			for _, r := range g.res {
				outDriven = outDriven || r[0] == "out" || r[1] == "out"
			}
			if !outDriven {
				t.Errorf("%s %+v: nothing at node out", f.Name, o)
			}
			switch f.Input {
			case SingleEnded:
				if _, ok := g.sources["vin"]; !ok {
					t.Errorf("%s: no source vin", f.Name)
				}
			case Differential:
				if _, ok := g.sources["vp"]; !ok || g.sources["vn"] == "" {
					t.Errorf("%s: no sources vp, vn", f.Name)
				}
			case Current:
				sh, ok := g.res[f.Shunt]
				if _, cur := g.current["isense"]; !cur || !ok || g.sources["vbus"] != sh[1] {
					t.Errorf("%s: current input isense through shunt %q to vbus not found", f.Name, f.Shunt)
				}
			}
			ref := g.sources["vref"] != "" || g.sources["vrefsrc"] != ""
			if f.Reference != RefNone && !ref {
				t.Errorf("%s: uses a reference but has no vref", f.Name)
			}
			if o.Load {
				if _, ok := g.res["Rload"]; !ok {
					t.Errorf("%s: Load without Rload", f.Name)
				}
			}
		}
	}
}

// TestOptionsRefused: each family refuses exactly the options it does not
// list in Allows.
func TestOptionsRefused(t *testing.T) {
	opts := map[Option]Options{
		AllowRefDivider: {RefDivider: true}, AllowSourceImpedance: {SourceImpedance: true},
		AllowBuffer: {Buffer: true}, AllowRefImpedance: {RefImpedance: true}, AllowOffsetToInverting: {OffsetToInverting: true},
	}
	for _, f := range All() {
		for bit, o := range opts {
			err := f.CheckOptions(o)
			if (f.Allows&bit != 0) != (err == nil) {
				t.Errorf("%s %+v: error %v", f.Name, o, err)
			}
		}
	}
}

// TestGainProblems: which gains each family can make follows from its
// ideal transfer (each family's doc comment).
func TestGainProblems(t *testing.T) {
	tests := []struct {
		f    *Family
		gain float64
		ok   bool
	}{
		{Inverting, -2, true}, {Inverting, 2, false},
		{NonInverting, 1, true}, {NonInverting, 0.5, false}, // G = 1 + Rf/Rg ≥ 1
		{Divider, 0.125, true}, {Divider, 1, false}, {Divider, -0.5, false}, // 0 < Rbot/(Rtop+Rbot) < 1
		{InAmp, 200, true}, {InAmp, 0.5, false}, // 1 + 2Rf/Rg ≥ 1
		{Difference, 0.2, true}, {Difference, -1, false},
		{CurrentSense, 0.5, true}, {LevelShift, 0.12, true}, {Matched, 1, true},
	}
	for _, tc := range tests {
		if got := tc.f.GainProblem(tc.gain) == ""; got != tc.ok {
			t.Errorf("%s gain %g: ok %v, want %v", tc.f.Name, tc.gain, got, tc.ok)
		}
	}
}

func TestPositionsAndAmplified(t *testing.T) {
	p, err := Divider.Positions(Options{SourceImpedance: true, Load: true})
	if err != nil || !slices.Equal(p, []string{"Rtop", "Rbot"}) {
		t.Errorf("divider positions %v, %v", p, err)
	}
	if Divider.Amplified(Options{}) || !Divider.Amplified(Options{Buffer: true}) || !Matched.Amplified(Options{}) {
		t.Error("Amplified: an unbuffered divider has no amplifier, a buffered one and a matched amplifier do")
	}
	if p, _ := Matched.Positions(Options{}); len(p) != 0 {
		t.Errorf("matched positions %v", p)
	}
}
