package strap

import (
	"fmt"

	"plumb/catalog"
	"plumb/optimize/circuit"
	"plumb/optimize/family"
)

// Part returns strapping s of network n as the circuit a family whose
// netlist comes from its part builds (family.PartCircuit, in
// family.Options.Part): the elements that carry current, named as in the
// network, and the internal op-amp "A1", with the strapping's inputs and
// reference on the nodes the family gives, its output on "out" and its tie
// and internal nodes named "x" and their strapping name; a single-ended
// strapping (kind FromPlus) uses only the family's positive input node. An
// element named
// as the spec's impedances are ("Rsrc", "Rload", ...) is refused: the
// budget would read it as the spec's.
func (s *Strapping) Part(n *catalog.MatchedNetwork) (family.PartCircuit, error) {
	if s.Kind == FromMinus {
		return nil, fmt.Errorf("%w: %s is %s; tie a single-ended input to vp (the same circuit)", ErrUnusable, s.Text, s.Kind)
	}
	net, err := s.Netlist(n)
	if err != nil {
		return nil, err
	}
	for _, r := range net.Resistors {
		if family.SpecResistor(r.Name) {
			return nil, fmt.Errorf("%w: element %q has the name of one of the spec's impedances; rename it in the catalog", ErrNetwork, r.Name)
		}
	}
	return &part{net: net, text: s.Text}, nil
}

// part is a strapped network as a family.PartCircuit.
type part struct {
	net  *circuit.Netlist
	text string
}

// String returns the strapping text, so that a part prints as the design
// names it.
func (p *part) String() string { return p.text }

// Build adds the strapped elements and the op-amp on b.
func (p *part) Build(b family.Builder, inp, inn, ref string) error {
	name := func(k int) string {
		switch x := p.net.Nodes[k]; x {
		case InPlus.String():
			return inp
		case InMinus.String():
			return inn
		case Ref.String():
			return ref
		case Output.String(), "0":
			return x
		default:
			return "x" + x
		}
	}
	for _, r := range p.net.Resistors {
		b.Resistor(r.Name, name(r.A), name(r.B), r.Ohm)
	}
	if len(p.net.OpAmps) != 1 {
		return fmt.Errorf("%w: strapped circuit with %d op-amps", ErrNetwork, len(p.net.OpAmps))
	}
	a := p.net.OpAmps[0]
	b.OpAmp("A1", name(a.Plus), name(a.Minus), name(a.Out))
	return nil
}
