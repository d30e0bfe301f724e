package circuit

import (
	"bufio"
	"bytes"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
)

// SPICEInfGain is the VCVS gain WriteSPICE writes for an ideal op-amp
// (Gain = +Inf), because SPICE has no infinite gain. Its effect is a
// relative closed-loop gain error of about NG/SPICEInfGain (1e-6 at a noise
// gain of 100; Franco ch. 1, from memory). It is not larger because
// ngspice's own rounding grows with the gain, to about 2e-16 x gain x the
// node voltages (measured here: at 1e9 the deck differs from the exact
// finite-gain solution by 1e-5 relative on offset outputs, at 1e12 by 1e-2);
// 1e8 keeps both effects near 1e-6.
const SPICEInfGain = 1e8

// WriteSPICE writes an ngspice deck of exactly this netlist: each resistor
// as an R element, each source as a V element to ground, each current
// source as an I element (SPICE's I n+ n- pushes current from n+ through
// the source to n-, the same convention as CurrentSource), and each op-amp
// as an E element (VCVS) from its output to ground, controlled by
// (Plus + Vos, Minus) where Vos is a V element in series with the
// non-inverting input and the bias currents are I elements from the input
// nodes to ground. The control block runs a DC operating point (.op) and
// prints every node voltage with 15 digits as lines "name = value",
// then quits with exit status 0 (ngspice -b otherwise exits 1 because the
// deck has no .print line). An
// op-amp node named a1_vos is introduced for each op-amp. Element names are
// the netlist names, prefixed by the SPICE type letter when they do not
// start with it.
//
// Characters SPICE cannot take in a name (white space, '=', '(', ')', ',')
// are written as '_', so "noise Rf" becomes I_noise_Rf. WriteSPICE returns
// an error wrapping ErrSPICE, and writes nothing, for an empty name, two
// elements or two nodes whose names are the same once written (SPICE
// ignores case), a node index out of range, or a value that is NaN or
// infinite where SPICE needs a number (only resistances and gains may be
// +Inf).
func (n *Netlist) WriteSPICE(w io.Writer) error {
	if err := n.checkSPICE(); err != nil {
		return err
	}
	bw := bufio.NewWriter(w)
	fmt.Fprintf(bw, "* plumb circuit %s\n", n.Family)
	for _, r := range n.Resistors {
		if math.IsInf(r.Ohm, 1) {
			fmt.Fprintf(bw, "* %s is open, written as %g ohm\n", r.Name, SPICEOpenOhm)
		}
	}
	nodes := n.spiceNodes()
	for _, r := range n.Resistors {
		fmt.Fprintf(bw, "%s %s %s %s\n", spiceName('R', r.Name), nodes[r.A], nodes[r.B], spiceNum(r.Ohm))
	}
	for _, v := range n.Sources {
		fmt.Fprintf(bw, "%s %s 0 DC %s\n", spiceName('V', v.Name), nodes[v.Node], spiceNum(v.V))
	}
	for _, c := range n.Currents {
		fmt.Fprintf(bw, "%s %s %s DC %s\n", spiceName('I', c.Name), nodes[c.From], nodes[c.To], spiceNum(c.A))
	}
	for _, a := range n.OpAmps {
		id := strings.ToLower(spiceSafe(a.Name))
		vos := id + "_vos"
		gain := a.Gain
		if math.IsInf(gain, 1) {
			gain = SPICEInfGain
		}
		fmt.Fprintf(bw, "VOS_%s %s %s DC %s\n", id, vos, nodes[a.Plus], spiceNum(a.Vos))
		fmt.Fprintf(bw, "E%s %s 0 %s %s %s\n", id, nodes[a.Out], vos, nodes[a.Minus], spiceNum(gain))
		fmt.Fprintf(bw, "IBP_%s %s 0 DC %s\n", id, nodes[a.Plus], spiceNum(a.IbPlus))
		fmt.Fprintf(bw, "IBM_%s %s 0 DC %s\n", id, nodes[a.Minus], spiceNum(a.IbMinus))
	}
	bw.WriteString(".control\nset numdgt=15\nop\nprint all\nquit 0\n.endc\n.end\n")
	return bw.Flush()
}

// ErrSPICE is returned by WriteSPICE for a netlist that cannot be written
// as a SPICE deck.
var ErrSPICE = errors.New("circuit: netlist cannot be written as SPICE")

// checkSPICE validates names, indices and values for WriteSPICE.
func (n *Netlist) checkSPICE() error {
	bad := func(format string, a ...any) error {
		return fmt.Errorf("%w: "+format, append([]any{ErrSPICE}, a...)...)
	}
	seen := map[string]string{}
	name := func(kind, s string) error {
		if s == "" {
			return bad("a %s has an empty name; give it one", kind)
		}
		key := kind + strings.ToLower(spiceSafe(s))
		if prev, ok := seen[key]; ok {
			return bad("%s names %q and %q are the same to SPICE, which ignores case; rename one", kind, prev, s)
		}
		seen[key] = s
		return nil
	}
	finite := func(what string, v float64) error {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return bad("%s is %g; SPICE needs a finite number", what, v)
		}
		return nil
	}
	nn := len(n.Nodes)
	idx := func(what string, ks ...int) error {
		for _, k := range ks {
			if k < 0 || k >= nn {
				return bad("%s has node index %d, outside 0..%d", what, k, nn-1)
			}
		}
		return nil
	}
	var errs []error
	for i, s := range n.Nodes {
		if i > 0 {
			errs = append(errs, name("node", s))
		}
	}
	for _, r := range n.Resistors {
		errs = append(errs, name("resistor", r.Name), idx("resistor "+r.Name, r.A, r.B))
		if !math.IsInf(r.Ohm, 1) {
			errs = append(errs, finite("resistor "+r.Name, r.Ohm))
		}
	}
	for _, v := range n.Sources {
		errs = append(errs, name("voltage source", v.Name), idx("source "+v.Name, v.Node), finite("source "+v.Name, v.V))
	}
	for _, c := range n.Currents {
		errs = append(errs, name("current source", c.Name), idx("current source "+c.Name, c.From, c.To), finite("current source "+c.Name, c.A))
	}
	for _, a := range n.OpAmps {
		errs = append(errs, name("op-amp", a.Name), idx("op-amp "+a.Name, a.Plus, a.Minus, a.Out),
			finite("op-amp "+a.Name+" Vos", a.Vos), finite("op-amp "+a.Name+" IbPlus", a.IbPlus), finite("op-amp "+a.Name+" IbMinus", a.IbMinus))
		if !math.IsInf(a.Gain, 1) {
			errs = append(errs, finite("op-amp "+a.Name+" gain", a.Gain))
		}
	}
	for _, err := range errs {
		if err != nil {
			return err
		}
	}
	return nil
}

// spiceNodes returns the SPICE names of the nodes: ground is 0, the others
// lower-case (SPICE folds case).
func (n *Netlist) spiceNodes() []string {
	s := make([]string, len(n.Nodes))
	for i, name := range n.Nodes {
		s[i] = strings.ToLower(spiceSafe(name))
	}
	s[0] = "0"
	return s
}

// spiceSafe replaces the characters SPICE cannot take in a name by '_'.
func spiceSafe(name string) string {
	return strings.Map(func(r rune) rune {
		if strings.ContainsRune(" \t\r\n=(),", r) {
			return '_'
		}
		return r
	}, name)
}

// spiceName prefixes name with the element letter unless it starts with it.
func spiceName(letter byte, name string) string {
	name = spiceSafe(name)
	if len(name) > 0 && (name[0]|0x20) == (letter|0x20) {
		return name
	}
	return string(letter) + "_" + name
}

// SPICEOpenOhm is the resistance WriteSPICE writes for an open resistor
// (Ohm = +Inf), which SPICE cannot parse.
const SPICEOpenOhm = 1e30

// spiceNum formats v with full float64 precision; +Inf (an open resistor)
// becomes SPICEOpenOhm.
func spiceNum(v float64) string {
	if math.IsInf(v, 1) {
		v = SPICEOpenOhm
	}
	return strconv.FormatFloat(v, 'g', 17, 64)
}

// RunNgspice writes n as a deck (WriteSPICE) into the directory dir, runs
// the ngspice program at path on it in batch mode and returns every value
// it prints, node voltages and voltage-source branch currents
// ("v_name#branch", positive into the source's node), by lower-case
// name. It serves the cross-checks against ngspice in this and other
// packages' tests.
func RunNgspice(path, dir string, n *Netlist) (map[string]float64, error) {
	var deck bytes.Buffer
	if err := n.WriteSPICE(&deck); err != nil {
		return nil, err
	}
	file := filepath.Join(dir, "deck.cir")
	if err := os.WriteFile(file, deck.Bytes(), 0o644); err != nil {
		return nil, fmt.Errorf("circuit: writing the SPICE deck: %w", err)
	}
	out, err := exec.Command(path, "-b", file).CombinedOutput()
	if err != nil {
		return nil, fmt.Errorf("circuit: ngspice: %w\n%s", err, out)
	}
	v := map[string]float64{}
	sc := bufio.NewScanner(bytes.NewReader(out))
	for sc.Scan() {
		name, val, ok := strings.Cut(sc.Text(), " = ")
		if !ok {
			continue
		}
		if f, err := strconv.ParseFloat(strings.TrimSpace(val), 64); err == nil {
			v[strings.ToLower(strings.TrimSpace(name))] = f
		}
	}
	if len(v) == 0 {
		return nil, fmt.Errorf("circuit: ngspice printed no values:\n%s", out)
	}
	return v, nil
}
