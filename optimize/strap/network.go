package strap

import (
	"fmt"
	"math"
	"strings"

	"plumb/catalog"
)

// Bounds of the enumeration. The walk visits Σk C(n,k)·4^(n−k)·Bell(k)
// pin assignments for n free pins (the pins but the output; each an input,
// the reference, the output or in a tie group, the groups counted as set
// partitions): about 190,000 for n = 7 (BenchmarkEnumerate, 0.14 s) and
// 1.3 million for n = 8, the most maxPins allows (BenchmarkEnumerateNine,
// 0.7 s).
const (
	maxPins     = 9
	maxNodes    = 32 // pins and internal nodes together
	maxElements = 32
)

// Net ids used while resolving a strapping: 1..4 the terminals vp, vn, ref
// and out, Tie1.. the tie groups, then one id per open pin and one per
// internal node.
const (
	idOpen     = int(Tie1) + maxPins
	idInternal = idOpen + maxPins
	maxNets    = idInternal + maxNodes
)

// model is a validated network with its nodes indexed: the pins first, in
// the network's order, then the internal nodes.
type model struct {
	net    *catalog.MatchedNetwork
	pins   []string
	nodes  []string
	ea, eb []int // element ends, node indices
	ohm    []float64
	names  []string
	// sensNames name the current source across each element.
	sensNames []string
	inv       int // internal op-amp nodes, node indices
	ninv      int
	out       int
	outPin    int
}

// prepare validates n and indexes its nodes.
func prepare(n *catalog.MatchedNetwork) (*model, error) {
	if n == nil {
		return nil, fmt.Errorf("%w: no network given", ErrNetwork)
	}
	bad := func(format string, a ...any) error {
		return fmt.Errorf("%w: "+format, append([]any{ErrNetwork}, a...)...)
	}
	m := &model{net: n, pins: n.Pins}
	switch {
	case len(n.Elements) == 0:
		return nil, bad("no elements; list the resistors inside with their values and nodes")
	case len(n.Elements) > maxElements:
		return nil, bad("%d elements, more than the %d a strapping enumeration takes", len(n.Elements), maxElements)
	case len(n.Pins) == 0:
		return nil, bad("no pins; list the nodes reachable outside the package")
	case len(n.Pins) > maxPins:
		return nil, bad("%d pins, more than the %d a strapping enumeration takes", len(n.Pins), maxPins)
	case n.OpAmpInv == "" || n.OpAmpNonInv == "" || n.OpAmpOut == "":
		return nil, bad("the internal op-amp's inverting input, non-inverting input and output nodes must all be named")
	case n.OpAmpInv == n.OpAmpNonInv || n.OpAmpInv == n.OpAmpOut || n.OpAmpNonInv == n.OpAmpOut:
		return nil, bad("the internal op-amp's nodes %q, %q and %q must differ", n.OpAmpInv, n.OpAmpNonInv, n.OpAmpOut)
	}
	if !math.IsNaN(n.RatioTolerance) && !(n.RatioTolerance >= 0 && n.RatioTolerance < 1) {
		return nil, bad("ratio tolerance %g: give a fraction from 0 to below 1 (0.001 for 0.1 %%), or leave it unknown", n.RatioTolerance)
	}
	if !math.IsNaN(n.RatioDriftPPM) && !(n.RatioDriftPPM >= 0 && !math.IsInf(n.RatioDriftPPM, 0)) {
		return nil, bad("ratio tracking %g ppm/K: give a figure of 0 or more, or leave it unknown", n.RatioDriftPPM)
	}
	index := map[string]int{}
	node := func(name string) int {
		if k, ok := index[name]; ok {
			return k
		}
		index[name] = len(m.nodes)
		m.nodes = append(m.nodes, name)
		return len(m.nodes) - 1
	}
	for i, p := range n.Pins {
		if p == "" || strings.ContainsAny(p, "= \t\r\n") {
			return nil, bad("pin %d is named %q; a pin name must be non-empty and hold no '=' or space", i+1, p)
		}
		if _, dup := index[p]; dup {
			return nil, bad("pin %q is listed twice", p)
		}
		node(p)
	}
	seen := map[string]string{}
	for i, e := range n.Elements {
		what := fmt.Sprintf("element %d (%q)", i+1, e.Name)
		key := strings.ToLower(e.Name)
		switch {
		case e.Name == "":
			return nil, bad("element %d has no name", i+1)
		case seen[key] != "":
			// SPICE ignores case, and the decks must name each element once.
			return nil, bad("%s has the name of %q (names are compared ignoring case)", what, seen[key])
		case !(e.Ohms > 0) || math.IsInf(e.Ohms, 0):
			return nil, bad("%s is %g ohm; give a positive finite resistance", what, e.Ohms)
		case e.A == "" || e.B == "":
			return nil, bad("%s must name both nodes it joins", what)
		case e.A == e.B:
			return nil, bad("%s joins node %q to itself", what, e.A)
		}
		seen[key] = e.Name
		m.ea = append(m.ea, node(e.A))
		m.eb = append(m.eb, node(e.B))
		m.ohm = append(m.ohm, e.Ohms)
		m.names = append(m.names, e.Name)
		m.sensNames = append(m.sensNames, "sens "+e.Name)
	}
	m.inv, m.ninv, m.out = node(n.OpAmpInv), node(n.OpAmpNonInv), node(n.OpAmpOut)
	if len(m.nodes) > maxNodes {
		return nil, bad("%d nodes, more than the %d a strapping enumeration takes", len(m.nodes), maxNodes)
	}
	if m.out >= len(n.Pins) {
		return nil, bad("the op-amp's output %q is not among the pins; an amplifier must bring its output out", n.OpAmpOut)
	}
	m.outPin = m.out
	touched := make([]bool, len(m.nodes))
	for i := range m.ea {
		touched[m.ea[i]], touched[m.eb[i]] = true, true
	}
	for i, p := range n.Pins {
		if !touched[i] && i != m.inv && i != m.ninv && i != m.out {
			return nil, bad("pin %q joins no element and no op-amp node", p)
		}
	}
	return m, nil
}

// resolved is a strapping reduced to nets and the elements that carry
// current, with no allocation (the enumeration resolves every assignment).
type resolved struct {
	net  [maxNodes]uint8   // node -> net id
	live [maxElements]bool // element carries current
	deg  [maxNets]uint8    // element ends of live elements per net
	anc  [maxNets]bool     // net is anchored: a terminal or an op-amp input
	par  [maxNets]uint8    // union-find parents
	ok   [maxNets]bool     // union-find root reaches an anchor
	can  [maxNets]uint8    // canonical net numbers, see key
	key  [2*maxElements + 2]uint8
	used [Tie1]bool // terminal nets vp, vn, ref, out in use
}

func (r *resolved) find(x uint8) uint8 {
	for r.par[x] != x {
		r.par[x] = r.par[r.par[x]]
		x = r.par[x]
	}
	return x
}

// resolve reduces the pin terminals c (len(m.pins), the output pin at
// Output) to nets, drops the elements that carry no current (shorted, in a
// group reaching no anchor, or hanging from an unconnected net) and builds
// the canonical key: for each live element its two nets, numbered 1..4 for
// the terminals and from 5 by first appearance, then the op-amp inputs'
// nets. Equivalent strappings have equal keys.
func (m *model) resolve(c []Terminal, r *resolved) {
	np := len(m.pins)
	for k := range m.nodes {
		switch {
		case k >= np:
			r.net[k] = uint8(idInternal + k - np)
		case c[k] == Open:
			r.net[k] = uint8(idOpen + k)
		default:
			r.net[k] = uint8(c[k])
		}
	}
	clear(r.anc[:])
	clear(r.deg[:])
	clear(r.ok[:])
	for x := range r.par {
		r.par[x] = uint8(x)
	}
	for t := InPlus; t < Tie1; t++ {
		r.anc[t] = true
	}
	r.anc[r.net[m.inv]], r.anc[r.net[m.ninv]] = true, true
	ne := len(m.ea)
	for i := range ne {
		a, b := r.net[m.ea[i]], r.net[m.eb[i]]
		r.live[i] = a != b
		if r.live[i] {
			if ra, rb := r.find(a), r.find(b); ra != rb {
				r.par[ra] = rb
			}
		}
	}
	for x := range r.anc {
		if r.anc[x] {
			r.ok[r.find(uint8(x))] = true
		}
	}
	for i := range ne {
		if r.live[i] && !r.ok[r.find(r.net[m.ea[i]])] {
			r.live[i] = false
		}
		if r.live[i] {
			r.deg[r.net[m.ea[i]]]++
			r.deg[r.net[m.eb[i]]]++
		}
	}
	for changed := true; changed; {
		changed = false
		for i := range ne {
			if !r.live[i] {
				continue
			}
			a, b := r.net[m.ea[i]], r.net[m.eb[i]]
			if (!r.anc[a] && r.deg[a] == 1) || (!r.anc[b] && r.deg[b] == 1) {
				r.live[i] = false
				r.deg[a]--
				r.deg[b]--
				changed = true
			}
		}
	}
	clear(r.can[:])
	clear(r.key[:])
	next := uint8(Tie1)
	canon := func(x uint8) uint8 {
		if x < uint8(Tie1) {
			return x
		}
		if r.can[x] == 0 {
			r.can[x] = next
			next++
		}
		return r.can[x]
	}
	for i := range ne {
		if r.live[i] {
			r.key[2*i], r.key[2*i+1] = canon(r.net[m.ea[i]]), canon(r.net[m.eb[i]])
		}
	}
	r.key[2*maxElements] = canon(r.net[m.inv])
	r.key[2*maxElements+1] = canon(r.net[m.ninv])
	for t := InPlus; t < Tie1; t++ {
		r.used[t] = r.deg[t] > 0 || r.net[m.inv] == uint8(t) || r.net[m.ninv] == uint8(t)
	}
}

// candidate reports whether a resolved strapping can be an amplifier at
// all: an input in use, an element at the output, and each op-amp input on
// a net of its own that an element or a source fixes (otherwise the
// circuit is singular, and the solver need not be asked).
func (r *resolved) candidate(m *model) bool {
	inv, ninv := r.net[m.inv], r.net[m.ninv]
	fixed := func(x uint8) bool { return r.deg[x] > 0 || (x >= uint8(InPlus) && x <= uint8(Ref)) }
	return (r.used[InPlus] || r.used[InMinus]) && r.deg[Output] > 0 && inv != ninv && fixed(inv) && fixed(ninv)
}
