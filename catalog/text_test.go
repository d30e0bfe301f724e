package catalog

import (
	"bytes"
	"encoding/csv"
	"strings"
	"testing"
)

// TestSpreadsheetSafe is hardening finding 5: cells starting with =, +, @
// were written verbatim to every CSV, so a hostile export became a live
// formula when opened in a spreadsheet. The leading-apostrophe rule (OWASP
// CSV injection guidance, from memory) marks them as text; plain numbers
// stay numbers.
func TestSpreadsheetSafe(t *testing.T) {
	tests := []struct{ in, want string }{
		{"=1+2", "'=1+2"},
		{"=HYPERLINK(\"http://x\")", "'=HYPERLINK(\"http://x\")"},
		{"+cmd", "'+cmd"},
		{"-1+2", "'-1+2"},
		{"@SUM(A1:A9)", "'@SUM(A1:A9)"},
		{"\tx", "'\tx"},
		{"\rx", "'\rx"},
		{"'quoted", "''quoted"},
		{"-0.1", "-0.1"}, // numbers are numbers to a spreadsheet
		{"+5", "+5"},
		{"-1e-06", "-1e-06"},
		{"", ""},
		{"AR-TP1-59K0", "AR-TP1-59K0"},
		{"a=b", "a=b"},
	}
	for _, tc := range tests {
		if got := SpreadsheetSafe(tc.in); got != tc.want {
			t.Errorf("SpreadsheetSafe(%q) = %q, want %q", tc.in, got, tc.want)
		}
		if back := ReadSpreadsheetSafe(SpreadsheetSafe(tc.in)); back != tc.in {
			t.Errorf("%q reads back as %q", tc.in, back)
		}
	}
	var b bytes.Buffer
	w := NewCSVWriter(&b)
	rec := []string{"=1+2", "-3", "ok"}
	if err := w.Write(rec); err != nil {
		t.Fatal(err)
	}
	if err := w.Flush(); err != nil {
		t.Fatal(err)
	}
	if b.String() != "'=1+2,-3,ok\n" || rec[0] != "=1+2" {
		t.Errorf("CSV %q, record %q", b.String(), rec)
	}
}

// FuzzSpreadsheetSafe: whatever a cell holds, the written cell starts with
// no formula lead unless it is a plain number, and reads back as it was,
// also through encoding/csv.
func FuzzSpreadsheetSafe(f *testing.F) {
	for _, s := range []string{"=1+2", "-0.1", "'x", "\t=", "@", "+-", "''=", "plain"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		out := SpreadsheetSafe(s)
		if out != "" && strings.IndexByte(formulaLeads, out[0]) >= 0 && out != s {
			t.Fatalf("%q written as %q", s, out)
		}
		if ReadSpreadsheetSafe(out) != s {
			t.Fatalf("%q written as %q reads back as %q", s, out, ReadSpreadsheetSafe(out))
		}
		var b bytes.Buffer
		w := NewCSVWriter(&b)
		if err := w.Write([]string{s}); err != nil {
			t.Fatal(err)
		}
		if err := w.Flush(); err != nil {
			t.Fatal(err)
		}
		rec, err := csv.NewReader(&b).Read()
		if err == nil && len(rec) == 1 && ReadSpreadsheetSafe(rec[0]) != strings.ReplaceAll(s, "\r\n", "\n") && !strings.Contains(s, "\r") {
			t.Fatalf("%q through CSV reads back as %q", s, rec[0])
		}
	})
}

func TestEscapeUnsafe(t *testing.T) {
	tests := []struct{ in, want string }{
		{"AB\x1b[2JC", `AB\x1b[2JC`},
		{"FAKE\u202e1-RA", `FAKE\u202e1-RA`},
		{"zero\u200bwidth", `zero\u200bwidth`},
		{"bad\xffbyte", `bad\xffbyte`},
		{"line\nend", `line\x0aend`},
		{"plain 4k99 ±0.1 % µV √Hz", "plain 4k99 ±0.1 % µV √Hz"},
	}
	for _, tc := range tests {
		if got := EscapeUnsafe(tc.in); got != tc.want {
			t.Errorf("EscapeUnsafe(%q) = %q, want %q", tc.in, got, tc.want)
		}
	}
}
