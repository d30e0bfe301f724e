package main

import (
	"bytes"
	"flag"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

var update = flag.Bool("update", false, "rewrite the golden files in testdata/")

// testFactory returns a factory with buffer streams, an empty config
// directory and a fixed clock.
func testFactory(t *testing.T) (*Factory, *bytes.Buffer, *bytes.Buffer) {
	t.Helper()
	ios, _, out, errOut := TestIO()
	f := newFactory(ios)
	cfg := t.TempDir()
	f.ConfigDir = func() (string, error) { return cfg, nil }
	dataDir := t.TempDir()
	f.DataDir = func() (string, error) { return dataDir, nil }
	f.Now = func() time.Time { return time.Date(2026, 1, 2, 3, 4, 5, 0, time.UTC) }
	return f, out, errOut
}

// runPlumb runs the root command with a shell-like argument line and
// returns stdout, stderr and the exit code Main would return.
func runPlumb(t *testing.T, f *Factory, line string) (string, string, int) {
	t.Helper()
	args := strings.Fields(line)
	root := newRootCmd(f)
	root.SetArgs(args)
	err := root.Execute()
	code := reportError(f.IO, err)
	return f.IO.Out.(*bytes.Buffer).String(), f.IO.ErrOut.(*bytes.Buffer).String(), code
}

// assertGolden compares got with testdata/NAME.golden, or rewrites the file
// with -update.
func assertGolden(t *testing.T, name, got string) {
	t.Helper()
	path := filepath.Join("testdata", name+".golden")
	if *update {
		if err := os.WriteFile(path, []byte(got), 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	want, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("reading golden file (run go test -update to create it): %v", err)
	}
	if got != string(want) {
		t.Errorf("output differs from %s (run go test -update if the change is intended)\n--- got ---\n%s\n--- want ---\n%s", path, got, want)
	}
}
