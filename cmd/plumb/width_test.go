package main

import (
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"
	"unicode/utf8"
)

// pageWidth is the width every text output fits when the terminal's is not
// known.
const pageWidth = 100

// TestReadmeExamplesFit100Columns runs the text commands the README shows
// (those that need no catalog file of their own and write no file), and
// solve, solve --explain, solve --frontier and check on every example
// spec, piped as a script would, and checks that no line of the results
// is wider than 100 columns.
func TestReadmeExamplesFit100Columns(t *testing.T) {
	readme, err := os.ReadFile("../../README.md")
	if err != nil {
		t.Fatal(err)
	}
	var lines []string
	for _, l := range strings.Split(string(readme), "\n") {
		l = strings.TrimSpace(l)
		if !strings.HasPrefix(l, "./plumb ") {
			continue
		}
		if i := strings.Index(l, "#"); i > 0 {
			l = strings.TrimSpace(l[:i])
		}
		cmd := strings.TrimPrefix(l, "./plumb ")
		if strings.Contains(cmd, " -o ") || strings.Contains(cmd, "--bom") || strings.Contains(cmd, "--catalog") ||
			strings.Contains(cmd, "--format") || strings.HasPrefix(cmd, "import") || strings.HasPrefix(cmd, "completion") ||
			strings.HasPrefix(cmd, "man") || strings.HasPrefix(cmd, "catalog init") || strings.Contains(cmd, "data/examples/") {
			continue
		}
		lines = append(lines, cmd)
	}
	if len(lines) < 5 {
		t.Fatalf("only %d README commands found: %q", len(lines), lines)
	}
	lines = append(lines, "demo")
	specs, _ := filepath.Glob("../../data/examples/*.yaml")
	for _, p := range specs {
		name := strings.TrimSuffix(filepath.Base(p), ".yaml")
		if strings.HasSuffix(name, "-design") {
			continue
		}
		lines = append(lines, "solve "+p, "solve "+p+" --explain 1", "solve "+p+" --frontier --top 2")
		if d := strings.TrimSuffix(p, ".yaml") + "-design.yaml"; fileExists(d) {
			lines = append(lines, "check "+p+" --design "+d)
		}
	}
	for _, cmd := range lines {
		t.Run(cmd, func(t *testing.T) {
			f, _, _ := testFactory(t)
			out, errOut, code := runPlumb(t, f, cmd)
			if code != 0 && code != 1 && code != 3 {
				t.Fatalf("exit %d: %s", code, errOut)
			}
			// Errors go to a piped stderr as one line each, for logs (on a
			// terminal they wrap: TestErrorsWrapOnTerminal); the results
			// on stdout are what a reader reads.
			for i, l := range strings.Split(out, "\n") {
				if n := utf8.RuneCountInString(l); n > pageWidth {
					t.Errorf("line %d is %d columns wide: %q", i+1, n, l)
				}
			}
		})
	}
}

func fileExists(p string) bool {
	_, err := os.Stat(p)
	return err == nil
}

// TestExplainPrintsOnlyThatDesign: --explain N prints design N and its
// full budget, not the ranking, the other designs or the near misses.
func TestExplainPrintsOnlyThatDesign(t *testing.T) {
	f, _, _ := testFactory(t)
	out, errOut, code := runPlumb(t, f, "solve logger-channel --top 3 --explain 2")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	for _, not := range []string{"RANK  FAMILY", "#1 ", "#3 ", "Near misses"} {
		if strings.Contains(out, not) {
			t.Errorf("--explain 2 prints %q", not)
		}
	}
	for _, want := range []string{"#2 ", "Full budget of design 2", "Contributors to"} {
		if !strings.Contains(out, want) {
			t.Errorf("--explain 2 lacks %q", want)
		}
	}
}

// TestErrorsWrapOnTerminal: on a terminal an error wider than the page is
// wrapped to 100 columns, its continuation indented, the words unchanged;
// piped, the same error stays on one line for logs.
func TestErrorsWrapOnTerminal(t *testing.T) {
	long := strings.Repeat("a-rather-long-directory-name/", 2) + "missing.db"
	cmd := "catalog list --catalog " + long
	for _, tty := range []bool{true, false} {
		f, _, _ := testFactory(t)
		f.IO.SetTerminal(false, tty)
		f.IO.SetColorMode("never")
		_, errOut, code := runPlumb(t, f, cmd)
		if code == 0 {
			t.Fatalf("%s: exit 0", cmd)
		}
		lines := strings.Split(strings.TrimRight(errOut, "\n"), "\n")
		words := strings.Fields(errOut)
		if !slices.Contains(words, long) {
			t.Errorf("terminal %v: the path is broken up: %q", tty, errOut)
		}
		for i, l := range lines {
			if n := utf8.RuneCountInString(l); tty && n > pageWidth {
				t.Errorf("terminal: line %d is %d columns wide: %q", i+1, n, l)
			}
			if i > 0 && tty && !strings.HasPrefix(l, "  ") {
				t.Errorf("terminal: continuation %q is not indented", l)
			}
		}
		if tty && len(lines) < 2 {
			t.Errorf("terminal: %d line(s), want the error wrapped: %q", len(lines), errOut)
		}
		if !tty && len(lines) != 1 {
			t.Errorf("piped: %d lines, want the error on one line: %q", len(lines), errOut)
		}
	}
}
