package spec

import (
	"math"
	"strings"
	"testing"
)

// adcBase is a level shift with a 4.096 V reference; each case adds its
// adc block and limits.
const adcBase = `name: adc
about: adc block test
family: level-shift
input: {single_ended: ±10V}
output: 0.1..4V
supply: 0..5V
reference: {voltage: 4.096V, tolerance: 0.05%, drift: 10ppm/K}
temperature: {range: 0..70C}
`

// TestADCBlock reads the adc block's figures into fractions of full scale:
// an LSB is 1/2^N of it (common practice), a % figure is of full scale, a
// figure in volts is divided by the nominal span.
func TestADCBlock(t *testing.T) {
	s, err := Parse([]byte(adcBase+`adc:
  bits: 12
  range: 0..1 x ref
  reference: channel
  gain_error: ±2LSB
  offset_error: 2.048mV
  inl: 0.05% FS
  gain_drift: 0.1LSB/K
  offset_drift: 4.096uV/K
limits:
  total_error: 16LSB
  total_drift: 0.1%
`), "adc.yaml")
	if err != nil {
		t.Fatal(err)
	}
	a := s.ADC
	if a == nil || !a.SharedRef || a.Bits != 12 || a.Range != (Range{0, 4.096}) || a.PerRef == nil || *a.PerRef != (Range{0, 1}) {
		t.Fatalf("adc %+v", a)
	}
	for _, c := range []struct {
		name string
		f    ADCFigure
		want float64
	}{
		{"gain error ±2 LSB", a.GainError, 2.0 / 4096},
		{"offset error 2.048 mV of 4.096 V", a.OffsetError, 0.0005},
		{"INL 0.05 % FS", a.INL, 0.0005},
		{"gain drift 0.1 LSB/K", a.GainDrift, 0.1 / 4096},
		{"offset drift 4.096 µV/K", a.OffsetDrift, 1e-6},
	} {
		if !c.f.Given || math.Abs(c.f.V-c.want) > 1e-15 {
			t.Errorf("%s: %+v, want %g", c.name, c.f, c.want)
		}
	}
	if math.Abs(s.Limits.TotalError-16.0/4096) > 1e-15 || !s.Limits.TotalErrorInLSB {
		t.Errorf("total_error %g (LSB %v), want 16/4096", s.Limits.TotalError, s.Limits.TotalErrorInLSB)
	}
	if math.Abs(s.Limits.TotalDrift-0.001) > 1e-15 || s.Limits.TotalDriftInLSB {
		t.Errorf("total_drift %g (LSB %v), want 0.001 of full scale", s.Limits.TotalDrift, s.Limits.TotalDriftInLSB)
	}
	// An own reference and a bipolar relative range; figures left out are
	// unknown, not zero.
	s, err = Parse([]byte(adcBase+`adc: {bits: 16, range: ±1 x ref, own_reference: {voltage: 2.5V}}
limits: {total_error: 0.1%}
`), "own.yaml")
	if err != nil {
		t.Fatal(err)
	}
	if a := s.ADC; a.SharedRef || a.Range != (Range{-2.5, 2.5}) || a.GainError.Given || a.Own.Tolerance.Given || a.LSB() != 5.0/65536 {
		t.Errorf("own reference adc %+v", a)
	}
}

// TestADCBlockErrors: every mistake in the adc block is one error at its
// line and column, with what to write.
func TestADCBlockErrors(t *testing.T) {
	for _, c := range []struct {
		name, src, want string
	}{
		{"limit without adc", adcBase + "limits: {total_error: 2LSB}\n", "limits.total_error: needs an adc block"},
		{"bits missing", adcBase + "adc: {range: 0..4.096V, reference: channel}\nlimits: {total_error: 2LSB}\n", "adc.bits: missing"},
		{"bits too many", adcBase + "adc: {bits: 40, range: 0..4.096V, reference: channel}\nlimits: {total_error: 2LSB}\n", "adc.bits"},
		{"no reference said", adcBase + "adc: {bits: 12, range: 0..4.096V}\nlimits: {total_error: 2LSB}\n", "adc.reference: missing"},
		{"bad reference", adcBase + "adc: {bits: 12, range: 0..4.096V, reference: mine}\nlimits: {total_error: 2LSB}\n", `"mine" is not a choice`},
		{"relative without voltage", adcBase + "adc: {bits: 12, range: 0..1 x ref, own_reference: {tolerance: 1%}}\nlimits: {total_error: 2LSB}\n", "no reference voltage is known"},
		{"range without unit", adcBase + "adc: {bits: 12, range: 0..4, reference: channel}\nlimits: {total_error: 2LSB}\n", "adc.range"},
		{"empty span", adcBase + "adc: {bits: 12, range: 1..1 x ref, reference: channel}\nlimits: {total_error: 2LSB}\n", "the two ends are equal"},
		{"negative INL", adcBase + "adc: {bits: 12, range: 0..4.096V, reference: channel, inl: -1LSB}\nlimits: {total_error: 2LSB}\n", "adc.inl"},
		{"bare figure", adcBase + "adc: {bits: 12, range: 0..4.096V, reference: channel, gain_error: 2}\nlimits: {total_error: 2LSB}\n", "adc.gain_error"},
		{"drift not per K", adcBase + "adc: {bits: 12, range: 0..4.096V, reference: channel, gain_drift: 2LSB}\nlimits: {total_error: 2LSB}\n", "adc.gain_drift"},
		{"bad limit", adcBase + "adc: {bits: 12, range: 0..4.096V, reference: channel}\nlimits: {total_error: 2V}\n", "limits.total_error"},
		{"own and channel", adcBase + "adc: {bits: 12, range: 0..4.096V, reference: channel, own_reference: {voltage: 2.5V}}\nlimits: {total_error: 2LSB}\n", "adc.own_reference"},
	} {
		t.Run(c.name, func(t *testing.T) {
			_, err := Parse([]byte(c.src), "bad.yaml")
			if err == nil {
				t.Fatal("accepted")
			}
			if !strings.Contains(err.Error(), c.want) || !strings.Contains(err.Error(), "bad.yaml:") {
				t.Errorf("error %q, want it to name bad.yaml:LINE:COL and contain %q", err, c.want)
			}
		})
	}
}

// TestReferenceAuto: reference.part auto leaves the figures to the part
// the search picks; figures given beside it, or another word, are errors;
// a design under such a spec names its part, which ReferenceFigures then
// takes the figures from.
func TestReferenceAuto(t *testing.T) {
	auto := strings.Replace(adcBase, "reference: {voltage: 4.096V, tolerance: 0.05%, drift: 10ppm/K}", "reference: {part: auto, voltage: 4.096V}", 1)
	s, err := Parse([]byte(auto+"limits: {gain_error: 1%}\n"), "auto.yaml")
	if err != nil {
		t.Fatal(err)
	}
	if !s.Reference.Auto() || s.Reference.Tolerance != 0 {
		t.Fatalf("reference %+v", s.Reference)
	}
	for _, c := range []struct{ name, src, want string }{
		{"figures with auto", strings.Replace(adcBase, "reference: {", "reference: {part: auto, ", 1), "reference.tolerance: given with part: auto"},
		{"a part number", strings.Replace(adcBase, "reference: {", "reference: {part: VR-1, ", 1), `reference.part: "VR-1" is not a choice`},
	} {
		_, err := Parse([]byte(c.src+"limits: {gain_error: 1%}\n"), "bad.yaml")
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want %q", c.name, err, c.want)
		}
	}
	d, err := ParseDesign([]byte("family: level-shift\npositions: {R1: {part: A}, R2: {part: A}, R3: {part: A}, Rf: {part: A}, Rg: {part: A}}\namplifier: {part: U}\nreference: {part: VR-4096}\n"), "d.yaml")
	if err != nil {
		t.Fatal(err)
	}
	if _, err := ReferenceFigures(s, d); err == nil || !strings.Contains(err.Error(), "has not been looked up") {
		t.Errorf("unresolved reference: %v", err)
	}
	d.Reference.V, d.Reference.Tolerance, d.Reference.Drift, d.Reference.Resolved = 4.096, 0.0004, 3e-6, true
	r, err := ReferenceFigures(s, d)
	if err != nil || r.Tolerance != 0.0004 || r.Drift != 3e-6 || r.V != 4.096 || r.Auto() {
		t.Errorf("figures %+v, %v", r, err)
	}
	d.Reference.V = 2.5
	if _, err := ReferenceFigures(s, d); err == nil || !strings.Contains(err.Error(), "2.5 V reference") {
		t.Errorf("wrong voltage: %v", err)
	}
	d.Reference = nil
	if _, err := ReferenceFigures(s, d); err == nil || !strings.Contains(err.Error(), "reference: missing") {
		t.Errorf("no reference: %v", err)
	}
}
