package main

import (
	"io"
	"strings"
	"unicode/utf8"

	"plumb/catalog"
)

// ownSGR are the escape sequences plumb itself writes (colour and bold);
// every other control character is escaped on the way to a terminal.
var ownSGR = []string{sgrReset, sgrBold, sgrRed, sgrGreen, sgrYellow}

// escapeText returns s with every control, format and bidirectional
// character escaped (catalog.EscapeUnsafe: \x1b, \u202e), except plumb's
// own colour sequences and the runes in keep. Text from a catalog, a spec
// or an import (part numbers, makers, sources) can then neither move,
// recolour nor clear the terminal, nor show one part number as another.
func escapeText(s, keep string) string {
	if strings.IndexFunc(s, func(r rune) bool { return r == utf8.RuneError || catalog.UnsafeRune(r) }) < 0 {
		return s
	}
	var b strings.Builder
	for s != "" {
		i := strings.IndexFunc(s, func(r rune) bool { return r == 0x1b || strings.ContainsRune(keep, r) })
		if i < 0 {
			b.WriteString(catalog.EscapeUnsafe(s))
			break
		}
		b.WriteString(catalog.EscapeUnsafe(s[:i]))
		s = s[i:]
		if own := ownPrefix(s); own != "" {
			b.WriteString(own)
			s = s[len(own):]
			continue
		}
		_, n := utf8.DecodeRuneInString(s)
		if s[0] == 0x1b {
			b.WriteString(catalog.EscapeUnsafe(s[:n]))
		} else {
			b.WriteString(s[:n])
		}
		s = s[n:]
	}
	return b.String()
}

// ownPrefix returns the colour sequence of plumb's own that s starts with
// ("" if none).
func ownPrefix(s string) string {
	for _, q := range ownSGR {
		if strings.HasPrefix(s, q) {
			return q
		}
	}
	return ""
}

// terminalWriter escapes what goes to a terminal (see escapeText), keeping
// line ends, tabs and plumb's own colour sequences. A rune split between
// two writes is held back until it is whole.
type terminalWriter struct {
	w    io.Writer
	tail []byte
}

func (t *terminalWriter) Write(p []byte) (int, error) {
	data := append(t.tail, p...)
	cut := len(data)
	// Hold back an incomplete rune at the end (at most 3 bytes).
	for i := len(data) - 1; i >= 0 && i >= len(data)-3; i-- {
		if utf8.RuneStart(data[i]) {
			if !utf8.FullRune(data[i:]) {
				cut = i
			}
			break
		}
	}
	t.tail = append(t.tail[:0:0], data[cut:]...)
	if _, err := io.WriteString(t.w, escapeText(string(data[:cut]), "\n\t")); err != nil {
		return 0, err
	}
	return len(p), nil
}
