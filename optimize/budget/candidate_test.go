package budget

import (
	"math"
	"testing"

	"plumb/optimize/spec"
)

// TestFoldPair: a series pair is R1 + R2 and a parallel pair R1 R2/(R1 +
// R2) (Ohm's law); the fractional tolerance of either is a weighted mean of
// the parts', so the larger bounds it; ratings follow the element that
// reaches its own first.
func TestFoldPair(t *testing.T) {
	a := Fig{Label: "A", Ohm: 1e3, Tolerance: 0.01, TCR: 100e-6, PowerW: 0.1, MaxVoltageV: 50}
	b := Fig{Label: "B", Ohm: 3e3, Tolerance: 0.001, TCR: 25e-6, PowerW: 0.1, MaxVoltageV: 50}
	cases := []struct {
		name              string
		pair              string
		ohm, power, volts float64
	}{
		// Series: B takes 3/4 of the power, so the pair is rated 0.1/0.75 W;
		// B takes 3/4 of the voltage, so 50/0.75 V.
		{"series", spec.Series, 4e3, 0.1 / 0.75, 50 / 0.75},
		// Parallel: 750 ohm; A takes 750/1000 of the power: 0.1/0.75 W; both see the full voltage.
		{"parallel", spec.Parallel, 750, 0.1 / 0.75, 50},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			f := FoldPair(c.pair, a, b)
			if math.Abs(f.Ohm-c.ohm) > 1e-9 || f.Tolerance != 0.01 || f.TCR != 100e-6 ||
				math.Abs(f.PowerW-c.power) > 1e-12 || math.Abs(f.MaxVoltageV-c.volts) > 1e-9 {
				t.Errorf("%+v", f)
			}
		})
	}
	// The folded tolerance bounds the pair's true worst case: both parts
	// at +1 % and +0.1 % move a series pair by (10 + 3)/4000 = 0.325 %.
	if worst := (1e3*0.01 + 3e3*0.001) / 4e3; worst > FoldPair(spec.Series, a, b).Tolerance {
		t.Errorf("folded tolerance below the pair's worst case %g", worst)
	}
}

// TestSeriesPairDesign: a position filled by a series pair evaluates like
// one resistor of the folded figures.
func TestSeriesPairDesign(t *testing.T) {
	s, _ := inverting(t, "0.1%", "25ppm/K", "-40..85C", "")
	pair := mustDesign(t, `family: inverting
positions:
  Rf: {series: [{value: 6.8k, tolerance: 0.1%, tcr: 25ppm/K}, {value: 3.2k, tolerance: 0.1%, tcr: 25ppm/K}]}
  Rg: {value: 10k, tolerance: 0.1%, tcr: 25ppm/K}
`+idealAmp)
	single := mustDesign(t, `family: inverting
positions:
  Rf: {value: 10k, tolerance: 0.1%, tcr: 25ppm/K}
  Rg: {value: 10k, tolerance: 0.1%, tcr: 25ppm/K}
`+idealAmp)
	a, err := Evaluate(s, pair)
	if err != nil {
		t.Fatal(err)
	}
	b, err := Evaluate(s, single)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(a.Metrics.GainError-b.Metrics.GainError) > 1e-12 || math.Abs(a.Metrics.Gain-b.Metrics.Gain) > 1e-12 {
		t.Errorf("pair %g / %g, single %g / %g", a.Metrics.Gain, a.Metrics.GainError, b.Metrics.Gain, b.Metrics.GainError)
	}
}
