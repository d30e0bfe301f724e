package budget

import (
	"errors"
	"math"
	"strings"
	"testing"

	"plumb/optimize/circuit"
	"plumb/optimize/family"
	"plumb/optimize/spec"
)

// TestNonInvertingReference: the non-inverting netlist returns Rg to the
// reference node, so solving it gives Vout = G Vin - (G-1) Vref with G = 1
// + Rf/Rg (superposition of the non-inverting gain on Vin and the
// inverting gain -Rf/Rg on Vref; Franco, chapter 1, from memory), not the
// G Vin + Vref that the spec's output-swing check assumes for referred
// stages. The spec therefore refuses a reference on a non-inverting stage,
// and the budget keeps that node at ground, so its output is G Vin and the
// check holds; the referred stages (difference, current sense, in-amp,
// matched) do give G Vin + Vref and keep the reference.
func TestNonInvertingReference(t *testing.T) {
	n, err := circuit.New(circuit.Family(family.NonInverting.Name), circuit.Options{})
	if err != nil {
		t.Fatal(err)
	}
	n.Resistors[n.Resistor("Rf")].Ohm = 90e3
	n.Resistors[n.Resistor("Rg")].Ohm = 10e3
	n.OpAmps[0].Gain = math.Inf(1)
	s := circuit.NewSolver(n)
	if err := s.Factor(); err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		name      string
		vin, vref float64
		want      float64 // G Vin - (G-1) Vref, G = 10
	}{
		{"input only", 0.2, 0, 2},
		{"reference only", 0, 0.5, -4.5},
		{"both", 0.2, 0.5, 2 - 4.5},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			n.Sources[n.SourceIndex("vin")].V = c.vin
			n.Sources[n.SourceIndex("vref")].V = c.vref
			if got := s.SolveOut(); math.Abs(got-c.want) > 1e-12 {
				t.Errorf("Vout = %.12g V, want G Vin - (G-1) Vref = %.12g V", got, c.want)
			}
		})
	}
	_, err = spec.Parse([]byte(`name: t
about: non-inverting with a reference
family: noninverting
gain: 10
input: {single_ended: 0..0.2V}
supply: ±15V
reference: {voltage: 0.5V}
temperature: {range: 25..25C}
limits: {gain_error: 1%}
`), "t.yaml")
	if !errors.Is(err, spec.ErrInvalid) || !strings.Contains(err.Error(), "reference") {
		t.Errorf("spec with a reference on a non-inverting stage: error %v, want it refused naming the reference", err)
	}
}
