// Package units reads and writes the engineering notations found in
// datasheets, distributor exports and specs: resistances ("4k99", "4.99 kΩ",
// "10R"), tolerances ("±0.1 %", "1000ppm"), temperature coefficients
// ("±25ppm/°C"), power ratings ("0.125W, 1/8W"), voltages, currents,
// frequencies, noise densities ("4.5 nV/√Hz"), decibels, temperatures and
// ranges, stock counts ("12,345", "1.234.567"), and the amplifier and
// stage figures: voltage drift ("2 µV/°C"), slew rate ("0.5 V/µs"),
// open-loop gain ("120 dB", "1000 V/mV"), thermal resistance ("250 K/W"),
// gain ("10", "0.25V/V") and transimpedance ("0.5 V/A").
//
// Every parser returns a value in SI units (ohm, fraction, ppm/K, W, V, A,
// Hz, V/√Hz, A/√Hz, dB, °C, V/K, V/s, V/V, K/W, V/A).
//
// The ParseXxx functions are lenient where a datasheet or export column
// leaves a unit out that cannot be in doubt ("470" ohm, "0.1" as a
// fraction). ParseStrict and ParseRangeStrict, over the Quantity
// constants, read the same notations but require the unit, for files people
// write by hand: a missing unit gives an *Error wrapping ErrNoUnit. Nothing is guessed: an input that could mean
// two things is refused with an *Error that quotes the input, says what was
// expected and shows a valid form. Blank cells ("", "-", "—", "n/a") give an
// *Error wrapping ErrBlank, so callers can treat them as unknown with
// errors.Is(err, ErrBlank).
//
// SI prefixes are case-sensitive, as in SI: "m" is milli and "M" is mega, so
// "1m" is one milliohm and "1M" one megohm. The trade's "K" for kilo is
// accepted where it cannot mean kelvin (resistances, frequencies). Unit
// symbols and words are matched without regard to ASCII case or spaces, and
// both Unicode omegas (U+03A9 and the ohm sign U+2126), both micro signs
// (U+00B5 and U+03BC), the degree sign and the masculine ordinal (° and º),
// the minus sign (U+2212) and the usual spaces (no-break, thin, narrow
// no-break) are understood.
//
// A decimal comma is accepted only where it cannot be a thousands separator:
// one comma, no dot, and not exactly three digits after it ("1,5k" is 1500 Ω,
// "1,000" is refused).
//
// The Format functions print engineering notation that the parsers read back.
package units
