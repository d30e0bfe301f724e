package main

import (
	"strings"
	"testing"
)

// TestCheckUnknownPartsOneHintEach: a design naming parts the catalog does
// not hold fails (exit 1) with each part's problem once, with one hint on
// what to do (the close part numbers, or how to look for it), not a second
// hint appended to the whole list.
func TestCheckUnknownPartsOneHintEach(t *testing.T) {
	_, errOut, code := runPlumb(t, fixtureFactory(t), "check testdata/diff-g10.yaml --design testdata/design-unknown-parts.yaml")
	if code != exitError {
		t.Fatalf("exit %d, want %d: %s", code, exitError, errOut)
	}
	for _, tc := range []struct {
		name, want string
		count      int
	}{
		{"nothing close: how to look", "look for it with `plumb catalog list --part PATTERN`", 1},
		{"a slip: the close part numbers", "HT25-10K3 is not in", 1},
		{"one hint per part, none for the list", "plumb catalog list", 1},
	} {
		t.Run(tc.name, func(t *testing.T) {
			if n := strings.Count(errOut, tc.want); n != tc.count {
				t.Errorf("%q appears %d times, want %d:\n%s", tc.want, n, tc.count, errOut)
			}
		})
	}
}
