package family

import "math"

// Inverting is the inverting amplifier, one op-amp and two resistors:
//
//	vin --[Rsrc]-- in --[Rg]-- m --[Rf]-- out --[Rload]-- 0
//	                           m = A1-   vref = A1+   A1 -> out
//
//	Vout = Vref(1 + Rf/Rg) - Vin·Rf/Rg,  G = -Rf/Rg
//
// (ideal op-amp; the solver is exact at any open-loop gain. S. Franco,
// "Design with Operational Amplifiers and Analog Integrated Circuits",
// McGraw-Hill, ch. 1, from memory.) The reference pin stays at 0 V: a
// spec's reference is refused. The source sees Rg.
var Inverting = &Family{
	Name:   "inverting",
	About:  "inverting amplifier, G = -Rf/Rg",
	Input:  SingleEnded,
	Allows: AllowSourceImpedance,
	GainProblem: func(g float64) string {
		if g >= 0 {
			return "an inverting amplifier has a negative gain (-Rf/Rg)"
		}
		return ""
	},
	Search: Search{OpAmps: 1, Ratio: &Ratio{
		Rg: []string{"Rg"}, Rf: []string{"Rf"}, PerRg: 1, PerRf: 1,
		Of:        func(g float64) float64 { return g },
		Gain:      func(k float64) float64 { return k },
		Sens:      func(float64) float64 { return 1 },
		Mult:      func(_, m float64) float64 { return m },
		NoiseGain: func(k float64) float64 { return 1 + k },
		Inverts:   true, SourceInRg: true,
		Voltages: func(k, vd, _, ref float64) (float64, float64) {
			out := ref - k*(vd-ref)
			return math.Abs(vd - ref), math.Abs(out - ref)
		},
		Pin: func(_, _, _, ref float64) float64 { return ref },
		Out: func(g, vd, ref float64) float64 { return ref - g*(vd-ref) },
		Zin: func(rg, _ float64) float64 { return rg },
	}},
	Netlist: func(b Builder, o Options) error {
		in := input(b, "vin", "Rsrc", 1, o.SourceImpedance)
		b.Source("vref", "vref", 0)
		b.Resistor("Rg", in, "m", 10e3)
		b.Resistor("Rf", "m", "out", 100e3)
		b.OpAmp("A1", "vref", "m", "out")
		load(b, o, nominalLoadOhm)
		return nil
	},
}
