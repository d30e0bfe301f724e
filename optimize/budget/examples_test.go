package budget

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"plumb/catalog"
	"plumb/optimize/spec"
)

func loadExample(t *testing.T, name string) *spec.Spec {
	t.Helper()
	s, err := spec.Load(filepath.Join("..", "..", "data", "examples", name))
	if err != nil {
		t.Fatal(err)
	}
	return s
}

func loadExampleDesign(t *testing.T, name string) *spec.Design {
	t.Helper()
	d, err := spec.LoadDesign(filepath.Join("..", "..", "data", "examples", name))
	if err != nil {
		t.Fatal(err)
	}
	return d
}

// TestExampleDesigns evaluates each example design against its spec under
// every method and checks the budget is complete.
func TestExampleDesigns(t *testing.T) {
	cases := []struct{ spec, design string }{
		{"logger-channel.yaml", "logger-inline-design.yaml"},
		{"logger-calibrated.yaml", "logger-inline-design.yaml"},
		{"attenuator.yaml", "attenuator-design.yaml"},
	}
	for _, c := range cases {
		for _, method := range []string{spec.WorstCase, spec.RSS, spec.MonteCarlo} {
			t.Run(c.spec+"/"+method, func(t *testing.T) {
				s := loadExample(t, c.spec)
				s.Analysis.Method, s.Analysis.Trials = method, 2000
				res, err := Evaluate(s, loadExampleDesign(t, c.design))
				if err != nil {
					t.Fatal(err)
				}
				if len(res.Limits) == 0 || res.Binding == "" {
					t.Fatalf("no limits or binding: %+v", res)
				}
				for _, l := range res.Limits {
					if l.Name == LimitGainError && len(l.Contributors) == 0 {
						t.Errorf("gain error has no contributors")
					}
					for i := 1; i < len(l.Contributors); i++ {
						if l.Contributors[i].Value > l.Contributors[i-1].Value {
							t.Errorf("%s contributors not sorted: %+v", l.Name, l.Contributors)
						}
					}
				}
				if _, err := json.Marshal(res); err != nil {
					t.Errorf("result does not encode as JSON: %v", err)
				}
				if method == spec.MonteCarlo && res.MonteCarlo == nil {
					t.Error("no Monte Carlo summary")
				}
			})
		}
	}
}

// TestHazardCaution: the battery monitor's 75 V common mode is above 60 V
// DC, so the result must carry the hazardous-voltage caution naming the
// standards (domain notes §5).
func TestHazardCaution(t *testing.T) {
	s := loadExample(t, "battery-monitor.yaml")
	d := mustDesign(t, `family: difference
positions:
  R1: {value: 1M, tolerance: 0.1%, tcr: 25ppm/K, power: 0.25W, max_voltage: 200V}
  R2: {value: 200k, tolerance: 0.1%, tcr: 25ppm/K, power: 0.25W, max_voltage: 200V}
  R3: {value: 1M, tolerance: 0.1%, tcr: 25ppm/K, power: 0.25W, max_voltage: 200V}
  R4: {value: 200k, tolerance: 0.1%, tcr: 25ppm/K, power: 0.25W, max_voltage: 200V}
amplifier: {aol: 120dB, gbw: 1MHz, vos: 100uV, cm_neg: 2V, cm_pos: 2V, swing_neg: 1V, swing_pos: 1V}
`)
	res, err := Evaluate(s, d)
	if err != nil {
		t.Fatal(err)
	}
	all := strings.Join(res.Cautions, "\n")
	for _, want := range []string{"HAZARDOUS VOLTAGE", "IEC 61010-1", "IEC 62368-1", "qualified", "not a safety approval"} {
		if !strings.Contains(all, want) {
			t.Errorf("cautions lack %q: %q", want, res.Cautions)
		}
	}
	// A 5 V logger spec carries no hazard caution.
	res, err = Evaluate(loadExample(t, "logger-channel.yaml"), loadExampleDesign(t, "logger-inline-design.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	if strings.Contains(strings.Join(res.Cautions, "\n"), "HAZARDOUS") {
		t.Errorf("logger flagged hazardous: %q", res.Cautions)
	}
}

// TestNearRatingCaution: a resistor above 80 % of its derated power is
// flagged.
func TestNearRatingCaution(t *testing.T) {
	s := loadExample(t, "attenuator.yaml")
	d := mustDesign(t, `family: divider
positions:
  Rtop: {value: 2.1k, tolerance: 1%, tcr: 100ppm/K, power: 0.25W}
  Rbot: {value: 300, tolerance: 1%, tcr: 100ppm/K, power: 0.25W}
`)
	res, err := Evaluate(s, d)
	if err != nil {
		t.Fatal(err)
	}
	// Rtop: (24 V x 2.1/2.4)² / 2.1 kΩ = 0.21 W against 0.125 W derated.
	if !strings.Contains(strings.Join(res.Cautions, "\n"), "Rtop dissipates") {
		t.Errorf("no power caution: %q", res.Cautions)
	}
}

// TestCatalogExampleDesigns resolves the example designs that name demo
// catalog parts and evaluates them.
func TestCatalogExampleDesigns(t *testing.T) {
	f, err := os.Open(filepath.Join("..", "..", "data", "demo.json"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	snap, err := catalog.ReadSnapshotJSON(f)
	if err != nil {
		t.Fatal(err)
	}
	lookup, err := spec.SnapshotLookup(snap)
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct{ spec, design string }{
		{"logger-channel.yaml", "logger-design.yaml"},
		{"current-sense.yaml", "current-sense-design.yaml"},
		{"load-cell.yaml", "load-cell-design.yaml"},
	} {
		t.Run(c.design, func(t *testing.T) {
			d := loadExampleDesign(t, c.design)
			if err := d.Resolve(lookup); err != nil {
				t.Fatal(err)
			}
			res, err := Evaluate(loadExample(t, c.spec), d)
			if err != nil {
				t.Fatal(err)
			}
			if len(res.Limits) == 0 {
				t.Error("no limits checked")
			}
		})
	}
}
