package main

import "testing"

// TestCountOf: a count takes the singular noun for one only (English
// grammar), as in the solve header's "1 design class".
func TestCountOf(t *testing.T) {
	for _, tc := range []struct {
		n    int
		want string
	}{
		{0, "0 design classes"},
		{1, "1 design class"},
		{2, "2 design classes"},
		{148, "148 design classes"},
	} {
		if got := countOf(tc.n, "design class", "design classes"); got != tc.want {
			t.Errorf("countOf(%d) = %q, want %q", tc.n, got, tc.want)
		}
	}
}
