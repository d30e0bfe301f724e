package units

import (
	"errors"
	"fmt"
)

// ErrBlank is wrapped by the *Error returned for an empty cell or one of the
// usual placeholders ("-", "—", "n/a", "N/A").
var ErrBlank = errors.New("units: no value")

// ErrNoUnit is wrapped by the *Error returned when a number comes without
// the unit its quantity requires: always for currents, noise densities,
// drifts, slew rates and open-loop gains, and for every quantity read by
// ParseStrict and ParseRangeStrict ("80" for a level: 80 dB or 80 V/V?).
var ErrNoUnit = errors.New("units: no unit")

// Error reports an input that cannot be read as the quantity asked for.
type Error struct {
	Input    string // the text as given
	Quantity string // what was expected, e.g. "resistance"
	Reason   string // what is wrong with the input

	example string // a valid form; default from the quantity name
	err     error  // wrapped sentinel (ErrBlank) or nil
}

// Error returns a message of the form
//
//	units: cannot read "4x99" as resistance: <reason>; write it like 4.99k, 4k99 or 4990
func (e *Error) Error() string {
	msg := fmt.Sprintf("units: cannot read %q as %s: %s", e.Input, e.Quantity, e.Reason)
	ex := e.example
	if ex == "" {
		ex = examples[e.Quantity]
	}
	if ex != "" {
		msg += "; write it like " + ex
	}
	return msg
}

// Unwrap returns ErrBlank for a blank input, ErrNoUnit for a number
// without its required unit and nil otherwise.
func (e *Error) Unwrap() error { return e.err }

// Quantity names used in errors, and a valid form of each.
const (
	qResistance   = "resistance"
	qFraction     = "fraction"
	qPercent      = "percentage"
	qTempco       = "temperature coefficient"
	qPower        = "power"
	qVoltage      = "voltage"
	qCurrent      = "current"
	qFrequency    = "frequency"
	qVoltageNoise = "voltage noise density"
	qCurrentNoise = "current noise density"
	qDB           = "level in dB"
	qTemperature  = "temperature"
	qTempRange    = "temperature range"
	qCount        = "count"
	qDrift        = "voltage drift"
	qSlew         = "slew rate"
	qAol          = "open-loop gain"
	qThermal      = "thermal resistance"
	qGain         = "gain"
	qTransimp     = "transimpedance"
)

var examples = map[string]string{
	qResistance:   "4.99k, 4k99 or 4990",
	qFraction:     "0.1%, ±0.05 %, 1000ppm or 0.001",
	qPercent:      "0.1% or 0.1 (read as percent)",
	qTempco:       "25ppm/K, ±25 ppm/°C or 25",
	qPower:        "0.125W, 125mW or 1/8W",
	qVoltage:      "15V, 500mV or 2.5",
	qCurrent:      "2nA, 1.5 µA or 5A",
	qFrequency:    "10kHz, 1.2 MHz or 1e6",
	qVoltageNoise: "4.5nV/√Hz or 4.5 nV/rtHz",
	qCurrentNoise: "0.5pA/√Hz or 0.5 pA/rtHz",
	qDB:           "80dB or 80",
	qTemperature:  "25C, -40 °C or 85",
	qTempRange:    "-40..85C, 0..70 or -40 to 125 °C",
	qCount:        "12345, 12,345, 12 345 or 1.234.567",
	qDrift:        "2µV/K, 2 uV/°C or 0.5 µV/C",
	qSlew:         "0.5V/µs, 20 V/us or 1e6 V/s",
	qAol:          "120dB, 1000 V/mV or 1 V/µV",
	qThermal:      "250K/W, 250 °C/W or 250",
	qGain:         "10, -2, 0.25V/V or 10x",
	qTransimp:     "0.5V/A, 500 mV/A, 0.5 Ω or 0.5",
}

func newError(input, quantity, reason string) *Error {
	return &Error{Input: input, Quantity: quantity, Reason: reason}
}

func blankError(input, quantity string) *Error {
	return &Error{Input: input, Quantity: quantity, Reason: "no value given", err: ErrBlank}
}
