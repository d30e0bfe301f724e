package units

import (
	"strings"
	"testing"
)

// Decimal comma and dot thousands as in the locales that write them
// ("1.234,5" for one thousand two hundred thirty-four and a half; ISO 80000-1
// allows the comma as decimal sign, from memory).
func TestFromDecimalComma(t *testing.T) {
	tests := []struct{ name, in, want string }{
		{name: "comma", in: "4,99 kΩ", want: "4.99 kΩ"},
		{name: "thousands and comma", in: "1.234,5", want: "1234.5"},
		{name: "comma with three digits", in: "1,000", want: "1.000"},
		{name: "dot thousands", in: "12.345", want: "12345"},
		{name: "two dot groups", in: "1.234.567", want: "1234567"},
		{name: "range", in: "1,5..2,5V", want: "1.5..2.5V"},
		{name: "unit after", in: "0,1 %", want: "0.1 %"},
		{name: "point kept", in: "1.5", want: "1.5"},
		{name: "no number", in: "n/a", want: "n/a"},
		{name: "two commas kept", in: "1,2,3", want: "1,2,3"},
		{name: "long first group kept", in: "1234.567,5", want: "1234.567,5"},
		{name: "trailing comma kept", in: "12,", want: "12,"},
		{name: "exponent", in: "1,5e3", want: "1.5e3"},
		// Regression: a first group of "0" was read as thousands, "0.125" -> "0125".
		{name: "zero integer part keeps point", in: "0.125", want: "0.125"},
		{name: "zero integer part with unit", in: "0.125 V", want: "0.125 V"},
		{name: "zero then two groups kept", in: "0.125.500", want: "0.125.500"},
		{name: "zero with comma", in: "0,125", want: "0.125"},
		{name: "leading zero group kept", in: "00.125", want: "00.125"},
		{name: "zero point in range", in: "0.125..0.250V", want: "0.125..0.250V"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := FromDecimalComma(tc.in); got != tc.want {
				t.Errorf("FromDecimalComma(%q) = %q, want %q", tc.in, got, tc.want)
			}
		})
	}
	// Read through a parser: 4,99k in a decimal-comma file is 4990 Ω.
	if v, err := ParseResistance(FromDecimalComma("4,990k")); err != nil || v != 4990 {
		t.Errorf("ParseResistance(FromDecimalComma(4,990k)) = %v, %v", v, err)
	}
}

// FuzzFromDecimalComma checks that the rewrite never grows the text (it
// only drops dots and turns commas into points) and that whatever the
// voltage parser reads from the result prints and reads back.
func FuzzFromDecimalComma(f *testing.F) {
	addSeeds(f, "4,99 kΩ", "1.234,5", "1,000", "12.345", "1,5..2,5V", "1,2,3", "x", "0.125", "0.125.500")
	f.Fuzz(func(t *testing.T, in string) {
		out := FromDecimalComma(in)
		if len(out) > len(in) {
			t.Fatalf("FromDecimalComma(%q) = %q is longer", in, out)
		}
		if strings.HasPrefix(in, "0.") && !strings.ContainsAny(in[2:], ",.") && strings.HasPrefix(out, "0") && !strings.HasPrefix(out, "0.") {
			t.Fatalf("FromDecimalComma(%q) = %q read the 0 as thousands", in, out)
		}
		if v, err := ParseVoltage(out); err == nil {
			if _, err2 := ParseVoltage(Format(v, "V")); err2 != nil {
				t.Fatalf("%q read as %v does not print back: %v", out, v, err2)
			}
		}
	})
}
