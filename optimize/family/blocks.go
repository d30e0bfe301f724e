package family

// Nominal values the netlists use. They give a working circuit of typical
// gain; callers overwrite them with the design's values.
const (
	nominalSrcOhm  = 100  // source impedance, ohm
	nominalLoadOhm = 10e3 // load on an amplifier output, ohm
	nominalDivLoad = 1e6  // load on a passive output, ohm
)

// Building blocks several families share, on top of a Builder.

// input adds source src at a node of the same name and returns the node the
// circuit sees: the source node itself, or with withR the far end of a
// source resistance rname (node "in", "inp" or "inn").
func input(b Builder, src, rname string, v float64, withR bool) string {
	b.Source(src, src, v)
	if !withR {
		return src
	}
	far := map[string]string{"vin": "in", "vp": "inp", "vn": "inn"}[src]
	b.Resistor(rname, src, far, nominalSrcOhm)
	return far
}

// refInput returns the node the stage's reference resistor starts from:
// the reference source's node src, or with withR the far end "refz" of the
// source's resistance Rref.
func refInput(b Builder, src string, withR bool) string {
	if !withR {
		return src
	}
	b.Resistor("Rref", src, "refz", nominalSrcOhm)
	return "refz"
}

// load adds "Rload" of ohm from the output to ground when o asks for it.
func load(b Builder, o Options, ohm float64) {
	if o.Load {
		b.Resistor("Rload", "out", "0", ohm)
	}
}

// fourResistorStage adds the four-resistor stage R1..R4 around op-amp amp,
// inputs inp (through R3) and inn (through R1), gain g = r2/r1, and its
// reference: source "vref" directly, or "vrefsrc" through Ra/Rb, either
// through the source's own resistance Rref with o.RefImpedance:
//
//	inn --[R1]-- m --[R2]-- out      m = amp-
//	inp --[R3]-- p --[R4]-- ref      p = amp+
//	ref = vref, or vrefsrc --[Ra]-- ref --[Rb]-- 0 with RefDivider
//	(R4 then ends on node "ref", else on node "vref"); with RefImpedance
//	the source drives the stage through vref (or vrefsrc) --[Rref]-- refz
func fourResistorStage(b Builder, inp, inn, amp string, o Options, r1, r2 float64) {
	r4, ref := r2, "vref"
	if o.RefDivider {
		ref = "ref"
		// Ra = Rb = r2/5 give a Thevenin resistance of r2/10, taken out of R4
		// so that R4 + Ra||Rb keeps the match R4'/R3 = R2/R1.
		b.Source("vrefsrc", "vrefsrc", 5)
		b.Resistor("Ra", refInput(b, "vrefsrc", o.RefImpedance), "ref", r2/5)
		b.Resistor("Rb", "ref", "0", r2/5)
		r4 = r2 - r2/10
	} else {
		b.Source("vref", "vref", 0)
		ref = refInput(b, "vref", o.RefImpedance)
	}
	b.Resistor("R1", inn, "m", r1)
	b.Resistor("R2", "m", "out", r2)
	b.Resistor("R3", inp, "p", r1)
	b.Resistor("R4", "p", ref, r4)
	b.OpAmp(amp, "p", "m", "out")
}
