package family

import "math"

// CurrentSense is a shunt Rs read by a difference amplifier; vbus fixes the
// shunt's low side "sn" (the load's node, the common mode) and the current
// isense enters its high side "sp":
//
//	isense -> sp --[Rs]-- sn = vbus
//	sn --[R1]-- m --[R2]-- out   sp --[R3]-- p --[R4]-- ref (as Difference)
//
//	Vout = Isense·Rs·R2/R1 + Vref  when R4/R3 = R2/R1,  G in V/A
//
// (Ohm's law and the difference amplifier, see Difference.) Its input is a
// current, so there is no source impedance; a spec's input impedance limit
// is the difference stage's, which the shunt does not load.
var CurrentSense = &Family{
	Name:        "current-sense",
	About:       "current sense: shunt and difference amplifier, gain in V/A",
	Input:       Current,
	Shunt:       "Rs",
	Reference:   RefOutput,
	Allows:      AllowRefDivider | AllowRefImpedance,
	GainProblem: positiveGain,
	Search: Search{Strategy: Shunt, As: Difference, OpAmps: 1, Sense: &Sense{
		// Milliohm metal strip to 10 ohm, a stage gain of 0.1 to 1000
		// (common practice).
		MinOhm: 1e-4, MaxOhm: 10, MinStageGain: 0.1, MaxStageGain: 1000,
		// The shunt voltage I·Rs is the differential input; the high side
		// sits that far above the low side, so the common mode of the two
		// terminals moves by half of it.
		Stage: func(imin, imax, cmMin, cmMax, rs float64) (float64, float64, float64, float64) {
			lo, hi := imin*rs, imax*rs
			return lo, hi, cmMin + math.Min(0, math.Min(lo, hi))/2, cmMax + math.Max(0, math.Max(lo, hi))/2
		},
	}},
	Netlist: func(b Builder, o Options) error {
		b.Source("vbus", "sn", 12)
		b.Current("isense", "0", "sp", 1)
		b.Resistor("Rs", "sp", "sn", 0.01)
		fourResistorStage(b, "sp", "sn", "A1", o, 1e3, 20e3)
		load(b, o, nominalLoadOhm)
		return nil
	},
}
