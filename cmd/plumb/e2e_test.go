package main

import (
	"bytes"
	"errors"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"sync"
	"testing"

	"plumb/catalog"
)

var (
	buildOnce sync.Once
	binPath   string
	buildErr  error
)

// plumbBinary builds the command once per test run into a temporary
// directory.
func plumbBinary(t *testing.T) string {
	t.Helper()
	if testing.Short() {
		t.Skip("skipping the end-to-end build in -short mode")
	}
	goTool, err := exec.LookPath("go")
	if err != nil {
		t.Skip("go command not found on PATH; skipping the end-to-end tests")
	}
	buildOnce.Do(func() {
		dir, err := os.MkdirTemp("", "plumb-e2e-")
		if err != nil {
			buildErr = err
			return
		}
		binPath = filepath.Join(dir, "plumb")
		out, err := exec.Command(goTool, "build", "-o", binPath, ".").CombinedOutput()
		if err != nil {
			buildErr = errors.New(string(out))
		}
	})
	if buildErr != nil {
		t.Fatalf("building plumb: %v", buildErr)
	}
	return binPath
}

// TestMain removes the built binary after the tests.
func TestMain(m *testing.M) {
	code := m.Run()
	if binPath != "" {
		os.RemoveAll(filepath.Dir(binPath))
	}
	os.Exit(code)
}

// runBinary runs the built plumb with args in a clean environment (no
// PLUMB_* variables, an empty config directory) and returns stdout, stderr
// and the exit code.
func runBinary(t *testing.T, args ...string) (string, string, int) {
	t.Helper()
	bin := plumbBinary(t)
	cmd := exec.Command(bin, args...)
	home := t.TempDir()
	var env []string
	for _, e := range os.Environ() {
		if !strings.HasPrefix(e, "PLUMB_") && !strings.HasPrefix(e, "XDG_") && !strings.HasPrefix(e, "HOME=") {
			env = append(env, e)
		}
	}
	cmd.Env = append(env, "HOME="+home, "XDG_CONFIG_HOME="+filepath.Join(home, "config"), "XDG_DATA_HOME="+filepath.Join(home, "data"), "NO_COLOR=1")
	var out, errOut bytes.Buffer
	cmd.Stdout, cmd.Stderr = &out, &errOut
	err := cmd.Run()
	code := 0
	var ee *exec.ExitError
	if errors.As(err, &ee) {
		code = ee.ExitCode()
	} else if err != nil {
		t.Fatal(err)
	}
	return out.String(), errOut.String(), code
}

func TestEndToEnd(t *testing.T) {
	t.Run("series E192 9..10", func(t *testing.T) {
		out, errOut, code := runBinary(t, "series", "E192", "--from", "9", "--to", "10")
		// IEC 60063:2015 E192 values from 9 to 10 ohm (9.20 is the standard's
		// exception to the rounded formula; domain notes §6).
		want := "9.09\n9.20\n9.31\n9.42\n9.53\n9.65\n9.76\n9.88\n10\n"
		if code != 0 || out != want {
			t.Errorf("exit %d, stdout %q, stderr %q; want %q", code, out, errOut, want)
		}
	})
	t.Run("catalog list json", func(t *testing.T) {
		out, errOut, code := runBinary(t, "catalog", "list", "--format", "json")
		if code != 0 {
			t.Fatalf("exit %d: %s", code, errOut)
		}
		snap, err := catalog.ReadSnapshotJSON(strings.NewReader(out))
		if err != nil {
			t.Fatalf("the demo catalog's JSON does not read back: %v", err)
		}
		if len(snap.Amplifiers) == 0 || len(snap.ResistorSeries)+len(snap.Resistors) == 0 {
			t.Errorf("demo catalog lists %d amplifiers and %d resistor series/rows", len(snap.Amplifiers), len(snap.ResistorSeries)+len(snap.Resistors))
		}
	})
	t.Run("demo", func(t *testing.T) {
		out, errOut, code := runBinary(t, "demo")
		if code != 0 {
			t.Fatalf("exit %d: %s\n%s", code, errOut, out)
		}
		for _, w := range []string{"plumb demo", "logger-channel", "RANK", "#1"} {
			if !strings.Contains(out, w) {
				t.Errorf("demo output lacks %q:\n%s", w, out)
			}
		}
	})
	t.Run("bad flag exits 2", func(t *testing.T) {
		_, errOut, code := runBinary(t, "series", "E24", "--nope")
		if code != exitUsage || !strings.Contains(errOut, "--nope") {
			t.Errorf("exit %d, stderr %q", code, errOut)
		}
	})
	t.Run("missing catalog exits 1", func(t *testing.T) {
		missing := filepath.Join(t.TempDir(), "none.db")
		_, errOut, code := runBinary(t, "--catalog", missing, "catalog", "stats")
		if code != exitError || !strings.Contains(errOut, "plumb catalog init") {
			t.Errorf("exit %d, stderr %q", code, errOut)
		}
	})
	t.Run("infeasible spec exits 3", func(t *testing.T) {
		_, errOut, code := runBinary(t, "solve", filepath.Join("testdata", "impossible.yaml"))
		if code != exitInfeasible {
			t.Errorf("exit %d, want %d: %s", code, exitInfeasible, errOut)
		}
	})
	t.Run("help documents exit codes", func(t *testing.T) {
		out, _, code := runBinary(t, "--help")
		if code != 0 || !strings.Contains(out, "Exit codes:") || !strings.Contains(out, "3  the spec is infeasible") {
			t.Errorf("exit %d, help:\n%s", code, out)
		}
	})
	t.Run("catalog init, import and list round trip", func(t *testing.T) {
		dir := t.TempDir()
		db := filepath.Join(dir, "parts.db")
		if _, errOut, code := runBinary(t, "catalog", "init", db, "--demo"); code != 0 {
			t.Fatalf("init: exit %d: %s", code, errOut)
		}
		out, errOut, code := runBinary(t, "--catalog", db, "catalog", "stats", "--format", "json")
		if code != 0 || !strings.Contains(out, `"amplifiers"`) {
			t.Fatalf("stats: exit %d: %s %s", code, out, errOut)
		}
	})
}
