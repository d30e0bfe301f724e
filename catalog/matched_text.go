package catalog

import (
	"errors"
	"fmt"
	"slices"
	"strings"
	"unicode"

	"plumb/catalog/units"
)

// The text form of a MatchedNetwork is one line of clauses separated by
// ";", in any order:
//
//	R1 10k IN-~INV; R2 10k INV~OUT; R3 10k IN+~NI; R4 10k NI~REF; amp INV NI OUT; pins IN- IN+ REF OUT
//
//   - an element is its name, its nominal value (any resistance the units
//     parser reads: 10k, 10 kΩ, 4.99e3) and the two nodes it joins, written
//     A~B;
//   - "amp INV NONINV OUT" names the nodes of the internal op-amp's
//     inverting input, non-inverting input and output;
//   - "pins P1 P2 ..." lists the nodes reachable from outside the package.
//
// Node and element names are any run of characters without white space,
// ";" or "~". The tolerances are not part of the text: an import reads them
// from columns of their own. FormatMatchedNetwork writes this form and
// ParseMatchedNetwork reads it; the CSV export and the importers use it.

// ErrNetworkText: a matched network's text form that cannot be read.
var ErrNetworkText = errors.New("catalog: bad matched-network text")

// FormatMatchedNetwork writes the elements, op-amp nodes and pins of n in
// the text form (tolerances are left out). A nil network gives "".
func FormatMatchedNetwork(n *MatchedNetwork) string {
	if n == nil {
		return ""
	}
	var b strings.Builder
	for _, e := range n.Elements {
		fmt.Fprintf(&b, "%s %s %s~%s; ", e.Name, formatFloat(e.Ohms), e.A, e.B)
	}
	fmt.Fprintf(&b, "amp %s %s %s; pins %s", n.OpAmpInv, n.OpAmpNonInv, n.OpAmpOut, strings.Join(n.Pins, " "))
	return b.String()
}

// ParseMatchedNetwork reads the text form into a network whose tolerances
// are unknown (NaN). An error wraps ErrNetworkText and names the clause
// (counted from 1) and what is wrong with it; the network's wiring is
// checked by Validate, not here.
func ParseMatchedNetwork(s string) (*MatchedNetwork, error) {
	n := &MatchedNetwork{Tolerance: Unknown(), RatioTolerance: Unknown(), RatioDriftPPM: Unknown()}
	var haveAmp, havePins bool
	for i, clause := range strings.Split(s, ";") {
		words := strings.Fields(clause)
		if len(words) == 0 {
			continue
		}
		bad := func(format string, a ...any) error {
			return fmt.Errorf("%w: clause %d %q: %s", ErrNetworkText, i+1, strings.TrimSpace(clause), fmt.Sprintf(format, a...))
		}
		switch strings.ToLower(words[0]) {
		case "amp":
			if haveAmp {
				return nil, bad("a second amp clause: give the op-amp's nodes once")
			}
			if len(words) != 4 {
				return nil, bad("write amp INV NONINV OUT: the nodes of the op-amp's inverting input, non-inverting input and output")
			}
			haveAmp = true
			n.OpAmpInv, n.OpAmpNonInv, n.OpAmpOut = words[1], words[2], words[3]
		case "pins":
			if havePins {
				return nil, bad("a second pins clause: list the pins once")
			}
			if len(words) < 2 {
				return nil, bad("list the pins after the word pins")
			}
			havePins = true
			n.Pins = words[1:]
		default:
			last := words[len(words)-1]
			if len(words) < 3 || !strings.Contains(last, "~") {
				return nil, bad("an element is NAME VALUE A~B, for example R1 10k IN~INV")
			}
			value := strings.Join(words[1:len(words)-1], " ") // "10 kΩ" may have a space
			ohms, err := units.ParseResistance(value)
			if err != nil {
				return nil, bad("value %q: %v", value, err)
			}
			a, b, ok := strings.Cut(last, "~")
			if !ok || a == "" || b == "" || strings.Contains(b, "~") {
				return nil, bad("nodes %q: write the two nodes the element joins as A~B", last)
			}
			n.Elements = append(n.Elements, MatchedElement{Name: words[0], Ohms: ohms, A: a, B: b})
		}
	}
	switch {
	case len(n.Elements) == 0:
		return nil, fmt.Errorf("%w: %q has no element: give each as NAME VALUE A~B", ErrNetworkText, s)
	case !haveAmp:
		return nil, fmt.Errorf("%w: %q has no amp clause: add amp INV NONINV OUT", ErrNetworkText, s)
	case !havePins:
		return nil, fmt.Errorf("%w: %q has no pins clause: add pins P1 P2 ...", ErrNetworkText, s)
	}
	return n, nil
}

// Check returns the first problem of the network's wiring and figures (as
// Snapshot.Validate finds it for the amplifier holding it), wrapping
// ErrInvalid, or nil.
func (n *MatchedNetwork) Check() error {
	c := checker{kind: KindAmplifier}
	c.checkMatched(n)
	if c.err == nil {
		return nil
	}
	return fmt.Errorf("%w: %s", ErrInvalid, c.problem)
}

// badNodeText reports whether a name or node holds a character the text
// form or the store uses as a separator.
func badNodeText(s string) bool {
	return strings.ContainsAny(s, ";~,") || strings.IndexFunc(s, unicode.IsSpace) >= 0
}

// checkMatched checks the network inside a matched amplifier: element
// values > 0, every element named once and joining two different named
// nodes, the op-amp's inputs among the element nodes and its output an
// element node or a pin (a part whose feedback element ends on a sense pin
// reaches the output only through the strap), the pins among those nodes,
// and the tolerances (each may be unknown) plausible fractions.
func (c *checker) checkMatched(n *MatchedNetwork) {
	const field = "network"
	if len(n.Elements) < 2 {
		c.fail(field, "has %d element(s): a matched network has at least two", len(n.Elements))
		return
	}
	nodes := map[string]bool{}
	names := map[string]bool{}
	for i, e := range n.Elements {
		switch {
		case strings.TrimSpace(e.Name) == "":
			c.fail(field, "element %d has no name: name it as the datasheet does (R1, R2, ...)", i+1)
		case strings.EqualFold(e.Name, "amp") || strings.EqualFold(e.Name, "pins"):
			c.fail(field, "element %d is named %q, a word of the network's text form: rename it", i+1, e.Name)
		case badNodeText(e.Name) || badNodeText(e.A) || badNodeText(e.B):
			c.fail(field, "element %s: names and nodes hold no white space, comma, ';' or '~' (%q, %q)", e.Name, e.A, e.B)
		case names[e.Name]:
			c.fail(field, "element name %s appears twice", e.Name)
		case !(e.Ohms > 0) || e.Ohms > 1e15:
			c.fail(field, "element %s: value %s ohm is not a positive resistance", e.Name, formatFloat(e.Ohms))
		case strings.TrimSpace(e.A) == "" || strings.TrimSpace(e.B) == "":
			c.fail(field, "element %s: both nodes must be named", e.Name)
		case e.A == e.B:
			c.fail(field, "element %s joins node %s to itself", e.Name, e.A)
		}
		names[e.Name] = true
		nodes[e.A], nodes[e.B] = true, true
	}
	for _, f := range []struct{ role, node string }{
		{"opamp_inv", n.OpAmpInv}, {"opamp_noninv", n.OpAmpNonInv}, {"opamp_out", n.OpAmpOut}} {
		switch {
		case strings.TrimSpace(f.node) == "":
			c.fail(field+"."+f.role, "is empty: name the node of the internal op-amp")
		case f.role == "opamp_out" && !nodes[f.node] && !slices.Contains(n.Pins, f.node):
			c.fail(field+"."+f.role, "node %s joins no element and is no pin: the output must be reachable", f.node)
		case f.role != "opamp_out" && !nodes[f.node]:
			c.fail(field+"."+f.role, "node %s joins no element: the op-amp's inputs must connect to the network", f.node)
		}
	}
	nodes[n.OpAmpOut] = true
	if c.err == nil && (n.OpAmpInv == n.OpAmpNonInv || n.OpAmpInv == n.OpAmpOut || n.OpAmpNonInv == n.OpAmpOut) {
		c.fail(field, "the op-amp's inputs and output must be three different nodes (%s, %s, %s)", n.OpAmpInv, n.OpAmpNonInv, n.OpAmpOut)
	}
	if badNodeText(n.OpAmpInv) || badNodeText(n.OpAmpNonInv) || badNodeText(n.OpAmpOut) {
		c.fail(field, "the op-amp's nodes hold no white space, comma, ';' or '~'")
	}
	if len(n.Pins) == 0 {
		c.fail(field+".pins", "is empty: list the nodes reachable from outside the package")
	}
	for i, p := range n.Pins {
		switch {
		case !nodes[p]:
			c.fail(field+".pins", "pin %q is not a node of the network", p)
		case slices.Contains(n.Pins[:i], p):
			c.fail(field+".pins", "pin %s is listed twice", p)
		}
	}
	if Known(n.Tolerance) {
		c.fraction(field+".tolerance", n.Tolerance)
	}
	if Known(n.RatioTolerance) {
		c.fraction(field+".ratio_tolerance", n.RatioTolerance)
	}
	c.nonNegative(field+".ratio_drift_ppm", n.RatioDriftPPM)
}
