package spec

import (
	"strings"
	"testing"
)

// TestStagesErrors: a chain's mistakes are reported at their field with
// line and column, like the other fields of a spec.
func TestStagesErrors(t *testing.T) {
	base := "name: c\nabout: a chain\ninput:\n  differential: ±10mV\n  common_mode: 0V\nsupply: ±5V\ntemperature:\n  range: 0..50C\nlimits:\n  gain_error: 1%\nstages:\n"
	for _, c := range []struct{ name, stages, want string }{
		{"one stage", "  - family: inamp\n    gain: 10\n", "x.yaml:11:1: stages: lists 1 stages; a chain takes 2"},
		{"unknown family", "  - family: inamp\n    gain: 10\n  - family: nosuch\n    gain: 2\n", "x.yaml:14:5: stages[1].family: \"nosuch\" is not a family"},
		{"missing gain", "  - family: inamp\n    gain: 10\n  - family: difference\n", "stages[1].gain: missing"},
		{"zero gain", "  - family: inamp\n    gain: 0\n  - family: difference\n    gain: 1\n", "x.yaml:13:5: stages[0].gain: is zero"},
		{"monte carlo", "  - family: inamp\n    gain: 10\n  - family: difference\n    gain: 1\nanalysis:\n  method: monte-carlo\n", "analysis.method: a chain is budgeted by worst-case or rss"},
		{"level shift as a stage", "  - family: inamp\n    gain: 10\n  - family: level-shift\n    gain: 1\n", "stages[1].family: family level-shift cannot be a stage"},
		{"top-level gain", "  - family: inamp\n    gain: 10\n  - family: difference\n    gain: 1\ngain: 10\n", "gain: given together with stages"},
		{"bad supply", "  - family: inamp\n    gain: 10\n    supply: 5..9V\n  - family: difference\n    gain: 1\n", "stages[0].supply: \"5..9V\" must span ground"},
	} {
		t.Run(c.name, func(t *testing.T) {
			_, err := Parse([]byte(base+c.stages), "x.yaml")
			if err == nil || !strings.Contains(err.Error(), c.want) {
				t.Fatalf("error %v, want it to hold %q", err, c.want)
			}
		})
	}
	s, err := Parse([]byte(base+"  - family: inamp\n    gain: 10\n  - family: difference\n    gain: 2\n"), "x.yaml")
	if err != nil {
		t.Fatal(err)
	}
	// The second stage takes the first's ideal output, ±100 mV, between
	// its inputs: common mode half of it.
	if sub := s.StageSpec(1); s.Gain != 20 || sub.Input != (Range{-0.1, 0.1}) || sub.CommonMode != (Range{-0.05, 0.05}) || !sub.Differential {
		t.Fatalf("chain gain %g, stage 2 input %+v common mode %+v", s.Gain, sub.Input, sub.CommonMode)
	}
}
