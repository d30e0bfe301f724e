package importers

import (
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"plumb/catalog/units"
)

// TestCellFigures reads cells as the row reader does (readValue: typ
// mark, header unit hint, decimal comma) through the shared units parsers.
func TestCellFigures(t *testing.T) {
	tests := []struct {
		name, in, hint string
		comma          bool
		q              quantity
		want           float64
		typ            bool
	}{
		// A split supply ±15 V runs from -15 V to +15 V: 30 V between the
		// rails (common practice for the supply range of an op-amp).
		{"split supply", "±15 V", "", false, parseSupply, 30, false},
		{"split supply under a volt header", "±2.25", "V", false, parseSupply, 4.5, false},
		{"single supply", "36", "V", false, parseSupply, 36, false},
		{"single supply with unit", "2.7 V", "", false, parseSupply, 2.7, false},
		// A kelvin and a degree Celsius are the same step (SI Brochure,
		// 9th ed., 2.3.3): 2 µV/°C is 2e-6 V/K.
		{"drift in the cell", "2 µV/°C", "", false, units.ParseDrift, 2e-6, false},
		{"drift from the header", "0.3", "µV/°C", false, units.ParseDrift, 0.3e-6, false},
		{"drift typical", "1 µV/K typ", "", false, units.ParseDrift, 1e-6, true},
		// 1 V/µs is 1e6 V/s (SI prefix micro = 1e-6).
		{"slew from the header", "2.5", "V/µs", false, units.ParseSlewRate, 2.5e6, false},
		// 120 dB of voltage gain is 10^(120/20) = 1e6 V/V (definition of
		// the decibel for a field quantity, IEC 60027-3, from memory);
		// 1000 V/mV is 1e6 V/V.
		{"open-loop gain dB", "120 dB", "", false, units.ParseOpenLoopGain, 1e6, false},
		{"open-loop gain V/mV", "1000 V/mV", "", false, units.ParseOpenLoopGain, 1e6, false},
		{"thermal resistance °C/W", "250 °C/W", "", false, units.ParseThermalResistance, 250, false},
		{"thermal resistance bare", "160", "", false, units.ParseThermalResistance, 160, false},
		{"voltage decimal comma", "0,5 V", "", true, units.ParseVoltage, 0.5, false},
		// Thousands separators (common practice): comma, space, apostrophe,
		// and dots when there are two or more.
		{"count comma", "4,210", "", false, parseCount, 4210, false},
		{"count space", "1 037", "", false, parseCount, 1037, false},
		{"count no-break space", "12\u00a0345", "", false, parseCount, 12345, false},
		{"count apostrophe", "12'345", "", false, parseCount, 12345, false},
		{"count dots", "1.234.567", "", false, parseCount, 1234567, false},
		{"count plus", "1000+", "", false, parseCount, 1000, false},
		{"count pcs", "250 PCS", "", false, parseCount, 250, false},
		{"count plus and pcs", "1,000+ pcs", "", false, parseCount, 1000, false},
		// A file that writes a decimal comma writes a dot for thousands;
		// the row reader hands parseCountDecimalComma the cell as written.
		{"count one dot, decimal-comma file", "12.345", "", false, parseCountDecimalComma, 12345, false},
		{"count two dots, decimal-comma file", "1.234.567", "", false, parseCountDecimalComma, 1234567, false},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got, typ, err := readValue(tc.in, tc.hint, tc.comma, tc.q)
			if err != nil || math.Abs(got-tc.want) > 1e-12*math.Abs(tc.want) || typ != tc.typ {
				t.Errorf("readValue(%q, %q) = %g, typ %v, %v; want %g, typ %v", tc.in, tc.hint, got, typ, err, tc.want, tc.typ)
			}
		})
	}
}

func TestCellFiguresRefused(t *testing.T) {
	tests := []struct {
		name, in string
		comma    bool
		q        quantity
		sentinel error // nil: any error
	}{
		{"bare drift", "2", false, units.ParseDrift, units.ErrNoUnit},
		{"bare slew rate", "0.5", false, units.ParseSlewRate, units.ErrNoUnit},
		{"bare open-loop gain", "120", false, units.ParseOpenLoopGain, units.ErrNoUnit},
		{"sign after ±", "±-15 V", false, parseSupply, nil},
		// "12.345" in a point-decimal file could be twelve and a bit.
		{"count one dot", "12.345", false, parseCount, nil},
		{"count fraction, decimal-comma file", "1,5", false, parseCountDecimalComma, nil},
		// "1,234" is 1.234 in a decimal-comma file, not a whole count.
		{"count comma, decimal-comma file", "1,234", false, parseCountDecimalComma, nil},
		{"count negative", "-5", false, parseCount, nil},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			v, _, err := readValue(tc.in, "", tc.comma, tc.q)
			if err == nil || tc.sentinel != nil && !errors.Is(err, tc.sentinel) {
				t.Errorf("readValue(%q) = %g, %v; want an error wrapping %v", tc.in, v, err, tc.sentinel)
			}
		})
	}
}

// TestDriftNeedsUnit: a drift cell without a unit, under a header without
// one, skips the row with a message naming the column and the unit wanted;
// under a header with a unit the same cell is read.
func TestDriftNeedsUnit(t *testing.T) {
	head := "Part Number,Manufacturer,Supply Voltage Min (V),Supply Voltage Max (V),Vos max (µV),%s,GBW (MHz),Slew Rate (V/µs),CMRR min (dB),Open Loop Gain min,Rail-to-Rail,Package,Unit Price (USD)\n"
	row := "ZX9001,Zephyrin Analog,2.7,36,25,0.3,10,2.5,110,120 dB,Yes,SOIC-8,1.85\n"
	for _, tc := range []struct {
		name, header string
		want         float64 // V/K; 0: row skipped
	}{
		{"header with unit", "Offset Drift max (µV/°C)", 0.3e-6},
		{"header without unit", "Offset Drift max", 0},
	} {
		t.Run(tc.name, func(t *testing.T) {
			f := filepath.Join(t.TempDir(), "amps.csv")
			if err := os.WriteFile(f, []byte(strings.Replace(head, "%s", tc.header, 1)+row), 0o644); err != nil {
				t.Fatal(err)
			}
			b, rep := mustRead(t, f)
			if tc.want == 0 {
				if len(b.Amplifiers) != 0 || !strings.Contains(problemText(rep), tc.header) || !strings.Contains(problemText(rep), "µV/K") {
					t.Errorf("want the row skipped for its drift column: %d amplifiers, %s", len(b.Amplifiers), problemText(rep))
				}
				return
			}
			if len(b.Amplifiers) != 1 || math.Abs(b.Amplifiers[0].VosDriftVK-tc.want) > 1e-18 {
				t.Fatalf("want %g V/K: %s", tc.want, problemText(rep))
			}
		})
	}
}
