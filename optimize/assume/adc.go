package assume

import "fmt"

// Limit names of the channel into an ADC (budget.Limit* are these).
const (
	// LimitTotalError is the channel's whole error at full scale, stage,
	// reference and ADC together.
	LimitTotalError = "total error"
	// LimitTotalDrift is the part of it the temperature range adds.
	LimitTotalDrift = "total drift"
	// LimitADCRange is the stage's output against the ADC's input range.
	LimitADCRange = "ADC input range"
)

// ADCPart is the part name the ADC's assumptions are listed under.
const ADCPart = "ADC"

// ADCFigures are an ADC's error figures as fractions of its full-scale
// range (per K for drifts), and its own reference's tolerance and drift;
// NaN is unknown.
type ADCFigures struct {
	GainError, OffsetError, INL float64
	GainDrift, OffsetDrift      float64
	// RefTolerance and RefDrift are the ADC's own reference's; they are
	// left alone when the ADC uses the channel's reference.
	RefTolerance, RefDrift float64
}

// Defaults for an ADC's figures that its spec does not give: the loose end
// of general-purpose successive-approximation converters with an internal
// reference (common practice; a precision part's datasheet beats them by
// ten or more).
const (
	ADCGainError    = 0.005  // 0.5 % of full scale
	ADCOffsetError  = 0.002  // 0.2 % of full scale
	ADCINLCodes     = 4      // ±4 LSB
	ADCGainDrift    = 50e-6  // 50 ppm of full scale per K
	ADCOffsetDrift  = 10e-6  // 10 ppm of full scale per K
	ADCRefTolerance = 0.01   // 1 %, a loose internal bandgap
	ADCRefDrift     = 100e-6 // 100 ppm/K, the same
)

// ADC fills the unknown figures of an ADC of bits resolution in place and
// says what it assumed, under part ADCPart.
func ADC(a *ADCFigures, bits int) []Assumption {
	f := filler{part: ADCPart}
	const why = "the loose end of general-purpose converters, common practice"
	f.set(&a.GainError, "adc_gain_error", ADCGainError, fmt.Sprintf("gain error not given: taken as %g %% of full scale (%s)", 100*ADCGainError, why))
	f.set(&a.OffsetError, "adc_offset_error", ADCOffsetError, fmt.Sprintf("offset error not given: taken as %g %% of full scale (%s)", 100*ADCOffsetError, why))
	inl := ADCINLCodes / float64(uint64(1)<<min(bits, 62))
	f.set(&a.INL, "adc_inl", inl, fmt.Sprintf("INL not given: taken as %d LSB (%s)", ADCINLCodes, why))
	f.set(&a.GainDrift, "adc_gain_drift", ADCGainDrift, fmt.Sprintf("gain drift not given: taken as %g ppm of full scale per K (%s)", 1e6*ADCGainDrift, why))
	f.set(&a.OffsetDrift, "adc_offset_drift", ADCOffsetDrift, fmt.Sprintf("offset drift not given: taken as %g ppm of full scale per K (%s)", 1e6*ADCOffsetDrift, why))
	f.set(&a.RefTolerance, "adc_reference_tolerance", ADCRefTolerance, fmt.Sprintf("own reference's tolerance not given: taken as %g %% (a loose internal bandgap, common practice)", 100*ADCRefTolerance))
	f.set(&a.RefDrift, "adc_reference_drift", ADCRefDrift, fmt.Sprintf("own reference's drift not given: taken as %g ppm/K (a loose internal bandgap, common practice)", 1e6*ADCRefDrift))
	return f.as
}

// The channel's limits rest on every figure of the stage's error terms
// and on the ADC's own.
func init() {
	for fig, limits := range feeds {
		var add []string
		for _, l := range limits {
			switch l {
			case LimitGainError, LimitOutputOffset, LimitCMRR, LimitNoiseRMS:
				add = appendOnce(add, LimitTotalError, LimitADCRange)
			case LimitGainDrift, LimitOffsetDrift:
				add = appendOnce(add, LimitTotalError, LimitTotalDrift, LimitADCRange)
			}
		}
		feeds[fig] = append(limits, add...)
	}
	for _, fig := range []string{"adc_gain_error", "adc_offset_error", "adc_inl"} {
		feeds[fig] = []string{LimitTotalError}
	}
	for _, fig := range []string{"adc_gain_drift", "adc_offset_drift"} {
		feeds[fig] = []string{LimitTotalError, LimitTotalDrift}
	}
	for _, fig := range []string{"adc_reference_tolerance", "adc_reference_drift"} {
		feeds[fig] = []string{LimitTotalError, LimitTotalDrift, LimitADCRange}
	}
	feeds["adc_reference_tolerance"] = []string{LimitTotalError, LimitADCRange}
	// A catalog reference's figures (the part the search picks for a
	// reference.part: auto) reach every limit the reference does.
	feeds["tolerance"] = appendOnce(feeds["tolerance"], LimitOutputOffset, LimitTotalError, LimitADCRange)
	feeds["drift_ppm"] = appendOnce(feeds["drift_ppm"], LimitOutputOffset, LimitOffsetDrift, LimitTotalError, LimitTotalDrift, LimitADCRange)
}

func appendOnce(list []string, names ...string) []string {
	for _, n := range names {
		found := false
		for _, l := range list {
			found = found || l == n
		}
		if !found {
			list = append(list, n)
		}
	}
	return list
}

// Reference fills a catalog voltage reference's unknown initial tolerance
// (fraction) and drift (ppm/K) in place with the defaults of a loose
// bandgap reference, ADCRefTolerance and ADCRefDrift (common practice), and
// says what it assumed.
func Reference(part string, tolerance, driftPPM *float64) []Assumption {
	f := filler{part: part}
	f.set(tolerance, "tolerance", ADCRefTolerance, fmt.Sprintf("initial tolerance not given: taken as %g %% (a loose bandgap reference, common practice)", 100*ADCRefTolerance))
	f.set(driftPPM, "drift_ppm", 1e6*ADCRefDrift, fmt.Sprintf("drift not given: taken as %g ppm/K (a loose bandgap reference, common practice)", 1e6*ADCRefDrift))
	return f.as
}
