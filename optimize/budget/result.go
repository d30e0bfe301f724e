package budget

import (
	"strconv"

	"plumb/catalog/units"
	"plumb/optimize/assume"
)

// Contribution is one term of a metric's budget: a part's tolerance, a
// tempco, an amplifier figure or the ratio quantization.
type Contribution struct {
	// Name says which part and which effect, e.g. "R2 tolerance", "A1 Vos".
	Name string `json:"name"`
	// Value is the term's size at the end of its tolerance (the parameter
	// at ±1), in the metric's unit: a fraction for gain error, ppm/K for
	// drift, V for offset, V/K for offset drift, V/√Hz and V for noise.
	// For CMRR it is the term's common-mode gain over the differential
	// gain (V/V), the terms of 1/CMRR.
	Value float64 `json:"value"`
	// Share is the fraction of the total this term makes: |v|/Σ|v| under
	// worst case, v²/Σv² under RSS and Monte Carlo.
	Share float64 `json:"share"`
}

// Limit is one spec limit checked against the design.
type Limit struct {
	Name string `json:"name"`
	// Value is the design's figure under the spec's method.
	Value float64 `json:"value"`
	// Limit is the spec's figure.
	Limit float64 `json:"limit"`
	// Max is true for a maximum (gain error), false for a minimum (CMRR).
	Max bool `json:"is_max"`
	// Margin is limit/value for a maximum and value/limit for a minimum,
	// so a margin of 1 sits on the limit, above 1 passes and 2 means twice
	// as good as needed. For dB limits it is the ratio of the linear values;
	// for amplifier headroom it is 1 + headroom/0.1 V (NearPinV). A limit
	// with no error at all reports 1e12.
	Margin     float64 `json:"margin"`
	MarginText string  `json:"margin_text"`
	Pass       bool    `json:"pass"`
	// Unit of Value and Limit: "", "V", "V/K", "Hz", "dB", "ppm/K", "V/rtHz", "ohm".
	Unit         string         `json:"unit"`
	Contributors []Contribution `json:"contributors,omitempty"`
}

// Metrics are the design's scalar figures under the spec's method, in SI
// units unless the name says otherwise.
type Metrics struct {
	// Gain is the nominal gain (nominal parts, finite open-loop gain).
	Gain       float64 `json:"gain"`
	GainTarget float64 `json:"gain_target"`
	// GainNominalError is (Gain - GainTarget)/GainTarget: ratio quantization
	// and open-loop gain.
	GainNominalError float64 `json:"gain_nominal_error"`
	// GainError is the worst |gain error| as a fraction over tolerances
	// and the temperature range (with gain calibration: relative to the
	// calibrated gain at the reference temperature).
	GainError float64 `json:"gain_error"`
	// GainErrorInitial is the worst |gain error| at the reference
	// temperature before calibration.
	GainErrorInitial float64 `json:"gain_error_initial"`
	// CMRRdB is the worst common-mode rejection, resistors and amplifier
	// (0, absent from JSON: a single-ended stage has no common mode to reject).
	CMRRdB float64 `json:"cmrr_db,omitempty"`
	// CMRRResistorsdB is the resistor-limited part (exact solve).
	CMRRResistorsdB float64 `json:"cmrr_resistors_db,omitempty"`
	// DriftPPMPerK is the worst gain drift, ppm/K, over the worst excursion.
	DriftPPMPerK float64 `json:"drift_ppm_per_k"`
	// OutputOffsetV is the worst output offset error at zero input and zero
	// common mode (with offset calibration: its change over temperature).
	OutputOffsetV float64 `json:"output_offset_v"`
	// CommonModeErrorV is the output error the common-mode range adds at
	// the worst CMRR: max |Vcm| x |Adm| / CMRR (differential stages), on
	// top of OutputOffsetV at zero signal.
	CommonModeErrorV float64 `json:"common_mode_error_v,omitempty"`
	// OffsetDriftVPerK is the worst output offset drift.
	OffsetDriftVPerK float64 `json:"offset_drift_v_per_k"`
	// NoiseGain is the op-amp's noise gain (A1, or the first stage of an in-amp).
	NoiseGain   float64 `json:"noise_gain"`
	BandwidthHz float64 `json:"bandwidth_hz"`
	// NoiseDensity is the output noise density at nominal values, V/√Hz.
	NoiseDensity float64 `json:"noise_v_per_rthz"`
	// NoiseRMSV is NoiseDensity over the brick-wall equivalent bandwidth
	// (π/2 x f-3dB for a single pole).
	NoiseRMSV float64 `json:"noise_rms_v"`
	// InputImpedanceOhm is the lowest input resistance seen by the source:
	// under worst case at the worst corner of tolerances, tempcos and load
	// life, otherwise at nominal values.
	InputImpedanceOhm float64 `json:"input_impedance_ohm"`
	// HeadroomV is the least margin of any op-amp pin or output to its
	// range over the input and common-mode corners (negative: out of range).
	HeadroomV float64 `json:"headroom_v"`
	// PowerRatio is the worst resistor dissipation over its derated rating.
	PowerRatio float64 `json:"power_ratio"`
	// VoltageRatio is the worst resistor voltage over its rated voltage.
	VoltageRatio float64 `json:"voltage_ratio"`
	// The channel into the ADC, when the spec has one (see Channel): its
	// total error at full scale and the part the temperature range adds,
	// as fractions of full scale and in LSB, and the output's least
	// margin to the ADC's input range, V.
	TotalErrorFS    float64 `json:"total_error_fs,omitempty"`
	TotalErrorLSB   float64 `json:"total_error_lsb,omitempty"`
	TotalDriftFS    float64 `json:"total_drift_fs,omitempty"`
	TotalDriftLSB   float64 `json:"total_drift_lsb,omitempty"`
	ADCRangeMarginV float64 `json:"adc_range_margin_v,omitempty"`
}

// MCSummary is the outcome of a Monte Carlo run.
type MCSummary struct {
	Trials int    `json:"trials"`
	Seed   uint64 `json:"seed"`
	// Distribution is "uniform" or "normal" (truncated at the tolerance).
	Distribution string `json:"distribution"`
	// Yield is the fraction of trials that passed every limit.
	Yield float64 `json:"yield"`
	// YieldTarget is the spec's target (0 = none).
	YieldTarget   float64            `json:"yield_target"`
	PerLimitYield map[string]float64 `json:"per_limit_yield"`
	// Percentiles maps metric name to its p0.135, p50 and p99.865 values
	// (the ±3 sigma points of a normal distribution).
	Percentiles map[string]Percentiles `json:"percentiles"`
	// Samples keeps every trial's value of each metric for histograms (the
	// gain error signed, the others as magnitudes), keyed by the Metric
	// names.
	Samples map[string][]float64 `json:"samples,omitempty"`
}

// Percentiles of one metric over the Monte Carlo trials.
type Percentiles struct {
	P0135  float64 `json:"p0_135"`
	P50    float64 `json:"p50"`
	P99865 float64 `json:"p99_865"`
	Mean   float64 `json:"mean"`
	StdDev float64 `json:"std_dev"`
	Min    float64 `json:"min"`
	Max    float64 `json:"max"`
}

// Part is one line of the design summary.
type Part struct {
	Position string  `json:"position"`
	Part     string  `json:"part"`
	Ohm      float64 `json:"value_ohm,omitempty"`
	// Grade is a short description: "0.1% 25ppm/K", "network 0.05% ratio".
	Grade string `json:"grade"`
}

// Result is a design's error budget against a spec.
type Result struct {
	Spec   string `json:"spec"`
	Family string `json:"family"`
	// Method is "worst-case", "rss" or "monte-carlo".
	Method  string  `json:"method"`
	Design  []Part  `json:"design"`
	Metrics Metrics `json:"metrics"`
	Limits  []Limit `json:"limits"`
	// Binding is the name of the limit with the least margin.
	Binding string `json:"binding"`
	// Pass is true when every limit passes (and, under Monte Carlo, the
	// yield meets its target).
	Pass bool `json:"pass"`
	// WorstCorner names, for the worst-case method, the tolerance corner
	// giving the worst gain error, e.g. "R1+ R2- R3- R4+ at 85C".
	WorstCorner string     `json:"worst_corner,omitempty"`
	Cautions    []string   `json:"cautions"`
	Notes       []string   `json:"notes"`
	MonteCarlo  *MCSummary `json:"monte_carlo,omitempty"`
	// Assumptions are the catalog figures the result rests on that nobody
	// gave, taken at their documented defaults (package assume).
	Assumptions []assume.Assumption `json:"assumptions,omitempty"`
	// Channel is the error of the whole channel at the ADC (nil: the spec
	// has no adc block).
	Channel *Channel `json:"channel,omitempty"`
}

// Limit names used in Result.Limits, Score and MCSummary.
const (
	LimitGainError      = assume.LimitGainError
	LimitCMRR           = assume.LimitCMRR
	LimitGainDrift      = assume.LimitGainDrift
	LimitOutputOffset   = assume.LimitOutputOffset
	LimitOffsetDrift    = assume.LimitOffsetDrift
	LimitNoiseRMS       = assume.LimitNoiseRMS
	LimitNoiseDensity   = assume.LimitNoiseDensity
	LimitBandwidth      = assume.LimitBandwidth
	LimitInputImpedance = assume.LimitInputImpedance
	LimitHeadroom       = assume.LimitHeadroom
	LimitPower          = assume.LimitPower
	LimitVoltage        = assume.LimitVoltage
)

// FormatFigure writes a figure in the unit words of Limit.Unit, as every
// command and report prints them: a bare fraction ("") as percent, dB to a
// tenth, ppm/K to four figures, a slew rate in V/µs, LSB to four figures,
// a fraction of an ADC's full scale as percent FS, and the rest, resistance
// too, in engineering notation with an SI prefix to four figures (4.275 mV,
// 3.334 MHz, 50.57 kΩ), the units a datasheet uses.
func FormatFigure(v float64, unit string) string {
	switch unit {
	case "":
		return units.FormatPercent(v)
	case "dB":
		return strconv.FormatFloat(v, 'f', 1, 64) + " dB"
	case "ppm/K":
		return strconv.FormatFloat(v, 'g', 4, 64) + " ppm/K"
	case "V/rtHz":
		return units.Format(v, "V/√Hz")
	case "ohm":
		return units.Format(v, "Ω")
	case "V/s":
		return units.FormatSlewRate(v)
	case UnitLSB:
		return strconv.FormatFloat(v, 'g', 4, 64) + " LSB"
	case UnitFS:
		return units.FormatPercent(v) + " FS"
	}
	return units.Format(v, unit)
}
