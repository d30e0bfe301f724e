package units

import (
	"errors"
	"fmt"
)

// ErrBlank is wrapped by the *Error returned for an empty cell or one of the
// usual placeholders ("-", "—", "n/a", "N/A").
var ErrBlank = errors.New("units: no value")

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

// Unwrap returns ErrBlank for a blank input and nil otherwise.
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
	qCount:        "12345, 12,345 or 12 345",
}

func newError(input, quantity, reason string) *Error {
	return &Error{Input: input, Quantity: quantity, Reason: reason}
}

func blankError(input, quantity string) *Error {
	return &Error{Input: input, Quantity: quantity, Reason: "no value given", err: ErrBlank}
}
