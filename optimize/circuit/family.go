package circuit

import (
	"fmt"
	"strings"
)

// Family names one circuit topology.
type Family string

// The circuit families plumb models.
const (
	Inverting    Family = "inverting"
	NonInverting Family = "noninverting"
	Difference   Family = "difference"
	Divider      Family = "divider"
	CurrentSense Family = "current-sense"
	LevelShift   Family = "level-shift"
	InAmp        Family = "inamp"
)

// Families returns every family in a fixed order.
func Families() []Family {
	return []Family{Inverting, NonInverting, Difference, Divider, CurrentSense, LevelShift, InAmp}
}

// ParseFamily returns the family named s (case and surrounding space are
// ignored). An unknown name gives an error wrapping ErrFamily that lists
// the valid names.
func ParseFamily(s string) (Family, error) {
	t := strings.ToLower(strings.TrimSpace(s))
	for _, f := range Families() {
		if string(f) == t {
			return f, nil
		}
	}
	names := make([]string, 0, 7)
	for _, f := range Families() {
		names = append(names, string(f))
	}
	return "", fmt.Errorf("%w %q: use one of %s", ErrFamily, s, strings.Join(names, ", "))
}

// Options select the optional parts of a family's topology. The zero value
// is the bare circuit. New rejects an option that a family does not have.
type Options struct {
	// RefDivider (difference, current-sense): the reference node is driven
	// by source "vrefsrc" through divider "Ra" (vrefsrc to ref) and "Rb"
	// (ref to ground), whose Thevenin resistance Ra||Rb is in series with
	// R4, instead of by the ideal source "vref".
	RefDivider bool
	// Load adds "Rload" from the output node to ground.
	Load bool
	// SourceImpedance puts a source resistance in series with each input
	// source: "Rsrc" for a single input (inverting, noninverting, divider,
	// level-shift), "Rsrcp" and "Rsrcn" for the vp and vn inputs
	// (difference, inamp). Not available for current-sense, whose input is
	// a current.
	SourceImpedance bool
	// Buffer (divider): a unity-gain follower "A1" after the divider tap;
	// the output is the follower's output.
	Buffer bool
	// RefImpedance (difference, current-sense, level-shift, inamp): the
	// reference source drives the stage through its own output resistance
	// "Rref", from the source's node to node "refz", where the stage's
	// reference resistor (R4; R2 of a level shift; Ra of a reference
	// divider) begins.
	RefImpedance bool
	// OffsetToInverting (level-shift): the reference enters the inverting
	// side through R2, giving a negative offset, instead of being summed
	// into the non-inverting node.
	OffsetToInverting bool
}

// Nominal values New uses. They give a working circuit of typical gain;
// callers overwrite them with the design's values.
const (
	nominalGain    = 1e6  // open-loop gain of every op-amp, V/V
	nominalSrcOhm  = 100  // source impedance, ohm
	nominalLoadOhm = 10e3 // load on an amplifier output, ohm
	nominalDivLoad = 1e6  // load on an unbuffered divider, ohm
)

// New returns the netlist of family f with options o, nominal part values
// and op-amp gains of 1e6 V/V with zero offset and bias currents. Node 0 is
// ground; source-driven nodes carry the source's name, except that vbus
// drives the shunt's low side "sn". Topologies (A1..A3
// are op-amps, "+"/"-" their inputs; equations for ideal op-amps, the
// solver is exact at any gain; S. Franco, "Design with Operational
// Amplifiers and Analog Integrated Circuits", McGraw-Hill, chapters 1-2,
// from memory):
//
// Inverting, Vout = Vref(1 + Rf/Rg) - Vin Rf/Rg:
//
//	vin --[Rsrc]-- in --[Rg]-- m --[Rf]-- out --[Rload]-- 0
//	                           m = A1-   vref = A1+   A1 -> out
//
// NonInverting, Vout = Vin(1 + Rf/Rg) - Vref Rf/Rg:
//
//	vin --[Rsrc]-- in = A1+
//	vref --[Rg]-- m --[Rf]-- out       m = A1-   A1 -> out
//
// Difference, Vout = Vp R4/(R3+R4)(1+R2/R1) - Vn R2/R1 + Vref R3/(R3+R4)(1+R2/R1):
//
//	vn --[Rsrcn]-- inn --[R1]-- m --[R2]-- out      m = A1-
//	vp --[Rsrcp]-- inp --[R3]-- p --[R4]-- ref      p = A1+
//	ref = vref, or vrefsrc --[Ra]-- ref --[Rb]-- 0 with RefDivider
//	(R4 then ends on node "ref", else on node "vref"); with RefImpedance
//	the source drives the stage through vref (or vrefsrc) --[Rref]-- refz
//	(likewise for the level shift's R2 and the in-amp's R4)
//
// Divider, Vout = Vin Rbot/(Rtop+Rbot) unloaded; iload leaves the output
// (the tap, or the buffer's output):
//
//	vin --[Rsrc]-- in --[Rtop]-- tap --[Rbot]-- 0
//	tap is "out", or with Buffer tap = A1+, A1- = A1 out = "out"
//
// CurrentSense, Vout = Isense Rs R2/R1 when R4/R3 = R2/R1: vbus fixes the
// shunt's low side "sn" (the load's node), isense enters the high side "sp":
//
//	isense -> sp --[Rs]-- sn = vbus
//	sn --[R1]-- m --[R2]-- out   sp --[R3]-- p --[R4]-- ref (as Difference)
//
// LevelShift, Vout = (1 + Rf/Rg)(Vin/R1 + Vref/R2)/(1/R1 + 1/R2 + 1/R3):
//
//	vin --[Rsrc]-- in --[R1]-- p    vref --[R2]-- p    p --[R3]-- 0   p = A1+
//	0 --[Rg]-- m --[Rf]-- out                                         m = A1-
//
// LevelShift with OffsetToInverting,
// Vout = Vin R3/(R1+R3) (1 + Rf/Rg + Rf/R2) - Vref Rf/R2:
//
//	vin --[Rsrc]-- in --[R1]-- p --[R3]-- 0                           p = A1+
//	vref --[R2]-- m   0 --[Rg]-- m --[Rf]-- out                        m = A1-
//
// InAmp (three op-amps), Vout = (Vp - Vn)(1 + 2Rf/Rg) R2/R1 + Vref with
// Rf1 = Rf2 = Rf and R4/R3 = R2/R1:
//
//	vp --[Rsrcp]-- inp = A1+   A1 -> o1 --[Rf1]-- g1 = A1-
//	vn --[Rsrcn]-- inn = A2+   A2 -> o2 --[Rf2]-- g2 = A2-   g1 --[Rg]-- g2
//	o2 --[R1]-- m --[R2]-- out   o1 --[R3]-- p --[R4]-- vref   A3: p, m -> out
//
// Load adds out --[Rload]-- 0 to every family.
func New(f Family, o Options) (*Netlist, error) {
	if err := checkOptions(f, o); err != nil {
		return nil, err
	}
	b := &builder{n: &Netlist{Family: f, Nodes: []string{"0"}}}
	switch f {
	case Inverting:
		in := b.input("vin", "Rsrc", 1, o.SourceImpedance)
		b.source("vref", "vref", 0)
		b.res("Rg", in, "m", 10e3)
		b.res("Rf", "m", "out", 100e3)
		b.amp("A1", "vref", "m", "out")
	case NonInverting:
		in := b.input("vin", "Rsrc", 0.1, o.SourceImpedance)
		b.source("vref", "vref", 0)
		b.res("Rg", "m", "vref", 10e3)
		b.res("Rf", "m", "out", 90e3)
		b.amp("A1", in, "m", "out")
	case Difference:
		inp := b.input("vp", "Rsrcp", 0, o.SourceImpedance)
		inn := b.input("vn", "Rsrcn", 0, o.SourceImpedance)
		b.diffStage(inp, inn, "A1", o, 10e3, 10e3)
	case CurrentSense:
		b.source("vbus", "sn", 12)
		b.current("isense", "0", "sp", 1)
		b.res("Rs", "sp", "sn", 0.01)
		b.diffStage("sp", "sn", "A1", o, 1e3, 20e3)
	case Divider:
		in := b.input("vin", "Rsrc", 10, o.SourceImpedance)
		tap := "out"
		if o.Buffer {
			tap = "tap"
		}
		b.res("Rtop", in, tap, 90e3)
		b.res("Rbot", tap, "0", 10e3)
		// The load's leakage leaves the output: the tap itself, or the
		// buffer's output, which supplies it.
		b.current("iload", "out", "0", 0)
		if o.Buffer {
			b.amp("A1", tap, "out", "out")
		}
	case LevelShift:
		// Nominals map -10..10 V onto 0..2.5 V with Vref = 2.5 V (default)
		// and 0.5..4.5 V onto 0..3.3 V (OffsetToInverting).
		in := b.input("vin", "Rsrc", 0, o.SourceImpedance)
		b.source("vref", "vref", 2.5)
		ref := b.refInput("vref", o.RefImpedance)
		if o.OffsetToInverting {
			b.res("R1", in, "p", 10e3)
			b.res("R3", "p", "0", 16.337e3)
			b.res("R2", ref, "m", 100e3)
			b.res("Rg", "m", "0", 100e3)
			b.res("Rf", "m", "out", 16.5e3)
		} else {
			b.res("R1", in, "p", 160e3)
			b.res("R2", ref, "p", 40e3)
			b.res("R3", "p", "0", 14.545e3)
			b.res("Rg", "m", "0", 10e3)
			b.res("Rf", "m", "out", 10e3)
		}
		b.amp("A1", "p", "m", "out")
	case InAmp:
		inp := b.input("vp", "Rsrcp", 0, o.SourceImpedance)
		inn := b.input("vn", "Rsrcn", 0, o.SourceImpedance)
		b.source("vref", "vref", 0)
		ref := b.refInput("vref", o.RefImpedance)
		b.res("Rf1", "o1", "g1", 18e3)
		b.res("Rg", "g1", "g2", 4e3)
		b.res("Rf2", "o2", "g2", 18e3)
		b.amp("A1", inp, "g1", "o1")
		b.amp("A2", inn, "g2", "o2")
		b.res("R1", "o2", "m", 10e3)
		b.res("R2", "m", "out", 10e3)
		b.res("R3", "o1", "p", 10e3)
		b.res("R4", "p", ref, 10e3)
		b.amp("A3", "p", "m", "out")
	default:
		_, err := ParseFamily(string(f))
		return nil, err
	}
	if o.Load {
		load := nominalLoadOhm
		if f == Divider && !o.Buffer {
			load = nominalDivLoad
		}
		b.res("Rload", "out", "0", load)
	}
	b.n.Out = b.node("out")
	return b.n, nil
}

// checkOptions rejects options the family does not have.
func checkOptions(f Family, o Options) error {
	bad := func(opt string) error {
		return fmt.Errorf("%w: %s is not available for family %q", ErrOption, opt, f)
	}
	refDiv := f == Difference || f == CurrentSense
	switch {
	case o.RefDivider && !refDiv:
		return bad("RefDivider (reference divider)")
	case o.RefImpedance && (f == Inverting || f == NonInverting || f == Divider):
		return bad("RefImpedance (no reference input)")
	case o.SourceImpedance && f == CurrentSense:
		return bad("SourceImpedance (its input is a current)")
	case o.Buffer && f != Divider:
		return bad("Buffer")
	case o.OffsetToInverting && f != LevelShift:
		return bad("OffsetToInverting")
	}
	return nil
}

// builder assembles a netlist by node name.
type builder struct{ n *Netlist }

func (b *builder) node(name string) int {
	if i := b.n.Node(name); i >= 0 {
		return i
	}
	b.n.Nodes = append(b.n.Nodes, name)
	return len(b.n.Nodes) - 1
}

func (b *builder) res(name, a, c string, ohm float64) {
	b.n.Resistors = append(b.n.Resistors, Resistor{Name: name, A: b.node(a), B: b.node(c), Ohm: ohm})
}

func (b *builder) source(name, node string, v float64) {
	b.n.Sources = append(b.n.Sources, Source{Name: name, Node: b.node(node), V: v})
}

func (b *builder) current(name, from, to string, a float64) {
	b.n.Currents = append(b.n.Currents, CurrentSource{Name: name, From: b.node(from), To: b.node(to), A: a})
}

func (b *builder) amp(name, plus, minus, out string) {
	b.n.OpAmps = append(b.n.OpAmps, OpAmp{Name: name, Plus: b.node(plus), Minus: b.node(minus), Out: b.node(out), Gain: nominalGain})
}

// refInput returns the node the stage's reference resistor starts from:
// the reference source's node src, or with withR the far end "refz" of the
// source's resistance Rref.
func (b *builder) refInput(src string, withR bool) string {
	if !withR {
		return src
	}
	b.res("Rref", src, "refz", nominalSrcOhm)
	return "refz"
}

// input adds source src at a node of the same name and returns the node the
// circuit sees: the source node itself, or with withR the far end of a
// source resistance rname (node "in", "inp" or "inn").
func (b *builder) input(src, rname string, v float64, withR bool) string {
	b.source(src, src, v)
	if !withR {
		return src
	}
	far := map[string]string{"vin": "in", "vp": "inp", "vn": "inn"}[src]
	b.res(rname, src, far, nominalSrcOhm)
	return far
}

// diffStage adds the four-resistor difference stage R1..R4 around op-amp
// amp, inputs inp (through R3) and inn (through R1), gain g = r2/r1, and its
// reference: source "vref" directly, or "vrefsrc" through Ra/Rb, either
// through the source's own resistance Rref with o.RefImpedance.
func (b *builder) diffStage(inp, inn, amp string, o Options, r1, r2 float64) {
	r4, ref := r2, "vref"
	if o.RefDivider {
		ref = "ref"
		// Ra = Rb = r2/5 give a Thevenin resistance of r2/10, taken out of R4
		// so that R4 + Ra||Rb keeps the match R4'/R3 = R2/R1.
		b.source("vrefsrc", "vrefsrc", 5)
		b.res("Ra", b.refInput("vrefsrc", o.RefImpedance), "ref", r2/5)
		b.res("Rb", "ref", "0", r2/5)
		r4 = r2 - r2/10
	} else {
		b.source("vref", "vref", 0)
		ref = b.refInput("vref", o.RefImpedance)
	}
	b.res("R1", inn, "m", r1)
	b.res("R2", "m", "out", r2)
	b.res("R3", inp, "p", r1)
	b.res("R4", "p", ref, r4)
	b.amp(amp, "p", "m", "out")
}
