// Package spec reads the two YAML files a user writes: a spec (what a
// signal-conditioning stage must do: family, gain or ranges, supplies,
// temperature, limits, analysis method, calibration, build) and a design
// (which part sits at each resistor position and which amplifier is used).
//
// Quantities are written as engineers write them, with their unit: "0.05%",
// "80dB", "5ppm/K", "-40..85C", "±10V" or "-10..10V", "10k". A bare number
// is accepted only where the unit cannot be in doubt (resistance in ohm,
// gain in V/V). The notations are those of catalog/units, read with its
// strict parsers (units.ParseStrict, units.ParseRangeStrict) wherever a
// unit is required. Parsed values are held in SI units; tempcos as
// fractions per kelvin.
//
// Every problem in a file is reported, each naming the file and the field
// path, what was wrong and how to write it; unknown fields are errors.
// Errors wrap ErrInvalid. The layouts are documented field by field in
// data/examples/README.md of the repository.
package spec
