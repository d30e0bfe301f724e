package importers

import (
	"bufio"
	"context"
	"errors"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"reflect"
	"strconv"
	"strings"
	"syscall"
	"testing"
	"time"

	"plumb/catalog"
	"plumb/catalog/eseries"
)

func newCatalog(t testing.TB) (*catalog.Store, string) {
	t.Helper()
	path := filepath.Join(t.TempDir(), "parts.db")
	st, err := catalog.Create(path, false)
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { st.Close() })
	return st, path
}

func snapshot(t testing.TB, st *catalog.Store) *catalog.Snapshot {
	t.Helper()
	s, err := st.Snapshot(context.Background())
	if err != nil {
		t.Fatal(err)
	}
	return s
}

func TestFourShapesGiveTheSameCatalog(t *testing.T) {
	ctx := context.Background()
	var want *catalog.Snapshot
	for _, f := range fourShapes {
		t.Run(filepath.Base(f), func(t *testing.T) {
			st, _ := newCatalog(t)
			rep, err := Import(ctx, st, []string{f}, Options{Source: "export", Now: testNow})
			if err != nil {
				t.Fatal(err)
			}
			if rep.Summary.Added != 6 || rep.Summary.Skipped != 0 {
				t.Errorf("summary %+v, want 6 added (1 series + 5 resistors)", rep.Summary)
			}
			got := snapshot(t, st)
			if want == nil {
				want = got
				return
			}
			if !catalog.SameFigures(got, want) {
				t.Errorf("catalog from %s differs from %s:\n got %+v\nwant %+v", f, fourShapes[0], got, want)
			}
		})
	}
	// The series gives back every row's own part number (stem-VALUECODE).
	st, _ := newCatalog(t)
	if _, err := Import(ctx, st, []string{fourShapes[2]}, Options{Now: testNow}); err != nil {
		t.Fatal(err)
	}
	for _, v := range eseries.E12.Values(1000, 8200) {
		part := "TFA0603B25-" + catalog.ValueCode(v)
		kind, got, err := st.Find(ctx, part)
		if err != nil {
			t.Fatalf("Find(%s): %v", part, err)
		}
		if r, ok := got.(*catalog.Resistor); kind != catalog.KindResistor || !ok || r.ValueOhm != v {
			t.Errorf("Find(%s) = %s %+v", part, kind, got)
		}
	}
}

func TestReimport(t *testing.T) {
	ctx := context.Background()
	st, _ := newCatalog(t)
	// One source label for both imports: a new label alone would count as
	// an update.
	if _, err := Import(ctx, st, []string{"testdata/resistors_a.csv"}, Options{Source: "distributor-a", Now: testNow}); err != nil {
		t.Fatal(err)
	}
	before := snapshot(t, st)
	orig, err := os.ReadFile("testdata/resistors_a.csv")
	if err != nil {
		t.Fatal(err)
	}
	text := string(orig)
	// New price and stock for one part, a new tolerance for another, one
	// new part.
	text = strings.Replace(text, `"12,345",$0.1,`, `"9,000",$0.09,`, 1)
	text = strings.Replace(text, "KSM1206-0R10-F,\"Ketterby Shunt Works\",\"RES 0R1 OHM 1% 1/2W 75PPM 1206, metal strip, SMD\",0.1 Ohms,±1%",
		"KSM1206-0R10-F,\"Ketterby Shunt Works\",\"RES 0R1 OHM 0.5% 1/2W 75PPM 1206, metal strip, SMD\",0.1 Ohms,±0.5%", 1)
	text += "QP0805F1K00,\"Quillon Passives\",\"RES 1K OHM 1% 1/8W 100PPM 0805\",1 kOhms,±1%,±100ppm/°C,\"0.125W, 1/8W\",0805,150V,500,$0.1,,$0.045,$0.021,QP,thick-film\n"
	f := filepath.Join(t.TempDir(), "again.csv")
	if err := os.WriteFile(f, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	later := testNow.Add(24 * time.Hour)
	dry, err := Import(ctx, st, []string{f}, Options{Source: "distributor-a", Now: later, DryRun: true})
	if err != nil {
		t.Fatal(err)
	}
	if !catalog.SameFigures(snapshot(t, st), before) {
		t.Fatal("a dry run changed the catalog")
	}
	rep, err := Import(ctx, st, []string{f}, Options{Source: "distributor-a", Now: later})
	if err != nil {
		t.Fatal(err)
	}
	want := Summary{Rows: 18, Parts: 7, Series: 1, Imported: 7, Added: 1, Updated: 1, Unchanged: 4, SpecChanged: 1}
	if rep.Summary != want {
		t.Errorf("summary %+v, want %+v", rep.Summary, want)
	}
	wantDry := want
	wantDry.DryRun = true
	if dry.Summary != wantDry {
		t.Errorf("dry-run summary %+v, want %+v", dry.Summary, wantDry)
	}
	_, v, err := st.Find(ctx, "KSM1206-0R10-F")
	if err != nil {
		t.Fatal(err)
	}
	if r := v.(*catalog.Resistor); r.Tolerance != 0.01 {
		t.Errorf("spec change written over the catalog: tolerance %g", r.Tolerance)
	}
	var reported bool
	for _, p := range rep.Problems {
		if p.Part == "KSM1206-0R10-F" && p.Severity == Doubt && p.File == f && p.Line > 0 && strings.Contains(p.Reason, "tolerance") {
			reported = true
		}
	}
	if !reported {
		t.Errorf("spec change not reported: %s", problemText(rep))
	}
	_, v, _ = st.Find(ctx, "QP0805F4K99")
	if r := v.(*catalog.Resistor); r.Stock != 9000 || r.PriceBreaks[0].UnitPrice != 0.09 {
		t.Errorf("price and stock not updated: %+v", r.Offer)
	}
	h, err := st.History(ctx, "QP0805F4K99")
	if err != nil || len(h) != 2 || h[1].Outcome != catalog.Updated || !h[1].ImportedAt.Equal(later) || h[1].Source != "distributor-a" {
		t.Errorf("history %+v, %v", h, err)
	}
}

func TestNoSQLFromFileContents(t *testing.T) {
	// The importer never talks SQL: it hands typed parts to the store, which
	// binds them as parameters. No source file here may build a statement.
	files, err := filepath.Glob("*.go")
	if err != nil {
		t.Fatal(err)
	}
	for _, f := range files {
		if strings.HasSuffix(f, "_test.go") {
			continue
		}
		b, err := os.ReadFile(f)
		if err != nil {
			t.Fatal(err)
		}
		src := string(b)
		for _, bad := range []string{`"database/sql"`, "sqlx", "modernc.org/sqlite", "INSERT ", "UPDATE ", "SELECT ", "DELETE FROM"} {
			if strings.Contains(src, bad) {
				t.Errorf("%s contains %q: SQL belongs to the store", f, bad)
			}
		}
	}
}

// writeBigExport writes an n-row resistor export: E96 values over six
// decades, three price breaks, prices varied so no run folds into a series.
func writeBigExport(t testing.TB, path, prefix string, n int) {
	t.Helper()
	f, err := os.Create(path)
	if err != nil {
		t.Fatal(err)
	}
	w := bufio.NewWriterSize(f, 1<<16)
	fmt.Fprintln(w, "Mfr Part #,Manufacturer,Description,Resistance,Tolerance,Temperature Coefficient,Power,Package,Technology,Quantity Available,Price @ 1,Price @ 100,Price @ 1000")
	vals := eseries.E96.Values(10, 9.76e6)
	for i := range n {
		v := vals[i%len(vals)]
		fmt.Fprintf(w, "%s%07d,Quillon Passives,\"RES %s OHM 1%% 1/10W 100PPM 0603, thick film\",%s,±1%%,±100ppm/°C,\"0.1W, 1/10W\",0603,thick film,\"%s\",$%.4f,$%.4f,$%.4f\n",
			prefix, i, catalog.ValueCode(v), catalog.ValueCode(v), commaThousands(1000+i%50000), 0.1+float64(i%997)*1e-4, 0.05, 0.021)
	}
	if err := w.Flush(); err != nil {
		t.Fatal(err)
	}
	if err := f.Close(); err != nil {
		t.Fatal(err)
	}
}

func commaThousands(n int) string {
	s := strconv.Itoa(n)
	for i := len(s) - 3; i > 0; i -= 3 {
		s = s[:i] + "," + s[i:]
	}
	return s
}

// TestHelperImport is the child process of the integrity tests: it imports
// PLUMB_TEST_FILE into PLUMB_TEST_CATALOG and prints "writing" when the
// file is read and the write transaction starts.
func TestHelperImport(t *testing.T) {
	cat, file := os.Getenv("PLUMB_TEST_CATALOG"), os.Getenv("PLUMB_TEST_FILE")
	if cat == "" {
		t.Skip("helper process for the kill and concurrency tests; runs only when they start it")
	}
	st, err := catalog.Open(cat)
	if err != nil {
		t.Fatal(err)
	}
	defer st.Close()
	_, err = Import(context.Background(), st, []string{file}, Options{Now: testNow,
		BeforeWrite: func(int) { fmt.Println("writing"); os.Stdout.Sync() }})
	if err != nil {
		t.Fatal(err)
	}
	fmt.Println("done")
}

func startHelper(t *testing.T, cat, file string) (*exec.Cmd, *bufio.Scanner) {
	t.Helper()
	cmd := exec.Command(os.Args[0], "-test.run=^TestHelperImport$", "-test.count=1")
	cmd.Env = append(os.Environ(), "PLUMB_TEST_CATALOG="+cat, "PLUMB_TEST_FILE="+file)
	out, err := cmd.StdoutPipe()
	if err != nil {
		t.Fatal(err)
	}
	cmd.Stderr = os.Stderr
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	return cmd, bufio.NewScanner(out)
}

func waitFor(t *testing.T, sc *bufio.Scanner, word string) {
	t.Helper()
	for sc.Scan() {
		if strings.TrimSpace(sc.Text()) == word {
			return
		}
	}
	t.Fatalf("helper ended before printing %q", word)
}

func TestKilledImportLeavesCatalogAsBefore(t *testing.T) {
	if testing.Short() {
		t.Skip("starts a child process importing 100,000 rows")
	}
	ctx := context.Background()
	st, path := newCatalog(t)
	if _, err := Import(ctx, st, []string{"testdata/resistors_a.csv"}, Options{Now: testNow}); err != nil {
		t.Fatal(err)
	}
	before := snapshot(t, st)
	histBefore, _ := st.History(ctx, "QP0805F4K99")
	st.Close()

	big := filepath.Join(t.TempDir(), "big.csv")
	writeBigExport(t, big, "KX", 100_000)
	// The big file also re-prices a part already in the catalog, so a
	// half-written import would show.
	f, _ := os.OpenFile(big, os.O_APPEND|os.O_WRONLY, 0)
	fmt.Fprintln(f, `QP0805F4K99,Quillon Passives,"RES 4K99 OHM 1% 1/8W 100PPM 0805, thick film",4K99,1%,100ppm,1/8W,0805,thick film,7,$9,$8,$7`)
	f.Close()

	cmd, sc := startHelper(t, path, big)
	waitFor(t, sc, "writing")
	time.Sleep(150 * time.Millisecond) // inside the one transaction (it takes seconds for 100,000 rows)
	if err := cmd.Process.Signal(syscall.SIGKILL); err != nil {
		t.Fatal(err)
	}
	err := cmd.Wait()
	ws, ok := cmd.ProcessState.Sys().(syscall.WaitStatus)
	if !ok || !ws.Signaled() {
		t.Fatalf("the import finished before it was killed (%v): make the file bigger", err)
	}

	st2, err := catalog.Open(path)
	if err != nil {
		t.Fatalf("catalog unreadable after the kill: %v", err)
	}
	defer st2.Close()
	if after := snapshot(t, st2); !catalog.SameFigures(after, before) {
		t.Errorf("catalog changed by a killed import: %d resistors, was %d", len(after.Resistors), len(before.Resistors))
	}
	if h, _ := st2.History(ctx, "QP0805F4K99"); len(h) != len(histBefore) {
		t.Errorf("history has %d entries, was %d", len(h), len(histBefore))
	}
}

func TestTwoImportsAtOnce(t *testing.T) {
	if testing.Short() {
		t.Skip("starts two child processes")
	}
	_, path := newCatalog(t)
	dir := t.TempDir()
	files := []string{filepath.Join(dir, "one.csv"), filepath.Join(dir, "two.csv")}
	writeBigExport(t, files[0], "PA", 20_000)
	writeBigExport(t, files[1], "PB", 20_000)
	var cmds []*exec.Cmd
	var scs []*bufio.Scanner
	for _, f := range files {
		c, sc := startHelper(t, path, f)
		cmds, scs = append(cmds, c), append(scs, sc)
	}
	for i, c := range cmds {
		waitFor(t, scs[i], "done")
		if err := c.Wait(); err != nil {
			t.Fatalf("import %s failed: %v", files[i], err)
		}
	}
	st, err := catalog.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer st.Close()
	stats, err := st.Stats(context.Background())
	if err != nil {
		t.Fatal(err)
	}
	if stats.Resistors != 40_000 {
		t.Errorf("%d resistors, want 40000 from both imports", stats.Resistors)
	}
}

func TestNetworksAndAmplifiersReachTheCatalog(t *testing.T) {
	ctx := context.Background()
	st, _ := newCatalog(t)
	files := []string{"testdata/networks.csv", "testdata/amplifiers.csv", "testdata/amplifiers_typ.csv", "testdata/amplifiers_matched.csv"}
	var progress []int
	rep, err := Import(ctx, st, files, Options{Now: testNow, Progress: func(n int) { progress = append(progress, n) }})
	if err != nil {
		t.Fatal(err)
	}
	if rep.Summary.Added != 8 || rep.Summary.Skipped != 0 {
		t.Fatalf("summary %+v: %s", rep.Summary, problemText(rep))
	}
	// Called at the end of each file with the running row count.
	if !reflect.DeepEqual(progress, []int{3, 6, 7, 8}) {
		t.Errorf("progress calls %v, want [3 6 7 8]", progress)
	}
	_, v, err := st.Find(ctx, "ZX3301")
	if err != nil {
		t.Fatal(err)
	}
	if a := v.(*catalog.Amplifier); !reflect.DeepEqual(a.TypicalOnly, []string{"vos_v", "vos_drift_v_per_k", "ib_a"}) {
		t.Errorf("typical-only flags lost in the catalog: %v", a.TypicalOnly)
	}
	_, v, err = st.Find(ctx, "MTN4-1K10K-A05")
	if err != nil {
		t.Fatal(err)
	}
	if n := v.(*catalog.Network); !reflect.DeepEqual(n.Values, []float64{1e3, 1e3, 1e4, 1e4}) || n.TCRTracking != 5 {
		t.Errorf("network %+v", n)
	}
}

func TestCancelledImportWritesNothing(t *testing.T) {
	st, _ := newCatalog(t)
	big := filepath.Join(t.TempDir(), "big.csv")
	writeBigExport(t, big, "CX", 5000)
	ctx, cancel := context.WithCancel(context.Background())
	_, err := Import(ctx, st, []string{big}, Options{Now: testNow, Progress: func(n int) {
		if n >= 2*ProgressEvery {
			cancel()
		}
	}})
	if !errors.Is(err, context.Canceled) || !strings.Contains(err.Error(), big) {
		t.Fatalf("err = %v, want context.Canceled naming the file", err)
	}
	if s := snapshot(t, st); len(s.Resistors) != 0 {
		t.Errorf("%d resistors written by a cancelled import", len(s.Resistors))
	}
}
