package spec

import (
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"

	"plumb/catalog"
)

// fakeCatalog holds invented parts for the resolve tests.
func fakeCatalog(part string) (catalog.Kind, any, error) {
	switch part {
	case "TEST-R-10K":
		return catalog.KindResistor, catalog.Resistor{Part: part, ValueOhm: 10e3,
			ResistorGrade: catalog.ResistorGrade{Tolerance: 0.001, TCR: 25, PowerW: 0.1, MaxVoltageV: 50}}, nil
	case "TEST-NET":
		return catalog.KindNetwork, &catalog.Network{Part: part, Values: []float64{1e3, 10e3, 1e3, 10e3},
			Tolerance: 0.001, RatioTolerance: 0.0002, TCR: 25, TCRTracking: 2, PowerW: 0.05, MaxVoltageV: 50}, nil
	case "TEST-AMP":
		return catalog.KindAmplifier, catalog.Amplifier{Part: part, Type: catalog.OpAmp, AolVV: 1e6, GBWHz: 1e6}, nil
	case "TEST-MATCHED":
		return catalog.KindAmplifier, catalog.Amplifier{Part: part, Type: catalog.MatchedAmp, Gains: []float64{1, 2}}, nil
	case "TEST-STRAP":
		// Invented: a difference amplifier of gain 2 with its feedback
		// element brought out to FB.
		return catalog.KindAmplifier, catalog.Amplifier{Part: part, Type: catalog.MatchedAmp, Gains: []float64{2},
			Network: &catalog.MatchedNetwork{
				Elements: []catalog.MatchedElement{{Name: "Ra", Ohms: 10e3, A: "IN-", B: "inv"}, {Name: "Rb", Ohms: 20e3, A: "inv", B: "FB"},
					{Name: "Rc", Ohms: 10e3, A: "IN+", B: "ni"}, {Name: "Rd", Ohms: 20e3, A: "ni", B: "REF"}},
				Pins: []string{"IN-", "IN+", "FB", "REF", "OUT"}, OpAmpInv: "inv", OpAmpNonInv: "ni", OpAmpOut: "OUT",
				Tolerance: 0.001, RatioTolerance: 0.0002, RatioDriftPPM: 2}}, nil
	}
	return "", nil, catalog.ErrNotFound
}

func TestDesignResolve(t *testing.T) {
	d, err := LoadDesign("testdata/good-design.yaml")
	if err != nil {
		t.Fatal(err)
	}
	if len(d.Unresolved()) != 4 {
		t.Errorf("unresolved before: %v", d.Unresolved())
	}
	if err := d.Resolve(fakeCatalog); err != nil {
		t.Fatal(err)
	}
	if u := d.Unresolved(); len(u) != 0 {
		t.Errorf("unresolved after: %v", u)
	}
	r2 := d.Position("R2").Elements[0]
	if r2.Ohm != 10e3 || r2.RatioTolerance != 0.0002 || math.Abs(r2.TCRTracking-2e-6) > 1e-18 {
		t.Errorf("network element: %+v", r2)
	}
	// Series pair 3.9k + 10k = 13.9k.
	if got := d.Position("R4").Ohm(); got != 13.9e3 {
		t.Errorf("series pair = %g, want 13900", got)
	}
	if d.Amplifier.Amp.AolVV != 1e6 {
		t.Errorf("amplifier not filled: %+v", d.Amplifier)
	}
}

const baseDesign = `family: difference
positions:
  R1: {part: TEST-R-10K}
  R2: {value: 10k, tolerance: 0.1%, tcr: 25ppm/K}
  R3: {network: TEST-NET, element: 1}
  R4: {network: TEST-NET, element: 2}
amplifier: {part: TEST-AMP}
`

func TestDesignErrors(t *testing.T) {
	cases := []struct {
		name    string
		edit    func(string) string
		resolve bool
		want    string
	}{
		{"no family", rep("family: difference\n", ""), false, "family: missing"},
		{"unknown field", add("colour: red\n"), false, "colour"},
		{"tolerance without unit", rep("tolerance: 0.1%", "tolerance: 0.1"), false, `positions.R2.tolerance: "0.1" has no unit`},
		{"inline without tcr", rep(", tcr: 25ppm/K", ""), false, "positions.R2.tcr: missing"},
		{"part and inline", rep("{part: TEST-R-10K}", "{part: TEST-R-10K, value: 10k}"), false, "also inline figures"},
		{"network without element", rep("{network: TEST-NET, element: 1}", "{network: TEST-NET}"), false, "positions.R3.element"},
		{"empty position", rep("{part: TEST-R-10K}", "{}"), false, "positions.R1: empty"},
		{"pair of three", rep("{part: TEST-R-10K}", "{series: [{part: A}, {part: B}, {part: C}]}"), false, "exactly two"},
		{"no amplifier", rep("amplifier: {part: TEST-AMP}\n", ""), false, "amplifier: missing"},
		{"gain on op-amp", rep("{part: TEST-AMP}", "{part: TEST-AMP, gain: 2}"), false, "amplifier.gain"},
		{"inline op-amp without aol", rep("{part: TEST-AMP}", "{gbw: 1MHz, vos: 1mV}"), false, "amplifier.aol: missing"},
		{"unknown part", rep("TEST-R-10K", "NOPE-1"), true, "positions.R1: NOPE-1"},
		{"element beyond network", rep("element: 2", "element: 9"), true, "beyond the 4 elements"},
		{"network named as part", rep("{part: TEST-R-10K}", "{part: TEST-NET}"), true, "is a network"},
		{"amplifier is a resistor", rep("{part: TEST-AMP}", "{part: TEST-R-10K}"), true, "not an amplifier"},
		{"matched amp in op-amp family", rep("{part: TEST-AMP}", "{part: TEST-MATCHED}"), true, "use family matched"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			d, err := ParseDesign([]byte(c.edit(baseDesign)), "d.yaml")
			if err == nil && c.resolve {
				before := d.Positions[0].Elements[0]
				err = d.Resolve(fakeCatalog)
				if d.Positions[0].Elements[0] != before {
					t.Error("a failed Resolve changed the design")
				}
			}
			if err == nil {
				t.Fatal("no error")
			}
			if !errors.Is(err, ErrInvalid) || !strings.Contains(err.Error(), c.want) || !strings.Contains(err.Error(), "d.yaml") {
				t.Errorf("error %q: want ErrInvalid naming d.yaml and saying %q", err, c.want)
			}
		})
	}
}

func TestMatchedDesign(t *testing.T) {
	src := "family: matched\namplifier: {part: TEST-MATCHED, gain: 2}\n"
	d, err := ParseDesign([]byte(src), "m.yaml")
	if err != nil {
		t.Fatal(err)
	}
	if err := d.Resolve(fakeCatalog); err != nil {
		t.Fatal(err)
	}
	d, _ = ParseDesign([]byte(strings.Replace(src, "gain: 2", "gain: 3", 1)), "m.yaml")
	if err := d.Resolve(fakeCatalog); err == nil || !strings.Contains(err.Error(), "not one of the gains") {
		t.Errorf("gain 3 accepted: %v", err)
	}
}

// TestStrappedDesign: a strapped design names a catalog part and its
// strapping; Resolve turns the text into the strapped circuit (positions
// the elements that carry current) and refuses a strapping that is not an
// amplifier, a pin the part does not have and a part with no network, each
// with the field and what to write.
func TestStrappedDesign(t *testing.T) {
	src := "family: strapped\namplifier: {part: TEST-STRAP, strapping: \"IN-=vn  IN+=vp FB=out REF=ref\"}\n"
	d, err := ParseDesign([]byte(src), "s.yaml")
	if err != nil {
		t.Fatal(err)
	}
	if err := d.Resolve(fakeCatalog); err != nil {
		t.Fatal(err)
	}
	if d.Options.Part == nil || d.Amplifier.Strapping != "IN-=vn IN+=vp FB=out REF=ref OUT=out" {
		t.Errorf("resolved strapping %q, part %v", d.Amplifier.Strapping, d.Options.Part)
	}
	w, err := d.Marshal()
	if err != nil || !strings.Contains(string(w), "strapping: IN-=vn IN+=vp FB=out REF=ref OUT=out") {
		t.Errorf("written design lost the strapping (%v):\n%s", err, w)
	}
	for _, c := range []struct{ name, src, want string }{
		{"missing strapping", "family: strapped\namplifier: {part: TEST-STRAP}\n", "amplifier.strapping: missing"},
		{"strapping elsewhere", "family: matched\namplifier: {part: TEST-MATCHED, gain: 2, strapping: \"IN-=vn\"}\n", "amplifier.strapping: a strapping belongs to a strapped amplifier"},
		{"inline", "family: strapped\namplifier: {aol: 120dB, gbw: 1MHz, strapping: \"IN-=vn\"}\n", "amplifier.part: missing"},
	} {
		if _, err := ParseDesign([]byte(c.src), "s.yaml"); err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want %q", c.name, err, c.want)
		}
	}
	for _, c := range []struct{ name, src, want string }{
		{"no such pin", strings.Replace(src, "FB=out", "FEEDBACK=out", 1), `no pin "FEEDBACK"`},
		{"not an amplifier", strings.Replace(src, "FB=out", "FB=ref", 1), "not a usable amplifier"},
		{"no network", "family: strapped\namplifier: {part: TEST-MATCHED, strapping: \"IN-=vn\"}\n", "holds no matched network"},
	} {
		d, err := ParseDesign([]byte(c.src), "s.yaml")
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		if err := d.Resolve(fakeCatalog); err == nil || !strings.Contains(err.Error(), c.want) || !strings.Contains(err.Error(), "amplifier.strapping") {
			t.Errorf("%s: error %v, want %q at amplifier.strapping", c.name, err, c.want)
		}
	}
}

// FuzzDesignRoundTrip reads a design, writes it, reads it back and writes
// it again: the two writes must match and the second read must succeed.
func FuzzDesignRoundTrip(f *testing.F) {
	f.Add([]byte(baseDesign))
	f.Add([]byte("family: matched\namplifier: {part: TEST-MATCHED, gain: 2}\n"))
	f.Add([]byte("family: divider\npositions:\n  Rtop: {value: 210k, tolerance: 0.1%, tcr: 25ppm/K, power: 0.1W}\n  Rbot: {parallel: [{value: 60k, tolerance: 1%, tcr: 100ppm/K}, {part: A}]}\n"))
	f.Add([]byte("family: inverting\npositions:\n  Rf: {value: 10k, tolerance: 1%, tcr: 100ppm/K}\n  Rg: {value: 1k, tolerance: 1%, tcr: 100ppm/K}\namplifier: {aol: 120dB, gbw: 1MHz, vos: 1mV, noise: 10nV/rtHz}\n"))
	f.Fuzz(func(t *testing.T, b []byte) {
		d, err := ParseDesign(b, "fuzz.yaml")
		if err != nil {
			return
		}
		w1, err := d.Marshal()
		if err != nil {
			t.Fatal(err)
		}
		d2, err := ParseDesign(w1, "fuzz.yaml")
		if err != nil {
			t.Fatalf("written design does not read back: %v\n%s", err, w1)
		}
		w2, err := d2.Marshal()
		if err != nil {
			t.Fatal(err)
		}
		if string(w1) != string(w2) {
			t.Errorf("round trip changed the design:\n%s\n---\n%s", w1, w2)
		}
	})
}

// inlineDesign has an inline amplifier and an inline pair the error cases edit.
const inlineDesign = `family: difference
positions:
  R1: {part: TEST-R-10K}
  R2: {value: 10k, tolerance: 0.1%, tcr: 25ppm/K}
  R3: {network: TEST-NET, element: 1}
  R4:
    series:
      - {value: 3.9k, tolerance: 1%, tcr: 100ppm/K}
      - {part: TEST-R-10K}
amplifier: {aol: 120dB, gbw: 1MHz}
`

// matchedDesign has an inline matched amplifier.
const matchedDesign = `family: matched
amplifier: {gain: 2, gain_error: 0.02%, gain_drift: 1ppm/K, cmrr: 90dB}
`

func TestDesignFieldErrors(t *testing.T) {
	amp := func(extra string) func(string) string { return rep("gbw: 1MHz}", "gbw: 1MHz, "+extra+"}") }
	r2 := func(extra string) func(string) string { return rep("tcr: 25ppm/K}", "tcr: 25ppm/K, "+extra+"}") }
	const neg = "must not be negative: a datasheet maximum is a magnitude; write "
	cases := []struct {
		name   string
		src    string
		edit   func(string) string
		field  string // the exact field path of the one error
		advice string // a fragment of its message
	}{
		// A negative maximum would cancel terms that add in the budget.
		{"negative vos", inlineDesign, amp("vos: -100uV"), "amplifier.vos", `"-100uV" ` + neg + "100uV"},
		{"negative vos drift", inlineDesign, amp("vos_drift: -1uV/K"), "amplifier.vos_drift", neg + "1uV/K"},
		{"negative ib", inlineDesign, amp("ib: -1nA"), "amplifier.ib", neg + "1nA"},
		{"negative ios", inlineDesign, amp("ios: -0.5nA"), "amplifier.ios", neg + "0.5nA"},
		{"negative noise", inlineDesign, amp("noise: -10nV/rtHz"), "amplifier.noise", "cannot be negative"},
		{"negative current noise", inlineDesign, amp("current_noise: -1pA/rtHz"), "amplifier.current_noise", "cannot be negative"},
		{"negative supply maximum", inlineDesign, amp("supply_max: -36V"), "amplifier.supply_max", "must not be negative: a rating is a magnitude; write 36V"},
		{"negative gbw", inlineDesign, rep("gbw: 1MHz", "gbw: -1MHz"), "amplifier.gbw", "a frequency cannot be negative"},
		{"zero gbw", inlineDesign, rep("gbw: 1MHz", "gbw: 0Hz"), "amplifier.gbw", `"0Hz" must be positive; give the gain-bandwidth product`},
		{"negative cmrr", inlineDesign, amp("cmrr: -10dB"), "amplifier.cmrr", `"-10dB" must be above 0 dB: CMRR is the datasheet's minimum rejection, a magnitude; write 10dB`},
		{"zero cmrr", inlineDesign, amp("cmrr: 0dB"), "amplifier.cmrr", "must be above 0 dB: CMRR is the datasheet's minimum rejection, a magnitude; write e.g. 90dB"},
		{"negative aol", inlineDesign, rep("aol: 120dB", "aol: -1000"), "amplifier.aol", `"-1000" must be above 0 dB (1 V/V): the open-loop gain is the datasheet's minimum, a magnitude; write 1000`},
		{"zero aol", inlineDesign, rep("aol: 120dB", "aol: 0"), "amplifier.aol", "must be above 0 dB (1 V/V)"},
		{"aol of 0 dB", inlineDesign, rep("aol: 120dB", "aol: 0dB"), "amplifier.aol", "write e.g. 120dB"},
		{"negative aol in dB", inlineDesign, rep("aol: 120dB", "aol: -20dB"), "amplifier.aol", "cannot be below 0 dB"},
		{"negative matched gain error", matchedDesign, rep("gain_error: 0.02%", "gain_error: -0.02%"), "amplifier.gain_error", neg + "0.02%"},
		{"negative matched gain drift", matchedDesign, rep("gain_drift: 1ppm/K", "gain_drift: -1ppm/K"), "amplifier.gain_drift", neg + "1ppm/K"},
		{"negative matched cmrr", matchedDesign, rep("cmrr: 90dB", "cmrr: -90dB"), "amplifier.cmrr", "write 90dB"},
		{"negative internal resistance", matchedDesign, rep("cmrr: 90dB", "cmrr: 90dB, internal_resistance: -10k"), "amplifier.internal_resistance", "cannot be negative"},
		{"negative tolerance", inlineDesign, rep("tolerance: 0.1%", "tolerance: -0.1%"), "positions.R2.tolerance", neg + "0.1%"},
		{"tolerance too wide", inlineDesign, rep("tolerance: 0.1%", "tolerance: 60%"), "positions.R2.tolerance", `"60%" is not a usable tolerance; give one below 50 %`},
		{"negative tcr", inlineDesign, rep("tcr: 25ppm/K", "tcr: -25ppm/K"), "positions.R2.tcr", `"-25ppm/K" ` + neg + "25ppm/K"},
		// U+2212 is the minus sign catalog/units reads as one.
		{"negative tcr with a minus sign", inlineDesign, rep("tcr: 25ppm/K", "tcr: \u221225ppm/K"), "positions.R2.tcr", neg + "25ppm/K"},
		{"negative tcr in a pair", inlineDesign, rep("tcr: 100ppm/K", "tcr: -100ppm/K"), "positions.R4.series[0].tcr", neg + "100ppm/K"},
		{"negative load life", inlineDesign, r2("load_life: -0.1%"), "positions.R2.load_life", neg + "0.1%"},
		{"negative voltage rating", inlineDesign, r2("max_voltage: -75V"), "positions.R2.max_voltage", "must not be negative: a rating is a magnitude; write 75V"},
		{"negative power rating", inlineDesign, r2("power: -0.1W"), "positions.R2.power", "cannot be negative"},
		{"negative thermal resistance", inlineDesign, r2("thermal_resistance: -250K/W"), "positions.R2.thermal_resistance", "cannot be negative"},
		// One bad field, one error.
		{"bad value", inlineDesign, rep("value: 10k", "value: 10x"), "positions.R2.value", "is not a resistance"},
		{"zero value", inlineDesign, rep("value: 10k", "value: 0"), "positions.R2.value", `"0" must be positive; give the resistance`},
		{"bad aol", inlineDesign, rep("aol: 120dB", "aol: lots"), "amplifier.aol", "is not an open-loop gain"},
		{"bad gbw", inlineDesign, rep("gbw: 1MHz", "gbw: fast"), "amplifier.gbw", "is not a frequency"},
		{"bad family of a divider", baseDesign, func(s string) string {
			return rep("amplifier: {part: TEST-AMP}\n", "")(rep("family: difference", "family: dividr")(s))
		}, "family", `"dividr" is not a family`},
		{"bad family of a matched amplifier", matchedDesign, rep("family: matched", "family: matchd"), "family", `"matchd" is not a family`},
		// YAML type errors, placed at their field.
		{"bool not true or false", baseDesign, add("options: {buffer: maybe}\n"), "options.buffer", `"maybe" is not a yes-or-no value; write true or false`},
		{"element not a number", baseDesign, rep("element: 1", "element: one"), "positions.R3.element", `"one" is not a whole number; write it in digits`},
		{"part number for a position's group", baseDesign, rep("R1: {part: TEST-R-10K}", "R1: TEST-R-10K"), "positions.R1",
			"e.g. {part: TEST-R-10K}"},
		{"part number for the amplifier", baseDesign, rep("amplifier: {part: TEST-AMP}", "amplifier: TEST-AMP"), "amplifier", "e.g. {part: TEST-AMP}"},
		{"scalar for positions", baseDesign, func(string) string { return "family: inverting\npositions: R1\namplifier: {part: TEST-AMP}\n" }, "positions",
			"one entry per resistor position belongs"},
		{"mapping for a pair", inlineDesign, rep("    series:\n      - {value: 3.9k, tolerance: 1%, tcr: 100ppm/K}\n      - {part: TEST-R-10K}", "    series: {part: TEST-R-10K}"),
			"positions.R4.series", "is given where a list belongs"},
		{"unknown field of a position", baseDesign, rep("R1: {part: TEST-R-10K}", "R1: {part: TEST-R-10K, colour: red}"), "positions.R1.colour",
			"the fields here are part, network, element, value, tolerance, tcr, power, max_voltage, thermal_resistance, load_life, ratio_tolerance, tcr_tracking, series, parallel"},
		{"unknown field of a pair element", inlineDesign, rep("{part: TEST-R-10K}\namplifier", "{part: TEST-R-10K, tcr_max: 5ppm/K}\namplifier"), "positions.R4.series[1].tcr_max",
			"is not a known field"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := ParseDesign([]byte(c.edit(c.src)), "d.yaml")
			checkOneFieldError(t, err, "d.yaml", c.field, c.advice)
		})
	}
}

// The figures these cases start from parse; signed input and output limits
// stay signed (negative reaches beyond the rail, data/examples README).
func TestDesignSignedFiguresAccepted(t *testing.T) {
	d, err := ParseDesign([]byte(rep("gbw: 1MHz}", "gbw: 1MHz, cm_neg: -0.1V, swing_pos: -0.05V}")(inlineDesign)), "d.yaml")
	if err != nil {
		t.Fatal(err)
	}
	if a := d.Amplifier.Amp; a.CMNegV != -0.1 || a.SwingPosV != -0.05 || a.AolVV != 1e6 {
		t.Errorf("amplifier figures: %+v", a)
	}
	if _, err := ParseDesign([]byte(matchedDesign), "m.yaml"); err != nil {
		t.Fatal(err)
	}
}

// TestDesignDuplicatePositionLine: a position given twice is reported at
// the repeat, naming the line of the first, so the two lines the message
// cites are the two the file holds.
func TestDesignDuplicatePositionLine(t *testing.T) {
	cases := []struct {
		name        string
		src         string
		line, first int
	}{
		{"block mapping", "name: dup\nfamily: difference\npositions:\n  R1: {part: A}\n  R2: {part: B}\n  R3: {part: A}\n  R2: {part: B}\n  R4: {part: B}\namplifier: {part: U}\n", 7, 5},
		{"repeat on the next line", "name: dup\nfamily: inverting\npositions:\n  R1: {part: A}\n  R1: {part: B}\n  R2: {part: B}\namplifier: {part: U}\n", 5, 4},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := ParseDesign([]byte(c.src), "d.yaml")
			fes := fieldErrors(t, err)
			if len(fes) != 1 {
				t.Fatalf("%d errors, want 1: %v", len(fes), err)
			}
			fe := fes[0]
			if want := fmt.Sprintf("given twice (also at line %d)", c.first); fe.Line != c.line || !strings.Contains(fe.Msg, want) {
				t.Errorf("error %q at line %d, want line %d and %q", fe.Msg, fe.Line, c.line, want)
			}
		})
	}
}
