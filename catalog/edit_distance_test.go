package catalog

import "testing"

// TestEditDistance checks the Levenshtein distance against worked values
// (kitten/sitting is 3, the textbook example; from memory).
func TestEditDistance(t *testing.T) {
	for _, tt := range []struct {
		a, b string
		want int
	}{{"kitten", "sitting", 3}, {"", "abc", 3}, {"thik film", "thick film", 1}, {"same", "same", 0}, {"flaw", "lawn", 2}} {
		if got := EditDistance(tt.a, tt.b); got != tt.want {
			t.Errorf("EditDistance(%q, %q) = %d, want %d", tt.a, tt.b, got, tt.want)
		}
	}
}
