package catalog

import (
	"errors"
	"math"
	"time"
)

// ErrNotFound is returned when a part number is not in the catalog.
var ErrNotFound = errors.New("catalog: part not found")

// Kind is the kind of an orderable part.
type Kind string

// The kinds of part the catalog holds.
const (
	KindResistor  Kind = "resistor"
	KindNetwork   Kind = "network"
	KindAmplifier Kind = "amplifier"
	KindReference Kind = "reference"
)

// PriceBreak is one step of a part's price list: the unit price that applies
// when at least MinQty pieces are bought.
type PriceBreak struct {
	MinQty    int     `json:"min_qty" yaml:"min_qty"`
	UnitPrice float64 `json:"unit_price" yaml:"unit_price"`
	Currency  string  `json:"currency" yaml:"currency"`
}

// Provenance says where a catalog row came from and when.
type Provenance struct {
	Source     string    `json:"source" yaml:"source"`
	ImportedAt time.Time `json:"imported_at" yaml:"imported_at"`
}

// Offer is what makes a part orderable: its price list, the minimum order
// quantity and the stock on hand.
type Offer struct {
	PriceBreaks []PriceBreak `json:"price_breaks" yaml:"price_breaks"`
	// MinOrder is the minimum order quantity; 0 or 1 means none.
	MinOrder int `json:"min_order,omitempty" yaml:"min_order,omitempty"`
	// Stock is the quantity available; -1 means unknown.
	Stock int `json:"stock" yaml:"stock"`
}

// ResistorGrade holds the figures shared by every value of a resistor
// product line at one tolerance and tempco grade.
//
// A figure tagged catalog:"unknown" (here and in Network and Amplifier) may
// be unknown: it holds NaN (see Unknown), is stored as NULL, written absent
// from JSON, blank in CSV and "-" in tables. NaN makes any arithmetic on a
// figure nobody gave come out NaN, so a budget cannot rest on it by
// accident; optimize resolves unknown figures to stated defaults at the one
// place catalog parts enter it. Technology and Package are "" when unknown.
type ResistorGrade struct {
	// Technology is a trade word: thick-film, thin-film, metal-film, foil,
	// wirewound, metal-strip (for shunts).
	Technology string `json:"technology" yaml:"technology"`
	// Package is the case or size code, for example 0603 or 1206.
	Package string `json:"package" yaml:"package"`
	// Tolerance is the initial tolerance as a fraction (0.001 for ±0.1 %).
	Tolerance float64 `json:"tolerance" yaml:"tolerance"`
	// TCR is the temperature coefficient box, ±ppm/K about 25 °C.
	TCR float64 `json:"tcr_ppm" yaml:"tcr_ppm" catalog:"unknown"`
	// PowerW is the rated power at the rated ambient, W.
	PowerW float64 `json:"power_w" yaml:"power_w" catalog:"unknown"`
	// MaxVoltageV is the limiting element voltage, V.
	MaxVoltageV float64 `json:"max_voltage_v" yaml:"max_voltage_v" catalog:"unknown"`
	// ThermalResistance is the part's thermal resistance to ambient, K/W.
	ThermalResistance float64 `json:"thermal_resistance_k_per_w,omitempty" yaml:"thermal_resistance_k_per_w,omitempty" catalog:"unknown"`
	// LoadLife is the load-life stability as a fraction of value over the
	// rated life.
	LoadLife float64 `json:"load_life,omitempty" yaml:"load_life,omitempty" catalog:"unknown"`
}

// ResistorSeries is a maker's product line offering every value of one
// E-series over a value range at one grade, with one price list and a stock
// figure per value.
type ResistorSeries struct {
	ID int64 `json:"-" yaml:"-"`
	// Part is the series' order-code stem; a value's part number is
	// PartNumber(value).
	Part  string `json:"part" yaml:"part"`
	Maker string `json:"maker" yaml:"maker"`
	Line  string `json:"line" yaml:"line"`
	// ESeries names the IEC 60063 series offered: E24, E96, E192, ...
	ESeries       string  `json:"e_series" yaml:"e_series"`
	MinOhm        float64 `json:"min_ohm" yaml:"min_ohm"`
	MaxOhm        float64 `json:"max_ohm" yaml:"max_ohm"`
	ResistorGrade `yaml:",inline"`
	Offer         `yaml:",inline"`
	Provenance    `yaml:",inline"`
}

// Resistor is one orderable resistor: one part number, one value.
type Resistor struct {
	ID       int64   `json:"-" yaml:"-"`
	Part     string  `json:"part" yaml:"part"`
	Maker    string  `json:"maker" yaml:"maker"`
	Line     string  `json:"line,omitempty" yaml:"line,omitempty"`
	ValueOhm float64 `json:"value_ohm" yaml:"value_ohm"`
	// SeriesPart is set when the resistor is a value of a ResistorSeries.
	SeriesPart    string `json:"series_part,omitempty" yaml:"series_part,omitempty"`
	ResistorGrade `yaml:",inline"`
	Offer         `yaml:",inline"`
	Provenance    `yaml:",inline"`
}

// Network is a set of resistors on one substrate whose ratios and tempcos
// are matched.
type Network struct {
	ID    int64  `json:"-" yaml:"-"`
	Part  string `json:"part" yaml:"part"`
	Maker string `json:"maker" yaml:"maker"`
	// Values are the element values in ohm, in pin order.
	Values         []float64 `json:"values_ohm" yaml:"values_ohm"`
	Technology     string    `json:"technology" yaml:"technology"`
	Package        string    `json:"package" yaml:"package"`
	Tolerance      float64   `json:"tolerance" yaml:"tolerance"`               // absolute, fraction
	RatioTolerance float64   `json:"ratio_tolerance" yaml:"ratio_tolerance"`   // any element to any other, fraction
	TCR            float64   `json:"tcr_ppm" yaml:"tcr_ppm" catalog:"unknown"` // absolute, ±ppm/K
	TCRTracking    float64   `json:"tcr_tracking_ppm" yaml:"tcr_tracking_ppm" catalog:"unknown"`
	PowerW         float64   `json:"power_w" yaml:"power_w" catalog:"unknown"` // per element
	MaxVoltageV    float64   `json:"max_voltage_v" yaml:"max_voltage_v" catalog:"unknown"`
	Offer          `yaml:",inline"`
	Provenance     `yaml:",inline"`
}

// AmplifierType tells an op-amp from an amplifier with matched resistors
// inside (a difference or instrumentation amplifier with fixed gains).
type AmplifierType string

// Amplifier types.
const (
	OpAmp      AmplifierType = "opamp"
	MatchedAmp AmplifierType = "matched"
)

// Amplifier is an op-amp or an amplifier with matched resistors inside.
// Input and output ranges are given relative to the rails: the input
// common-mode range runs from V- + CMNegV to V+ - CMPosV, so a negative
// CMPosV means the inputs work above the positive rail. The output swings
// from V- + SwingNegV to V+ - SwingPosV.
type Amplifier struct {
	ID       int64         `json:"-" yaml:"-"`
	Part     string        `json:"part" yaml:"part"`
	Maker    string        `json:"maker" yaml:"maker"`
	Type     AmplifierType `json:"type" yaml:"type"`
	Channels int           `json:"channels" yaml:"channels"`
	Package  string        `json:"package" yaml:"package"`

	SupplyMinV float64 `json:"supply_min_v" yaml:"supply_min_v"` // total supply span V+ - V-
	SupplyMaxV float64 `json:"supply_max_v" yaml:"supply_max_v"`
	CMNegV     float64 `json:"cm_neg_v" yaml:"cm_neg_v" catalog:"unknown"`
	CMPosV     float64 `json:"cm_pos_v" yaml:"cm_pos_v" catalog:"unknown"`
	SwingNegV  float64 `json:"swing_neg_v" yaml:"swing_neg_v" catalog:"unknown"`
	SwingPosV  float64 `json:"swing_pos_v" yaml:"swing_pos_v" catalog:"unknown"`

	VosV        float64  `json:"vos_v" yaml:"vos_v" catalog:"unknown"`                         // max input offset voltage
	VosDriftVK  float64  `json:"vos_drift_v_per_k" yaml:"vos_drift_v_per_k" catalog:"unknown"` // max offset drift, V/K
	IbA         float64  `json:"ib_a" yaml:"ib_a" catalog:"unknown"`                           // max input bias current
	IosA        float64  `json:"ios_a" yaml:"ios_a" catalog:"unknown"`                         // max input offset current
	AolVV       float64  `json:"aol_v_per_v" yaml:"aol_v_per_v" catalog:"unknown"`             // min open-loop gain
	CMRRdB      float64  `json:"cmrr_db" yaml:"cmrr_db" catalog:"unknown"`                     // min CMRR
	GBWHz       float64  `json:"gbw_hz" yaml:"gbw_hz" catalog:"unknown"`
	SlewVs      float64  `json:"slew_v_per_s" yaml:"slew_v_per_s" catalog:"unknown"`
	NoiseVHz    float64  `json:"noise_v_per_rthz" yaml:"noise_v_per_rthz" catalog:"unknown"` // voltage noise density, V/√Hz
	NoiseAHz    float64  `json:"noise_a_per_rthz" yaml:"noise_a_per_rthz" catalog:"unknown"` // current noise density, A/√Hz
	IqA         float64  `json:"iq_a" yaml:"iq_a" catalog:"unknown"`                         // quiescent current per channel
	TypicalOnly []string `json:"typical_only,omitempty" yaml:"typical_only,omitempty"`       // JSON names of figures given only as typical
	// RailToRail is what the maker calls rail-to-rail: RailIn, RailOut,
	// RailInOut, or "" (not stated, or not rail-to-rail). It matters where
	// the range figures are unknown.
	RailToRail string `json:"rail_to_rail,omitempty" yaml:"rail_to_rail,omitempty"`

	// Matched-resistor amplifiers only.
	Gains        []float64 `json:"gains,omitempty" yaml:"gains,omitempty"`
	GainErrorMax float64   `json:"gain_error_max,omitempty" yaml:"gain_error_max,omitempty" catalog:"unknown"` // fraction
	GainDriftPPM float64   `json:"gain_drift_ppm,omitempty" yaml:"gain_drift_ppm,omitempty" catalog:"unknown"` // ±ppm/K
	// InNegV and InPosV bound the input voltage range relative to the
	// rails, as CMNegV and CMPosV do for the op-amp pins.
	InNegV float64 `json:"in_neg_v,omitempty" yaml:"in_neg_v,omitempty" catalog:"unknown"`
	InPosV float64 `json:"in_pos_v,omitempty" yaml:"in_pos_v,omitempty" catalog:"unknown"`
	// InternalOhm is the internal resistor value (for noise), ohm.
	InternalOhm float64 `json:"internal_ohm,omitempty" yaml:"internal_ohm,omitempty" catalog:"unknown"`
	// Network describes the matched resistors inside, when the maker
	// publishes them: nil when only the gains are known. A strappable
	// amplifier makes other gains than Gains by tying its pins.
	Network *MatchedNetwork `json:"network,omitempty" yaml:"network,omitempty" catalog:"apart"`

	Offer      `yaml:",inline"`
	Provenance `yaml:",inline"`
}

// MatchedNetwork is the set of matched resistors inside an amplifier and
// how they connect: to the package pins and to the internal op-amp. Node
// names are the maker's pin names (Pins lists the ones reachable from
// outside the package) or internal names; the internal op-amp's inverting
// input, non-inverting input and output are the nodes OpAmpInv,
// OpAmpNonInv and OpAmpOut (its output is normally also a pin).
type MatchedNetwork struct {
	Elements    []MatchedElement `json:"elements" yaml:"elements"`
	Pins        []string         `json:"pins" yaml:"pins"`
	OpAmpInv    string           `json:"opamp_inv" yaml:"opamp_inv"`
	OpAmpNonInv string           `json:"opamp_noninv" yaml:"opamp_noninv"`
	OpAmpOut    string           `json:"opamp_out" yaml:"opamp_out"`
	// Tolerance is each element's absolute tolerance, a fraction.
	Tolerance float64 `json:"tolerance" yaml:"tolerance" catalog:"unknown"`
	// RatioTolerance is the largest error of the ratio of any two elements
	// of the network (matching), a fraction.
	RatioTolerance float64 `json:"ratio_tolerance" yaml:"ratio_tolerance" catalog:"unknown"`
	// RatioDriftPPM is the ratio tracking between any two elements, ±ppm/K.
	RatioDriftPPM float64 `json:"ratio_drift_ppm" yaml:"ratio_drift_ppm" catalog:"unknown"`
}

// MatchedElement is one resistor of a MatchedNetwork: its name (R1, R2, ...
// as the datasheet draws it), nominal value and the two nodes it joins.
type MatchedElement struct {
	Name string  `json:"name" yaml:"name"`
	Ohms float64 `json:"ohms" yaml:"ohms"`
	A    string  `json:"a" yaml:"a"`
	B    string  `json:"b" yaml:"b"`
}

// Reference is a voltage reference: a part whose output is a stated voltage
// with a stated initial tolerance and drift, which an ADC channel's gain
// is proportional to. Figures tagged catalog:"unknown" may be unknown (NaN),
// as in the other part types; only the output voltage and the initial
// tolerance are required. Topology and Package are "" when unknown.
type Reference struct {
	ID    int64  `json:"-" yaml:"-"`
	Part  string `json:"part" yaml:"part"`
	Maker string `json:"maker" yaml:"maker"`
	// Topology is RefSeries (a three-terminal regulator with an input
	// supply), RefShunt (a two-terminal part fed through a resistor) or "".
	Topology string `json:"topology,omitempty" yaml:"topology,omitempty"`
	Package  string `json:"package" yaml:"package"`
	// OutputV is the nominal output voltage, V.
	OutputV float64 `json:"output_v" yaml:"output_v"`
	// Tolerance is the initial output tolerance at 25 °C as a fraction
	// (0.0005 for ±0.05 %).
	Tolerance float64 `json:"tolerance" yaml:"tolerance"`
	// DriftPPM is the temperature coefficient, ppm/K, as a box-method
	// maximum: (Vmax - Vmin)/(Vnom·(TempMaxC - TempMinC))·10^6 over the
	// rated range below (the usual way reference drift is specified; a
	// ppm/°C figure is the same number, a temperature difference of 1 °C
	// being 1 K).
	DriftPPM float64 `json:"drift_ppm" yaml:"drift_ppm" catalog:"unknown"`
	// TempMinC and TempMaxC bound the temperature range the drift figure
	// is specified over, °C.
	TempMinC float64 `json:"temp_min_c" yaml:"temp_min_c" catalog:"unknown"`
	TempMaxC float64 `json:"temp_max_c" yaml:"temp_max_c" catalog:"unknown"`
	// NoisePPV is the low-frequency output noise, 0.1 Hz to 10 Hz, peak to
	// peak, V.
	NoisePPV float64 `json:"noise_pp_v" yaml:"noise_pp_v" catalog:"unknown"`
	// NoiseVHz is the wideband output noise density, V/√Hz.
	NoiseVHz float64 `json:"noise_v_per_rthz" yaml:"noise_v_per_rthz" catalog:"unknown"`
	// SupplyMinV and SupplyMaxV bound the input (supply) voltage of a series
	// reference, V; a shunt reference has none (unknown).
	SupplyMinV float64 `json:"supply_min_v" yaml:"supply_min_v" catalog:"unknown"`
	SupplyMaxV float64 `json:"supply_max_v" yaml:"supply_max_v" catalog:"unknown"`
	// DropoutV is the least input-to-output difference at which the output
	// stays in regulation, V.
	DropoutV float64 `json:"dropout_v" yaml:"dropout_v" catalog:"unknown"`
	// LoadSourceA and LoadSinkA are the largest load currents the output
	// sources and sinks within its specification, A (for a shunt
	// reference, LoadSinkA is its largest operating current).
	LoadSourceA float64 `json:"load_source_a" yaml:"load_source_a" catalog:"unknown"`
	LoadSinkA   float64 `json:"load_sink_a" yaml:"load_sink_a" catalog:"unknown"`
	// OutputOhm is the output resistance (load regulation in V/A), ohm: a
	// load regulation in ppm/mA is OutputOhm = reg·10^-6·OutputV/10^-3 A.
	OutputOhm float64 `json:"output_ohm" yaml:"output_ohm" catalog:"unknown"`
	// LongTermPPM is the long-term drift over the first 1000 h, ppm.
	LongTermPPM float64 `json:"long_term_ppm" yaml:"long_term_ppm" catalog:"unknown"`
	// IqA is the quiescent (supply) current, A.
	IqA float64 `json:"iq_a" yaml:"iq_a" catalog:"unknown"`

	Offer      `yaml:",inline"`
	Provenance `yaml:",inline"`
}

// Reference topologies (Reference.Topology).
const (
	RefSeries = "series"
	RefShunt  = "shunt"
)

// Rail-to-rail claims of an amplifier (Amplifier.RailToRail).
const (
	RailIn    = "in"
	RailOut   = "out"
	RailInOut = "in-out"
)

// Unknown returns the value of a figure nobody gave: NaN.
func Unknown() float64 { return math.NaN() }

// Known reports whether a figure was given (is not NaN).
func Known(x float64) bool { return !math.IsNaN(x) }

// UnitPrice returns the unit price that applies when qty pieces are bought:
// the price of the largest break whose MinQty is at most qty. ok is false
// when the list is empty or qty is below the first break.
func (o Offer) UnitPrice(qty int) (price float64, currency string, ok bool) {
	best := -1
	for i, b := range o.PriceBreaks {
		if b.MinQty <= qty && (best < 0 || b.MinQty > o.PriceBreaks[best].MinQty) {
			best = i
		}
	}
	if best < 0 {
		return 0, "", false
	}
	b := o.PriceBreaks[best]
	return b.UnitPrice, b.Currency, true
}

// IsCurrencyCode reports whether s has the shape of an ISO 4217 code: three
// letters A-Z, as every price break's currency must.
func IsCurrencyCode(s string) bool { return currencyCode(s) }
