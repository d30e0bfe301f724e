package importers

import (
	"bytes"
	"context"
	"errors"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"
	"time"

	"plumb/catalog"
	"plumb/catalog/eseries"
)

var testNow = time.Date(2026, 11, 30, 12, 0, 0, 0, time.UTC)

// fourShapes are exports of the same 17 resistors: different header words
// and column orders, ',' ';' and tab, decimal comma, UTF-8 BOM, CRLF,
// quoted fields with embedded separators, quotes and newlines, one column
// per price break or one packed column, values missing from their column
// but given in the description.
var fourShapes = []string{
	"testdata/resistors_a.csv",
	"testdata/resistors_b.csv",
	"testdata/resistors_c.tsv",
	"testdata/resistors_d.csv",
}

func mustRead(t *testing.T, files ...string) (*Batch, *Report) {
	t.Helper()
	b, rep, err := Read(context.Background(), files, Options{Source: "test", Now: testNow})
	if err != nil {
		t.Fatalf("Read(%v): %v", files, err)
	}
	return b, rep
}

func TestFourShapesGiveTheSameParts(t *testing.T) {
	want, _ := mustRead(t, fourShapes[0])
	// 12 rows of one E12 decade fold into a series; 5 stay single.
	if len(want.Resistors) != 5 || len(want.Series) != 1 {
		t.Fatalf("%s: %d resistors and %d series, want 5 and 1", fourShapes[0], len(want.Resistors), len(want.Series))
	}
	for _, f := range fourShapes[1:] {
		t.Run(filepath.Base(f), func(t *testing.T) {
			got, rep := mustRead(t, f)
			if rep.Count(Skip) != 0 || rep.Count(Doubt) != 0 {
				t.Errorf("problems: %+v", rep.Problems)
			}
			got.origin, want.origin = nil, nil
			if !catalog.SameFigures(got, want) {
				for i := range want.Resistors {
					if i < len(got.Resistors) && !catalog.SameFigures(got.Resistors[i], want.Resistors[i]) {
						t.Errorf("resistor %d:\n got %+v\nwant %+v", i, got.Resistors[i], want.Resistors[i])
					}
				}
				t.Errorf("batches differ:\n got %+v\nwant %+v", got.Series, want.Series)
			}
		})
	}
}

func usd(q int, p float64) catalog.PriceBreak {
	return catalog.PriceBreak{MinQty: q, UnitPrice: p, Currency: "USD"}
}

func findResistor(t *testing.T, b *Batch, part string) catalog.Resistor {
	t.Helper()
	for _, r := range b.Resistors {
		if r.Part == part {
			return r
		}
	}
	t.Fatalf("no resistor %s", part)
	return catalog.Resistor{}
}

func TestResistorFiguresAgainstTheTrade(t *testing.T) {
	b, _ := mustRead(t, "testdata/resistors_b.csv")
	tests := []struct {
		name, part string
		ohm, tol   float64
		tcr, power float64
		stock      int
		breaks     []catalog.PriceBreak
	}{
		// "4K99" is the letter-for-decimal-point code of IEC 60062 (from
		// memory): 4.99 kΩ. 1/8 W is 0.125 W; "12 345" is 12345 pieces.
		{"RKM code and decimal comma", "QP0805F4K99", 4990, 0.01, 100, 0.125, 12345,
			[]catalog.PriceBreak{usd(1, 0.10), usd(100, 0.045), usd(1000, 0.021)}},
		// "0R1" is 0.1 Ω in the same code (IEC 60062, from memory).
		{"R as decimal point", "KSM1206-0R10-F", 0.1, 0.01, 75, 0.5, 2500,
			[]catalog.PriceBreak{usd(1, 0.55), usd(10, 0.41), usd(100, 0.29), usd(1000, 0.2)}},
		// "2M2" is 2.2 MΩ; blank stock is unknown (-1), not zero.
		{"mega and blank stock", "QP0603F2M20", 2.2e6, 0.01, 100, 0.1, -1, []catalog.PriceBreak{usd(1, 0.10)}},
		// ±0.05 % is a fraction of 5e-4.
		{"fine tolerance", "TFA0805-49K9-A10", 49900, 0.0005, 10, 0.125, 740,
			[]catalog.PriceBreak{usd(1, 1.25), usd(100, 0.83), usd(1000, 0.61)}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			r := findResistor(t, b, tc.part)
			if math.Abs(r.ValueOhm-tc.ohm) > 1e-9*tc.ohm || math.Abs(r.Tolerance-tc.tol) > 1e-12 ||
				r.TCR != tc.tcr || math.Abs(r.PowerW-tc.power) > 1e-12 || r.Stock != tc.stock {
				t.Errorf("%s: got %g Ω ±%g %g ppm/K %g W stock %d", tc.part, r.ValueOhm, r.Tolerance, r.TCR, r.PowerW, r.Stock)
			}
			if !reflect.DeepEqual(r.PriceBreaks, tc.breaks) {
				t.Errorf("%s: breaks %v, want %v", tc.part, r.PriceBreaks, tc.breaks)
			}
		})
	}
}

func TestSeriesGrouping(t *testing.T) {
	b, rep := mustRead(t, "testdata/resistors_a.csv")
	if len(b.Series) != 1 {
		t.Fatalf("%d series, want 1: %+v", len(b.Series), b.Series)
	}
	s := b.Series[0]
	// The E12 decade of IEC 60063: 1.0 1.2 1.5 1.8 2.2 2.7 3.3 3.9 4.7 5.6
	// 6.8 8.2 (domain notes §6, from memory).
	if s.ESeries != "E12" || s.MinOhm != 1000 || s.MaxOhm != 8200 {
		t.Errorf("series %s %g..%g, want E12 1000..8200", s.ESeries, s.MinOhm, s.MaxOhm)
	}
	if got := eseries.E12.Values(s.MinOhm, s.MaxOhm); len(got) != 12 {
		t.Errorf("E12 from 1k to 8.2k has %d values, want 12", len(got))
	}
	// The series part numbers are the rows' own: stem + "-" + value code.
	if s.Part != "TFA0603B25" || s.PartNumber(4700) != "TFA0603B25-4K70" {
		t.Errorf("series part %q, value part %q", s.Part, s.PartNumber(4700))
	}
	// Stock runs 1000, 1037, ... 1407 over the 12 values; a series holds
	// one figure per value, so it keeps the least.
	if s.Stock != 1000 {
		t.Errorf("series stock %d, want 1000", s.Stock)
	}
	text := problemText(rep)
	if !strings.Contains(text, "grouped as series TFA0603B25") || !strings.Contains(text, "from 1000 to 1407") {
		t.Errorf("the report does not say what was grouped: %s", text)
	}
	for _, r := range b.Resistors {
		if strings.HasPrefix(r.Part, "TFA0603B25-") {
			t.Errorf("grouped row %s also kept as a single resistor", r.Part)
		}
	}
}

func TestNoSeriesWithoutSeriesPartNumbers(t *testing.T) {
	dir := t.TempDir()
	f := filepath.Join(dir, "e6.csv")
	var sb strings.Builder
	sb.WriteString("Part Number,Manufacturer,Resistance,Tolerance,TCR,Power,Package,Technology,Price\n")
	for _, v := range []string{"10", "15", "22", "33", "47", "68"} {
		sb.WriteString("ODD" + v + "X,Orrin Resistive," + v + "R,1%,100ppm,1/4W,1206,thick film,$0.01\n")
	}
	if err := os.WriteFile(f, []byte(sb.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	b, rep := mustRead(t, f)
	if len(b.Series) != 0 || len(b.Resistors) != 6 {
		t.Errorf("%d series, %d resistors; want 0 and 6", len(b.Series), len(b.Resistors))
	}
	if !strings.Contains(problemText(rep), "kept as single resistors") {
		t.Errorf("report does not say why no series: %s", problemText(rep))
	}
}

func problemText(rep *Report) string {
	var b bytes.Buffer
	_ = rep.WriteCSV(&b)
	return b.String()
}

func TestValuesFromTheDescription(t *testing.T) {
	b, rep := mustRead(t, "testdata/resistors_d.csv")
	// Line 5 has no resistance; its description says 1K8. Only with 1800 Ω
	// read does the E12 decade stay whole and fold into one series.
	if len(b.Series) != 1 || len(rep.Files[0].Groups) != 1 || rep.Files[0].Groups[0].Values != 12 {
		t.Fatalf("series %+v", rep.Files[0].Groups)
	}
	var found bool
	for _, p := range rep.Problems {
		if p.Part == "TFA0603B25-1K80" && p.Severity == Info && p.Line == 5 && p.Column == "Ohms" && strings.Contains(p.Reason, "description") {
			found = true
		}
	}
	if !found {
		t.Errorf("no info line for the resistance taken from the description: %s", problemText(rep))
	}
}

func TestDescribe(t *testing.T) {
	tests := []struct {
		name, desc string
		comma      bool
		ohm, tol   float64
		tcr, power float64
		pkg        string
	}{
		{"distributor order", "RES 4.99K OHM 0.1% 1/10W 25PPM 0603", false, 4990, 0.001, 25, 0.1, "0603"},
		{"RKM and per-kelvin", "Thin film 4K99 ±0.1% ±25ppm/K 0.1W 0805", false, 4990, 0.001, 25, 0.1, "0805"},
		{"decimal comma", "RES 4,99K OHM 0,1% 0,1W 25PPM 0603", true, 4990, 0.001, 25, 0.1, "0603"},
		// a bare number is never read as ohms: 0603 is a size, 1000 a count.
		{"bare numbers ignored", "REEL OF 1000, 0603", false, 0, 0, 0, 0, "0603"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			d := describe(tc.desc, tc.comma)
			if math.Abs(d.resistance-tc.ohm) > 1e-9 || math.Abs(d.tolerance-tc.tol) > 1e-12 || d.tcr != tc.tcr ||
				math.Abs(d.power-tc.power) > 1e-12 || d.pkg != tc.pkg {
				t.Errorf("describe(%q) = %g Ω %g %g ppm %g W %q", tc.desc, d.resistance, d.tolerance, d.tcr, d.power, d.pkg)
			}
		})
	}
}

func TestDescriptionDisagreesWithColumn(t *testing.T) {
	dir := t.TempDir()
	f := filepath.Join(dir, "mixed.csv")
	csv := "Part Number,Manufacturer,Description,Resistance,Tolerance,TCR,Price\n" +
		"X-1,Orrin Resistive,RES 4K99 1% 100PPM 1/10W 0603 thick film,4.99k,0.1%,100ppm,$0.10\n"
	if err := os.WriteFile(f, []byte(csv), 0o644); err != nil {
		t.Fatal(err)
	}
	b, rep := mustRead(t, f)
	if b.Resistors[0].Tolerance != 0.001 {
		t.Errorf("tolerance %g: the column must win", b.Resistors[0].Tolerance)
	}
	if rep.Count(Doubt) == 0 || !strings.Contains(problemText(rep), "the description says") {
		t.Errorf("no doubt raised for the disagreement: %s", problemText(rep))
	}
}

func TestNetworks(t *testing.T) {
	b, rep := mustRead(t, "testdata/networks.csv")
	if len(b.Networks) != 3 {
		t.Fatalf("%d networks, want 3: %s", len(b.Networks), problemText(rep))
	}
	tests := []struct {
		name      string
		i         int
		values    []float64
		ratio     float64
		tracking  float64
		doubtLine int
	}{
		{"count times one value", 0, []float64{1e4, 1e4, 1e4, 1e4}, 0.0002, 2, 0},
		{"groups of values", 1, []float64{1e3, 1e3, 1e4, 1e4}, 0.0005, 5, 0},
		// No tracking figure: unknown in the catalog (the solve takes it as
		// 2 x TCR, optimize/assume).
		{"tracking not given", 2, []float64{1e5, 1e5}, 0.001, math.NaN(), 0},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			n := b.Networks[tc.i]
			if !reflect.DeepEqual(n.Values, tc.values) || math.Abs(n.RatioTolerance-tc.ratio) > 1e-12 || !catalog.SameFigures(n.TCRTracking, tc.tracking) {
				t.Errorf("%s: values %v ratio %g tracking %g", n.Part, n.Values, n.RatioTolerance, n.TCRTracking)
			}
			if tc.doubtLine > 0 {
				ok := false
				for _, p := range rep.Problems {
					ok = ok || p.Line == tc.doubtLine && p.Severity == Doubt && p.Column == "TCR Tracking"
				}
				if !ok {
					t.Errorf("no doubt reported for the assumed tracking: %s", problemText(rep))
				}
			}
		})
	}
}

func TestAmplifiers(t *testing.T) {
	b, rep := mustRead(t, "testdata/amplifiers.csv")
	if len(b.Amplifiers) != 3 {
		t.Fatalf("%d amplifiers: %s", len(b.Amplifiers), problemText(rep))
	}
	a, c := b.Amplifiers[0], b.Amplifiers[1]
	tests := []struct {
		name      string
		got, want float64
	}{
		// 120 dB is a voltage ratio of 10^(120/20) = 1e6 (definition of the
		// decibel for field quantities, IEC 60027-3, from memory).
		{"open-loop gain from dB", a.AolVV, 1e6},
		// 1000 V/mV is 1e6 V/V.
		{"open-loop gain in V/mV", c.AolVV, 1e6},
		{"offset from header unit µV", a.VosV, 25e-6},
		{"drift µV/°C is V/K", a.VosDriftVK, 0.3e-6},
		{"slew V/µs", a.SlewVs, 2.5e6},
		{"GBW MHz", a.GBWHz, 10e6},
		{"noise nV/√Hz", a.NoiseVHz, 8e-9},
		{"bias current", a.IbA, 2e-9},
		{"quiescent mA", a.IqA, 1.1e-3},
		// ±18 V supplies span 36 V (the catalog holds the span).
		{"split supply is a span", c.SupplyMaxV, 36},
		{"rail-to-rail in/out", a.CMPosV + a.CMNegV + a.SwingNegV + a.SwingPosV, 0},
		{"rail-to-rail out only: input headroom", c.CMPosV, defaultHeadroomV},
		{"rail-to-rail out only: swing", c.SwingPosV, 0},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if math.Abs(tc.got-tc.want) > 1e-9*math.Abs(tc.want)+1e-300 {
				t.Errorf("got %g, want %g", tc.got, tc.want)
			}
		})
	}
	if len(a.TypicalOnly) != 0 {
		t.Errorf("max figures flagged typical: %v", a.TypicalOnly)
	}
}

func TestTypicalOnlyFigures(t *testing.T) {
	b, rep := mustRead(t, "testdata/amplifiers_typ.csv")
	a := b.Amplifiers[0]
	want := []string{"vos_v", "vos_drift_v_per_k", "ib_a"} // header "(typ)" twice, cell "1 pA typ" once
	if !reflect.DeepEqual(a.TypicalOnly, want) {
		t.Errorf("TypicalOnly = %v, want %v", a.TypicalOnly, want)
	}
	if a.VosV != 0.5e-3 || a.IbA != 1e-12 {
		t.Errorf("vos %g ib %g", a.VosV, a.IbA)
	}
	if !strings.Contains(problemText(rep), "worst-case budget needs maximums") {
		t.Errorf("report does not warn about typical figures: %s", problemText(rep))
	}
}

func TestBadRows(t *testing.T) {
	b, rep := mustRead(t, "testdata/bad_rows.csv")
	if len(b.Resistors) != 1 || b.Resistors[0].Part != "BR-008" || b.Resistors[0].Stock != 12345 {
		t.Fatalf("kept %+v, want only BR-008 with stock 12345", b.Resistors)
	}
	tests := []struct {
		name   string
		line   int
		column string
		raw    string
		err    error
	}{
		{"unreadable resistance", 2, "Resistance", "4x99", ErrBadValue},
		{"unquoted comma shifts columns", 3, "", "", ErrRagged},
		{"blank tolerance", 4, "Tolerance", "", ErrMissingValue},
		{"text in stock", 5, "Stock", "lots", ErrBadValue},
		{"short row", 6, "", "", ErrRagged},
		{"no part number", 7, "Part Number", "", ErrMissingValue},
		{"two prices for one quantity", 8, "Price", "1:0.10; 1:0.09", ErrBadValue},
		{"repeated part", 10, "Part Number", "BR-008", ErrDuplicate},
		{"stray quote", 11, "", "", ErrBadQuotes},
		{"zero ohm", 12, "Resistance", "0R", ErrBadValue},
	}
	if rep.Summary.Rows != 11 || rep.Summary.Skipped != len(tests) {
		t.Errorf("summary %+v, want 11 rows, %d skipped", rep.Summary, len(tests))
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			for _, p := range rep.Problems {
				if p.Line != tc.line || p.Severity != Skip {
					continue
				}
				if p.File != "testdata/bad_rows.csv" || p.Column != tc.column || tc.raw != "" && p.Raw != tc.raw || tc.err != nil && !errors.Is(p.Err, tc.err) {
					t.Errorf("line %d: %+v", tc.line, p)
				}
				return
			}
			t.Errorf("no skip reported for line %d: %s", tc.line, problemText(rep))
		})
	}
}

func TestBadFiles(t *testing.T) {
	dir := t.TempDir()
	wide := filepath.Join(dir, "wide.csv")
	// 10^6 columns in the header.
	if err := os.WriteFile(wide, []byte(strings.Repeat("c,", 1_000_000)+"\n1\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	long := filepath.Join(dir, "unclosed.csv")
	if err := os.WriteFile(long, []byte("Part Number,Resistance,Tolerance\nA,\""+strings.Repeat("x\n", MaxRecordBytes)+"\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	u16 := filepath.Join(dir, "utf16.csv")
	var u16text []byte
	for _, c := range []byte("Part Number,Resistance\nA,1k\n") {
		u16text = append(u16text, c, 0)
	}
	if err := os.WriteFile(u16, u16text, 0o644); err != nil {
		t.Fatal(err)
	}
	noPart := filepath.Join(dir, "nopart.csv")
	if err := os.WriteFile(noPart, []byte("Resistance,Tolerance\n1k,1%\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	tests := []struct {
		name, file string
		err        error
	}{
		{"binary", "testdata/binary.csv", ErrNotCSV},
		{"UTF-16 without BOM", u16, ErrNotCSV},
		{"empty", "testdata/empty.csv", ErrEmpty},
		{"blank lines only", "testdata/blank.csv", ErrEmpty},
		{"header without rows", "testdata/header_only.csv", ErrNoRows},
		{"a million columns", wide, ErrTooManyColumns},
		{"unclosed quote", long, ErrRecordTooLong},
		{"no part number column", noPart, ErrMissingColumn},
		{"missing file", filepath.Join(dir, "absent.csv"), os.ErrNotExist},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			_, _, err := Read(context.Background(), []string{tc.file}, Options{})
			if !errors.Is(err, tc.err) {
				t.Fatalf("Read(%s) = %v, want %v", tc.file, err, tc.err)
			}
			if !strings.Contains(err.Error(), tc.file) {
				t.Errorf("error %q does not name the file", err)
			}
			if tc.file == u16 && !strings.Contains(err.Error(), "UTF-16") {
				t.Errorf("error %q does not say what the file is", err)
			}
		})
	}
}

func TestEncodings(t *testing.T) {
	dir := t.TempDir()
	// "±" and "°" in Windows-1252 are 0xB1 and 0xB0 (the code page's
	// published table, from memory).
	cp := []byte("Part Number,Manufacturer,Description,Resistance,Tolerance,TCR,Price\nW-1,Orrin Resistive,thin film 0603 0.1W,10k,\xb10.1%,\xb125ppm/\xb0C,$0.10\n")
	u16 := []byte{0xFF, 0xFE}
	for _, r := range "Part Number\tManufacturer\tDescription\tResistance\tTolerance\tTCR\tPrice\r\nW-1\tOrrin Resistive\tthin film 0603 0.1W\t10k\t±0.1%\t25ppm/K\t$0.10\r\n" {
		u16 = append(u16, byte(r), byte(r>>8))
	}
	tests := []struct {
		name string
		data []byte
		enc  string
	}{
		{"Windows-1252", cp, "Windows-1252"},
		{"UTF-16LE tab text", u16, "UTF-16"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			f := filepath.Join(dir, tc.name+".csv")
			if err := os.WriteFile(f, tc.data, 0o644); err != nil {
				t.Fatal(err)
			}
			b, rep := mustRead(t, f)
			if len(b.Resistors) != 1 || b.Resistors[0].Tolerance != 0.001 || b.Resistors[0].TCR != 25 {
				t.Fatalf("got %+v; %s", b.Resistors, problemText(rep))
			}
			if rep.Files[0].Shape.Encoding != tc.enc {
				t.Errorf("encoding %q, want %q", rep.Files[0].Shape.Encoding, tc.enc)
			}
		})
	}
}

func TestToleranceForms(t *testing.T) {
	tests := []struct {
		name, in string
		want     float64
	}{
		{"percent sign", "±0.1%", 0.001},
		{"bare number is percent", "0.1", 0.001},
		{"ppm", "500ppm", 0.0005},
		// Tolerance code letters of IEC 60062 (from memory): F = ±1 %,
		// B = ±0.1 %, J = ±5 %.
		{"letter F", "F", 0.01},
		{"letter b", "b", 0.001},
		{"letter J", "J", 0.05},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got, err := parseTolerance(tc.in)
			if err != nil || math.Abs(got-tc.want) > 1e-15 {
				t.Errorf("parseTolerance(%q) = %g, %v; want %g", tc.in, got, err, tc.want)
			}
		})
	}
	if _, err := parseTolerance("Q"); err == nil {
		t.Error("an unknown letter must be refused")
	}
}

func TestHeaderUnits(t *testing.T) {
	f := filepath.Join(t.TempDir(), "units.csv")
	text := "Part Number,Manufacturer,Resistance (Ω),Tolerance (±%),TCR (±ppm/°C),Power (rating),Package,Technology\n" +
		"X-1,Orrin Resistive,4990,0.1,25,0.125,0603,thin film\n"
	if err := os.WriteFile(f, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	b, rep := mustRead(t, f)
	if len(b.Resistors) != 1 {
		t.Fatalf("no part: %s", problemText(rep))
	}
	r := b.Resistors[0]
	if r.ValueOhm != 4990 || r.Tolerance != 0.001 || r.TCR != 25 || r.PowerW != 0.125 {
		t.Errorf("got %g Ω %g %g ppm/K %g W", r.ValueOhm, r.Tolerance, r.TCR, r.PowerW)
	}
	// "(rating)" is no unit: the bare number is read, and the report says so.
	var doubt bool
	for _, p := range rep.Problems {
		doubt = doubt || p.Severity == Doubt && p.Column == "Power (rating)" && p.Raw == "0.125"
	}
	if !doubt {
		t.Errorf("no doubt for the unreadable header unit: %s", problemText(rep))
	}
}

func TestMatchedAmplifier(t *testing.T) {
	b, rep := mustRead(t, "testdata/amplifiers_matched.csv")
	if len(b.Amplifiers) != 1 {
		t.Fatalf("no amplifier: %s", problemText(rep))
	}
	a := b.Amplifiers[0]
	// 86 dB CMRR and ±0.02 % gain error are read as written; 110 dB open-loop
	// gain is 10^(110/20) V/V (definition of the decibel).
	if a.Type != catalog.MatchedAmp || !reflect.DeepEqual(a.Gains, []float64{1, 2, 0.5}) || a.GainErrorMax != 0.0002 ||
		a.GainDriftPPM != 1 || a.CMRRdB != 86 || math.Abs(a.AolVV-math.Pow(10, 5.5)) > 1e-6 {
		t.Errorf("got %+v", a)
	}
}

func TestKindOption(t *testing.T) {
	if _, _, err := Read(context.Background(), []string{"testdata/networks.csv"}, Options{Kind: "capacitor"}); !errors.Is(err, ErrUnknownKind) {
		t.Errorf("unknown kind: %v", err)
	}
	// A kind given is used as it is.
	b, _, err := Read(context.Background(), []string{"testdata/networks.csv"}, Options{Kind: catalog.KindNetwork})
	if err != nil || len(b.Networks) != 3 {
		t.Errorf("forced network kind: %v, %d networks", err, len(b.Networks))
	}
}

// TestToleranceColumnRequired: a resistor file with no column, fixed value
// or description to read the tolerance from is refused once, naming the
// column to map, instead of skipping every row for it.
func TestToleranceColumnRequired(t *testing.T) {
	fixed, err := LoadMapping("", "testdata/mappings/fixed_tolerance.yaml")
	if err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		name, file string
		mapping    *Mapping
		err        error
		parts      int
	}{
		{"no tolerance anywhere", "testdata/exports/res_no_tolerance.csv", nil, ErrMissingColumn, 0},
		{"tolerance in the description", "testdata/exports/res_tolerance_in_description.csv", nil, nil, 1},
		{"fixed tolerance in the mapping", "testdata/exports/res_no_tolerance.csv", fixed, nil, 2},
	} {
		t.Run(tc.name, func(t *testing.T) {
			b, rep, err := Read(context.Background(), []string{tc.file}, Options{Mapping: tc.mapping})
			if !errors.Is(err, tc.err) {
				t.Fatalf("Read(%s) = %v, want %v", tc.file, err, tc.err)
			}
			if err != nil {
				for _, want := range []string{tc.file, "tolerance", "columns: tolerance", "fixed: tolerance"} {
					if !strings.Contains(err.Error(), want) {
						t.Errorf("error %q does not say %q", err, want)
					}
				}
				return
			}
			if len(b.Resistors) != tc.parts {
				t.Errorf("%d resistors, want %d:\n%s", len(b.Resistors), tc.parts, problemText(rep))
			}
		})
	}
}
