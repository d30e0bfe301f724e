package circuit

import (
	"fmt"
	"strings"

	"plumb/optimize/family"
)

// Family names one circuit topology of package family's registry.
type Family string

// Options select the optional parts of a family's topology (see
// family.Options). The zero value is the bare circuit.
type Options = family.Options

// Families returns every family with a netlist, in registry order.
func Families() []Family {
	var out []Family
	for _, f := range family.All() {
		if !f.Datasheet() {
			out = append(out, Family(f.Name))
		}
	}
	return out
}

// ParseFamily returns the family named s (case and surrounding space are
// ignored). An unknown name gives an error wrapping ErrFamily that lists
// the valid names.
func ParseFamily(s string) (Family, error) {
	t := strings.ToLower(strings.TrimSpace(s))
	var names []string
	for _, f := range Families() {
		if string(f) == t {
			return f, nil
		}
		names = append(names, string(f))
	}
	return "", fmt.Errorf("%w %q: use one of %s", ErrFamily, s, strings.Join(names, ", "))
}

// nominalGain is the open-loop gain New gives every op-amp, V/V.
const nominalGain = 1e6

// New returns the netlist of family f with options o (its topology, from
// package family, where each family's doc comment draws it), nominal part
// values and op-amp gains of 1e6 V/V with zero offset and bias currents.
// Node 0 is ground. A family without a netlist gives an error wrapping
// family.ErrNoNetlist, an option the family does not have one wrapping
// ErrOption, an unknown name (or one without a netlist) one wrapping
// ErrFamily.
func New(f Family, o Options) (*Netlist, error) {
	name, err := ParseFamily(string(f))
	if err != nil {
		return nil, err
	}
	fam := family.Lookup(string(name))
	b := &builder{n: &Netlist{Family: Family(fam.Name), Nodes: []string{"0"}}}
	if err := fam.Build(b, o); err != nil {
		return nil, err
	}
	b.n.Out = b.node("out")
	return b.n, nil
}

// builder assembles a netlist by node name (a family.Builder).
type builder struct{ n *Netlist }

func (b *builder) node(name string) int {
	if i := b.n.Node(name); i >= 0 {
		return i
	}
	b.n.Nodes = append(b.n.Nodes, name)
	return len(b.n.Nodes) - 1
}

func (b *builder) Resistor(name, a, c string, ohm float64) {
	b.n.Resistors = append(b.n.Resistors, Resistor{Name: name, A: b.node(a), B: b.node(c), Ohm: ohm})
}

func (b *builder) Source(name, node string, v float64) {
	b.n.Sources = append(b.n.Sources, Source{Name: name, Node: b.node(node), V: v})
}

func (b *builder) Current(name, from, to string, a float64) {
	b.n.Currents = append(b.n.Currents, CurrentSource{Name: name, From: b.node(from), To: b.node(to), A: a})
}

func (b *builder) OpAmp(name, plus, minus, out string) {
	b.n.OpAmps = append(b.n.OpAmps, OpAmp{Name: name, Plus: b.node(plus), Minus: b.node(minus), Out: b.node(out), Gain: nominalGain})
}
