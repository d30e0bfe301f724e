package budget

import (
	"math"
	"os"
	"strings"
	"testing"

	"plumb/optimize/spec"
)

// TestHazardCautionVoltages: the caution names the highest voltage on the
// input terminals and supplies and the limit it crosses: 60 V DC, or 30 V
// rms (42.4 V peak of a sine) for a range that swings both ways (IEC
// 61010-1 and IEC 62368-1, from memory; domain notes §5).
func TestHazardCautionVoltages(t *testing.T) {
	low := spec.Range{Min: -15, Max: 15}
	cases := []struct {
		name    string
		s       spec.Spec
		current bool
		want    []string // substrings; nil: no caution
	}{
		{name: "5 V logger", s: spec.Spec{Input: spec.Range{Max: 2.5}, Supply: spec.Range{Max: 5}}},
		{name: "unipolar 50 V is below 60 V DC", s: spec.Spec{Input: spec.Range{Max: 50}, Supply: low}},
		{name: "unipolar 100 V input", s: spec.Spec{Input: spec.Range{Max: 100}, Supply: low},
			want: []string{"is 100 V (the input against ground), above 60 V DC."}},
		{name: "±50 V input may be 35 V rms", s: spec.Spec{Input: spec.Range{Min: -50, Max: 50}, Supply: low},
			want: []string{"is 50 V (the input against ground), below 60 V DC, but an input swinging both ways to 50 V peak is above 30 V rms (42.4 V peak)"}},
		{name: "±40 V input stays under 30 V rms", s: spec.Spec{Input: spec.Range{Min: -40, Max: 40}, Supply: low}},
		// The reviewed case: the pins sit at ±5 V ± 50 V = 55 V, but the two
		// input terminals are 100 V apart.
		{name: "±100 V differential", s: spec.Spec{Differential: true, Input: spec.Range{Min: -100, Max: 100}, CommonMode: spec.Range{Min: -5, Max: 5}, Supply: low},
			want: []string{"is 100 V (the differential input, between the two input terminals), above 60 V DC; an input swinging both ways to 100 V peak is also above 30 V rms"}},
		{name: "75 V common mode", s: spec.Spec{Differential: true, Input: spec.Range{Min: -1, Max: 1}, CommonMode: spec.Range{Min: 70, Max: 75}, Supply: low},
			want: []string{"is 75.5 V (an input terminal against ground, the common mode and half the differential input), above 60 V DC."}},
		{name: "current sense on a 75 V bus", s: spec.Spec{Input: spec.Range{Max: 5}, CommonMode: spec.Range{Min: 70, Max: 75}, Supply: spec.Range{Max: 5}}, current: true,
			want: []string{"is 75 V (the common-mode input against ground), above 60 V DC."}},
		{name: "5 A current sense is not 5 V", s: spec.Spec{Input: spec.Range{Max: 70}, CommonMode: spec.Range{Min: -0.1, Max: 0.1}, Supply: spec.Range{Max: 5}}, current: true},
		{name: "±36 V rails", s: spec.Spec{Input: spec.Range{Max: 1}, Supply: spec.Range{Min: -36, Max: 36}},
			want: []string{"is 72 V (between the supply rails), above 60 V DC."}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			got := HazardCaution(&c.s, c.current)
			if c.want == nil {
				if got != "" {
					t.Errorf("caution %q, want none", got)
				}
				return
			}
			for _, w := range append(c.want, "HAZARDOUS VOLTAGE: the highest voltage on the input terminals and supplies",
				"IEC 61010-1", "IEC 62368-1", "local codes", "by "+QualifiedPerson+".", "not a safety approval") {
				if !strings.Contains(got, w) {
					t.Errorf("caution %q\nlacks %q", got, w)
				}
			}
		})
	}
}

// TestZeroDeratingMeansDefault: a spec built in code leaves Derating at 0,
// which means the documented default of 50 % of rated power (domain notes
// §5, ECSS-Q-ST-30-11, from memory), not a power ratio of +Inf. Rtop of a
// 2.1k/300 divider at 24 V dissipates (24 x 2.1/2.4)² / 2.1k = 0.21 W
// (Ohm's law, hand calculation), 1.68 times 50 % of 0.25 W.
func TestZeroDeratingMeansDefault(t *testing.T) {
	s := mustSpec(t, `name: t
about: divider power
family: divider
gain: 0.125
input: {single_ended: 0..24V}
supply: 0..3.3V
temperature: {range: 25..25C}
limits: {gain_error: 5%}
`)
	d := mustDesign(t, `family: divider
positions:
  Rtop: {value: 2.1k, tolerance: 1%, tcr: 100ppm/K, power: 0.25W}
  Rbot: {value: 300, tolerance: 1%, tcr: 100ppm/K, power: 0.25W}
`)
	cases := []struct {
		name     string
		derating float64
		want     float64
	}{
		{"zero value is the 50 % default", 0, 0.21 / (0.5 * 0.25)},
		{"50 % as parsed", 0.5, 0.21 / (0.5 * 0.25)},
		{"70 %", 0.7, 0.21 / (0.7 * 0.25)},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			sc := *s
			sc.Derating = c.derating
			res, err := Evaluate(&sc, d)
			if err != nil {
				t.Fatal(err)
			}
			if got := res.Metrics.PowerRatio; math.IsInf(got, 0) || math.Abs(got-c.want) > 1e-9*c.want {
				t.Errorf("power ratio %.9g, want %.9g", got, c.want)
			}
			if c.derating == 0 && !strings.Contains(strings.Join(res.Cautions, "\n"), "(derating 50 %)") {
				t.Errorf("cautions %q, want the power caution at the 50 %% default", res.Cautions)
			}
		})
	}
}

// TestPassiveDividerNoise: an unbuffered divider sets no bandwidth, so its
// noise RMS is the thermal density of Rtop || Rbot, sqrt(4 k T R) (Horowitz
// and Hill, noise chapter), over the bandwidth the spec asks for; without
// one the noise RMS limit is not checked and a note says why, and a
// bandwidth limit is never checked on it. Both once passed as "no error"
// or vanished without a word.
func TestPassiveDividerNoise(t *testing.T) {
	d := mustDesign(t, `family: divider
positions:
  Rtop: {value: 90k, tolerance: 0.1%, tcr: 25ppm/K}
  Rbot: {value: 10k, tolerance: 0.1%, tcr: 25ppm/K}
`)
	spec := func(limits string) string {
		return "name: t\nabout: passive divider noise\nfamily: divider\ngain: 0.1\ninput: {single_ended: 0..10V}\nsupply: 0..5V\n" +
			"temperature: {range: -40..85C}\nlimits: {" + limits + "}\n"
	}
	res, err := Evaluate(mustSpec(t, spec("noise_rms: 1mV, bandwidth: 10kHz")), d)
	if err != nil {
		t.Fatal(err)
	}
	want := math.Sqrt(4*Boltzmann*(85+273.15)*9e3) * math.Sqrt(10e3)
	if got := res.Metrics.NoiseRMSV; math.Abs(got-want) > 1e-9*want {
		t.Errorf("noise RMS %.6g V, want %.6g V", got, want)
	}
	checked := map[string]bool{}
	for _, l := range res.Limits {
		checked[l.Name] = true
	}
	if !checked[LimitNoiseRMS] || checked[LimitBandwidth] {
		t.Errorf("limits checked %v: want noise RMS and no bandwidth", checked)
	}
	if !hasNote(res, "bandwidth limit not checked") {
		t.Errorf("no note on the unchecked bandwidth limit: %q", res.Notes)
	}
	res, err = Evaluate(mustSpec(t, spec("noise_rms: 1mV")), d)
	if err != nil {
		t.Fatal(err)
	}
	for _, l := range res.Limits {
		if l.Name == LimitNoiseRMS {
			t.Errorf("noise RMS checked without a bandwidth: %+v", l)
		}
	}
	if !hasNote(res, "noise RMS limit not checked") {
		t.Errorf("no note on the unchecked noise RMS limit: %q", res.Notes)
	}
}

func hasNote(res *Result, prefix string) bool {
	for _, n := range res.Notes {
		if strings.HasPrefix(n, prefix) {
			return true
		}
	}
	return false
}

// TestMissingAmplifierFigures: figures an inline amplifier leaves out
// count as ideal, and the budget says which, so that a review does not
// take "no error" from a missing Vos for a measured zero.
func TestMissingAmplifierFigures(t *testing.T) {
	res, err := Evaluate(mustSpec(t, diffSpec(1, "worst-case")), mustDesign(t, diffDesign(1, "0.1%")))
	if err != nil {
		t.Fatal(err)
	}
	const want = "amplifier figures not given, taken as ideal (no error from them): vos, vos_drift, ib, ios, cmrr, noise, current_noise;"
	if !hasNote(res, want) {
		t.Errorf("notes %q, want one starting %q", res.Notes, want)
	}
}

// TestOutputHeadroomWithErrors: the output's headroom is what is left once
// the worst-case gain error on the full-scale signal and the output offset
// have moved it: an inverting gain of -10 on ±1 V reaches ±10 V nominally,
// 10 mV inside a swing limit of ±(12 - 1.99) V, and 0.1 % resistors take
// that away (arithmetic on the budget's own figures). The headroom was
// once judged at nominal values only.
func TestOutputHeadroomWithErrors(t *testing.T) {
	s := mustSpec(t, "name: t\nabout: output headroom\nfamily: inverting\ngain: -10\ninput: {single_ended: ±1V}\nsupply: ±12V\n"+
		"temperature: {range: 25..25C}\nlimits: {gain_error: 1%}\n")
	d := mustDesign(t, "family: inverting\npositions:\n  Rf: {value: 100k, tolerance: 0.1%, tcr: 0ppm/K}\n  Rg: {value: 10k, tolerance: 0.1%, tcr: 0ppm/K}\n"+
		"amplifier: {aol: 1e12, gbw: 10MHz, vos: 100uV, cm_neg: 1V, cm_pos: 1V, swing_neg: 1.99V, swing_pos: 1.99V}\n")
	res, err := Evaluate(s, d)
	if err != nil {
		t.Fatal(err)
	}
	m := res.Metrics
	want := 0.01 - (m.GainError*1*math.Abs(m.Gain) + m.OutputOffsetV)
	if math.Abs(m.HeadroomV-want) > 1e-9 || want >= 0 {
		t.Errorf("headroom %.6g V, want %.6g V (negative)", m.HeadroomV, want)
	}
	if res.Pass {
		t.Error("a stage whose worst-case output passes its swing limit passes")
	}
}

// TestSafetyWordingAsReadme: the cautions defer to the same person the
// README's "Safety" section names (project rule: one wording for users),
// and no caution in the tree names anyone else.
func TestSafetyWordingAsReadme(t *testing.T) {
	raw, err := os.ReadFile("../../README.md")
	if err != nil {
		t.Fatal(err)
	}
	readme := string(raw)
	i := strings.Index(readme, "## Safety")
	if i < 0 {
		t.Fatal("README has no Safety section")
	}
	section := readme[i:]
	if j := strings.Index(section[len("## Safety"):], "\n## "); j >= 0 {
		section = section[:len("## Safety")+j]
	}
	section = strings.Join(strings.Fields(section), " ")
	if !strings.Contains(section, "local codes by "+QualifiedPerson+".") {
		t.Errorf("README's Safety section does not defer to %q:\n%s", QualifiedPerson, section)
	}
	if strings.Contains(hazardText, "licensed") || !strings.Contains(hazardText, "by "+QualifiedPerson+".") {
		t.Errorf("hazard caution %q does not use the README's wording", hazardText)
	}
}
