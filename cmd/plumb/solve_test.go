package main

import (
	"strings"
	"testing"
)

// TestSolveExplainBeyondTheDesigns: --explain N with fewer than N designs
// found is an error that says how many there are, not a heading over an
// empty page with exit 0.
func TestSolveExplainBeyondTheDesigns(t *testing.T) {
	for _, tc := range []struct {
		name, args string
		code       int
		want       string // in stdout for exit 0, in stderr otherwise
	}{
		{"a design found", "solve testdata/diff-g10.yaml --top 1 --explain 1", exitOK, "Full budget of design 1"},
		{"beyond the designs found", "solve testdata/diff-g10.yaml --top 50 --explain 50", exitError, "--explain 50: the search found"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			out, errOut, code := runPlumb(t, fixtureFactory(t), tc.args)
			if code != tc.code {
				t.Fatalf("exit %d, want %d: %s", code, tc.code, errOut)
			}
			got := out
			if tc.code != exitOK {
				got = errOut
			}
			if !strings.Contains(got, tc.want) {
				t.Errorf("output lacks %q:\n%s%s", tc.want, out, errOut)
			}
		})
	}
}
