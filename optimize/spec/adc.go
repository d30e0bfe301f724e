package spec

import (
	"fmt"
	"math"
	"regexp"
	"strings"

	"plumb/catalog/units"
	"plumb/optimize/family"
)

// ADC is the converter the stage drives: what it reads and how wrong its
// own figures let it be. Every error figure is held as a fraction of the
// full-scale range (FSR, the span of Range): a datasheet's LSB is
// 1/2^Bits of it, its % FS is that fraction, and a figure in volts is
// divided by the nominal span.
type ADC struct {
	// Bits is the resolution; one LSB is FSR/2^Bits.
	Bits int `json:"bits"`
	// Range is the input range at the nominal reference, V.
	Range Range `json:"range_v"`
	// PerRef, when the range was written relative to the reference
	// ("0..1 x ref"), holds it in multiples of the reference voltage.
	PerRef *Range `json:"range_x_ref,omitempty"`
	// SharedRef is true when the ADC uses the spec's reference block (the
	// one the stage's reference input sees): its errors then enter both.
	SharedRef bool `json:"shared_reference"`
	// Own is the ADC's own reference (internal or separate) when it does
	// not use the spec's: V may be 0 when the range is absolute.
	Own ADCReference `json:"own_reference"`
	// GainError, OffsetError and INL are datasheet maximums, fractions of
	// FSR; GainDrift and OffsetDrift the same per K.
	GainError   ADCFigure `json:"gain_error"`
	OffsetError ADCFigure `json:"offset_error"`
	INL         ADCFigure `json:"inl"`
	GainDrift   ADCFigure `json:"gain_drift_per_k"`
	OffsetDrift ADCFigure `json:"offset_drift_per_k"`
}

// ADCReference is an ADC's own reference.
type ADCReference struct {
	V         float64   `json:"v"`
	Tolerance ADCFigure `json:"tolerance"`   // fraction
	Drift     ADCFigure `json:"drift_per_k"` // fraction per K
}

// ADCFigure is one figure of an ADC block; a figure not written is not
// Given (unknown, never zero: package assume gives it a default).
type ADCFigure struct {
	V     float64 `json:"v"`
	Given bool    `json:"given"`
}

// FullScale is the nominal full-scale range, V.
func (a *ADC) FullScale() float64 { return a.Range.Span() }

// LSB is the size of one code at the nominal reference: FSR/2^N (any ADC
// textbook; common practice).
func (a *ADC) LSB() float64 { return a.FullScale() / math.Exp2(float64(a.Bits)) }

// Codes is 2^Bits, the number of codes: LSB per full scale.
func (a *ADC) Codes() float64 { return math.Exp2(float64(a.Bits)) }

// MaxBits bounds adc.bits: converters of more than 32 bits are not sold,
// and 2^32 codes keep every LSB figure exact in a float64.
const MaxBits = 32

type rawADC struct {
	Bits         string  `yaml:"bits"`
	Range        string  `yaml:"range"`
	Reference    string  `yaml:"reference"`
	OwnReference *rawRef `yaml:"own_reference"`
	GainError    string  `yaml:"gain_error"`
	OffsetError  string  `yaml:"offset_error"`
	INL          string  `yaml:"inl"`
	GainDrift    string  `yaml:"gain_drift"`
	OffsetDrift  string  `yaml:"offset_drift"`
}

// Where an ADC takes its reference (adc.reference).
const (
	ADCRefChannel = "channel"
	ADCRefOwn     = "own"
)

// reRelative matches a range written in multiples of the reference:
// "0..1 x ref", "±1 × ref", "-1..1*Vref".
var reRelative = regexp.MustCompile(`(?i)^(.*?)\s*(?:x|×|\*)\s*v?ref$`)

// parseADC reads the adc block and the channel limits that depend on it
// (limits.total_error, limits.total_drift).
func parseADC(p *problems, r *rawSpec, s *Spec) {
	ra := r.ADC
	if ra == nil {
		for i, text := range []string{r.Limits.TotalError, r.Limits.TotalDrift} {
			if path := [2]string{"limits.total_error", "limits.total_drift"}[i]; text != "" {
				p.add(path, "needs an adc block: the channel's total error is counted at the ADC (give adc.bits, adc.range and adc.reference)")
			}
		}
		return
	}
	a := &ADC{}
	s.ADC = a
	if ra.Bits == "" {
		p.add("adc.bits", "missing; give the resolution in bits, e.g. 12")
	} else {
		a.Bits = count(p, "adc.bits", ra.Bits, 1, MaxBits, "bits")
	}
	switch ref := strings.TrimSpace(ra.Reference); {
	case ref == ADCRefChannel && ra.OwnReference != nil:
		p.add("adc.own_reference", "given, but adc.reference is channel; remove one of them")
	case ref == ADCRefChannel:
		a.SharedRef = true
		if r.Reference == nil {
			p.add("adc.reference", "is channel, but the spec has no reference block; give reference.voltage (and its tolerance and drift), or an adc.own_reference")
		}
	case ref == ADCRefOwn, ref == "" && ra.OwnReference != nil:
	case ref == "":
		p.add("adc.reference", "missing; write channel (the ADC uses the spec's reference block) or own (with adc.own_reference: voltage, tolerance, drift)")
	default:
		p.add("adc.reference", "%q is not a choice; write channel (the spec's reference block) or own (an internal or separate reference, figures under adc.own_reference)", ref)
	}
	if o := ra.OwnReference; o != nil {
		if o.Voltage != "" {
			a.Own.V = magnitude(p, "adc.own_reference.voltage", o.Voltage, datasheetMax, field(p, "adc.own_reference.voltage", o.Voltage, uVolt))
		}
		if o.Tolerance != "" {
			a.Own.Tolerance = ADCFigure{magnitude(p, "adc.own_reference.tolerance", o.Tolerance, datasheetMax, fractionField(p, "adc.own_reference.tolerance", o.Tolerance)), true}
		}
		if o.Drift != "" {
			a.Own.Drift = ADCFigure{magnitude(p, "adc.own_reference.drift", o.Drift, datasheetMax, tempcoField(p, "adc.own_reference.drift", o.Drift)), true}
		}
		if o.Impedance != "" {
			p.add("adc.own_reference.impedance", "is not used for an ADC's reference; remove it")
		}
		if o.Part != "" {
			p.add("adc.own_reference.part", "is not taken here: an ADC's own reference is given by its figures; to pick a reference from the catalog, give it as the spec's reference (part: auto) and write adc.reference: channel")
		}
	}
	parseADCRange(p, ra, s)
	fs := 0.0
	if !p.failed("adc.range", "adc.reference", "adc.own_reference", "reference") {
		fs = a.FullScale()
	}
	codes := 0.0
	if !p.failed("adc.bits") && a.Bits > 0 {
		codes = a.Codes()
	}
	a.GainError = adcFigure(p, "adc.gain_error", ra.GainError, codes, fs, false)
	a.OffsetError = adcFigure(p, "adc.offset_error", ra.OffsetError, codes, fs, false)
	a.INL = adcFigure(p, "adc.inl", ra.INL, codes, fs, false)
	a.GainDrift = adcFigure(p, "adc.gain_drift", ra.GainDrift, codes, fs, true)
	a.OffsetDrift = adcFigure(p, "adc.offset_drift", ra.OffsetDrift, codes, fs, true)
	l := &s.Limits
	l.TotalError, l.TotalErrorInLSB = channelLimit(p, "limits.total_error", r.Limits.TotalError, codes)
	l.TotalDrift, l.TotalDriftInLSB = channelLimit(p, "limits.total_drift", r.Limits.TotalDrift, codes)
}

// parseADCRange reads adc.range: absolute ("0..4.096V", "±2.5V") or in
// multiples of the reference ("0..1 x ref", "±1 x ref").
func parseADCRange(p *problems, ra *rawADC, s *Spec) {
	a := s.ADC
	text := strings.TrimSpace(ra.Range)
	if text == "" {
		p.add("adc.range", "missing; give the input range, absolute (0..4.096V, ±2.5V) or relative to the reference (0..1 x ref, ±1 x ref)")
		return
	}
	m := reRelative.FindStringSubmatch(text)
	if m == nil {
		a.Range = rangeField(p, "adc.range", text, uVolt)
	} else {
		lo, hi, err := relativeRange(m[1])
		if err != nil {
			p.add("adc.range", "%q: %v; write the multiples of the reference as 0..1 x ref, -1..1 x ref or ±1 x ref", text, err)
			return
		}
		a.PerRef = &Range{Min: lo, Max: hi}
		vref := a.Own.V
		if a.SharedRef && s.Reference != nil {
			vref = s.Reference.V
		}
		if vref <= 0 {
			if !p.failed("adc.reference", "adc.own_reference", "reference") {
				p.add("adc.range", "%q is relative to the reference, but no reference voltage is known; give adc.own_reference.voltage (or use reference: channel)", text)
			}
			return
		}
		a.Range = Range{Min: lo * vref, Max: hi * vref}
	}
	if !p.failed("adc.range") && !(a.Range.Max > a.Range.Min) {
		p.add("adc.range", "%q gives no span; the upper end must lie above the lower", text)
	}
}

// relativeRange reads the multiples of a relative range: "0..1", "-1..1"
// or "±1".
func relativeRange(t string) (lo, hi float64, err error) {
	t = strings.TrimSpace(t)
	if strings.HasPrefix(t, "±") || strings.HasPrefix(t, "+-") {
		return units.ParseSymmetric(strings.Replace(t, "+-", "±", 1), "")
	}
	return units.ParseRange(t, "")
}

// reFS matches a trailing "FS" or "FSR" after a percent or ppm figure
// ("0.05%FS", "0.05 % FSR", "50 ppm FS/K"), which says of what the
// fraction is; it is dropped before the figure is read.
var reFS = regexp.MustCompile(`(?i)\s*(?:of\s+)?fsr?\b`)

// adcFigure reads one ADC error figure: in LSB ("±2LSB"), as a fraction
// of full scale ("0.05%", "0.05% FS", "500ppm") or in volts ("2mV"); a
// drift in LSB/K, ppm/K (of full scale) or V/K. It returns the figure as a
// fraction of full scale (per K for a drift). codes or fs of 0 mean the
// bits or the range failed: a figure that needs them is then skipped.
func adcFigure(p *problems, path, text string, codes, fs float64, drift bool) ADCFigure {
	if text == "" {
		return ADCFigure{}
	}
	v, inLSB, inVolts, err := readADCFigure(text, drift)
	if err != nil {
		p.add(path, "%v", err)
		return ADCFigure{}
	}
	if v < 0 {
		p.add(path, "%q must not be negative: a datasheet maximum is a magnitude; write %s", text, unsigned(text))
		return ADCFigure{}
	}
	switch {
	case inLSB && codes == 0, inVolts && fs == 0:
		return ADCFigure{}
	case inLSB:
		v /= codes
	case inVolts:
		v /= fs
	}
	return ADCFigure{v, true}
}

// readADCFigure reads text in LSB, a fraction of full scale or volts (per
// K for a drift). A ± in front gives the magnitude.
func readADCFigure(text string, drift bool) (v float64, inLSB, inVolts bool, err error) {
	t := strings.TrimSpace(text)
	low := strings.ToLower(t)
	example := "±2LSB, 0.05% (of full scale) or 2mV"
	if drift {
		example = "0.1LSB/K, 2ppm/K (of full scale) or 5uV/K"
	}
	switch {
	case strings.Contains(low, "lsb"):
		if drift {
			i := strings.Index(low, "lsb")
			per := strings.TrimSpace(low[i+3:])
			if per != "/k" && per != "/°c" && per != "/c" {
				return 0, false, false, fmt.Errorf("%q is not a drift in LSB per kelvin; write it like %s", text, example)
			}
			t = t[:i+3]
		}
		if v, err = lsbValue(t); err != nil {
			return 0, false, false, fmt.Errorf("%q is not a figure in LSB; write it like %s", text, example)
		}
		return v, true, false, nil
	case drift && strings.Contains(low, "v/"):
		v, err = parseQuantity(t, uVPerK)
		return v, false, true, err
	case drift:
		v, err = parsePPMPerK(reFS.ReplaceAllString(t, ""))
		if err != nil {
			return 0, false, false, fmt.Errorf("%q is not a drift of full scale; write it like %s", text, example)
		}
		return v, false, false, nil
	case strings.HasSuffix(low, "v"):
		v, err = parseQuantity(strings.TrimPrefix(t, "±"), uVolt)
		return v, false, true, err
	}
	v, err = parseFraction(reFS.ReplaceAllString(t, ""))
	if err != nil {
		return 0, false, false, fmt.Errorf("%q is not a figure in LSB, a fraction of full scale or volts; write it like %s", text, example)
	}
	return math.Abs(v), false, false, nil
}

// lsbValue reads "2LSB", "±0.5 LSB" (the magnitude) through catalog/units.
func lsbValue(t string) (float64, error) {
	if strings.HasPrefix(t, "±") {
		_, hi, err := units.ParseSymmetric(t, "LSB")
		return hi, err
	}
	return units.ParseQuantity(t, "LSB")
}

// channelLimit reads limits.total_error or limits.total_drift, in LSB or as
// a fraction of full scale ("0.05%", "0.05% FS"), into a fraction of full
// scale, and says whether it was written in LSB.
func channelLimit(p *problems, path, text string, codes float64) (fs float64, inLSB bool) {
	if text == "" {
		return 0, false
	}
	t := strings.TrimSpace(text)
	var v float64
	var err error
	if inLSB = strings.Contains(strings.ToLower(t), "lsb"); inLSB {
		v, err = lsbValue(t)
	} else {
		v, err = parseFraction(reFS.ReplaceAllString(t, ""))
	}
	switch {
	case err != nil:
		p.add(path, "%q is not in LSB or a fraction of full scale; write it like 2LSB or 0.05%%", text)
	case v <= 0:
		p.add(path, "%q must be positive; leave the limit out to have none", text)
	case inLSB && codes > 0:
		v /= codes
	}
	return v, inLSB
}

// checkADC finds contradictions between the adc block and the rest of the
// spec once every field has parsed.
func checkADC(p *problems, s *Spec) {
	a := s.ADC
	if a == nil {
		return
	}
	if a.SharedRef {
		for _, f := range familiesWith(s, func(f *family.Family) bool { return f.Reference == family.RefNone }) {
			p.add("adc.reference", "is channel, but family %s has no reference block; give the ADC's reference under adc.own_reference", f.Name)
			return
		}
	}
}

// RefAuto in reference.part asks the search to pick the reference from the
// catalog.
const RefAuto = "auto"

// Auto reports whether the search picks the reference from the catalog.
func (r *Reference) Auto() bool { return r != nil && r.Part == RefAuto }

// parseRefPart reads reference.part: auto, for a reference the search
// picks from the catalog's references of the voltage given, whose figures
// are then the part's.
func parseRefPart(p *problems, ref *rawRef, r *Reference) {
	switch part := strings.TrimSpace(ref.Part); {
	case part == "":
	case part != RefAuto:
		p.add("reference.part", "%q is not a choice here; write auto to have the search pick the reference from the catalog (a design file names the part it uses), or leave it out and give the figures", part)
	default:
		r.Part = RefAuto
		for _, f := range []struct{ path, text string }{{"reference.tolerance", ref.Tolerance}, {"reference.drift", ref.Drift}} {
			if f.text != "" {
				p.add(f.path, "given with part: auto; the figures are the catalog part's: remove it, or give the figures without part")
			}
		}
	}
}
