package spec

import (
	"errors"
	"math"
	"testing"

	"plumb/catalog/units"
)

// Forms read through catalog/units that the spec reader's own parser did
// not know, and the wrapping of units' sentinels.
func TestQuantityForms(t *testing.T) {
	cases := []struct {
		name string
		in   string
		u    unit
		want float64
	}{
		// 20·log10(1e6) = 120 dB (IEC 60027-3 field level, from memory).
		{"aol in dB", "120dB", uAol, 1e6},
		// 1 V/mV = 1000 V/V (common practice).
		{"aol in V/mV", "1000V/mV", uAol, 1e6},
		{"aol bare is V/V, as Marshal writes it", "250000", uAol, 2.5e5},
		{"drift per degree C", "2uV/°C", uVPerK, 2e-6},
		// One V/A is one ohm (SI, from memory).
		{"transimpedance in milliohm", "50mΩ", uTransR, 0.05},
		{"thermal resistance in °C/W", "250°C/W", uKPerW, 250},
		{"resistance code", "4k99", uOhm, 4990},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			got, err := parseQuantity(c.in, c.u)
			if err != nil || math.Abs(got-c.want) > 1e-12*math.Abs(c.want) {
				t.Errorf("parseQuantity(%q) = %g, %v; want %g", c.in, got, err, c.want)
			}
		})
	}
	// The unit written once after the upper end applies to the lower end.
	lo, hi, err := parseRange("-500..500mV", uVolt)
	if err != nil || lo != -0.5 || hi != 0.5 {
		t.Errorf("range: %g %g %v", lo, hi, err)
	}
	_, err = parseQuantity("80", uDB)
	if !errors.Is(err, units.ErrNoUnit) || err.Error() != `"80" has no unit; write it like 80dB` {
		t.Errorf("bare dB: %v", err)
	}
}
