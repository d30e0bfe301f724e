package family

import "math"

// Divider is the resistive divider, unbuffered or with a unity-gain
// follower after its tap; the load's leakage current "iload" leaves the
// output:
//
//	vin --[Rsrc]-- in --[Rtop]-- tap --[Rbot]-- 0
//	tap is "out", or with Buffer tap = A1+, A1- = A1 out = "out"
//
//	Vout = Vin·Rbot/(Rtop + Rbot) unloaded,  0 < G < 1
//
// (Ohm's law.) It has no reference input: a spec's reference is refused.
var Divider = &Family{
	Name:   "divider",
	About:  "resistive divider, unbuffered or buffered, G = Rbot/(Rtop + Rbot)",
	Input:  SingleEnded,
	Allows: AllowSourceImpedance | AllowBuffer,
	GainProblem: func(g float64) string {
		if g <= 0 || g >= 1 {
			return "a divider's gain R2/(R1+R2) lies between 0 and 1"
		}
		return ""
	},
	Search: Search{Ratio: &Ratio{
		Rg: []string{"Rbot"}, Rf: []string{"Rtop"}, PerRg: 1, PerRf: 1,
		Of:        func(g float64) float64 { return (1 - g) / g },
		Gain:      func(k float64) float64 { return 1 / (1 + k) },
		Sens:      func(k float64) float64 { return k / (1 + k) },
		Mult:      func(k, m float64) float64 { return (1 + k) / (1 + k*m) },
		NoiseGain: func(float64) float64 { return 1 },
		Passive:   true, SourceInRf: true, LoadAcrossRg: true,
		Voltages: func(k, vd, _, _ float64) (float64, float64) {
			out := vd / (1 + k)
			return math.Abs(out), math.Abs(vd - out)
		},
		Pin: func(k, vd, _, _ float64) float64 { return vd / (1 + k) },
		Out: func(g, vd, _ float64) float64 { return g * vd },
		Zin: func(rg, rf float64) float64 { return rg + rf },
	}},
	Netlist: func(b Builder, o Options) error {
		in := input(b, "vin", "Rsrc", 10, o.SourceImpedance)
		tap := "out"
		if o.Buffer {
			tap = "tap"
		}
		b.Resistor("Rtop", in, tap, 90e3)
		b.Resistor("Rbot", tap, "0", 10e3)
		// The load's leakage leaves the output: the tap itself, or the
		// buffer's output, which supplies it.
		b.Current("iload", "out", "0", 0)
		ohm := nominalDivLoad
		if o.Buffer {
			b.OpAmp("A1", tap, "out", "out")
			ohm = nominalLoadOhm
		}
		load(b, o, ohm)
		return nil
	},
}
