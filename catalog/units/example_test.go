package units_test

import (
	"errors"
	"fmt"

	"plumb/catalog/units"
)

func ExampleParseResistance() {
	for _, s := range []string{"4k99", "4.99 kΩ", "10R", "0R1", "2.2 MOhm", "50 mΩ", "1,5k"} {
		v, err := units.ParseResistance(s)
		fmt.Println(v, err)
	}
	_, err := units.ParseResistance("4x99")
	fmt.Println(err)
	// Output:
	// 4990 <nil>
	// 4990 <nil>
	// 10 <nil>
	// 0.1 <nil>
	// 2.2e+06 <nil>
	// 0.05 <nil>
	// 1500 <nil>
	// units: cannot read "4x99" as resistance: unknown unit or prefix "x99"; write it like 4.99k, 4k99 or 4990
}

func ExampleParseFraction() {
	for _, s := range []string{"±0.1%", "1000ppm", "0.001"} {
		v, _ := units.ParseFraction(s)
		fmt.Println(v)
	}
	v, _ := units.ParsePercent("0.1") // a bare number in a percent column
	fmt.Println(v)
	// Output:
	// 0.001
	// 0.001
	// 0.001
	// 0.001
}

func ExampleParsePPM() {
	a, _ := units.ParsePPM("±25ppm/°C")
	b, _ := units.ParsePPM("5e-6/K")
	fmt.Println(a, b)
	// Output:
	// 25 5
}

func ExampleParsePower() {
	v, err := units.ParsePower("0.125W, 1/8W")
	fmt.Println(v, err)
	_, err = units.ParsePower("0.25W, 1/8W")
	fmt.Println(err)
	// Output:
	// 0.125 <nil>
	// units: cannot read "0.25W, 1/8W" as power: the two ratings 0.25W and 1/8W disagree; write it like 0.125W, 125mW or 1/8W
}

func ExampleParseSymmetric() {
	lo, hi, _ := units.ParseSymmetric("±15V", "V")
	fmt.Println(lo, hi)
	_, err := units.ParseVoltage("±15V")
	fmt.Println(err)
	// Output:
	// -15 15
	// units: cannot read "±15V" as voltage: ± gives a pair of values (minus and plus), not one value; write it like 15V, 500mV or 2.5
}

func ExampleParseTemperatureRange() {
	lo, hi, err := units.ParseTemperatureRange("-40…+125°C")
	fmt.Println(lo, hi, err)
	// Output:
	// -40 125 <nil>
}

func ExampleParseCount() {
	n, _ := units.ParseCount("12,345")
	fmt.Println(n)
	_, err := units.ParseCount("-")
	fmt.Println(errors.Is(err, units.ErrBlank))
	// Output:
	// 12345
	// true
}

func ExampleFormatOhms() {
	for _, v := range []float64{4990, 10000, 100, 0.1, 2.2e6, 49.9} {
		fmt.Println(units.FormatOhms(v))
	}
	// Output:
	// 4.99k
	// 10k
	// 100
	// 0.1
	// 2.2M
	// 49.9
}

func ExampleFormat() {
	fmt.Println(units.Format(2.5e-9, "V/√Hz"))
	fmt.Println(units.Format(1e-3, "V"))
	fmt.Println(units.FormatPercent(0.0005), units.FormatPPM(25))
	// Output:
	// 2.5 nV/√Hz
	// 1 mV
	// 0.05% 25 ppm/K
}

func ExampleDB() {
	fmt.Printf("%.1f dB\n", units.DB(2750)) // worst-case CMRR of a gain-10 difference amplifier with 0.1 % resistors
	fmt.Println(units.FromDB(80))
	// Output:
	// 68.8 dB
	// 10000
}

func ExampleParseStrict() {
	v, err := units.ParseStrict("80dB", units.Level)
	fmt.Println(v, err)
	_, err = units.ParseStrict("80", units.Level)
	fmt.Println(err, errors.Is(err, units.ErrNoUnit))
	lo, hi, _ := units.ParseRangeStrict("-500..500mV", units.Voltage)
	fmt.Println(lo, hi)
	// Output:
	// 80 <nil>
	// units: cannot read "80" as level in dB: a unit is needed (dB); write it like 80dB or -3 dB true
	// -0.5 0.5
}

func ExampleParseOpenLoopGain() {
	for _, s := range []string{"120dB", "1000 V/mV", "1 V/µV"} {
		v, _ := units.ParseOpenLoopGain(s)
		fmt.Println(v)
	}
	// Output:
	// 1e+06
	// 1e+06
	// 1e+06
}
