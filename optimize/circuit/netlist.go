package circuit

import (
	"errors"
	"slices"

	"plumb/optimize/family"
)

// Sentinel errors. Callers branch on them with errors.Is.
var (
	// ErrSingular is returned by Factor when the nodal matrix cannot be
	// factored: a node without a DC path, a resistor whose value is zero,
	// negative or NaN, or an op-amp gain that is not positive.
	ErrSingular = errors.New("circuit: singular nodal matrix")
	// ErrFamily is returned for an unknown family name.
	ErrFamily = errors.New("circuit: unknown circuit family")
	// ErrOption is returned by New for an option the family does not have.
	ErrOption = family.ErrOption
	// ErrTopology is returned by Factor for a netlist the solver cannot
	// represent: a node index out of range, an op-amp output on ground or
	// on a source-driven node, two op-amps driving one node, or a node
	// driven by two sources.
	ErrTopology = errors.New("circuit: invalid netlist topology")
)

// Netlist is a linear DC circuit: resistors, ideal voltage sources to
// ground, current sources and op-amps. Node 0 is ground and is named "0".
//
// Resistor names are the position names used everywhere in plumb, for
// example "Rf" and "Rg" of an inverting amplifier or "R1".."R4" of a
// difference amplifier; see each family's doc comment in package family.
type Netlist struct {
	Family    Family
	Nodes     []string        // node names; index 0 is ground "0"
	Resistors []Resistor      // position names, see New
	Sources   []Source        // ideal voltage sources to ground
	Currents  []CurrentSource // current sources, including test and noise injections
	OpAmps    []OpAmp         // finite-gain VCVS models
	Out       int             // output node index
}

// Resistor is a resistor of Ohm ohms between nodes A and B. An Ohm of +Inf
// is an open circuit.
type Resistor struct {
	Name string
	A, B int
	Ohm  float64
}

// Source is an ideal voltage source of V volts from ground to Node: it fixes
// V(Node) = V.
type Source struct {
	Name string
	Node int
	V    float64
}

// CurrentSource is an ideal current source: A amperes leave node From and
// enter node To through the source.
type CurrentSource struct {
	Name     string
	From, To int
	A        float64
}

// OpAmp is an operational amplifier modelled as a voltage-controlled
// voltage source of open-loop gain Gain with its input offset voltage Vos in
// series with the non-inverting input:
//
//	V(Out) = Gain * (V(Plus) + Vos - V(Minus))
//
// Gain = +Inf is the ideal amplifier and is handled exactly: the constraint
// becomes V(Plus) + Vos = V(Minus). IbPlus and IbMinus are the input bias
// currents, flowing into the pins (out of the nodes Plus and Minus).
type OpAmp struct {
	Name             string
	Plus, Minus, Out int
	Gain, Vos        float64
	IbPlus, IbMinus  float64
}

// Resistor returns the index of the resistor at position name, or -1.
func (n *Netlist) Resistor(name string) int {
	return slices.IndexFunc(n.Resistors, func(r Resistor) bool { return r.Name == name })
}

// SourceIndex returns the index of the voltage source named name, or -1.
func (n *Netlist) SourceIndex(name string) int {
	return slices.IndexFunc(n.Sources, func(s Source) bool { return s.Name == name })
}

// CurrentIndex returns the index of the current source named name, or -1.
func (n *Netlist) CurrentIndex(name string) int {
	return slices.IndexFunc(n.Currents, func(c CurrentSource) bool { return c.Name == name })
}

// OpAmpIndex returns the index of the op-amp named name, or -1.
func (n *Netlist) OpAmpIndex(name string) int {
	return slices.IndexFunc(n.OpAmps, func(a OpAmp) bool { return a.Name == name })
}

// Node returns the index of the node named name, or -1.
func (n *Netlist) Node(name string) int {
	return slices.Index(n.Nodes, name)
}

// Positions returns the resistor position names in netlist order.
func (n *Netlist) Positions() []string {
	p := make([]string, len(n.Resistors))
	for i, r := range n.Resistors {
		p[i] = r.Name
	}
	return p
}

// Clone returns a deep copy of n that shares no slices with it, so that
// each goroutine can own a netlist and its Solver.
func (n *Netlist) Clone() *Netlist {
	c := *n
	c.Nodes = slices.Clone(n.Nodes)
	c.Resistors = slices.Clone(n.Resistors)
	c.Sources = slices.Clone(n.Sources)
	c.Currents = slices.Clone(n.Currents)
	c.OpAmps = slices.Clone(n.OpAmps)
	return &c
}
