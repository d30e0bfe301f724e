package spec

import (
	"errors"
	"fmt"
	"strings"

	"plumb/catalog/units"
)

// unit is one kind of quantity as a spec or design file writes it. Values
// are read by catalog/units: strictly (the unit must be written) through
// units.ParseStrict, or through a lenient parser where a bare number cannot
// be in doubt (resistance in ohm, gain in V/V).
type unit struct {
	what    string         // "voltage", for messages
	q       units.Quantity // read with units.ParseStrict or ParseRangeStrict
	lenient func(string) (float64, error)
	example string
}

// Quantities used in spec and design files.
var (
	uVolt     = unit{"voltage", units.Voltage, nil, "10V, 500mV or ±10V"}
	uAmp      = unit{"current", units.Current, nil, "5A, 2nA or 1.5uA"}
	uOhm      = unit{"resistance", units.Resistance, units.ParseResistance, "10k, 4.99k or 100"}
	uHertz    = unit{"frequency", units.Frequency, nil, "10kHz or 1MHz"}
	uWatt     = unit{"power", units.Power, nil, "0.125W or 125mW"}
	uDB       = unit{"level in dB", units.Level, nil, "80dB"}
	uVPerK    = unit{"drift", units.Drift, nil, "10uV/K"}
	uNoise    = unit{"noise density", units.VoltageNoise, nil, "20nV/rtHz"}
	uCurNoise = unit{"current noise density", units.CurrentNoise, nil, "0.5pA/rtHz"}
	uCelsius  = unit{"temperature", units.Temperature, nil, "25C or -40C"}
	uGain     = unit{"gain", units.Gain, units.ParseGain, "10, -2 or 0.25V/V"}
	uTransR   = unit{"gain", units.Transimpedance, units.ParseTransimpedance, "0.5V/A"}
	uKPerW    = unit{"thermal resistance", units.ThermalResistance, units.ParseThermalResistance, "250K/W"}
	uAol      = unit{"open-loop gain", units.OpenLoopGain, parseAol, "120dB, 1000V/mV or 1e6 (V/V)"}
	uPlain    = unit{"number", 0, func(s string) (float64, error) { return units.ParseQuantity(s, "") }, "3"}
	uFraction = unit{"fraction", units.Fraction, nil, "0.05%, ±0.1% or 500ppm"}
	uTempco   = unit{"temperature coefficient", units.Tempco, nil, "25ppm/K or ±5ppm/°C"}
)

// quantityError describes text that is not a quantity of the kind wanted.
type quantityError struct {
	input  string
	u      unit
	reason string
	err    error // from catalog/units
}

func (e *quantityError) Error() string {
	return fmt.Sprintf("%q %s; write it like %s", e.input, e.reason, e.u.example)
}

func (e *quantityError) Unwrap() error { return e.err }

// newQuantityError says in the spec's words why units refused s as a what:
// empty, without its unit, or not a what (with the reason units gives).
func newQuantityError(s string, u unit, what string, err error) error {
	article := "a "
	if strings.ContainsRune("aeiou", rune(what[0])) {
		article = "an "
	}
	reason := "is not " + article + what
	var ue *units.Error
	switch {
	case errors.Is(err, units.ErrBlank):
		reason = "is empty"
	case errors.Is(err, units.ErrNoUnit):
		reason = "has no unit"
	case errors.As(err, &ue):
		why := ue.Reason
		if strings.HasPrefix(why, `unknown unit or prefix "K`) {
			// catalog/units reads a capital K as kilo only in resistances
			// and frequencies; elsewhere K is the kelvin.
			why += ": kilo is a small k here; a capital K means kilo only in resistances and frequencies"
		}
		reason += " (" + why + ")"
	}
	return &quantityError{s, u, reason, err}
}

// parseQuantity reads one value such as "10k", "500mV", "80dB" into SI.
func parseQuantity(s string, u unit) (float64, error) {
	var v float64
	var err error
	if u.lenient != nil {
		v, err = u.lenient(s)
	} else {
		v, err = units.ParseStrict(s, u.q)
	}
	if err != nil {
		return 0, newQuantityError(s, u, u.what, err)
	}
	return v, nil
}

// parseFraction reads "0.05%", "500ppm" or "±0.1%" as a fraction. A bare
// number is refused: 0.1 could mean 10 % or 0.1 %.
func parseFraction(s string) (float64, error) { return parseQuantity(s, uFraction) }

// parsePPMPerK reads a temperature coefficient such as "25ppm/K" or
// "±5 ppm/°C" and returns it per kelvin as a fraction (25e-6).
func parsePPMPerK(s string) (float64, error) {
	v, err := parseQuantity(s, uTempco)
	return v / 1e6, err
}

// parseRange reads "±10V", "-10..10V", "0..4V" or a single "5V" (lo = hi)
// as an interval in SI (units.ParseRangeStrict). The unit may be written
// once at the end or on both ends.
func parseRange(s string, u unit) (lo, hi float64, err error) {
	lo, hi, err = units.ParseRangeStrict(s, u.q)
	if err != nil {
		return 0, 0, newQuantityError(s, u, u.what+" range", err)
	}
	return lo, hi, nil
}

// singleValue reports whether s reads as one value of u rather than as a
// range: "25C", not "25..25C" or "±5V".
func singleValue(s string, u unit) bool {
	_, err := units.ParseStrict(s, u.q)
	return err == nil
}

// parseAol reads an open-loop gain in dB, V/V, V/mV or V/µV; a bare number
// is V/V, as Design.Marshal writes it.
func parseAol(s string) (float64, error) {
	v, err := units.ParseOpenLoopGain(s)
	if errors.Is(err, units.ErrNoUnit) {
		return units.ParseGain(s)
	}
	return v, err
}
