package spec_test

import (
	"fmt"

	"plumb/optimize/spec"
)

// Parse a spec; every quantity carries its unit.
func ExampleParse() {
	s, err := spec.Parse([]byte(`name: channel
about: difference amplifier into an ADC
family: difference
gain: 0.2
input: {differential: ±10V, common_mode: -5..5V}
supply: ±5V
reference: {voltage: 2V}
temperature: {range: 0..50C}
limits: {gain_error: 0.5%, cmrr: 60dB, gain_drift: 20ppm/K}
`), "channel.yaml")
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(s.Gain, s.Input, s.Limits.GainError, s.Limits.CMRRdB, s.Limits.GainDrift, s.WorstExcursion())

	// A quantity without its unit is refused, naming the file and field.
	_, err = spec.Parse([]byte("name: x\nabout: y\nfamily: difference\ngain: 1\ninput: {differential: ±1V}\nsupply: ±5V\ntemperature: {range: 0..50C}\nlimits: {cmrr: 80}\n"), "x.yaml")
	fmt.Println(err)
	// Output:
	// 0.2 {-10 10} 0.005 60 2e-05 25
	// spec x.yaml:8:10: limits.cmrr: "80" has no unit; write it like 80dB
}

// Write a design back in the design-file layout.
func ExampleDesign_Marshal() {
	d, err := spec.ParseDesign([]byte(`family: inverting
positions:
  Rf: {value: 47k, tolerance: 0.1%, tcr: 25ppm/K}
  Rg: {part: XR-10K0}
amplifier: {part: OPX-1}
`), "d.yaml")
	if err != nil {
		fmt.Println(err)
		return
	}
	out, _ := d.Marshal()
	fmt.Print(string(out))
	// Output:
	// family: inverting
	// positions:
	//     Rf:
	//         value: "47000"
	//         tolerance: 0.1%
	//         tcr: 25ppm/K
	//     Rg:
	//         part: XR-10K0
	// amplifier:
	//     part: OPX-1
}
