package units

import (
	"testing"
	"unicode"
	"unicode/utf8"
)

// TestSpaceLen checks the byte-level space test against the runes it is
// documented to know, and that no other rune up to U+FFFF is taken for a
// space.
func TestSpaceLen(t *testing.T) {
	want := func(r rune) bool {
		return r == ' ' || r == '\t' || r == 0x00A0 || (r >= 0x2000 && r <= 0x200A) ||
			r == 0x202F || r == 0x205F || r == 0x3000
	}
	for r := rune(0); r <= 0xFFFF; r++ {
		if !utf8.ValidRune(r) {
			continue
		}
		s := string(r) + "x"
		got := spaceLen(s, 0)
		if want(r) {
			if got != utf8.RuneLen(r) {
				t.Errorf("spaceLen(%U) = %d, want %d", r, got, utf8.RuneLen(r))
			}
			if r > ' ' && !unicode.IsSpace(r) {
				t.Errorf("%U is not a Unicode space", r)
			}
		} else if got != 0 {
			t.Errorf("spaceLen(%U) = %d, want 0", r, got)
		}
	}
}
