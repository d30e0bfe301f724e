package main

import (
	"encoding/json"
	"math"
	"strings"
	"testing"
)

// TestDemoExamples runs `plumb demo EXAMPLE` on the channel examples (one
// stage, a strapped part, a chain) and checks each ranks a design whose
// channel budget is in LSB and within its limit, and that a name that is
// not an embedded example is a usage error naming the examples.
func TestDemoExamples(t *testing.T) {
	for _, name := range []string{"adc-channel", "strapped-gain", "two-stage"} {
		t.Run(name, func(t *testing.T) {
			f, _, _ := testFactory(t)
			out, errOut, code := runPlumb(t, f, "demo "+name+" --format json")
			if code != 0 {
				t.Fatalf("exit %d: %s", code, errOut)
			}
			var res struct {
				Designs []struct {
					Metrics map[string]any `json:"metrics"`
				} `json:"designs"`
			}
			if err := json.Unmarshal([]byte(out), &res); err != nil {
				t.Fatalf("demo JSON: %v\n%s", err, out)
			}
			if len(res.Designs) == 0 || len(res.Designs) > demoTop {
				t.Fatalf("%d designs, want 1..%d", len(res.Designs), demoTop)
			}
			lsb, ok := res.Designs[0].Metrics["total_error_lsb"].(float64)
			if !ok || !(lsb > 0) || math.IsInf(lsb, 0) {
				t.Fatalf("design 1 has no finite total_error_lsb: %v", res.Designs[0].Metrics)
			}
		})
	}
	f, _, _ := testFactory(t)
	_, errOut, code := runPlumb(t, f, "demo no-such-example")
	if code != 2 || !strings.Contains(errOut, "two-stage") || !strings.Contains(errOut, "plumb solve FILE") {
		t.Errorf("unknown example: exit %d, %s", code, errOut)
	}
}
