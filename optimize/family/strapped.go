package family

// Strapped is a difference stage built on one catalog part, an amplifier
// with matched resistors inside, whose pins are tied to make a gain its
// front page may not list (package strap enumerates every usable
// strapping of the part's network, catalog.Amplifier.Network). The
// design names the part and its strapping as pin connections
// ("IN-=vn IN+=vp FB=out REF=ref OUT=out"); its positions are the part's
// elements that carry current, each with the network's absolute
// tolerance, its ratio tolerance and its ratio tracking, so the budget
// solves the strapped circuit exactly like any netlist:
//
//	vn --[Rsrcn]-- inn --+
//	                     |  the part's elements as strapped,   --> out
//	vp --[Rsrcp]-- inp --+  internal op-amp A1 (typical part:
//	                     |  R1 inn-xm, R2 xm-out, R3 inp-xp,
//	vref --[Rref]-- ref -+  R4 xp-ref, A1 between xp and xm)
//
//	Vout = Gp·Vp + Gn·Vn + Gr·Vref,  Gp + Gn + Gr = 1, Gp + Gn = 0 nominal
//	     = Adm·(Vp − Vn) + Vref,     Adm = (Gp − Gn)/2
//
// The gain error is the network's ratio tolerance δ propagated through the
// strapping's sensitivities, worst case Σ|∂ln G/∂ln Ri|·δ/2; the drift the
// ratio tracking the same way; the CMRR Adm over the worst-case common-mode
// gain; the offset the op-amp's Vos times the strapping's noise gain 1/β
// (not 1 + G: an attenuating strapping may have a noise gain of 1 or 3 at
// the same gain) plus the bias currents through the resistances at the
// op-amp's inputs; and the op-amp's inputs sit at Kp·Vp + Kn·Vn + Kr·Vref,
// which an internal divider takes beyond the rails' reach of the inputs
// (package strap's doc gives each equation; the difference amplifier's are
// in the domain notes §2 and §9, after S. Franco, "Design with Operational
// Amplifiers and Analog Integrated Circuits", difference-amplifier
// section, from memory).
var Strapped = &Family{
	Name:        "strapped",
	About:       "an amplifier with matched resistors inside, its pins strapped for the gain",
	Input:       Differential,
	Reference:   RefOutput,
	Allows:      AllowSourceImpedance | AllowRefImpedance,
	GainProblem: positiveGain,
	Search:      Search{Strategy: Part, As: Difference, OpAmps: 1, Strappings: true},
	Netlist: func(b Builder, o Options) error {
		inp := input(b, "vp", "Rsrcp", 0, o.SourceImpedance)
		inn := input(b, "vn", "Rsrcn", 0, o.SourceImpedance)
		b.Source("vref", "vref", 0)
		ref := refInput(b, "vref", o.RefImpedance)
		part := o.Part
		if part == nil {
			part = typicalPart{}
		}
		if err := part.Build(b, inp, inn, ref); err != nil {
			return err
		}
		load(b, o, nominalLoadOhm)
		return nil
	},
}

// typicalPart is the four equal elements of the classic unity-gain
// difference amplifier, the netlist Strapped builds without a design's
// part.
type typicalPart struct{}

func (typicalPart) Build(b Builder, inp, inn, ref string) error {
	b.Resistor("R1", inn, "xm", 10e3)
	b.Resistor("R2", "xm", "out", 10e3)
	b.Resistor("R3", inp, "xp", 10e3)
	b.Resistor("R4", "xp", ref, 10e3)
	b.OpAmp("A1", "xp", "xm", "out")
	return nil
}
