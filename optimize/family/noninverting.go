package family

// NonInverting is the non-inverting amplifier, one op-amp and two
// resistors; the input drives the op-amp's pin directly, so its range must
// lie within the rails:
//
//	vin --[Rsrc]-- in = A1+
//	vref --[Rg]-- m --[Rf]-- out       m = A1-   A1 -> out
//
//	Vout = Vin(1 + Rf/Rg) - Vref·Rf/Rg,  G = 1 + Rf/Rg
//
// (ideal op-amp; S. Franco, "Design with Operational Amplifiers and Analog
// Integrated Circuits", McGraw-Hill, ch. 1, from memory). Rg's far end
// stays at 0 V: a spec's reference is refused.
var NonInverting = &Family{
	Name:       "noninverting",
	About:      "non-inverting amplifier, G = 1 + Rf/Rg",
	Input:      SingleEnded,
	InputAtPin: true,
	Allows:     AllowSourceImpedance,
	GainProblem: func(g float64) string {
		if g < 1 {
			return "a non-inverting amplifier has gain 1 + Rf/Rg, at least 1"
		}
		return ""
	},
	Netlist: func(b Builder, o Options) error {
		in := input(b, "vin", "Rsrc", 0.1, o.SourceImpedance)
		b.Source("vref", "vref", 0)
		b.Resistor("Rg", "m", "vref", 10e3)
		b.Resistor("Rf", "m", "out", 90e3)
		b.OpAmp("A1", in, "m", "out")
		load(b, o, nominalLoadOhm)
		return nil
	},
}
