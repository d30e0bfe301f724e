package main

import (
	"database/sql"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"syscall"
	"testing"

	"plumb/optimize/report"
)

// TestDamagedCatalogCommands: a catalog whose schema version reads -1 once
// panicked every command (index out of range, exit 2: documented as a
// usage error). Each command now refuses it with exit 1 and a message
// naming the file.
func TestDamagedCatalogCommands(t *testing.T) {
	clearPlumbEnv(t)
	path := filepath.Join(t.TempDir(), "parts.db")
	f, _, _ := testFactory(t)
	if _, errOut, code := runPlumb(t, f, "catalog init "+path); code != exitOK {
		t.Fatalf("init: exit %d: %s", code, errOut)
	}
	db, err := sql.Open("sqlite", path)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := db.Exec("PRAGMA user_version = -1"); err != nil {
		t.Fatal(err)
	}
	db.Close()
	for _, line := range []string{"catalog list", "catalog stats", "solve logger-channel", "catalog export --format json", "check logger-channel --design logger-design"} {
		f, _, _ := testFactory(t)
		_, errOut, code := runPlumb(t, f, line+" --catalog "+path)
		if code != exitError || !strings.Contains(errOut, "schema version -1") || !strings.Contains(errOut, "parts.db") {
			t.Errorf("%s: exit %d: %s", line, code, errOut)
		}
	}
}

// TestForceReplacesOnlyRegularFiles is hardening finding 4: --force renamed
// a regular file over symbolic links, device nodes and FIFOs (it replaced a
// link to /dev/stdout with a file). Every output path refuses them, with
// or without --force, and leaves them as they were; a regular file is
// replaced.
func TestForceReplacesOnlyRegularFiles(t *testing.T) {
	clearPlumbEnv(t)
	commands := []struct {
		name string
		line func(out string) string
	}{
		{"catalog export", func(out string) string { return "catalog export --format json --force -o " + out }},
		{"solve --bom", func(out string) string { return "solve testdata/diff-g10.yaml --top 1 --force --bom " + out }},
		{"report html", func(out string) string { return "report testdata/diff-g10.yaml --top 1 --force -o " + out + ".html" }},
		{"catalog init", func(out string) string { return "catalog init --force " + out }},
		{"import report", func(out string) string {
			return "import --catalog " + filepath.Join(filepath.Dir(out), "c.db") + " --dry-run --force --report " + out + " testdata/export.csv"
		}},
	}
	targets := []struct {
		kind string
		make func(t *testing.T, path string) bool // false: cannot make it here
	}{
		{"a symbolic link", func(t *testing.T, path string) bool {
			target := path + ".target"
			if err := os.WriteFile(target, []byte("keep me"), 0o644); err != nil {
				t.Fatal(err)
			}
			return os.Symlink(target, path) == nil
		}},
		{"a FIFO", func(t *testing.T, path string) bool { return syscall.Mkfifo(path, 0o644) == nil }},
		{"a directory", func(t *testing.T, path string) bool { return os.Mkdir(path, 0o755) == nil }},
		{"a device", func(t *testing.T, path string) bool {
			// The null device's numbers (1, 3) on Linux; making one needs root.
			return syscall.Mknod(path, syscall.S_IFCHR|0o644, 1<<8|3) == nil
		}},
	}
	for _, c := range commands {
		for _, tg := range targets {
			t.Run(c.name+" over "+tg.kind, func(t *testing.T) {
				dir := t.TempDir()
				out := filepath.Join(dir, "out")
				line := c.line(out)
				path := strings.Fields(line)[slices.IndexFunc(strings.Fields(line), func(s string) bool { return strings.HasPrefix(s, out) })]
				if c.name == "import report" {
					path = out
				}
				if !tg.make(t, path) {
					t.Skipf("cannot make %s here", tg.kind)
				}
				before, _ := os.Lstat(path)
				f, _, _ := testFactory(t)
				useFixtureCatalog(t, f)
				_, errOut, code := runPlumb(t, f, line)
				if code != exitError || !strings.Contains(errOut, tg.kind) || !strings.Contains(errOut, "only regular files") && !strings.Contains(errOut, "not a regular file") {
					t.Errorf("%s: exit %d: %s", line, code, errOut)
				}
				after, err := os.Lstat(path)
				if err != nil || after.Mode() != before.Mode() {
					t.Errorf("%s was changed: %v", tg.kind, err)
				}
				if tg.kind == "a symbolic link" {
					if b, _ := os.ReadFile(path + ".target"); string(b) != "keep me" {
						t.Errorf("the link's target was written: %q", b)
					}
				}
			})
		}
	}
	// A regular file is replaced with --force.
	out := filepath.Join(t.TempDir(), "cat.json")
	if err := os.WriteFile(out, []byte("old"), 0o644); err != nil {
		t.Fatal(err)
	}
	f, _, _ := testFactory(t)
	useFixtureCatalog(t, f)
	if _, errOut, code := runPlumb(t, f, "catalog export --format json --force -o "+out); code != exitOK {
		t.Fatalf("regular file: exit %d: %s", code, errOut)
	}
	if b, _ := os.ReadFile(out); !strings.Contains(string(b), "plumb-catalog-snapshot") {
		t.Errorf("regular file not replaced: %.40q", b)
	}
}

// TestReportSidecars is hardening finding 4: report -o X.md overwrote an
// existing SVG beside it without --force, and left stale SVGs when a later
// report had fewer designs. The plot files are outputs: none is replaced
// without --force, and those an earlier report listed as its own and the
// new one does not write are removed; other files are never touched.
func TestReportSidecars(t *testing.T) {
	clearPlumbEnv(t)
	dir := t.TempDir()
	run := func(line string) (string, int) {
		t.Helper()
		f, _, _ := testFactory(t)
		useFixtureCatalog(t, f)
		_, errOut, code := runPlumb(t, f, line)
		return errOut, code
	}
	first := filepath.Join(dir, "r.md")
	if errOut, code := run("report testdata/diff-g10.yaml --top 2 -o " + first); code != exitOK {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	md, err := os.ReadFile(first)
	if err != nil {
		t.Fatal(err)
	}
	plots := report.Sidecars(md)
	if len(plots) == 0 {
		t.Fatal("the report lists no plot files")
	}
	for _, p := range plots {
		if _, err := os.Stat(filepath.Join(dir, p)); err != nil {
			t.Errorf("listed plot %s: %v", p, err)
		}
	}

	// A plot file of a new report's name exists: refused without --force,
	// and nothing is written.
	clash := filepath.Join(dir, "s-"+strings.TrimPrefix(plots[0], "r-"))
	if err := os.WriteFile(clash, []byte("mine"), 0o644); err != nil {
		t.Fatal(err)
	}
	if errOut, code := run("report testdata/diff-g10.yaml --top 2 -o " + filepath.Join(dir, "s.md")); code != exitError || !strings.Contains(errOut, filepath.Base(clash)) || !strings.Contains(errOut, "--force") {
		t.Errorf("plot file in the way: exit %d: %s", code, errOut)
	}
	if b, _ := os.ReadFile(clash); string(b) != "mine" {
		t.Error("the plot file in the way was overwritten")
	}
	if _, err := os.Stat(filepath.Join(dir, "s.md")); err == nil {
		t.Error("s.md written although its plot file was refused")
	}

	// A smaller report over the first: its own old plots go, a file it
	// never listed stays.
	stray := filepath.Join(dir, "r-notes.svg")
	if err := os.WriteFile(stray, []byte("mine"), 0o644); err != nil {
		t.Fatal(err)
	}
	if errOut, code := run("report testdata/diff-g10.yaml --top 1 --force -o " + first); code != exitOK {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	md, _ = os.ReadFile(first)
	now := report.Sidecars(md)
	for _, p := range plots {
		_, err := os.Stat(filepath.Join(dir, p))
		if listed := slices.Contains(now, p); listed != (err == nil) {
			t.Errorf("%s: listed %v, exists %v", p, listed, err == nil)
		}
	}
	if len(now) >= len(plots) {
		t.Errorf("the one-design report lists %d plots, the two-design one %d", len(now), len(plots))
	}
	if _, err := os.Stat(stray); err != nil {
		t.Errorf("a file the report never listed was removed: %v", err)
	}
}
