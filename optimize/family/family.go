package family

import (
	"errors"
	"fmt"
)

// Sentinel errors. Callers branch on them with errors.Is.
var (
	// ErrUnknown is returned for a family name the registry does not list.
	ErrUnknown = errors.New("family: unknown circuit family")
	// ErrOption is returned for a netlist option the family does not have.
	ErrOption = errors.New("family: option does not apply to this family")
	// ErrNoNetlist is returned for a family built from one catalog part
	// whose figures come from its data sheet (no positions to solve).
	ErrNoNetlist = errors.New("family: no netlist, the stage is one catalog part")
)

// Input is the kind of signal a family's input takes.
type Input int

// Inputs.
const (
	// SingleEnded is one voltage against ground (spec input.single_ended).
	SingleEnded Input = iota
	// Differential is a voltage between two terminals riding on a common
	// mode (spec input.differential and input.common_mode).
	Differential
	// Current is a current through a shunt whose low side sits at the
	// common mode (spec input.current, gain in V/A).
	Current
)

// RefUse says what a family does with the spec's reference voltage.
type RefUse int

// Uses of the reference.
const (
	// RefNone: the stage has no reference input; a spec giving one is
	// refused.
	RefNone RefUse = iota
	// RefOutput: the reference is the ideal output at zero input.
	RefOutput
	// RefShift: the output is shifted by a fraction of the reference; the
	// spec must give it, and derives gain and offset from its input and
	// output ranges (Family.OutputRange).
	RefShift
)

// Options select the optional parts of a family's netlist. The zero value
// is the bare circuit. A family refuses (ErrOption) an option it does not
// list in Family.Allows; Load applies to every family.
type Options struct {
	// RefDivider: the reference node is driven by source "vrefsrc" through
	// divider "Ra" (vrefsrc to ref) and "Rb" (ref to ground), whose
	// Thevenin resistance Ra||Rb is in series with the stage's reference
	// resistor, instead of by the ideal source "vref".
	RefDivider bool
	// Load adds "Rload" from the output node to ground.
	Load bool
	// SourceImpedance puts a source resistance in series with each input
	// source: "Rsrc" for a single input, "Rsrcp" and "Rsrcn" for the vp
	// and vn inputs.
	SourceImpedance bool
	// Buffer: a unity-gain follower "A1" after a passive stage's output.
	Buffer bool
	// RefImpedance: the reference source drives the stage through its own
	// output resistance "Rref", from the source's node to node "refz",
	// where the stage's reference resistor begins.
	RefImpedance bool
	// OffsetToInverting: the reference enters the inverting side, giving a
	// negative offset, instead of being summed into the non-inverting node.
	OffsetToInverting bool
	// Part is the circuit inside the design's catalog part as the design
	// straps it, for a family whose netlist comes from its part
	// (Search.Strappings); nil elsewhere, and for such a family the
	// netlist's typical part.
	Part PartCircuit
}

// PartCircuit is the circuit inside one catalog part as a design uses it:
// an amplifier with matched resistors inside, its pins tied as the design
// says (package strap implements it). Build adds the elements that carry
// current (each a position, named as the part's data sheet names it, with
// its nominal value) and the internal op-amp "A1", with the part's
// positive input, negative input and reference on nodes inp, inn and ref
// and its output on "out"; its other nodes get names of its own that start
// with "x". The family adds the sources, the spec's impedances and the load.
type PartCircuit interface {
	Build(b Builder, inp, inn, ref string) error
}

// Option is one optional part of a netlist, as a bit of Family.Allows.
type Option uint8

// Options a family may allow.
const (
	AllowRefDivider Option = 1 << iota
	AllowSourceImpedance
	AllowBuffer
	AllowRefImpedance
	AllowOffsetToInverting
)

// Builder receives a family's netlist, element by element, with nodes by
// name (package circuit implements it and solves the result; a recorder
// here lists positions). Node "0" is ground.
type Builder interface {
	// Resistor adds resistor name from node a to node b.
	Resistor(name, a, b string, ohm float64)
	// Source adds an ideal voltage source name fixing node at v volts.
	Source(name, node string, v float64)
	// Current adds a current source name of a amperes leaving node from
	// and entering node to.
	Current(name, from, to string, a float64)
	// OpAmp adds op-amp name with inputs plus and minus driving node out.
	OpAmp(name, plus, minus, out string)
}

// Family is one circuit family: everything about it that is particular to
// it, so that the spec reader, the netlist solver, the budget and the
// search work through these fields and never on a family's name.
//
// Netlist conventions every family keeps (the budget reads the netlist by
// them): the output node is "out"; the signal is source "vin" (single
// ended), sources "vp" and "vn" (differential) or current source "isense"
// with the shunt's low side fixed by source "vbus" (current); the
// reference is source "vref" (or "vrefsrc" behind a reference divider
// "Ra"/"Rb"); current source "iload" is what the load draws from the
// output; resistors "Rsrc", "Rsrcp", "Rsrcn", "Rref" and "Rload" stand for
// the spec's source, reference and load impedances, every other resistor
// is a position the design fills.
//
// To add a family, write one file in this package that declares a Family
// value with its doc comment (topology, equations, sources) and list it in
// the registry (registry.go).
type Family struct {
	// Name is the family's name in specs, designs and results.
	Name string
	// About is one line on what the family builds, for listings.
	About string
	// Input is the kind of signal the family takes.
	Input Input
	// Reference is what the family does with the spec's reference.
	Reference RefUse
	// OutputRange: the spec gives an output range instead of a gain (gain
	// = output span / input span, offset = out.min - gain·in.min), and the
	// family must be listed alone.
	OutputRange bool
	// InputAtPin: the input drives an amplifier pin directly, so its range
	// must lie within the rails.
	InputAtPin bool
	// Shunt is the position that carries a current input (Input Current),
	// "" for none.
	Shunt string
	// Allows lists the netlist options the family has besides Load.
	Allows Option
	// GainProblem says why the spec's gain g cannot be made by the family
	// ("" when it can).
	GainProblem func(g float64) string
	// Search is how the search walks the family's designs.
	Search Search
	// Netlist builds the family's topology with options o on b, with
	// nominal values that give a working circuit of typical gain (callers
	// overwrite them with a design's values). Nil for a family that is one
	// catalog part (an amplifier with matched resistors inside), whose
	// budget comes from its data sheet.
	Netlist func(b Builder, o Options) error
}

// Strategy is the shape of a family's search space.
type Strategy int

// Strategies.
const (
	// RatioPair: every position takes one of two values, Rg and Rf, each of
	// one resistor grade (or a matched four-element network when
	// Search.Networks), and the gain is set by k = Rf/Rg (Search.Ratio).
	RatioPair Strategy = iota
	// TwoStage: an input stage set by k = Rf/Rg (Search.Ratio) and a
	// second stage of gain R2/R1 searched exactly per second-stage gain.
	TwoStage
	// ShiftNetwork: an input network of three values R1, R2, R3 that sets
	// slope and offset from the reference, and a feedback pair Rg = Rf.
	ShiftNetwork
	// Shunt: a shunt from the catalog, then the family Search.As for each
	// shunt value with the limits less the shunt's share.
	Shunt
	// Part: one catalog part (an amplifier with matched resistors inside)
	// at one of its gains, walked alongside the circuit of Search.As.
	Part
)

// Search is what the search needs of a family beyond its netlist: the
// shape of its space and the screening model of its ratio.
type Search struct {
	Strategy Strategy
	// As is the family whose space a Shunt or Part family is walked in
	// (nil: the family itself).
	As *Family
	// Networks: the stage may sit on a matched four-element network from
	// the catalog instead of discrete resistors.
	Networks bool
	// Op-amps is the number of op-amps of the stage (0: passive).
	OpAmps int
	// Ratio is the screening model of the gain-setting ratio (RatioPair
	// and TwoStage).
	Ratio *Ratio
	// Strappings: a Part family whose part makes its gains by how its pins
	// are tied (package strap enumerates them from the part's matched
	// network, catalog.Amplifier.Network) instead of at its front-page
	// gains; each usable strapping is one design, and the budget solves the
	// strapped circuit (Options.Part) like any netlist.
	Strappings bool
	// Shift is the design model of a ShiftNetwork family.
	Shift *Shift
	// Sense is the shunt model of a Shunt family.
	Sense *Sense
}

// Sense is the model of a family that reads a current through a shunt Rs
// with the stage of family Search.As behind it.
type Sense struct {
	// MinOhm and MaxOhm bound the shunt values the search considers, and
	// MinStageGain, MaxStageGain the gain of the stage behind the shunt.
	MinOhm, MaxOhm             float64
	MinStageGain, MaxStageGain float64
	// Stage maps the spec's current range [imin, imax] and the shunt's
	// low-side range [cmMin, cmMax] onto the stage's differential input
	// and common mode for shunt value rs.
	Stage func(imin, imax, cmMin, cmMax, rs float64) (inMin, inMax, vcmMin, vcmMax float64)
}

// Shift is the design model of a family that maps an input of slope m onto
// an output with offset b from a reference vref through an input network
// and a feedback pair of one value (Rg = Rf).
type Shift struct {
	// FeedbackNG is the noise gain the equal feedback pair gives.
	FeedbackNG float64
	// NoiseGain is the target noise gain for (m, b, vref).
	NoiseGain func(m, b, vref float64) float64
	// Ratios returns the input network's target ratios R2/R1 and R3/R1.
	Ratios func(m, b, vref float64) (q2, q3 float64)
	// Node is the voltage at the amplifier's inputs for input vin.
	Node func(m, b, vref, vin float64) float64
	// Problem says why (m, b, vref) cannot be built ("" when it can).
	Problem func(m, b, vref float64) string
	// Positions returns the positions of the input network and of the
	// feedback side, with the reference into the inverting node or not.
	Positions func(inverting bool) (in, fb []string)
}

// Ratio is the screening model of a stage whose gain the ratio k = Rf/Rg
// of its two values sets: pure functions of k and the spec's figures that
// the search's screening, bounds and ratings use (each family's doc
// comment gives the equations and sources). The exact budget never uses
// them: it solves the netlist.
type Ratio struct {
	// Rg and Rf are the positions that take the Rg and the Rf value, and
	// PerRg, PerRf how many placements each value has per stage.
	Rg, Rf       []string
	PerRg, PerRf int
	// Of is the ratio k that makes gain magnitude g (of the input stage,
	// for TwoStage: g over the second stage's gain).
	Of func(g float64) float64
	// Gain is the ideal gain magnitude at ratio k.
	Gain func(k float64) float64
	// Sens is the magnitude of the gain's sensitivity to the ratio,
	// (k/G)·dG/dk.
	Sens func(k float64) float64
	// Mult is the exact factor by which the ideal gain moves when k is
	// multiplied by m.
	Mult func(k, m float64) float64
	// NoiseGain is the gain the amplifier's offset and noise see, 1 + k
	// for a single op-amp stage.
	NoiseGain func(k float64) float64
	// Inverts: the output is -G times the input.
	Inverts bool
	// FourResistor: two ratios R2/R1 and R4/R3 of one value pair, driven
	// differentially: their mismatch sets a CMRR, the bias currents act
	// through matched impedances (offset Ios·Rf∥Rg + Ib·Rf∥Rg·2t) and both
	// inputs add resistor noise.
	FourResistor bool
	// Passive: no amplifier; the load's leakage stands in for its bias
	// current and the bandwidth is the source's and the load's.
	Passive bool
	// SourceInRg: the spec's source resistance adds to Rg (the input
	// resistor); SourceInRf: to Rf (a divider's top). LoadAcrossRg: the
	// spec's load is in parallel with Rg (a divider's bottom).
	SourceInRg, SourceInRf, LoadAcrossRg bool
	// Voltages returns the voltages across an Rg and an Rf position at
	// ratio k for input vd (differential or single ended), common mode vcm
	// and reference ref.
	Voltages func(k, vd, vcm, ref float64) (vg, vf float64)
	// Pin returns the voltage at the op-amp's input pins.
	Pin func(k, vd, vcm, ref float64) float64
	// Out returns the ideal output for input vd at gain magnitude g and
	// reference ref.
	Out func(g, vd, ref float64) float64
	// Zin returns the smallest input impedance the source sees with values
	// rg and rf (+Inf where the input is an op-amp pin).
	Zin func(rg, rf float64) float64
	// Stage2 is the second stage of a TwoStage family (nil otherwise).
	Stage2 *Stage2
}

// Stage2 is the second stage of a two-stage family: a difference amplifier
// of gain k2 = R2/R1 on the first stage's outputs, the stage's gain then
// Gain(k)·k2. Its functions take the first stage's ratio k, k2, the input
// vd, the common mode vcm and the reference ref.
type Stage2 struct {
	// Pins returns the lowest and highest voltage at any op-amp input pin.
	Pins func(k, k2, vd, vcm, ref float64) (lo, hi float64)
	// Voltages returns the voltages across the second stage's input (R1,
	// R3) and feedback (R2, R4) positions for the stage's output out.
	Voltages func(k, k2, vd, vcm, ref, out float64) (v1, v2 float64)
	// Swing returns the range the first stage's outputs swing over.
	Swing func(k, vd, vcm float64) (lo, hi float64)
	// NoiseGain is the largest noise gain of any of its op-amps.
	NoiseGain func(k, k2 float64) float64
}

// SearchFamily returns the family whose space f is walked in.
func (f *Family) SearchFamily() *Family {
	if f.Search.As != nil {
		return f.Search.As
	}
	return f
}

// Build builds f's netlist with options o on b, after checking the options
// against f.Allows.
func (f *Family) Build(b Builder, o Options) error {
	if f.Netlist == nil {
		return fmt.Errorf("%w: %s", ErrNoNetlist, f.Name)
	}
	if err := f.CheckOptions(o); err != nil {
		return err
	}
	return f.Netlist(b, o)
}

// CheckOptions refuses an option f does not allow.
func (f *Family) CheckOptions(o Options) error {
	for _, c := range []struct {
		set   bool
		allow Option
		what  string
	}{
		{o.RefDivider, AllowRefDivider, "RefDivider (reference divider)"},
		{o.RefImpedance, AllowRefImpedance, "RefImpedance (no reference input)"},
		{o.SourceImpedance, AllowSourceImpedance, "SourceImpedance (no voltage input)"},
		{o.Buffer, AllowBuffer, "Buffer"},
		{o.OffsetToInverting, AllowOffsetToInverting, "OffsetToInverting"},
	} {
		if c.set && f.Allows&c.allow == 0 {
			return fmt.Errorf("%w: %s is not available for family %q", ErrOption, c.what, f.Name)
		}
	}
	return nil
}

// GainUnit is the unit of the family's gain: V/A for a current input,
// else V/V.
func (f *Family) GainUnit() string {
	if f.Input == Current {
		return "V/A"
	}
	return "V/V"
}

// Integrated reports whether the family is one catalog part with its
// resistors inside: a design names no positions, only the part (at one of
// its gains, or strapped).
func (f *Family) Integrated() bool { return f.Netlist == nil || f.Search.Strappings }

// Datasheet reports whether a design of the family is budgeted from its
// part's data sheet alone (an integrated family with no netlist).
func (f *Family) Datasheet() bool { return f.Netlist == nil }

// Positions returns the positions of f's netlist with options o, in
// netlist order (none for a family budgeted from a data sheet; for a
// family whose part is strapped, the elements of o.Part, or of the typical
// part when o.Part is nil).
func (f *Family) Positions(o Options) ([]string, error) {
	r := &recorder{}
	if f.Datasheet() {
		return nil, nil
	}
	if err := f.Build(r, o); err != nil {
		return nil, err
	}
	return r.positions, nil
}

// Amplified reports whether a design of f with options o has an amplifier
// (an integrated family is one).
func (f *Family) Amplified(o Options) bool {
	if f.Datasheet() {
		return true
	}
	r := &recorder{}
	return f.Build(r, o) == nil && r.amps > 0
}

// SpecResistor reports whether netlist resistor name stands for an
// impedance the spec fixes (source, reference, load) rather than a
// position a design fills.
func SpecResistor(name string) bool {
	switch name {
	case "Rload", "Rsrc", "Rsrcp", "Rsrcn", "Rref":
		return true
	}
	return false
}

// recorder is a Builder that notes positions and amplifiers.
type recorder struct {
	positions []string
	amps      int
}

func (r *recorder) Resistor(name, _, _ string, _ float64) {
	if !SpecResistor(name) {
		r.positions = append(r.positions, name)
	}
}
func (r *recorder) Source(string, string, float64)          {}
func (r *recorder) Current(string, string, string, float64) {}
func (r *recorder) OpAmp(string, string, string, string)    { r.amps++ }
