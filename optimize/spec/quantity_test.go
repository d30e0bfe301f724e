package spec

import (
	"errors"
	"testing"

	"plumb/catalog/units"
)

// A unit written once after the upper end applies to the lower end, and
// units' sentinels reach the caller under the spec's own message.
func TestQuantityRangeAndSentinel(t *testing.T) {
	lo, hi, err := parseRange("-500..500mV", uVolt)
	if err != nil || lo != -0.5 || hi != 0.5 {
		t.Errorf("range: %g %g %v", lo, hi, err)
	}
	_, err = parseQuantity("80", uDB)
	if !errors.Is(err, units.ErrNoUnit) || err.Error() != `"80" has no unit; write it like 80dB` {
		t.Errorf("bare dB: %v", err)
	}
	_, err = parseQuantity(" ", uVolt)
	if !errors.Is(err, units.ErrBlank) || err.Error() != `" " is empty; write it like 10V, 500mV or ±10V` {
		t.Errorf("blank: %v", err)
	}
}
