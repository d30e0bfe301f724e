package units

// Quantity names a kind of figure for ParseStrict and ParseRangeStrict.
type Quantity uint8

// The quantities ParseStrict reads, each in the SI unit of its lenient
// parser (ParseResistance, ParseFraction, ...).
const (
	Resistance        Quantity = iota + 1 // ohm
	Fraction                              // fraction (0.001 for 0.1 %)
	Tempco                                // ppm/K
	Power                                 // W
	Voltage                               // V
	Current                               // A
	Frequency                             // Hz
	VoltageNoise                          // V/√Hz
	CurrentNoise                          // A/√Hz
	Level                                 // dB
	Temperature                           // °C
	Drift                                 // V/K
	SlewRate                              // V/s
	OpenLoopGain                          // V/V
	ThermalResistance                     // K/W
	Gain                                  // V/V
	Transimpedance                        // V/A
)

// kinds holds the reader of each Quantity.
var kinds = [...]*kind{
	Resistance: &resistanceKind, Fraction: &fractionKind, Tempco: &tempcoKind,
	Power: &powerKind, Voltage: &voltageKind, Current: &currentKind,
	Frequency: &frequencyKind, VoltageNoise: &voltageNoiseKind,
	CurrentNoise: &currentNoiseKind, Level: &dbKind, Temperature: &temperatureKind,
	Drift: &driftKind, SlewRate: &slewKind, OpenLoopGain: &aolKind,
	ThermalResistance: &thermalKind, Gain: &gainKind, Transimpedance: &transimpedanceKind,
}

// symbols holds the unit each Quantity's range example is written in.
var symbols = [...]string{
	Resistance: "Ω", Fraction: "%", Tempco: "ppm/K", Power: "W", Voltage: "V", Current: "A",
	Frequency: "Hz", VoltageNoise: "nV/√Hz", CurrentNoise: "pA/√Hz", Level: "dB", Temperature: "°C",
	Drift: "µV/K", SlewRate: "V/µs", OpenLoopGain: "V/V", ThermalResistance: "K/W", Gain: "V/V",
	Transimpedance: "V/A",
}

// rangeNames and rangeExamples are built once so that a range read
// allocates nothing.
var rangeNames, rangeExamples [len(kinds)]string

func init() {
	for q := Resistance; int(q) < len(kinds); q++ {
		u := symbols[q]
		rangeNames[q] = kinds[q].name + " range"
		rangeExamples[q] = "-10..10" + u + ", 0 to 5 " + u + ", ±10" + u + " or 5" + u
	}
}

func (q Quantity) kind() *kind {
	if q == 0 || int(q) >= len(kinds) {
		panic("units: unknown Quantity")
	}
	return kinds[q]
}

// String returns the quantity's name as errors give it ("voltage",
// "level in dB").
func (q Quantity) String() string {
	if q == 0 || int(q) >= len(kinds) {
		return "unknown quantity"
	}
	return kinds[q].name
}

// ParseStrict reads s as quantity q as its lenient parser does
// (ParseVoltage for Voltage, ...), except that the unit must be written: a
// bare number, or a number with only an SI prefix ("10m"), gives an *Error
// wrapping ErrNoUnit. It is for files people write by hand, such as specs,
// where "80" for a CMRR or "0.1" for a tolerance is more likely a slip than
// a choice. Resistance accepts the letter-for-point codes ("4k7", "0R1",
// "10R"), whose letter names the unit; Tempco refuses "ppm" without a
// per-kelvin unit. It panics on a Quantity that is not one of the
// constants.
func ParseStrict(s string, q Quantity) (float64, error) {
	switch q {
	case Resistance:
		if v, reason, ok := readInfix(s); ok {
			if reason != "" {
				return 0, resistanceKind.fail(s, reason, stBad, true)
			}
			return v, nil
		}
	case Power:
		return parsePower(s, true)
	case OpenLoopGain:
		return ParseOpenLoopGain(s)
	}
	return q.kind().parseMode(s, mode{strict: true})
}

// ParseRangeStrict reads a range of quantity q with units required, as
// specs write ranges: "-10..10V" or "-10V..10V" (a unit written once after
// the upper end applies to both), "0 to 5 V", "-40…85°C", "±10V" (-10..10)
// and a single value "5V" (5..5). lo must not be above hi. Each end is read
// as ParseStrict reads it, without the forms particular to one quantity
// (fractions of a watt, decibels of open-loop gain, 4k7 codes). Errors wrap
// ErrNoUnit for a missing unit and ErrBlank for a blank input.
func ParseRangeStrict(s string, q Quantity) (lo, hi float64, err error) {
	k := q.kind()
	return parseRange(s, k, rangeNames[q], rangeExamples[q], true)
}
