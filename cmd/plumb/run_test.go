package main

import (
	"bytes"
	"context"
	"encoding/csv"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/spf13/cobra"

	"plumb/catalog"
	"plumb/optimize/budget"
	"plumb/optimize/search"
	"plumb/optimize/spec"
)

// fixtureTime stamps the fixture catalog's rows.
var fixtureTime = time.Date(2026, 1, 2, 3, 4, 5, 0, time.UTC)

// useFixtureCatalog makes f open a fresh in-memory catalog holding
// testdata/catalog.json (invented parts) on every call.
func useFixtureCatalog(t *testing.T, f *Factory) {
	t.Helper()
	b, err := os.ReadFile(filepath.Join("testdata", "catalog.json"))
	if err != nil {
		t.Fatal(err)
	}
	useSnapshotCatalog(f, "fixture", func() (*catalog.Snapshot, error) { return catalog.ReadSnapshotJSON(bytes.NewReader(b)) })
}

// useSnapshotCatalog makes f open a fresh in-memory catalog holding the
// snapshot load returns, imported from source, on every call.
func useSnapshotCatalog(f *Factory, source string, load func() (*catalog.Snapshot, error)) {
	f.Catalog = func(ctx context.Context) (*catalog.Store, error) {
		snap, err := load()
		if err != nil {
			return nil, err
		}
		st, err := catalog.OpenMemory()
		if err != nil {
			return nil, err
		}
		if _, err := st.Upsert(ctx, snap, catalog.UpsertOptions{Source: source, Now: fixtureTime}); err != nil {
			return nil, err
		}
		return st, nil
	}
}

// fixtureFactory is a test factory on the fixture catalog with no PLUMB_*
// variables set.
func fixtureFactory(t *testing.T) *Factory {
	t.Helper()
	clearPlumbEnv(t)
	f, _, _ := testFactory(t)
	useFixtureCatalog(t, f)
	return f
}

func TestGolden(t *testing.T) {
	tests := []struct {
		name     string
		args     string
		terminal bool
		code     int
	}{
		{name: "catalog-list", args: "catalog list"},
		{name: "catalog-list-terminal", args: "catalog list", terminal: true},
		{name: "catalog-list-filtered", args: "catalog list --kind series --max-tolerance 0.1"},
		{name: "catalog-show-amplifier", args: "catalog show KA-205"},
		{name: "catalog-show-series-value", args: "catalog show HT25-4K99"},
		{name: "catalog-stats", args: "catalog stats"},
		{name: "catalog-history", args: "catalog history KA-205"},
		{name: "bom-network", args: "bom testdata/design-network.yaml --spec testdata/diff-g10.yaml"},
		{name: "config-show", args: "config show"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			f := fixtureFactory(t)
			f.IO.SetTerminal(tt.terminal, false)
			out, errOut, code := runPlumb(t, f, tt.args)
			if code != tt.code {
				t.Fatalf("exit %d, want %d: %s", code, tt.code, errOut)
			}
			assertGolden(t, tt.name, out)
		})
	}
}

// TestRenderGolden prints search and budget results kept in testdata
// (JSON captured from the optimize packages on the fixture catalog) so that
// the layout is tested apart from the numbers, which those packages own.
func TestRenderGolden(t *testing.T) {
	tests := []struct {
		name     string
		fixture  string
		terminal bool
		render   func(ios *IOStreams, b []byte) error
	}{
		{name: "solve", fixture: "solve-result.json", render: renderSolve(0)},
		{name: "solve-explain", fixture: "solve-result.json", render: renderSolve(1)},
		{name: "solve-terminal", fixture: "solve-result.json", terminal: true, render: renderSolve(0)},
		{name: "solve-infeasible", fixture: "solve-infeasible.json", render: renderSolve(0)},
		{name: "solve-hazard", fixture: "solve-hazard.json", render: renderSolve(0)},
		{name: "check", fixture: "check-result.json", render: func(ios *IOStreams, b []byte) error {
			var r budget.Result
			if err := json.Unmarshal(b, &r); err != nil {
				return err
			}
			return writeCheckTable(ios.Out, ios, &spec.Spec{Name: "fixture-g10"}, &r)
		}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			b, err := os.ReadFile(filepath.Join("testdata", tt.fixture))
			if err != nil {
				t.Fatal(err)
			}
			ios, _, out, _ := TestIO()
			ios.SetTerminal(tt.terminal, false)
			if err := tt.render(ios, b); err != nil {
				t.Fatal(err)
			}
			assertGolden(t, tt.name, out.String())
		})
	}
}

func renderSolve(explain int) func(ios *IOStreams, b []byte) error {
	return func(ios *IOStreams, b []byte) error {
		var r search.Result
		if err := json.Unmarshal(b, &r); err != nil {
			return err
		}
		return writeSolveTable(ios.Out, ios, "Designs for fixture-g10 (build of 100)", &r, explain)
	}
}

func TestSeriesValues(t *testing.T) {
	tests := []struct {
		name string
		args string
		want string
	}{
		// IEC 60063:2015 E192, the values from 9 to 10 ohm; 9.20 is the
		// standard's exception to the rounded formula (domain notes §6).
		{name: "E192 9..10", args: "series E192 --from 9 --to 10", want: "9.09 9.20 9.31 9.42 9.53 9.65 9.76 9.88 10"},
		// IEC 60063:2015 E24 decade (domain notes §6, from memory).
		{name: "E24 decade", args: "series E24",
			want: "1 1.1 1.2 1.3 1.5 1.6 1.8 2 2.2 2.4 2.7 3 3.3 3.6 3.9 4.3 4.7 5.1 5.6 6.2 6.8 7.5 8.2 9.1 10"},
		// E96 across a decade boundary, in trade notation ("4k7" = 4.7 kohm,
		// common practice); 4.75k, 4.87k, 4.99k, 5.11k are E96 values (IEC 60063).
		{name: "E96 4k7..5k2", args: "series e96 --from 4k7 --to 5k2", want: "4.75k 4.87k 4.99k 5.11k"},
		{name: "E12 keeps two figures", args: "series E12 --from 0.9 --to 1.6", want: "1 1.2 1.5"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			f := fixtureFactory(t)
			out, errOut, code := runPlumb(t, f, tt.args)
			if code != exitOK {
				t.Fatalf("exit %d: %s", code, errOut)
			}
			if got := strings.Join(strings.Fields(out), " "); got != tt.want {
				t.Errorf("got  %s\nwant %s", got, tt.want)
			}
		})
	}
}

func TestSeriesFormats(t *testing.T) {
	f := fixtureFactory(t)
	out, _, code := runPlumb(t, f, "series E192 --from 9 --to 10 --format json")
	if code != exitOK {
		t.Fatal(code)
	}
	var got seriesJSON
	if err := json.Unmarshal([]byte(out), &got); err != nil {
		t.Fatal(err)
	}
	// E192 from 9 to 10: 9.09 ... 9.88, 10 (IEC 60063:2015).
	want := []float64{9.09, 9.2, 9.31, 9.42, 9.53, 9.65, 9.76, 9.88, 10}
	if got.Series != "E192" || len(got.ValuesOhm) != len(want) {
		t.Fatalf("got %+v", got)
	}
	for i := range want {
		if math.Abs(got.ValuesOhm[i]-want[i]) > 1e-12 {
			t.Errorf("value %d = %g, want %g", i, got.ValuesOhm[i], want[i])
		}
	}

	f = fixtureFactory(t)
	out, _, _ = runPlumb(t, f, "series E24 --from 1k --to 1k5 --format csv")
	recs, err := csv.NewReader(strings.NewReader(out)).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	// E24 1.0, 1.1, 1.2, 1.3, 1.5 times 1000 (IEC 60063).
	wantCSV := [][]string{{"series", "value_ohm", "value"}, {"E24", "1000", "1k"}, {"E24", "1100", "1.1k"}, {"E24", "1200", "1.2k"}, {"E24", "1300", "1.3k"}, {"E24", "1500", "1.5k"}}
	if len(recs) != len(wantCSV) {
		t.Fatalf("csv = %q", recs)
	}
	for i := range recs {
		if strings.Join(recs[i], ",") != strings.Join(wantCSV[i], ",") {
			t.Errorf("row %d = %q, want %q", i, recs[i], wantCSV[i])
		}
	}
}

func TestErrorsNameTheProblem(t *testing.T) {
	missing := filepath.Join(t.TempDir(), "x.db")
	tests := []struct {
		name   string
		args   string
		code   int
		wantIn []string
	}{
		{name: "unknown series", args: "series E25", code: exitUsage, wantIn: []string{`"E25"`, "E3, E6, E12, E24, E48, E96, E192"}},
		{name: "bad resistance", args: "series E24 --from 4x7", code: exitUsage, wantIn: []string{"--from", `"4x7"`}},
		{name: "empty range", args: "series E24 --from 10 --to 1", code: exitUsage, wantIn: []string{"empty"}},
		{name: "unknown flag", args: "series E24 --step 1", code: exitUsage, wantIn: []string{"unknown flag: --step", "plumb series --help"}},
		{name: "missing argument", args: "catalog show", code: exitUsage, wantIn: []string{"PART"}},
		{name: "unknown command", args: "frobnicate", code: exitUsage, wantIn: []string{`unknown command "frobnicate"`, "solve"}},
		{name: "unknown part", args: "catalog show NOPE-1", code: exitError, wantIn: []string{"NOPE-1", "catalog list"}},
		{name: "missing catalog", args: "--catalog " + missing + " catalog list", code: exitError,
			wantIn: []string{missing, "not found", "plumb catalog init " + missing, "leave --catalog unset"}},
		{name: "missing spec", args: "solve nosuch.yaml", code: exitError, wantIn: []string{"nosuch.yaml", "logger-channel"}},
		{name: "bad format value", args: "catalog list --format xml", code: exitUsage, wantIn: []string{`"xml"`, "table, json, csv"}},
		{name: "quiet and verbose", args: "-q -v config show", code: exitUsage, wantIn: []string{"--quiet and --verbose"}},
		{name: "import into the demo catalog", args: "import testdata/catalog.json", code: exitError, wantIn: []string{"plumb catalog init", "--dry-run"}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			f := fixtureFactory(t)
			if strings.Contains(tt.args, "--catalog") {
				f.Catalog = f.openConfigured
			}
			_, errOut, code := runPlumb(t, f, tt.args)
			if code != tt.code {
				t.Errorf("exit %d, want %d (%s)", code, tt.code, errOut)
			}
			for _, w := range tt.wantIn {
				if !strings.Contains(errOut, w) {
					t.Errorf("stderr %q does not mention %q", errOut, w)
				}
			}
		})
	}
}

func TestCatalogListJSON(t *testing.T) {
	f := fixtureFactory(t)
	out, _, code := runPlumb(t, f, "catalog list --format json")
	if code != exitOK {
		t.Fatal(code)
	}
	snap, err := catalog.ReadSnapshotJSON(strings.NewReader(out))
	if err != nil {
		t.Fatalf("list JSON does not read back as a snapshot: %v", err)
	}
	if len(snap.ResistorSeries) != 2 || len(snap.Resistors) != 1 || len(snap.Networks) != 1 || len(snap.Amplifiers) != 3 {
		t.Errorf("snapshot holds %d series, %d resistors, %d networks, %d amplifiers; want 2, 1, 1, 3",
			len(snap.ResistorSeries), len(snap.Resistors), len(snap.Networks), len(snap.Amplifiers))
	}
	// The JSON names are the catalog structs' tags.
	for _, key := range []string{`"part"`, `"maker"`, `"value_ohm"`, `"tolerance"`, `"tcr_ppm"`, `"power_w"`, `"stock"`, `"price_breaks"`, `"min_qty"`, `"unit_price"`, `"currency"`} {
		if !strings.Contains(out, key) {
			t.Errorf("list JSON lacks %s", key)
		}
	}
}

func TestCatalogExport(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "cat.json")
	f := fixtureFactory(t)
	if _, errOut, code := runPlumb(t, f, "catalog export -o "+path); code != exitOK {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	snap, err := catalog.ReadSnapshotJSON(bytes.NewReader(b))
	if err != nil || len(snap.Amplifiers) != 3 {
		t.Fatalf("export does not read back: %v", err)
	}

	f = fixtureFactory(t)
	_, errOut, code := runPlumb(t, f, "catalog export -o "+path)
	if code != exitError || !strings.Contains(errOut, "--force") {
		t.Errorf("overwrite without --force: exit %d, %q", code, errOut)
	}
	f = fixtureFactory(t)
	if _, errOut, code := runPlumb(t, f, "catalog export --format csv --kind amplifier -o "+path+" --force"); code != exitOK {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	recs, err := readCSVFile(path)
	if err != nil {
		t.Fatal(err)
	}
	if len(recs) != 4 {
		t.Errorf("amplifier CSV has %d lines, want a header and 3 parts", len(recs))
	}
	entries, _ := os.ReadDir(dir)
	if len(entries) != 1 {
		t.Errorf("export left %d files in the directory, want 1 (no temporary files)", len(entries))
	}
}

func readCSVFile(path string) ([][]string, error) {
	b, err := os.ReadFile(path)
	if err != nil {
		return nil, err
	}
	return csv.NewReader(bytes.NewReader(b)).ReadAll()
}

func TestCatalogInit(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "sub", "parts.db")
	f := fixtureFactory(t)
	if _, errOut, code := runPlumb(t, f, "catalog init "+path); code != exitOK {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	f = fixtureFactory(t)
	f.Catalog = f.openConfigured
	out, errOut, code := runPlumb(t, f, "--catalog "+path+" catalog stats --format json")
	if code != exitOK {
		t.Fatalf("stats of the new catalog: exit %d: %s", code, errOut)
	}
	var s catalog.Stats
	if err := json.Unmarshal([]byte(out), &s); err != nil || s.Resistors+s.Series+s.Networks+s.Amplifiers != 0 {
		t.Errorf("new catalog is not empty: %+v (%v)", s, err)
	}
	f = fixtureFactory(t)
	if _, errOut, code := runPlumb(t, f, "catalog init "+path); code != exitError || !strings.Contains(errOut, "--force") {
		t.Errorf("second init: exit %d, %q; want a refusal naming --force", code, errOut)
	}
	f = fixtureFactory(t)
	if _, errOut, code := runPlumb(t, f, "catalog init --force "+path); code != exitOK {
		t.Errorf("init --force: exit %d: %s", code, errOut)
	}
	// Without a path the catalog goes to plumb/catalog.db in the data directory.
	f = fixtureFactory(t)
	if _, errOut, code := runPlumb(t, f, "catalog init"); code != exitOK {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	dd, _ := f.DataDir()
	if _, err := os.Stat(filepath.Join(dd, "plumb", "catalog.db")); err != nil {
		t.Errorf("default catalog not created: %v", err)
	}
}

func TestSolve(t *testing.T) {
	f := fixtureFactory(t)
	out, errOut, code := runPlumb(t, f, "solve testdata/diff-g10.yaml --format json --top 2")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	var res search.Result
	if err := json.Unmarshal([]byte(out), &res); err != nil {
		t.Fatal(err)
	}
	if len(res.Designs) == 0 || len(res.Designs) > 2 {
		t.Fatalf("%d designs, want 1 or 2", len(res.Designs))
	}
	for i, d := range res.Designs {
		if d.Rank != i+1 || d.UnitCost <= 0 {
			t.Errorf("design %d: rank %d, unit cost %g", i, d.Rank, d.UnitCost)
		}
		for _, l := range d.Limits {
			if !l.Pass {
				t.Errorf("ranked design %d fails %s", d.Rank, l.Name)
			}
		}
		if i > 0 && d.TotalCost < res.Designs[i-1].TotalCost {
			t.Errorf("design %d is cheaper than design %d", d.Rank, d.Rank-1)
		}
	}
}

func TestSolveInfeasibleExit3(t *testing.T) {
	for _, format := range []string{"table", "json"} {
		t.Run(format, func(t *testing.T) {
			f := fixtureFactory(t)
			out, errOut, code := runPlumb(t, f, "solve testdata/impossible.yaml --format "+format)
			if code != exitInfeasible {
				t.Fatalf("exit %d, want %d: %s", code, exitInfeasible, errOut)
			}
			if !strings.Contains(errOut, "no design in the catalog meets the spec") || !strings.Contains(errOut, "relax") {
				t.Errorf("stderr %q does not explain the infeasible spec", errOut)
			}
			if format == "table" && !strings.Contains(out, "No design meets the spec") {
				t.Errorf("stdout lacks the explanation:\n%s", out)
			}
			if format == "json" && !strings.Contains(out, `"infeasible"`) {
				t.Errorf("JSON lacks the infeasible section:\n%s", out)
			}
		})
	}
}

func TestSolveHazardCaution(t *testing.T) {
	f := fixtureFactory(t)
	_, errOut, _ := runPlumb(t, f, "solve testdata/hazard.yaml --format csv")
	if !strings.Contains(errOut, "CAUTION:") || !strings.Contains(errOut, "IEC 62368-1") {
		t.Errorf("CSV output: the caution is not on stderr: %q", errOut)
	}
	f = fixtureFactory(t)
	out, _, _ := runPlumb(t, f, "solve testdata/hazard.yaml")
	// Above 60 V DC the output must defer to IEC 61010-1 / IEC 62368-1
	// (project rule; limits from those standards, from memory).
	if !strings.HasPrefix(out, "CAUTION:") || !strings.Contains(out, "IEC 61010-1") {
		t.Errorf("output does not open with the safety caution:\n%s", out)
	}
}

// TestBOM checks the purchasing list arithmetic: the bought quantity is at
// least placements x stages x (1 + attrition), and the extended price is
// quantity x unit price (common practice for a bill of materials).
func TestBOM(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "bom.csv")
	f := fixtureFactory(t)
	if _, errOut, code := runPlumb(t, f, "solve testdata/diff-g10.yaml --top 1 --bom "+path); code != exitOK {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	recs, err := readCSVFile(path)
	if err != nil {
		t.Fatal(err)
	}
	if strings.Join(recs[0], ",") != strings.Join(bomCSVHeader, ",") {
		t.Fatalf("header %q", recs[0])
	}
	col := map[string]int{}
	for i, h := range recs[0] {
		col[h] = i
	}
	for _, r := range recs[1:] {
		perStage, _ := strconv.Atoi(r[col["quantity_per_stage"]])
		bought, _ := strconv.Atoi(r[col["quantity_bought"]])
		unit, _ := strconv.ParseFloat(r[col["unit_price"]], 64)
		ext, _ := strconv.ParseFloat(r[col["extended_price"]], 64)
		if bought < perStage*100 {
			t.Errorf("%s: bought %d for %d per stage x 100 stages", r[col["part"]], bought, perStage)
		}
		if math.Abs(ext-float64(bought)*unit) > 1e-9*math.Max(1, ext) {
			t.Errorf("%s: extended %g != %d x %g", r[col["part"]], ext, bought, unit)
		}
		if r[col["maker"]] == "" || r[col["source"]] != "fixture" {
			t.Errorf("%s: maker %q, source %q", r[col["part"]], r[col["maker"]], r[col["source"]])
		}
	}

	// plumb bom on a design of the network: one network covers R1..R4.
	f = fixtureFactory(t)
	out, errOut, code := runPlumb(t, f, "bom testdata/design-network.yaml --spec testdata/diff-g10.yaml --format csv")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	recs, err = csv.NewReader(strings.NewReader(out)).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if len(recs) != 3 || recs[1][col["positions"]] != "R1 R2 R3 R4" || recs[1][col["quantity_per_stage"]] != "1" {
		t.Errorf("network BOM = %q", recs)
	}
	// 100 stages of one network at 1.35 EUR (the fixture's only break).
	if recs[1][col["quantity_bought"]] != "100" || recs[1][col["extended_price"]] != "135" {
		t.Errorf("network line = %q, want 100 bought for 135 EUR", recs[1])
	}
}

func TestMan(t *testing.T) {
	dir := t.TempDir()
	f := fixtureFactory(t)
	if _, errOut, code := runPlumb(t, f, "man "+dir); code != exitOK {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	for _, name := range []string{"plumb.1", "plumb-catalog-list.1", "plumb-solve.1", "plumb-series.1"} {
		b, err := os.ReadFile(filepath.Join(dir, name))
		if err != nil {
			t.Errorf("%s: %v", name, err)
			continue
		}
		s := string(b)
		// man(7): a page starts with .TH and has NAME and SYNOPSIS sections.
		if !strings.HasPrefix(s, ".TH ") || !strings.Contains(s, ".SH NAME\n") || !strings.Contains(s, ".SH SYNOPSIS\n") {
			t.Errorf("%s is not a man page:\n%s", name, s)
		}
		if strings.Contains(s, "\n.Example") || strings.Contains(s, "\n'") {
			t.Errorf("%s has a text line read as a roff request", name)
		}
	}
	b, _ := os.ReadFile(filepath.Join(dir, "plumb.1"))
	if !strings.Contains(string(b), "Exit codes") {
		t.Error("plumb.1 does not document the exit codes")
	}
}

func TestCompletion(t *testing.T) {
	for _, sh := range []string{"bash", "zsh", "fish", "powershell"} {
		t.Run(sh, func(t *testing.T) {
			f := fixtureFactory(t)
			out, errOut, code := runPlumb(t, f, "completion "+sh)
			if code != exitOK || !strings.Contains(out, "plumb") {
				t.Errorf("exit %d, %d bytes: %s", code, len(out), errOut)
			}
		})
	}
}

func TestConfigShowSources(t *testing.T) {
	f := fixtureFactory(t)
	cfgDir, _ := f.ConfigDir()
	file := writeConfig(t, cfgDir, "format: csv\ntop: 4\n")
	t.Setenv("PLUMB_TOP", "8")
	out, errOut, code := runPlumb(t, f, "--catalog parts.db config show --format json")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	var got []settingJSON
	if err := json.Unmarshal([]byte(out), &got); err != nil {
		t.Fatal(err)
	}
	want := []settingJSON{
		{Key: "catalog", Value: "parts.db", Source: "flag --catalog"},
		{Key: "format", Value: "json", Source: "flag --format"},
		{Key: "top", Value: "8", Source: "env PLUMB_TOP"},
		{Key: "color", Value: "auto", Source: "default"},
		{Key: "import.currency", Value: "", Source: "default"},
		{Key: "currency.rates", Value: "", Source: "default"},
	}
	_ = file
	if len(got) != len(want) {
		t.Fatalf("got %+v", got)
	}
	for i := range want {
		if got[i] != want[i] {
			t.Errorf("setting %d = %+v, want %+v", i, got[i], want[i])
		}
	}
	// Without the flag, the config file's format applies and is named.
	f = fixtureFactory(t)
	writeConfig(t, mustDir(t, f.ConfigDir), "format: csv\n")
	out, _, _ = runPlumb(t, f, "config show")
	if !strings.Contains(out, "format,csv,config file "+filepath.Join(mustDir(t, f.ConfigDir), "plumb", "plumb.yaml")) {
		t.Errorf("config file source not shown:\n%s", out)
	}
}

func mustDir(t *testing.T, fn func() (string, error)) string {
	t.Helper()
	d, err := fn()
	if err != nil {
		t.Fatal(err)
	}
	return d
}

func TestImport(t *testing.T) {
	dir := t.TempDir()
	db := filepath.Join(dir, "parts.db")
	f := fixtureFactory(t)
	if _, errOut, code := runPlumb(t, f, "catalog init "+db); code != exitOK {
		t.Fatalf("init: exit %d: %s", code, errOut)
	}
	cfg := t.TempDir()
	importOnce := func(args string) (string, string, int) {
		f := fixtureFactory(t)
		f.Catalog = f.openConfigured
		f.ConfigDir = func() (string, error) { return cfg, nil }
		return runPlumb(t, f, "--catalog "+db+" "+args)
	}
	listParts := func() int {
		out, errOut, code := importOnce("catalog list --format json")
		if code != exitOK {
			t.Fatalf("list: exit %d: %s", code, errOut)
		}
		snap, err := catalog.ReadSnapshotJSON(strings.NewReader(out))
		if err != nil {
			t.Fatal(err)
		}
		return len(snap.Resistors) + len(snap.ResistorSeries)
	}

	out, errOut, code := importOnce("import testdata/export.csv --dry-run --format json")
	if code != exitOK {
		t.Fatalf("dry run: exit %d: %s", code, errOut)
	}
	var rep importJSON
	if err := json.Unmarshal([]byte(out), &rep); err != nil {
		t.Fatal(err)
	}
	if !rep.DryRun || rep.Rows != 3 || rep.Skipped != 1 || rep.Imported != 2 {
		t.Errorf("dry run report = %+v; want 3 rows, 1 skipped (4x99), 2 to import", rep)
	}
	if n := listParts(); n != 0 {
		t.Errorf("dry run wrote %d parts", n)
	}
	// The table form of a dry run shows the mapping it guessed and the
	// first rows as parsed, besides the problems.
	out, errOut, code = importOnce("import testdata/export.csv --dry-run")
	if code != exitOK {
		t.Fatalf("dry run table: exit %d: %s", code, errOut)
	}
	for _, want := range []string{"Columns of testdata/export.csv:", "CONFIDENCE", "resistance", "as read:", "Rows to look at:"} {
		if !strings.Contains(out, want) {
			t.Errorf("dry run table lacks %q:\n%s", want, out)
		}
	}

	report := filepath.Join(dir, "rows.csv")
	out, errOut, code = importOnce("import testdata/export.csv --report " + report + " --save-mapping larkwood")
	if code != exitOK {
		t.Fatalf("import: exit %d: %s", code, errOut)
	}
	if !strings.Contains(out, "imported 2 part(s)") || !strings.Contains(out, "export.csv:4") {
		t.Errorf("import table does not name the imported parts and the bad row:\n%s", out)
	}
	if n := listParts(); n != 2 {
		t.Errorf("catalog holds %d parts after the import, want 2", n)
	}
	recs, err := readCSVFile(report)
	if err != nil {
		t.Fatal(err)
	}
	found := false
	for _, r := range recs[1:] {
		if r[1] == "4" && r[4] == "skip" {
			found = true
		}
	}
	if !found {
		t.Errorf("row report does not list line 4 as skipped: %q", recs)
	}
	// The mapping is saved under the config directory and used again.
	if _, err := os.Stat(filepath.Join(cfg, "plumb", "mappings", "larkwood.yaml")); err != nil {
		t.Errorf("mapping not saved: %v", err)
	}
	out, errOut, code = importOnce("import testdata/export.csv --mapping larkwood --format json")
	if code != exitOK {
		t.Fatalf("import with the saved mapping: exit %d: %s", code, errOut)
	}
	if err := json.Unmarshal([]byte(out), &rep); err != nil || rep.Unchanged != 2 {
		t.Errorf("second import = %+v (%v); want the 2 parts unchanged", rep, err)
	}
}

func TestCheck(t *testing.T) {
	f := fixtureFactory(t)
	out, errOut, code := runPlumb(t, f, "check testdata/diff-g10.yaml --design testdata/design-network.yaml --format json")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	var res struct {
		Pass   bool `json:"pass"`
		Limits []struct {
			Name  string  `json:"name"`
			Value float64 `json:"value"`
			Pass  bool    `json:"pass"`
		} `json:"limits"`
	}
	if err := json.Unmarshal([]byte(out), &res); err != nil {
		t.Fatal(err)
	}
	if !res.Pass {
		t.Errorf("network design fails: %s", out)
	}
	for _, l := range res.Limits {
		// A network with ratios held within r = 0.05 % gives a worst-case
		// resistor-limited CMRR of (1+G)/(2r) = 11/0.001 = 11000, 80.8 dB
		// (S. Franco, difference-amplifier chapter; domain notes §2); the
		// amplifier's 100 dB lowers it a little, never below 60 dB here.
		if l.Name == "CMRR" && (l.Value > 80.9 || l.Value < 75) {
			t.Errorf("CMRR %.2f dB, want just under 80.8 dB", l.Value)
		}
	}

	f = fixtureFactory(t)
	_, errOut, code = runPlumb(t, f, "check testdata/impossible.yaml --design testdata/design-network.yaml")
	if code != exitError || !strings.Contains(errOut, "gain drift") || !strings.Contains(errOut, "plumb solve") {
		t.Errorf("failing check: exit %d, stderr %q", code, errOut)
	}
	f = fixtureFactory(t)
	if _, errOut, code = runPlumb(t, f, "check testdata/diff-g10.yaml"); code != exitUsage || !strings.Contains(errOut, "--design") {
		t.Errorf("check without --design: exit %d, %q", code, errOut)
	}
}

// TestHelpExamples runs every line of every command's Example against the
// embedded demo catalog, in a scratch directory, in order (later lines may
// use files earlier lines wrote). Each must exit 0.
func TestHelpExamples(t *testing.T) {
	clearPlumbEnv(t)
	f, _, _ := testFactory(t)
	root := newRootCmd(f)
	var walk func(c *cobra.Command)
	var cmds []*cobra.Command
	walk = func(c *cobra.Command) {
		cmds = append(cmds, c)
		for _, sub := range c.Commands() {
			walk(sub)
		}
	}
	walk(root)
	for _, c := range cmds {
		if !c.Runnable() || c.Name() == "help" {
			continue
		}
		t.Run(c.CommandPath(), func(t *testing.T) {
			if c.Example == "" && c.HasParent() {
				t.Fatalf("%s has no Example", c.CommandPath())
			}
			dir := t.TempDir()
			t.Chdir(dir)
			for _, line := range strings.Split(c.Example, "\n") {
				// Shell redirection is the shell's business, not plumb's.
				cmdline, _, _ := strings.Cut(line, ">")
				fields := strings.Fields(cmdline)
				for len(fields) > 0 && strings.Contains(fields[0], "=") {
					k, v, _ := strings.Cut(fields[0], "=")
					t.Setenv(k, v)
					fields = fields[1:]
				}
				if len(fields) == 0 || fields[0] != "plumb" {
					continue
				}
				f, _, _ := testFactory(t)
				f.ConfigDir = func() (string, error) { return dir, nil }
				_, errOut, code := runPlumb(t, f, strings.Join(fields[1:], " "))
				if code != exitOK {
					t.Errorf("%s: exit %d: %s", line, code, errOut)
				}
			}
		})
	}
}

func TestReport(t *testing.T) {
	dir := t.TempDir()
	html := filepath.Join(dir, "r.html")
	f := fixtureFactory(t)
	if _, errOut, code := runPlumb(t, f, "report testdata/diff-g10.yaml --top 2 -o "+html); code != exitOK {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	b, err := os.ReadFile(html)
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(string(b), "<html") || !strings.Contains(string(b), "fixture-g10") {
		t.Errorf("report is not an HTML page about the spec (%d bytes)", len(b))
	}
	f = fixtureFactory(t)
	if _, errOut, code := runPlumb(t, f, "report testdata/diff-g10.yaml -o "+html); code != exitError || !strings.Contains(errOut, "--force") {
		t.Errorf("overwrite without --force: exit %d, %q", code, errOut)
	}
	md := filepath.Join(dir, "n.md")
	f = fixtureFactory(t)
	if _, errOut, code := runPlumb(t, f, "report testdata/diff-g10.yaml --design testdata/design-network.yaml -o "+md); code != exitOK {
		t.Fatalf("markdown: exit %d: %s", code, errOut)
	}
	if b, err := os.ReadFile(md); err != nil || !strings.Contains(string(b), "HN4-1K-10K") {
		t.Errorf("markdown report lacks the design's network: %v", err)
	}
	for _, bad := range []string{"report testdata/diff-g10.yaml", "report testdata/diff-g10.yaml -o r.pdf",
		"report testdata/diff-g10.yaml --design testdata/design-network.yaml --top 2 -o x.html"} {
		f = fixtureFactory(t)
		if _, errOut, code := runPlumb(t, f, bad); code != exitUsage {
			t.Errorf("%s: exit %d, want %d: %s", bad, code, exitUsage, errOut)
		}
	}
}

func TestCSVHasPlainSpaces(t *testing.T) {
	f := fixtureFactory(t)
	out, _, code := runPlumb(t, f, "catalog list --format csv")
	if code != exitOK {
		t.Fatal(code)
	}
	// The no-break spaces that keep values with their units in tables must
	// not reach CSV, which scripts read.
	if strings.Contains(out, nbsp) {
		t.Errorf("CSV holds no-break spaces:\n%q", out)
	}
	if !strings.Contains(out, "Vos 150 µV") {
		t.Errorf("CSV detail lacks the amplifier's offset:\n%s", out)
	}
}
