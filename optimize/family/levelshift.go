package family

import "fmt"

// shiftNG is the noise gain of the level shift's equal feedback pair
// (Rg = Rf), and the least with the reference into the inverting node.
const shiftNG = 2

// shiftNoiseGain is the target noise gain: 2, or 2 + β = 2 - b/Vref with
// the reference into the inverting node (b < 0).
func shiftNoiseGain(_, b, vref float64) float64 {
	if b < 0 {
		return shiftNG - b/vref
	}
	return shiftNG
}

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
//
// The design model (Search.Shift). Reference into the non-inverting node:
// with a1, a2, a3 the conductance shares of R1, R2, R3 the slope is
// m = NG·a1 and the offset b = NG·a2·Vref (superposition at the
// non-inverting node, the summing amplifier of the same book, from
// memory). Rg = Rf (one value of one grade), so NG = 2 exactly and no
// feedback ratio is quantized; the input network then needs R2/R1 = a1/a2
// = m·Vref/b and R3/R1 = a1/a3 with a3 = 1 - (m + b/Vref)/2, so it reaches
// every shift with m > 0, b > 0 and m + b/Vref < 2 (mapping a signal onto
// an ADC range inside [0, Vref] always has m + b/Vref <= 1).
//
// Reference into the inverting node, for a negative offset: the node
// equation at the inverting input, Vm/Rg + (Vm-Vref)/R2 + (Vm-Vout)/Rf = 0
// with Vm = V+ (same book, from memory). Again Rg = Rf, so with β = Rf/R2
// = -b/Vref the noise gain is NG = 2 + β and the divider a = R3/(R1+R3) =
// m/NG; R2 comes from the feedback grade (the offset Vref·Rf/R2 is then a
// ratio of one grade), R1 and R3 from the input grade, and R3/R1 =
// a/(1-a) is aimed at the NG of the R2 value chosen, so R2's quantization
// moves only the offset. It reaches every shift with m > 0, b < 0 and
// m < 2 + β.
var LevelShift = &Family{
	Name:        "level-shift",
	About:       "level shift, Vout = m·Vin + b with the offset from a reference",
	Input:       SingleEnded,
	Reference:   RefShift,
	OutputRange: true,
	Allows:      AllowSourceImpedance | AllowRefImpedance | AllowOffsetToInverting,
	GainProblem: positiveGain,
	Search: Search{Strategy: ShiftNetwork, OpAmps: 1, Shift: &Shift{
		FeedbackNG: shiftNG,
		NoiseGain:  shiftNoiseGain,
		Ratios: func(m, b, vref float64) (float64, float64) {
			if b < 0 {
				beta := -b / vref
				a := m / shiftNoiseGain(m, b, vref)
				return 1 / beta, a / (1 - a)
			}
			a1, a2 := m/shiftNG, b/(vref*shiftNG)
			return a1 / a2, a1 / (1 - a1 - a2)
		},
		// Vout/2 (non-inverting summing), or a·Vin = m·Vin/NG.
		Node: func(m, b, vref, vin float64) float64 {
			if b < 0 {
				return m * vin / shiftNoiseGain(m, b, vref)
			}
			return (m*vin + b) / shiftNG
		},
		Problem: func(m, b, vref float64) string {
			switch {
			case !(vref > 0):
				return fmt.Sprintf("level shift needs a positive reference voltage, got %g V", vref)
			case b == 0:
				return fmt.Sprintf("level shift with offset 0 V: use a stage without a reference (family %s) for a gain without offset", NonInverting.Name)
			case b < 0 && !(m < shiftNoiseGain(m, b, vref)):
				return fmt.Sprintf("level shift with gain %g and offset %g V: with the reference into the inverting input the gain must stay below 2 + |offset|/Vref = %.3g with Rg = Rf", m, b, shiftNoiseGain(m, b, vref))
			case b > 0 && m+b/vref >= shiftNG:
				return fmt.Sprintf("level shift with gain %g and offset %g V: gain + offset/Vref = %.3g must stay below %d with Rg = Rf", m, b, m+b/vref, int(shiftNG))
			}
			return ""
		},
		Positions: func(inverting bool) ([]string, []string) {
			if inverting {
				return []string{"R1", "R3"}, []string{"R2", "Rg", "Rf"}
			}
			return []string{"R1", "R2", "R3"}, []string{"Rg", "Rf"}
		},
	}},
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
