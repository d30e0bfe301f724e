package circuit

import (
	"math"
	"math/rand/v2"
	"strconv"

	"plumb/optimize/family"
)

// variants returns every valid option combination of family f.
func variants(f Family) []Options {
	var out []Options
	for mask := 0; mask < 64; mask++ {
		o := Options{
			RefDivider:        mask&1 != 0,
			Load:              mask&2 != 0,
			SourceImpedance:   mask&4 != 0,
			Buffer:            mask&8 != 0,
			OffsetToInverting: mask&16 != 0,
			RefImpedance:      mask&32 != 0,
		}
		if family.Lookup(string(f)).CheckOptions(o) == nil {
			out = append(out, o)
		}
	}
	return out
}

// mustNew is New for options known to be valid.
func mustNew(f Family, o Options) *Netlist {
	n, err := New(f, o)
	if err != nil {
		panic(err)
	}
	return n
}

// randomize sets every value of n at random: resistors within a factor of
// two of nominal, sources within ±5 V, currents, and op-amps of assorted
// gains (some ideal) with offsets and bias currents.
func randomize(n *Netlist, r *rand.Rand) {
	for i := range n.Resistors {
		n.Resistors[i].Ohm *= math.Exp(r.Float64()*1.4 - 0.7)
	}
	for i := range n.Sources {
		n.Sources[i].V = r.Float64()*10 - 5
	}
	for i := range n.Currents {
		scale := 1e-6
		if n.Currents[i].Name == "isense" {
			scale = 2
		}
		n.Currents[i].A = (r.Float64()*2 - 1) * scale
	}
	gains := []float64{1e4, 1e5, 1e6, 1e7, math.Inf(1)}
	for i := range n.OpAmps {
		a := &n.OpAmps[i]
		a.Gain = gains[r.IntN(len(gains))]
		a.Vos = (r.Float64()*2 - 1) * 1e-3
		a.IbPlus = (r.Float64()*2 - 1) * 1e-7
		a.IbMinus = (r.Float64()*2 - 1) * 1e-7
	}
}

// excitation kinds for derived gains: each zeroes every excitation of a
// netlist, then sets one group.
type excitation int

const (
	exAll    excitation = iota // keep the random values
	exSignal                   // unit differential (or single-ended) input
	exCommon                   // unit common-mode input (two-input families)
	exOffset                   // only Vos and bias currents
)

// excite returns a copy of n with only the excitation e active.
func excite(n *Netlist, e excitation) *Netlist {
	c := n.Clone()
	if e == exAll {
		return c
	}
	for i := range c.Sources {
		c.Sources[i].V = 0
	}
	for i := range c.Currents {
		c.Currents[i].A = 0
	}
	if e != exOffset {
		for i := range c.OpAmps {
			c.OpAmps[i].Vos, c.OpAmps[i].IbPlus, c.OpAmps[i].IbMinus = 0, 0, 0
		}
	}
	set := func(name string, v float64) {
		if k := c.SourceIndex(name); k >= 0 {
			c.Sources[k].V = v
		}
	}
	switch e {
	case exSignal:
		set("vin", 1)
		set("vp", 0.5)
		set("vn", -0.5)
		if k := c.CurrentIndex("isense"); k >= 0 {
			c.Currents[k].A = 1
		}
	case exCommon:
		set("vp", 1)
		set("vn", 1)
		set("vbus", 1)
	}
	return c
}

// merge returns one netlist holding copies of nets side by side, sharing
// only ground; names get the suffix _c<i>. It is how many cases go to one
// simulator run.
func merge(nets []*Netlist) (*Netlist, [][]int) {
	m := &Netlist{Family: "batch", Nodes: []string{"0"}}
	maps := make([][]int, len(nets))
	for i, n := range nets {
		suf := "_c" + strconv.Itoa(i)
		idx := make([]int, len(n.Nodes))
		for k, name := range n.Nodes {
			if k == 0 {
				continue
			}
			idx[k] = len(m.Nodes)
			m.Nodes = append(m.Nodes, name+suf)
		}
		maps[i] = idx
		for _, r := range n.Resistors {
			m.Resistors = append(m.Resistors, Resistor{r.Name + suf, idx[r.A], idx[r.B], r.Ohm})
		}
		for _, s := range n.Sources {
			m.Sources = append(m.Sources, Source{s.Name + suf, idx[s.Node], s.V})
		}
		for _, c := range n.Currents {
			m.Currents = append(m.Currents, CurrentSource{c.Name + suf, idx[c.From], idx[c.To], c.A})
		}
		for _, a := range n.OpAmps {
			a.Name += suf
			a.Plus, a.Minus, a.Out = idx[a.Plus], idx[a.Minus], idx[a.Out]
			m.OpAmps = append(m.OpAmps, a)
		}
	}
	return m, maps
}

// solveAll factors and solves n, returning all node voltages.
func solveAll(n *Netlist) ([]float64, error) {
	s := NewSolver(n)
	if err := s.Factor(); err != nil {
		return nil, err
	}
	v := make([]float64, len(n.Nodes))
	s.Solve(v)
	return v, nil
}

// relErr is |got-want| relative to max(|want|, floor).
func relErr(got, want, floor float64) float64 {
	return math.Abs(got-want) / math.Max(math.Abs(want), floor)
}

// addTestCurrent puts a current source across a random resistor of n, as
// the budget layer does to inject a resistor's noise current, so the checks
// cover current sources between two free nodes.
func addTestCurrent(n *Netlist, r *rand.Rand) {
	res := n.Resistors[r.IntN(len(n.Resistors))]
	n.Currents = append(n.Currents, CurrentSource{Name: "noise " + res.Name, From: res.A, To: res.B, A: (r.Float64()*2 - 1) * 1e-5})
}

// randomCase is case c of a seeded random sweep over family f: the c-th
// option combination with random values, and on odd cases a test current
// across a random resistor.
func randomCase(f Family, c int, r *rand.Rand) *Netlist {
	vs := variants(f)
	n := mustNew(f, vs[c%len(vs)])
	randomize(n, r)
	if c%2 == 1 {
		addTestCurrent(n, r)
	}
	return n
}

// The families the tests build, by their registry entries.
var (
	Inverting    = Family(family.Inverting.Name)
	NonInverting = Family(family.NonInverting.Name)
	Difference   = Family(family.Difference.Name)
	Divider      = Family(family.Divider.Name)
	CurrentSense = Family(family.CurrentSense.Name)
	LevelShift   = Family(family.LevelShift.Name)
	InAmp        = Family(family.InAmp.Name)
)
