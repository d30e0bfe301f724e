package family

import "math"

// InAmp is the three-op-amp instrumentation amplifier: two non-inverting
// input amplifiers sharing Rg (gain 1 + 2Rf/Rg on the difference, unity on
// the common mode), then a difference amplifier R1..R4 (discrete or a
// matched network) of gain R2/R1:
//
//	vp --[Rsrcp]-- inp = A1+   A1 -> o1 --[Rf1]-- g1 = A1-
//	vn --[Rsrcn]-- inn = A2+   A2 -> o2 --[Rf2]-- g2 = A2-   g1 --[Rg]-- g2
//	o2 --[R1]-- m --[R2]-- out   o1 --[R3]-- p --[R4]-- vref   A3: p, m -> out
//
//	Vout = (Vp - Vn)·(1 + 2Rf/Rg)·R2/R1 + Vref  with Rf1 = Rf2 = Rf and
//	R4/R3 = R2/R1
//
// (S. Franco, "Design with Operational Amplifiers and Analog Integrated
// Circuits", McGraw-Hill, instrumentation-amplifier section, from memory.)
var InAmp = &Family{
	Name:      "inamp",
	About:     "three-op-amp instrumentation amplifier, G = (1 + 2Rf/Rg)·R2/R1",
	Input:     Differential,
	Reference: RefOutput,
	Allows:    AllowSourceImpedance | AllowRefImpedance,
	GainProblem: func(g float64) string {
		if g < 1 {
			return "an instrumentation amplifier's gain is at least 1"
		}
		return ""
	},
	Search: Search{Strategy: TwoStage, Networks: true, OpAmps: 3, Ratio: &Ratio{
		Rg: []string{"Rg"}, Rf: []string{"Rf1", "Rf2"}, PerRg: 1, PerRf: 2,
		// 1 + 2Rf/Rg = G/k2 (the search passes the first stage's gain).
		Of:        func(g float64) float64 { return (g - 1) / 2 },
		Gain:      func(k float64) float64 { return 1 + 2*k },
		Sens:      func(k float64) float64 { return 2 * k / (1 + 2*k) },
		Mult:      func(k, m float64) float64 { return (1 + 2*k*m) / (1 + 2*k) },
		NoiseGain: func(k float64) float64 { return 1 + 2*k },
		// Rg carries the input difference, each Rf k times it.
		Voltages: func(k, vd, _, _ float64) (float64, float64) { return math.Abs(vd), math.Abs(k * vd) },
		Out:      referredOut,
		Zin:      func(float64, float64) float64 { return math.Inf(1) },
		Stage2: &Stage2{
			// A1 and A2 see the inputs; A3 sees the first stage's outputs
			// Vcm ± G1·Vd/2 through R3/R4.
			Pins: func(k, k2, vd, vcm, ref float64) (float64, float64) {
				o1 := vcm + (1+2*k)*vd/2
				v := o1*k2/(1+k2) + ref/(1+k2)
				return math.Min(v, math.Min(vcm-vd/2, vcm+vd/2)), math.Max(v, math.Max(vcm-vd/2, vcm+vd/2))
			},
			Voltages: func(k, k2, vd, vcm, ref, out float64) (float64, float64) {
				o1, o2 := vcm+(1+2*k)*vd/2, vcm-(1+2*k)*vd/2
				pin := o1*k2/(1+k2) + ref/(1+k2)
				return math.Max(math.Abs(o2-pin), math.Abs(o1-pin)), math.Max(math.Abs(pin-out), math.Abs(pin-ref))
			},
			Swing: func(k, vd, vcm float64) (float64, float64) {
				g1 := 1 + 2*k
				return math.Min(vcm-g1*vd/2, vcm+g1*vd/2), math.Max(vcm-g1*vd/2, vcm+g1*vd/2)
			},
			NoiseGain: func(k, k2 float64) float64 { return math.Max(1+2*k, 1+k2) },
		},
	}},
	Netlist: func(b Builder, o Options) error {
		inp := input(b, "vp", "Rsrcp", 0, o.SourceImpedance)
		inn := input(b, "vn", "Rsrcn", 0, o.SourceImpedance)
		b.Source("vref", "vref", 0)
		ref := refInput(b, "vref", o.RefImpedance)
		b.Resistor("Rf1", "o1", "g1", 18e3)
		b.Resistor("Rg", "g1", "g2", 4e3)
		b.Resistor("Rf2", "o2", "g2", 18e3)
		b.OpAmp("A1", inp, "g1", "o1")
		b.OpAmp("A2", inn, "g2", "o2")
		b.Resistor("R1", "o2", "m", 10e3)
		b.Resistor("R2", "m", "out", 10e3)
		b.Resistor("R3", "o1", "p", 10e3)
		b.Resistor("R4", "p", ref, 10e3)
		b.OpAmp("A3", "p", "m", "out")
		load(b, o, nominalLoadOhm)
		return nil
	},
}
