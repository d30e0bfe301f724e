package circuit_test

import (
	"fmt"
	"math"
	"os"

	"plumb/optimize/circuit"
)

// A difference amplifier of gain 10 whose R4 is 0.1 % high: differential
// gain, common-mode gain and CMRR from two solves of one factored matrix.
// By hand from the equation in New: Acm = 11 x 100.1/110.1 - 10 = 0.000908.
func ExampleNew() {
	n, err := circuit.New(circuit.Difference, circuit.Options{})
	if err != nil {
		fmt.Println(err)
		return
	}
	for name, ohm := range map[string]float64{"R1": 10e3, "R2": 100e3, "R3": 10e3, "R4": 100.1e3} {
		n.Resistors[n.Resistor(name)].Ohm = ohm
	}
	n.OpAmps[n.OpAmpIndex("A1")].Gain = math.Inf(1)
	s := circuit.NewSolver(n)
	if err := s.Factor(); err != nil {
		fmt.Println(err)
		return
	}
	vp, vn := n.SourceIndex("vp"), n.SourceIndex("vn")
	n.Sources[vp].V, n.Sources[vn].V = 0.5, -0.5
	adm := s.SolveOut()
	n.Sources[vp].V, n.Sources[vn].V = 1, 1
	acm := s.SolveOut()
	fmt.Printf("Adm %.5f V/V, Acm %.3g V/V, CMRR %.1f dB\n", adm, acm, 20*math.Log10(math.Abs(adm/acm)))
	// Output:
	// Adm 10.00045 V/V, Acm 0.000908 V/V, CMRR 80.8 dB
}

// The SPICE deck of an inverting amplifier.
func ExampleNetlist_WriteSPICE() {
	n, _ := circuit.New(circuit.Inverting, circuit.Options{})
	if err := n.WriteSPICE(os.Stdout); err != nil {
		fmt.Println(err)
	}
	// Output:
	// * plumb circuit inverting
	// Rg vin m 10000
	// Rf m out 100000
	// vin vin 0 DC 1
	// vref vref 0 DC 0
	// VOS_a1 a1_vos vref DC 0
	// Ea1 out 0 a1_vos m 1000000
	// IBP_a1 vref 0 DC 0
	// IBM_a1 m 0 DC 0
	// .control
	// set numdgt=15
	// op
	// print all
	// quit 0
	// .endc
	// .end
}
