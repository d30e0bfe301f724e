package budget

import (
	"errors"
	"math"
	"strings"
	"testing"
)

func TestCheckFinite(t *testing.T) {
	tests := []struct {
		name string
		v    any
		path string // "" when every figure is finite
	}{
		{"finite result", &Result{Metrics: Metrics{GainError: 0.01}, Limits: []Limit{{Value: 1, Margin: MaxMargin}}}, ""},
		{"infinite margin", &Result{Limits: []Limit{{Name: "gain error", Margin: math.Inf(1)}}}, "limits[0].margin is +Inf"},
		{"NaN metric", Result{Metrics: Metrics{DriftPPMPerK: math.NaN()}}, "metrics.drift_ppm_per_k is NaN"},
		{"Monte Carlo percentile", &Result{MonteCarlo: &MCSummary{Percentiles: map[string]Percentiles{"b": {P50: math.Inf(-1)}, "a": {}}}},
			"monte_carlo.percentiles[b].p50 is -Inf"},
		{"nil pointer", (*Result)(nil), ""},
	}
	for _, tc := range tests {
		err := CheckFinite("x", tc.v)
		switch {
		case tc.path == "" && err != nil:
			t.Errorf("%s: %v", tc.name, err)
		case tc.path != "" && (!errors.Is(err, ErrNotFinite) || !strings.Contains(err.Error(), tc.path)):
			t.Errorf("%s: %v, want %q", tc.name, err, tc.path)
		}
	}
}
