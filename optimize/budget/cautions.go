package budget

import (
	"fmt"
	"math"
	"strings"

	"plumb/optimize/family"
	"plumb/optimize/spec"
)

// Thresholds for cautions (domain notes §5; IEC 61010-1 and IEC 62368-1
// give the exact limits, from memory).
const (
	// HazardDCV is the DC level above which a voltage is treated as
	// hazardous.
	HazardDCV = 60.0
	// HazardRMSV is the rms level above which an AC voltage is treated as
	// hazardous; an input or common-mode range that swings both ways is
	// taken as a sine whose peak is its smaller range end, so the
	// threshold is HazardRMSV x √2 peak.
	HazardRMSV = 30.0
	// NearRating is the fraction of a derated power or rated voltage above
	// which a resistor is flagged (common practice).
	NearRating = 0.8
	// NearPinV is how close an amplifier pin may come to its range before
	// it is flagged.
	NearPinV = 0.1
)

// QualifiedPerson is who every caution defers the safety check to, in the
// one wording the README's "Safety" section and the domain notes (§5) use:
// a qualified person, under the applicable standards and local codes.
const QualifiedPerson = "a qualified person"

// hazardText is the caution printed for specs at hazardous voltages: the
// highest voltage on the input terminals and supplies, which limit it
// crosses, and the deferral to the standards, local codes and a qualified
// person (domain notes §5).
const hazardText = "HAZARDOUS VOLTAGE: the highest voltage on the input terminals and supplies is %.4g V (%s), %s. " +
	"Creepage, clearance, insulation and every resistor's voltage rating must be checked against the applicable standard " +
	"(IEC 61010-1 for measurement equipment, IEC 62368-1 for ICT and AV equipment) and local codes by " + QualifiedPerson + ". " +
	"plumb is a selection aid, not a safety approval."

// HazardCaution returns the hazardous-voltage caution for spec s, or ""
// when every voltage stays below the limits. currentInput is true for a
// current-sense stage, whose signal is a current and whose terminals sit at
// the common mode.
//
// The voltages considered: a single-ended input against ground; for a
// differential input the voltage between the two input terminals (the
// differential input) and each terminal against ground (common mode ±
// half the differential input); the common-mode range; each supply rail
// and the span between the rails. The highest of them is hazardous above
// HazardDCV; an input or common-mode range that swings both ways may be AC
// and is hazardous when its smaller peak exceeds HazardRMSV x √2 (a sine
// of 30 V rms; IEC 61010-1 and IEC 62368-1, from memory).
func HazardCaution(s *spec.Spec, currentInput bool) string {
	worst, what := 0.0, ""
	consider := func(v float64, name string) {
		if math.Abs(v) > worst {
			worst, what = math.Abs(v), name
		}
	}
	acPeak := 0.0 // largest peak of a range that swings both ways
	bipolar := func(r spec.Range) {
		if r.Min < 0 && r.Max > 0 {
			acPeak = math.Max(acPeak, math.Min(-r.Min, r.Max))
		}
	}
	switch {
	case currentInput:
	case s.Differential:
		for _, d := range [2]float64{s.Input.Min, s.Input.Max} {
			consider(d, "the differential input, between the two input terminals")
		}
		for _, cm := range [2]float64{s.CommonMode.Min, s.CommonMode.Max} {
			for _, d := range [2]float64{s.Input.Min, s.Input.Max} {
				for _, pin := range [2]float64{cm + d/2, cm - d/2} {
					consider(pin, "an input terminal against ground, the common mode and half the differential input")
				}
			}
		}
		bipolar(s.Input)
	default:
		consider(s.Input.Min, "the input against ground")
		consider(s.Input.Max, "the input against ground")
		bipolar(s.Input)
	}
	if s.Differential || currentInput {
		consider(s.CommonMode.Min, "the common-mode input against ground")
		consider(s.CommonMode.Max, "the common-mode input against ground")
		bipolar(s.CommonMode)
	}
	consider(s.Supply.Min, "a supply rail against ground")
	consider(s.Supply.Max, "a supply rail against ground")
	consider(s.Supply.Span(), "between the supply rails")
	acLimit := HazardRMSV * math.Sqrt2
	var above string
	switch {
	case worst > HazardDCV && acPeak > acLimit:
		above = fmt.Sprintf("above %g V DC; an input swinging both ways to %.4g V peak is also above %g V rms (%.3g V peak) if it is AC", HazardDCV, acPeak, HazardRMSV, acLimit)
	case worst > HazardDCV:
		above = fmt.Sprintf("above %g V DC", HazardDCV)
	case acPeak > acLimit:
		above = fmt.Sprintf("below %g V DC, but an input swinging both ways to %.4g V peak is above %g V rms (%.3g V peak) if it is AC", HazardDCV, acPeak, HazardRMSV, acLimit)
	default:
		return ""
	}
	return fmt.Sprintf(hazardText, worst, what, above)
}

// cautions adds hazardous-voltage and near-rating cautions to res.
func (e *Evaluator) cautions(res *Result) {
	s := e.s
	if c := HazardCaution(s, e.sigCur >= 0); c != "" {
		res.Cautions = append(res.Cautions, c)
	}
	m := &res.Metrics
	pr, pAt, vr, vAt := e.ratings()
	if pAt >= 0 && pr > NearRating {
		res.Cautions = append(res.Cautions, fmt.Sprintf("%s dissipates %.0f %% of its derated power (derating %.0f %%): near or above its rating; choose a larger part or higher values",
			e.positions[pAt], 100*pr, 100*e.derating()))
	}
	if vAt >= 0 && vr > NearRating {
		res.Cautions = append(res.Cautions, fmt.Sprintf("%s sees %.0f %% of its rated voltage min(sqrt(P R), limiting element voltage): near or above its rating",
			e.positions[vAt], 100*vr))
	}
	if (e.matched || len(e.amps) > 0) && m.HeadroomV < NearPinV {
		state := "within"
		if m.HeadroomV < 0 {
			state = "beyond"
		}
		res.Cautions = append(res.Cautions, fmt.Sprintf("%s comes %s %s of its range (%s headroom) at an input or common-mode corner",
			e.headWhere(), state, FormatFigure(NearPinV, "V"), FormatFigure(m.HeadroomV, "V")))
	}
	if a := e.c.Amp; a != nil && a.SupplyMaxV > 0 && s.Supply.Span() > a.SupplyMaxV {
		res.Cautions = append(res.Cautions, fmt.Sprintf("the supply span %s exceeds %s's maximum supply %s", FormatFigure(s.Supply.Span(), "V"), a.Part, FormatFigure(a.SupplyMaxV, "V")))
	}
	if a := e.c.Amp; a != nil && a.SupplyMinV > 0 && s.Supply.Span() < a.SupplyMinV {
		res.Cautions = append(res.Cautions, fmt.Sprintf("the supply span %s is below %s's minimum supply %s", FormatFigure(s.Supply.Span(), "V"), a.Part, FormatFigure(a.SupplyMinV, "V")))
	}
}

// commonNotes states the modelling assumptions every result rests on.
func (e *Evaluator) commonNotes(res *Result) {
	s := e.s
	res.Notes = append(res.Notes,
		fmt.Sprintf("temperature points %g C (reference) and the range ends %g..%g C; worst excursion %g K", s.TempRef, s.Temp.Min, s.Temp.Max, s.WorstExcursion()))
	l := &s.Limits
	switch {
	case !e.passive():
		res.Notes = append(res.Notes, "open-loop gain at its datasheet minimum; bias currents taken as constant over temperature",
			fmt.Sprintf("noise: white densities at %g C, RMS over the brick-wall bandwidth π/2 x f-3dB of a single pole (1/f noise not modelled)", s.Temp.Max))
	case l.BandwidthHz > 0:
		res.Notes = append(res.Notes,
			fmt.Sprintf("noise: thermal densities at %g C, RMS over the limit's bandwidth as a brick wall: a divider sets no bandwidth of its own", s.Temp.Max),
			"bandwidth limit not checked: a resistive divider has none of its own (its source, the load's capacitance and any filter after it set it)")
	case l.NoiseRMSV > 0:
		res.Notes = append(res.Notes, "noise RMS limit not checked: a resistive divider sets no bandwidth to integrate its noise over; give limits.bandwidth, the bandwidth the filter or ADC after it passes")
	}
	if !e.passive() && l.NoiseRMSV > 0 && !e.noiseBandKnown(&res.Metrics) {
		res.Notes = append(res.Notes, "noise RMS limit not checked: the stage's bandwidth is not known (no gbw figure, or no signal reaches the output)")
	}
	if missing := e.missingAmpFigures(); len(missing) > 0 {
		res.Notes = append(res.Notes, "amplifier figures not given, taken as ideal (no error from them): "+strings.Join(missing, ", ")+
			"; give the datasheet maximums for a budget that counts them")
	}
	if l.InputImpedance > 0 && e.fam.Input == family.Current {
		res.Notes = append(res.Notes, "input impedance limit not checked: the input is a current, and the shunt is the impedance it sees")
	}
	if s.Calibrate.Gain {
		res.Notes = append(res.Notes, "gain calibrated once at the reference temperature: the initial gain error drops out; drift, load life and CMRR remain")
	}
	if s.Calibrate.Offset {
		res.Notes = append(res.Notes, "offset calibrated once at the reference temperature: the initial offset drops out; its drift remains")
	}
	for _, t := range e.c.Figs {
		if t.ThermalResistance > 0 {
			res.Notes = append(res.Notes, "self-heating included: each resistor runs P x thermal resistance above ambient at the worst input corner")
			break
		}
	}
}

// missingAmpFigures lists the error figures of the loaded amplifier that
// are zero (not given), which the budget then treats as ideal; an
// amplifier with matched resistors inside is judged by its own figures.
func (e *Evaluator) missingAmpFigures() []string {
	if e.passive() {
		return nil
	}
	type fig struct {
		name string
		v    float64
	}
	a := &e.amp
	figs := []fig{{"vos", a.VosV}, {"vos_drift", a.VosDriftVK}, {"ib", a.IbA}, {"ios", a.IosA}, {"aol", a.AolVV},
		{"cmrr", a.CMRRdB}, {"gbw", a.GBWHz}, {"noise", a.NoiseVHz}, {"current_noise", a.NoiseAHz}}
	if e.matched {
		figs = []fig{{"vos", a.VosV}, {"vos_drift", a.VosDriftVK}, {"gain_error", a.GainErrorMax}, {"gain_drift", a.GainDriftPPM},
			{"cmrr", a.CMRRdB}, {"gbw", a.GBWHz}, {"noise", a.NoiseVHz}}
	}
	var out []string
	for _, f := range figs {
		if f.v == 0 {
			out = append(out, f.name)
		}
	}
	return out
}

// TempCurve is a design's gain error over the spec's temperature range for
// the report plot: the nominal parts and the worst-case envelope.
type TempCurve struct {
	TempC   []float64 `json:"temp_c"`
	Nominal []float64 `json:"nominal"` // fraction
	Low     []float64 `json:"low"`     // fraction, worst low
	High    []float64 `json:"high"`    // fraction, worst high
}

// GainErrorVsTemperature solves the gain error at n temperatures across the
// spec's range: nominal parts, and the two corners where every parameter
// sits at the end that raises (lowers) the gain at that temperature. With
// gain calibration the error is relative to the gain at the reference
// temperature.
func (e *Evaluator) GainErrorVsTemperature(c *Candidate, n int) (*TempCurve, error) {
	if err := e.SetCandidate(c); err != nil {
		return nil, err
	}
	if n < 2 {
		n = 2
	}
	s := e.s
	tc := &TempCurve{}
	var p, ref point
	refGain := s.Gain
	// errAt is the gain error at t of the parts at x: against the target,
	// or with calibration against the same parts' gain at Tref.
	errAt := func(t float64) (float64, error) {
		if err := e.eval(e.x, t, false, &p); err != nil {
			return 0, err
		}
		g := p.gain
		if !s.Calibrate.Gain {
			return g/refGain - 1, nil
		}
		if err := e.eval(e.x, s.TempRef, false, &ref); err != nil {
			return 0, err
		}
		return g/ref.gain - 1, nil
	}
	for i := 0; i < n; i++ {
		t := s.Temp.Min + (s.Temp.Max-s.Temp.Min)*float64(i)/float64(n-1)
		nom, err := errAt(t)
		if err != nil {
			return nil, err
		}
		// Linear envelope: each parameter's excursion adds at its worst sign.
		spread := 0.0
		for j := range e.params {
			if e.params[j].kind.amplifierTerm() {
				continue
			}
			e.x[j] = 1
			q, err := errAt(t)
			e.x[j] = 0
			if err != nil {
				return nil, err
			}
			spread += math.Abs(q - nom)
		}
		tc.TempC = append(tc.TempC, t)
		tc.Nominal = append(tc.Nominal, nom)
		tc.Low = append(tc.Low, nom-spread)
		tc.High = append(tc.High, nom+spread)
	}
	return tc, nil
}
