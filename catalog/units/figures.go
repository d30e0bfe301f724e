package units

import "math"

// perKelvin lists the ways of writing unit per kelvin or per degree Celsius
// (the same step: SI Brochure, 9th ed., 2.3.3).
func perKelvin(u string) []symbol {
	var out []symbol
	for _, d := range []string{"K", "°C", "ºC", "˚C", "℃", "C", "degC"} {
		out = append(out, symbol{u + "/" + d, 0, ""})
	}
	return out
}

var (
	driftKind = kind{
		name: qDrift, symbols: perKelvin("V"),
		prefixes: pGeneral, negative: true, pm: true,
		needUnit: "µV/K or µV/°C", strict: "2µV/K, 2 uV/°C or 0.5 µV/C",
	}
	slewKind = kind{
		name: qSlew,
		symbols: []symbol{
			{"V/s", 0, ""}, {"V/ms", 3, ""}, {"V/µs", 6, ""}, {"V/μs", 6, ""}, {"V/us", 6, ""}, {"V/ns", 9, ""},
		},
		prefixes: pGeneral, needUnit: "V/µs or V/us", strict: "0.5V/µs, 20 V/us or 1e6 V/s",
	}
	aolKind = kind{
		name: qAol,
		symbols: []symbol{
			{"V/V", 0, ""}, {"V/mV", 3, ""}, {"V/µV", 6, ""}, {"V/μV", 6, ""}, {"V/uV", 6, ""},
		},
		needUnit: "dB, V/V, V/mV or V/µV", strict: "120dB, 1000 V/mV or 1 V/µV",
	}
	thermalKind = kind{
		name: qThermal, bare: true,
		needUnit: "K/W or °C/W", strict: "250K/W or 250 °C/W",
	}
	gainKind = kind{
		name: qGain, symbols: []symbol{{"V/V", 0, ""}, {"x", 0, ""}, {"×", 0, ""}},
		bare: true, negative: true, needUnit: "V/V", strict: "10V/V, -2 V/V or 10x",
	}
	transimpedanceKind = kind{
		name:    qTransimp,
		symbols: append([]symbol{{"V/A", 0, ""}}, ohmSymbols[:4]...),
		bare:    true, prefixes: pGeneral, negative: true,
		needUnit: "V/A or Ω", strict: "0.5V/A, 500 mV/A or 0.5 Ω",
	}
)

func init() {
	// K/W, °C/W, ... are the per-kelvin spellings turned over.
	for _, d := range []string{"K", "°C", "ºC", "˚C", "℃", "C", "degC"} {
		thermalKind.symbols = append(thermalKind.symbols, symbol{d + "/W", 0, ""})
	}
}

// ParseDrift reads a voltage drift (an offset drift) in V/K: "2µV/K",
// "2 uV/°C", "0.5 µV/C", "±1 µV/℃", "-3nV/K". A leading ± is dropped as for
// a temperature coefficient; a kelvin and a degree Celsius are the same
// step. The unit is required: a bare number says neither volt nor kelvin.
func ParseDrift(s string) (float64, error) { return driftKind.parse(s) }

// ParseSlewRate reads a slew rate in V/s: "0.5V/µs", "20 V/us", "1.5 V/μs",
// "500mV/µs" (0.5 V/µs), "2 V/ns", "1e6 V/s". 1 V/µs is 1e6 V/s. The unit is
// required: datasheets give V/µs, SI is V/s.
func ParseSlewRate(s string) (float64, error) { return slewKind.parse(s) }

// ParseOpenLoopGain reads an open-loop voltage gain as a ratio in V/V:
// "1000 V/mV" (1e6), "1 V/µV" (1e6), "200000 V/V", or a level in decibels,
// "120dB", converted as 10^(dB/20) (IEC 60027-3, a field quantity). The
// unit is required: a bare "120" could be decibels or V/V. Negative figures
// are refused.
func ParseOpenLoopGain(s string) (float64, error) {
	t := trimSpaces(s)
	if len(t) < 2 || !foldEq(t[len(t)-2:], "dB") {
		return aolKind.parse(s)
	}
	db, reason, st := dbKind.read(s, mode{strict: true})
	if st == stOK && db < 0 {
		reason, st = "an open-loop gain cannot be below 0 dB", stBad
	}
	if st != stOK {
		return 0, aolKind.fail(s, reason, st, false)
	}
	v := FromDB(db)
	if math.IsInf(v, 0) {
		return 0, aolKind.fail(s, "number out of range", stBad, false)
	}
	return v, nil
}

// ParseThermalResistance reads a thermal resistance in K/W: "250K/W",
// "250 °C/W", "250 C/W", or a bare number (K/W). A kelvin and a degree
// Celsius are the same step, so °C/W equals K/W. Negative values are refused.
func ParseThermalResistance(s string) (float64, error) { return thermalKind.parse(s) }

// ParseGain reads a voltage gain in V/V: "10", "-2", "0.25V/V", "10x",
// "10×". SI prefixes are not read ("1k" is refused: write 1000).
func ParseGain(s string) (float64, error) { return gainKind.parse(s) }

// ParseTransimpedance reads a transimpedance (output volts per input
// ampere, as of a current-sense stage) in V/A: "0.5V/A", "500 mV/A",
// "0.5 Ω", "50mΩ" or a bare number (V/A). One V/A is one ohm (SI).
func ParseTransimpedance(s string) (float64, error) { return transimpedanceKind.parse(s) }
