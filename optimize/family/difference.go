package family

import "math"

// Difference is the difference amplifier: one op-amp and four resistors
// (discrete, or a matched four-element network):
//
//	vn --[Rsrcn]-- inn --[R1]-- m --[R2]-- out      m = A1-
//	vp --[Rsrcp]-- inp --[R3]-- p --[R4]-- ref      p = A1+
//	ref = vref, or vrefsrc --[Ra]-- ref --[Rb]-- 0 with a reference divider,
//	either through the reference's own resistance Rref
//
//	Vout = Vp·R4/(R3+R4)·(1 + R2/R1) - Vn·R2/R1 + Vref·R3/(R3+R4)·(1 + R2/R1)
//	     = G·(Vp - Vn) + Vref   when R4/R3 = R2/R1 = G
//
// With the four ratios off by their tolerances the common mode leaks
// through: Acm = (k2 - k1)/(1 + k2), Adm = (k2(1 + k1)/(1 + k2) + k1)/2 for
// k1 = R2/R1, k2 = R4/R3, so CMRR ≈ (1 + G)/(4t) for four resistors of
// tolerance t and (1 + G)/(2r) on a network of ratio tolerance r (S.
// Franco, "Design with Operational Amplifiers and Analog Integrated
// Circuits", McGraw-Hill, difference-amplifier section, from memory; the
// domain notes §2).
var Difference = &Family{
	Name:        "difference",
	About:       "difference amplifier, op-amp and four resistors or a matched network",
	Input:       Differential,
	Reference:   RefOutput,
	Allows:      AllowRefDivider | AllowSourceImpedance | AllowRefImpedance,
	GainProblem: positiveGain,
	Search: Search{OpAmps: 1, Networks: true, Ratio: &Ratio{
		Rg: []string{"R1", "R3"}, Rf: []string{"R2", "R4"}, PerRg: 2, PerRf: 2,
		Of:           func(g float64) float64 { return g },
		Gain:         func(k float64) float64 { return k },
		Sens:         func(float64) float64 { return 1 },
		Mult:         func(_, m float64) float64 { return m },
		NoiseGain:    func(k float64) float64 { return 1 + k },
		FourResistor: true, SourceInRg: true,
		Voltages: func(k, vd, vcm, ref float64) (float64, float64) {
			vm, vp := vcm-vd/2, vcm+vd/2
			pin := vp*k/(1+k) + ref/(1+k)
			out := k*vd + ref
			return math.Max(math.Abs(vm-pin), math.Abs(vp-pin)), math.Max(math.Abs(pin-out), math.Abs(pin-ref))
		},
		Pin: func(k, vd, vcm, ref float64) float64 { return (vcm+vd/2)*k/(1+k) + ref/(1+k) },
		Out: referredOut,
		// Driven differentially (V± = Vcm ± Vd/2) the inverting input draws
		// (V- - Vpin)/R1 with the pin following V+·k/(1+k), so it looks like
		// R1·(1+k)/(1+2k); the non-inverting input is R3 + R4.
		Zin: func(rg, rf float64) float64 {
			k := rf / rg
			return math.Min(rg*(1+k)/(1+2*k), rg+rf)
		},
	}},
	Netlist: func(b Builder, o Options) error {
		inp := input(b, "vp", "Rsrcp", 0, o.SourceImpedance)
		inn := input(b, "vn", "Rsrcn", 0, o.SourceImpedance)
		fourResistorStage(b, inp, inn, "A1", o, 10e3, 10e3)
		load(b, o, nominalLoadOhm)
		return nil
	},
}

// referredOut is the ideal output of a stage referred to its reference,
// G·Vd + Vref.
func referredOut(g, vd, ref float64) float64 { return g*vd + ref }

// positiveGain refuses a gain that is not positive: a stage whose sign
// follows from which input is which.
func positiveGain(g float64) string {
	if g <= 0 {
		return "give a positive gain; swap the inputs for a negative one"
	}
	return ""
}
