package family

// LevelShift maps the input range onto the output range, Vout = m·Vin + b,
// taking the offset b from the reference. The spec gives input and output
// ranges: m = output span / input span, b = out.min - m·in.min. With the
// reference summed into the non-inverting node (b > 0):
//
//	vin --[Rsrc]-- in --[R1]-- p    vref --[R2]-- p    p --[R3]-- 0   p = A1+
//	0 --[Rg]-- m --[Rf]-- out                                         m = A1-
//
//	Vout = (1 + Rf/Rg)·(Vin/R1 + Vref/R2)/(1/R1 + 1/R2 + 1/R3)
//
// and with the reference into the inverting input (OffsetToInverting,
// b < 0):
//
//	vin --[Rsrc]-- in --[R1]-- p --[R3]-- 0                           p = A1+
//	vref --[R2]-- m   0 --[Rg]-- m --[Rf]-- out                        m = A1-
//
//	Vout = Vin·R3/(R1 + R3)·(1 + Rf/Rg + Rf/R2) - Vref·Rf/R2
//
// (superposition on an ideal op-amp; S. Franco, "Design with Operational
// Amplifiers and Analog Integrated Circuits", McGraw-Hill, ch. 1, from
// memory). Nominals map -10..10 V onto 0..2.5 V with Vref = 2.5 V (default)
// and 0.5..4.5 V onto 0..3.3 V (OffsetToInverting).
var LevelShift = &Family{
	Name:        "level-shift",
	About:       "level shift, Vout = m·Vin + b with the offset from a reference",
	Input:       SingleEnded,
	Reference:   RefShift,
	OutputRange: true,
	Allows:      AllowSourceImpedance | AllowRefImpedance | AllowOffsetToInverting,
	GainProblem: positiveGain,
	Search:      Search{Strategy: ShiftNetwork, OpAmps: 1},
	Netlist: func(b Builder, o Options) error {
		in := input(b, "vin", "Rsrc", 0, o.SourceImpedance)
		b.Source("vref", "vref", 2.5)
		ref := refInput(b, "vref", o.RefImpedance)
		if o.OffsetToInverting {
			b.Resistor("R1", in, "p", 10e3)
			b.Resistor("R3", "p", "0", 16.337e3)
			b.Resistor("R2", ref, "m", 100e3)
			b.Resistor("Rg", "m", "0", 100e3)
			b.Resistor("Rf", "m", "out", 16.5e3)
		} else {
			b.Resistor("R1", in, "p", 160e3)
			b.Resistor("R2", ref, "p", 40e3)
			b.Resistor("R3", "p", "0", 14.545e3)
			b.Resistor("Rg", "m", "0", 10e3)
			b.Resistor("Rf", "m", "out", 10e3)
		}
		b.OpAmp("A1", "p", "m", "out")
		load(b, o, nominalLoadOhm)
		return nil
	},
}
