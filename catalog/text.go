package catalog

import (
	"encoding/csv"
	"fmt"
	"io"
	"strconv"
	"strings"
	"unicode"
	"unicode/utf8"
)

// UnsafeRune reports whether r must not reach a terminal or a table as it
// is: a control character (C0, DEL, C1: ESC starts the sequences that
// recolour, move or clear a terminal), an invisible format character (the
// bidirectional overrides such as U+202E, zero-width spaces) or a line or
// paragraph separator. Printed raw, such a character can make a part
// number show as another.
func UnsafeRune(r rune) bool {
	return unicode.IsControl(r) || unicode.In(r, unicode.Cf, unicode.Zl, unicode.Zp)
}

// EscapeUnsafe returns s with every unsafe rune (see UnsafeRune) and every
// byte that is not UTF-8 written as a Go escape: \x1b, \u202e, \xff. Text
// without them comes back unchanged.
func EscapeUnsafe(s string) string {
	i := strings.IndexFunc(s, func(r rune) bool { return r == utf8.RuneError || UnsafeRune(r) })
	if i < 0 {
		return s
	}
	var b strings.Builder
	b.WriteString(s[:i])
	for i < len(s) {
		r, n := utf8.DecodeRuneInString(s[i:])
		switch {
		case r == utf8.RuneError && n == 1:
			fmt.Fprintf(&b, `\x%02x`, s[i])
		case r < 0x80 && UnsafeRune(r):
			fmt.Fprintf(&b, `\x%02x`, r)
		case UnsafeRune(r):
			b.WriteString(strings.Trim(strconv.QuoteRuneToASCII(r), "'"))
		default:
			b.WriteString(s[i : i+n])
		}
		i += n
	}
	return b.String()
}

// formulaLeads are the first characters that make a spreadsheet read a
// cell as a formula (or, for tab and carriage return, hide what follows):
// the list of the OWASP guidance on CSV injection, from memory.
const formulaLeads = "=+-@\t\r"

// SpreadsheetSafe returns cell as a CSV file must hold it so that no
// spreadsheet runs it as a formula: a cell that starts with = + - @, a tab
// or a carriage return is written with a leading apostrophe, which
// spreadsheets read as "text, not a formula" and do not show (common
// practice). A plain number (-0.1, +5, -1e-06) is a number to a
// spreadsheet, not a formula, and stays as it is, and so does every other
// cell. A cell that itself starts with an apostrophe gets a second one, so
// that ReadSpreadsheetSafe undoes the rule exactly.
func SpreadsheetSafe(cell string) string {
	if cell == "" {
		return cell
	}
	switch {
	case cell[0] == '\'':
		return "'" + cell
	case strings.IndexByte(formulaLeads, cell[0]) < 0:
		return cell
	}
	if _, err := strconv.ParseFloat(cell, 64); err == nil {
		return cell
	}
	return "'" + cell
}

// ReadSpreadsheetSafe undoes SpreadsheetSafe: an apostrophe before a
// formula lead or before another apostrophe is dropped.
func ReadSpreadsheetSafe(cell string) string {
	if len(cell) >= 2 && cell[0] == '\'' && (cell[1] == '\'' || strings.IndexByte(formulaLeads, cell[1]) >= 0) {
		return cell[1:]
	}
	return cell
}

// CSVWriter is the one CSV writer of every file plumb writes (catalog
// exports, part lists, purchasing lists, import row reports): RFC 4180
// through encoding/csv, every cell made SpreadsheetSafe.
type CSVWriter struct {
	w   *csv.Writer
	rec []string
}

// NewCSVWriter returns a CSVWriter on w.
func NewCSVWriter(w io.Writer) *CSVWriter { return &CSVWriter{w: csv.NewWriter(w)} }

// Write writes one record; record itself is not changed.
func (c *CSVWriter) Write(record []string) error {
	c.rec = c.rec[:0]
	for _, cell := range record {
		c.rec = append(c.rec, SpreadsheetSafe(cell))
	}
	return c.w.Write(c.rec)
}

// Flush writes any buffered data and returns the first error of any write.
func (c *CSVWriter) Flush() error {
	c.w.Flush()
	return c.w.Error()
}
