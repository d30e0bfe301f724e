package main

import (
	"bytes"
	"context"
	"database/sql"
	"fmt"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"syscall"
	"testing"

	"plumb/catalog"
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

// hostileSnapshot is the fixture catalog plus a resistor whose text cells
// start with formula leads and hold terminal control and bidirectional
// characters, as a hostile or careless export could leave them.
func hostileSnapshot() (*catalog.Snapshot, error) {
	b, err := os.ReadFile(filepath.Join("testdata", "catalog.json"))
	if err != nil {
		return nil, err
	}
	snap, err := catalog.ReadSnapshotJSON(bytes.NewReader(b))
	if err != nil {
		return nil, err
	}
	r := snap.Resistors[0]
	r.Part, r.Maker, r.Line = "@EVIL-1", "=HYPERLINK(\"x\")", "Fake\x1b[2J\u202eenil"
	snap.Resistors = append(snap.Resistors, r)
	return snap, nil
}

// TestCSVCellsNeutralised is hardening finding 5: catalog export, catalog
// list --format csv and the import row report wrote cells starting with
// =, + or @ verbatim. Every CSV plumb writes now goes through one writer
// (catalog.CSVWriter) that marks them with a leading apostrophe.
func TestCSVCellsNeutralised(t *testing.T) {
	clearPlumbEnv(t)
	dir := t.TempDir()
	for _, line := range []string{"catalog export --format csv --kind resistor", "catalog list --format csv --kind resistor"} {
		f, _, _ := testFactory(t)
		useSnapshotCatalog(f, "hostile", hostileSnapshot)
		out, errOut, code := runPlumb(t, f, line)
		if code != exitOK {
			t.Fatalf("%s: exit %d: %s", line, code, errOut)
		}
		if !strings.Contains(out, "'@EVIL-1") || !strings.Contains(out, `'=HYPERLINK(""x"")`) || strings.Contains(out, ",@EVIL") || strings.Contains(out, "\n@EVIL") {
			t.Errorf("%s: formula cells not neutralised:\n%s", line, out)
		}
	}
	// The import row report quotes the raw cell of a refused row.
	csvFile := filepath.Join(dir, "in.csv")
	if err := os.WriteFile(csvFile, []byte("part,maker,value,tolerance,tcr,power,price\nR-1,Acme,=cmd|' /C calc'!A0,1%,100ppm/K,0.1W,0.1 USD\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	rep := filepath.Join(dir, "rows.csv")
	f, _, _ := testFactory(t)
	runPlumb(t, f, "catalog init "+filepath.Join(dir, "c.db"))
	f, _, _ = testFactory(t)
	runPlumb(t, f, "import --catalog "+filepath.Join(dir, "c.db")+" --dry-run --report "+rep+" "+csvFile)
	b, err := os.ReadFile(rep)
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(string(b), "'=cmd") || strings.Contains(string(b), ",=cmd") {
		t.Errorf("import report does not neutralise the raw cell:\n%s", b)
	}
}

// TestTerminalTextEscaped is hardening finding 5: part numbers and makers
// with ESC or U+202E were printed raw to the terminal. Tables escape every
// cell, and whatever goes to a terminal is escaped, keeping plumb's own
// colours.
func TestTerminalTextEscaped(t *testing.T) {
	clearPlumbEnv(t)
	for _, tty := range []bool{false, true} {
		ios, _, out, _ := TestIO()
		ios.SetTerminal(tty, tty)
		ios.guardTerminals()
		f := newFactory(ios)
		cfg := t.TempDir()
		f.ConfigDir = func() (string, error) { return cfg, nil }
		useSnapshotCatalog(f, "hostile", hostileSnapshot)
		root := newRootCmd(f)
		root.SetArgs(strings.Fields("catalog show @EVIL-1"))
		if code := reportError(f.IO, root.Execute()); code != exitOK {
			t.Fatalf("exit %d", code)
		}
		text := out.String()
		if strings.Contains(text, "\x1b[2J") || strings.Contains(text, "\u202e") || !strings.Contains(text, `Fake\x1b[2J\u202eenil`) {
			t.Errorf("terminal %v: control characters reach the output: %q", tty, text)
		}
	}
	// The terminal guard keeps plumb's own colour and line ends.
	var b bytes.Buffer
	w := &terminalWriter{w: &b}
	fmt.Fprint(w, sgrBold+"ok"+sgrReset+"\n\x1b]0;title\x07\u202e")
	w.Write([]byte("\xe2\x80")) // half of U+202E: held back
	w.Write([]byte("\xaeend\n"))
	if want := sgrBold + "ok" + sgrReset + "\n" + `\x1b]0;title\x07\u202e\u202eend` + "\n"; b.String() != want {
		t.Errorf("terminal writer wrote %q, want %q", b.String(), want)
	}
}

// TestExitCodesDocumented: the README's exit-code table lists exactly the
// codes Main returns, and every command returns the code the table gives
// for its outcome (hardening: "the README's exit-code table matches what
// every command returns"; a panic's exit 2 once read as a usage error).
func TestExitCodesDocumented(t *testing.T) {
	readme, err := os.ReadFile(filepath.Join("..", "..", "README.md"))
	if err != nil {
		t.Fatal(err)
	}
	_, table, ok := strings.Cut(string(readme), "## Exit codes")
	if !ok {
		t.Fatal("README has no exit-code section")
	}
	var documented []int
	for _, line := range strings.Split(table, "\n") {
		var code int
		if _, err := fmt.Sscanf(line, "| %d |", &code); err == nil {
			documented = append(documented, code)
		}
		if strings.HasPrefix(line, "## ") {
			break
		}
	}
	if want := []int{exitOK, exitError, exitUsage, exitInfeasible, exitInterrupted}; !slices.Equal(documented, want) {
		t.Errorf("README documents exit codes %v, Main returns %v", documented, want)
	}
	if !strings.Contains(rootLong, "130  interrupted") {
		t.Error("plumb --help does not list exit code 130")
	}

	clearPlumbEnv(t)
	dir := t.TempDir()
	bad := filepath.Join(dir, "bad.csv")
	if err := os.WriteFile(bad, []byte("part,maker,value\nR-1,Acme,not a value\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	db := filepath.Join(dir, "c.db")
	cases := []struct {
		line string
		code int
	}{
		{"series E12 --from 1 --to 2", exitOK},
		{"solve testdata/diff-g10.yaml --top 1", exitOK},
		{"catalog init " + db, exitOK},
		{"solve testdata/missing.yaml", exitError},
		{"check testdata/impossible.yaml --design testdata/design-network.yaml", exitError},
		{"catalog list --catalog " + filepath.Join(dir, "none.db"), exitError},
		{"import --catalog " + db + " " + bad, exitError},
		{"frobnicate", exitUsage},
		{"solve", exitUsage},
		{"solve testdata/diff-g10.yaml --top 0", exitUsage},
		{"solve testdata/diff-g10.yaml --no-such-flag", exitUsage},
		{"solve testdata/impossible.yaml", exitInfeasible},
		{"solve testdata/no-reference.yaml", exitInfeasible}, // no 3.3 V reference in the catalog
		{"report testdata/impossible.yaml -o " + filepath.Join(dir, "r.html"), exitInfeasible},
	}
	for _, c := range cases {
		f := fixtureFactory(t)
		if strings.Contains(c.line, "--catalog") || strings.HasPrefix(c.line, "catalog init") {
			f, _, _ = testFactory(t) // the catalog named on the line
		}
		if _, errOut, code := runPlumb(t, f, c.line); code != c.code {
			t.Errorf("plumb %s: exit %d, the README gives %d: %s", c.line, code, c.code, errOut)
		}
	}
	// Ctrl-C: the command's context is cancelled.
	f := fixtureFactory(t)
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	root := newRootCmd(f)
	root.SetArgs(strings.Fields("solve testdata/diff-g10.yaml"))
	if code := reportError(f.IO, root.ExecuteContext(ctx)); code != exitInterrupted {
		t.Errorf("interrupted solve: exit %d, want %d", code, exitInterrupted)
	}
}
