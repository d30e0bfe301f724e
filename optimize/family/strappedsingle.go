package family

// StrappedSingle is a single-ended stage built on one catalog part, an
// amplifier with matched resistors inside, whose pins are tied for a
// single-ended input (package strap enumerates every usable strapping of
// the part's network; this family takes those of kind "single-ended from
// vp"): an inverting gain (the input into the inverting side, the
// non-inverting side grounded), a non-inverting gain, an attenuation
// through the part's internal divider, each with the divider letting the
// input go beyond the rails where the strapping divides before the
// op-amp's inputs. The part's reference terminal "ref" is ground: the
// output is measured from 0 V, and a spec's reference is refused. It is
// walked as a circuit of its own (Search.As nil), since one part makes
// gains of either sign and below or above one.
//
//	vin --[Rsrc]-- in --+  the part's elements as strapped,   --> out
//	                    |  internal op-amp A1
//	      0 ---- ref ---+  (typical part: R1 in-xm, R2 xm-out, A1+ at 0)
//
//	Vout = G·Vin,   G = the strapping's transfer from vp (package strap),
//	G' = G·Zin/(Zin + Rs) with a source resistance Rs,
//
// exactly, for the ideal op-amp: the stage is linear and its only source
// drives it through Rs into the input impedance Zin (Thevenin). The gain
// error is the network's ratio tolerance propagated through the
// strapping's sensitivities, the drift its tracking, the offset the
// op-amp's Vos times the noise gain 1/β and the bias currents through the
// resistances at its inputs (package strap's doc gives each equation; the
// inverting and non-inverting amplifiers' are in the domain notes §2, after
// S. Franco, "Design with Operational Amplifiers and Analog Integrated
// Circuits", ch. 1, from memory).
var StrappedSingle = &Family{
	Name:        "strapped-single",
	About:       "an amplifier with matched resistors inside, its pins strapped for a single-ended gain or attenuation",
	Input:       SingleEnded,
	Reference:   RefNone,
	Allows:      AllowSourceImpedance,
	GainProblem: nonzeroGain,
	Search:      Search{Strategy: Part, OpAmps: 1, Strappings: true},
	Netlist: func(b Builder, o Options) error {
		in := input(b, "vin", "Rsrc", 1, o.SourceImpedance)
		part := o.Part
		if part == nil {
			part = typicalSingle{}
		}
		if err := part.Build(b, in, "", "0"); err != nil {
			return err
		}
		load(b, o, nominalLoadOhm)
		return nil
	},
}

// nonzeroGain refuses a zero gain: a single-ended strapping makes either
// sign.
func nonzeroGain(g float64) string {
	if g == 0 {
		return "give a gain other than zero (negative for an inverting stage)"
	}
	return ""
}

// typicalSingle is the unity-gain inverting strapping of two equal
// elements, the netlist StrappedSingle builds without a design's part.
type typicalSingle struct{}

func (typicalSingle) Build(b Builder, in, _, ref string) error {
	b.Resistor("R1", in, "xm", 10e3)
	b.Resistor("R2", "xm", "out", 10e3)
	b.OpAmp("A1", ref, "xm", "out")
	return nil
}
