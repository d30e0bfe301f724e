package family

import "math"

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
	Search: Search{OpAmps: 1, Ratio: &Ratio{
		Rg: []string{"Rg"}, Rf: []string{"Rf"}, PerRg: 1, PerRf: 1,
		Of:        func(g float64) float64 { return g - 1 },
		Gain:      func(k float64) float64 { return 1 + k },
		Sens:      func(k float64) float64 { return k / (1 + k) },
		Mult:      func(k, m float64) float64 { return (1 + k*m) / (1 + k) },
		NoiseGain: func(k float64) float64 { return 1 + k },
		Voltages: func(k, vd, _, ref float64) (float64, float64) {
			out := (1+k)*vd - k*ref
			return math.Abs(vd - ref), math.Abs(out - vd)
		},
		Pin: func(_, vd, _, _ float64) float64 { return vd },
		// Rg returns to the reference: Vout = G·Vin - (G-1)·Vref.
		Out: func(g, vd, ref float64) float64 { return g*vd - (g-1)*ref },
		Zin: func(float64, float64) float64 { return math.Inf(1) },
	}},
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
