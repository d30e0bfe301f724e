package importers

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// resistorHeader and resistorRow build small resistor exports for the
// hostile-input tests.
const resistorHeader = "Part Number,Manufacturer,Resistance,Tolerance,TCR,Power,Package,Technology,Stock,Price (USD)\n"

func resistorRow(part, maker, stock string) string {
	return part + "," + maker + ",1k,0.1%,25ppm/K,0.1W,0603,thin-film," + stock + ",0.10\n"
}

func writeFile(t *testing.T, name, text string) string {
	t.Helper()
	p := filepath.Join(t.TempDir(), name)
	if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

func problemAt(rep *Report, line int) *Problem {
	for i := range rep.Problems {
		if rep.Problems[i].Line == line && rep.Problems[i].Severity == Skip {
			return &rep.Problems[i]
		}
	}
	return nil
}

func TestHugeStockIsRefusedNotWrapped(t *testing.T) {
	// 19 digits: past what float64 holds exactly, and one more digit past
	// int64 (9223372036854775807 is 2^63 - 1).
	for _, stock := range []string{"9223372036854775807", "9999999999999999999", "1000000000000000"} {
		t.Run(stock, func(t *testing.T) {
			p := writeFile(t, "s.csv", resistorHeader+resistorRow("HS-1", "Orrin Resistive", stock)+resistorRow("HS-2", "Orrin Resistive", "10"))
			b, rep := mustRead(t, p)
			if len(b.Resistors) != 1 || b.Resistors[0].Part != "HS-2" {
				t.Fatalf("kept %+v, want only HS-2", b.Resistors)
			}
			pr := problemAt(rep, 2)
			if pr == nil || pr.Column != "Stock" || !errors.Is(pr.Err, ErrBadValue) || strings.Contains(pr.Reason, "negative") {
				t.Fatalf("line 2: %+v", pr)
			}
		})
	}
}

func TestCarriageReturnLineEnds(t *testing.T) {
	text := strings.ReplaceAll(resistorHeader+resistorRow("CR-1", "Orrin Resistive", "5")+resistorRow("CR-2", "Orrin Resistive", "6"), "\n", "\r")
	b, rep := mustRead(t, writeFile(t, "cr.csv", text))
	if len(b.Resistors) != 2 || b.Resistors[1].Part != "CR-2" || b.Resistors[1].Stock != 6 {
		t.Fatalf("read %+v (%s)", b.Resistors, problemText(rep))
	}
	if !rep.Files[0].Shape.CROnly {
		t.Errorf("shape %+v does not say the lines end with CR", rep.Files[0].Shape)
	}
}

func TestUnclosedQuoteDoesNotSwallowRows(t *testing.T) {
	tests := []struct {
		name string
		bad  string
	}{
		// The quote closes at the next row's first quote, followed by text.
		{"closed by the next quote", `UQ-2,"Orrin Resistive,1k,0.1%,25ppm/K,0.1W,0603,thin-film,5,0.10` + "\n"},
		// The quote closes at the start of the next row's quoted field and a
		// separator follows: one record of the wrong width.
		{"closed before a separator", `UQ-2,Orrin Resistive,"1k,0.1%,25ppm/K,0.1W,0603,thin-film,5,0.10` + "\n"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			text := resistorHeader + resistorRow("UQ-1", "Orrin Resistive", "5") + tc.bad +
				`UQ-3,"Orrin Resistive",1k,0.1%,25ppm/K,0.1W,0603,thin-film,7,0.10` + "\n" +
				`"UQ-4",Orrin Resistive,1k,0.1%,25ppm/K,0.1W,0603,thin-film,8,0.10` + "\n"
			b, rep := mustRead(t, writeFile(t, "q.csv", text))
			var got []string
			for _, r := range b.Resistors {
				got = append(got, r.Part)
			}
			if strings.Join(got, " ") != "UQ-1 UQ-3 UQ-4" {
				t.Errorf("read %v, want UQ-1 UQ-3 UQ-4 (%s)", got, problemText(rep))
			}
			pr := problemAt(rep, 3)
			if pr == nil || !errors.Is(pr.Err, ErrBadQuotes) {
				t.Fatalf("no quote problem on line 3: %s", problemText(rep))
			}
			if rep.Summary.Skipped != 1 {
				t.Errorf("%d rows skipped, want 1: %s", rep.Summary.Skipped, problemText(rep))
			}
		})
	}
}

func TestControlCharactersRefused(t *testing.T) {
	tests := []struct {
		name, part, maker, column string
		char                      string
	}{
		{"escape in the part number", "CC\x1b[31m-1", "Orrin Resistive", "Part Number", "U+001B"},
		{"right-to-left override in the maker", "CC-1", "Orrin \u202eResistive", "Manufacturer", "U+202E"},
		{"zero-width space in the part number", "CC\u200b-1", "Orrin Resistive", "Part Number", "U+200B"},
		{"bell in the maker", "CC-1", "Orrin\aResistive", "Manufacturer", "U+0007"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			p := writeFile(t, "c.csv", resistorHeader+resistorRow("OK-1", "Orrin Resistive", "5")+resistorRow(tc.part, tc.maker, "5"))
			b, rep := mustRead(t, p)
			if len(b.Resistors) != 1 {
				t.Fatalf("kept %d resistors, want only OK-1", len(b.Resistors))
			}
			pr := problemAt(rep, 3)
			if pr == nil || pr.Column != tc.column || !strings.Contains(pr.Reason, tc.char) {
				t.Fatalf("line 3: %+v", pr)
			}
			if strings.ContainsAny(pr.Error(), "\x1b\a\u202e\u200b") {
				t.Errorf("the message prints the character raw: %q", pr.Error())
			}
		})
	}
}

func TestHostileMappings(t *testing.T) {
	dir := t.TempDir()
	tests := []struct {
		name, yaml, want string
	}{
		// Nine levels of nine aliases: 9^7 strings if expanded.
		{"alias bomb", "a: &a [x,x,x,x,x,x,x,x,x]\nb: &b [*a,*a,*a,*a,*a,*a,*a,*a,*a]\nc: &c [*b,*b,*b,*b,*b,*b,*b,*b,*b]\ncolumns: *c\n", "anchors and aliases"},
		{"list where a mapping goes", "columns:\n  - part\n", "line 2, column 3: columns must be key: value lines, not a list"},
		{"list as a header", "columns:\n  part: [A, B]\n", "columns.part must be a single value"},
		{"bad price break", "price_breaks:\n  - column: P\n    min_qty: many\n", "min_qty must be a whole number"},
		{"two documents", "kind: resistor\n---\nkind: network\n", "second YAML document"},
		{"repeated key", "columns:\n  part: A\n  part: B\n", "part is given twice"},
		{"not YAML", "columns: [\n", "not YAML"},
		{"empty", "", "empty"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			p := filepath.Join(dir, strings.ReplaceAll(tc.name, " ", "-")+".yaml")
			if err := os.WriteFile(p, []byte(tc.yaml), 0o644); err != nil {
				t.Fatal(err)
			}
			_, err := LoadMapping(dir, p)
			if !errors.Is(err, ErrMapping) || !strings.Contains(err.Error(), tc.want) {
				t.Fatalf("err = %v, want ErrMapping saying %q", err, tc.want)
			}
			for _, goName := range []string{"importers.", "map[", "!!seq", "!!map", "[]"} {
				if strings.Contains(err.Error(), goName) {
					t.Errorf("message %q shows a Go or YAML type name", err)
				}
			}
		})
	}
}

func TestPlausibility(t *testing.T) {
	const header = "Part Number,Manufacturer,Resistance,Tolerance,TCR,Price (USD)\n"
	tests := []struct {
		name, row, column, want string
		unusual                 bool // kept with --allow-unusual
	}{
		// A unit slip: 50000 ppm/K is 5 %/K; carbon composition, the worst
		// fixed resistor, stays near ±1500 ppm/K (common practice).
		{"tempco slip", "P-1,Orrin,1k,1%,50000ppm/K,0.10", "TCR", "50000 ppm/K", true},
		{"tolerance above 50 %", "P-1,Orrin,1k,60%,100ppm,0.10", "Tolerance", "60 %", true},
		{"resistance 1e308", "P-1,Orrin,1e308,1%,100ppm,0.10", "Resistance", "1e+308 ohm", true},
		{"resistance below 1 mohm", "P-1,Orrin,0.0001,1%,100ppm,0.10", "Resistance", "0.0001 ohm", true},
		{"zero price", "P-1,Orrin,1k,1%,100ppm,0", "Price (USD)", "a unit price of 0 USD from 1 piece: no part is free", true},
		{"negative price", "P-1,Orrin,1k,1%,100ppm,-0.10", "Price (USD)", "", false},
		// 0.001 could be 0.001 % or the fraction 0.001 (0.1 %).
		{"bare tolerance", "P-1,Orrin,1k,0.001,100ppm,0.10", "Tolerance", "ambiguous", false},
		// Zero is zero in % and as a fraction: not ambiguous, and no grade.
		{"bare zero tolerance", "P-1,Orrin,1k,0,100ppm,0.10", "Tolerance", "a tolerance of 0 is no resistor's grade", false},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			p := writeFile(t, "p.csv", header+tc.row+"\n")
			b, rep := mustRead(t, p)
			pr := problemAt(rep, 2)
			if len(b.Resistors) != 0 || pr == nil || pr.Column != tc.column || !strings.Contains(pr.Reason, tc.want) {
				t.Fatalf("kept %d; problem %+v", len(b.Resistors), pr)
			}
			b, rep, err := Read(t.Context(), []string{p}, Options{AllowUnusual: true})
			if err != nil {
				t.Fatal(err)
			}
			if kept := len(b.Resistors) == 1; kept != tc.unusual {
				t.Errorf("--allow-unusual kept it: %v, want %v (%s)", kept, tc.unusual, problemText(rep))
			}
			if tc.unusual && rep.Count(Doubt) == 0 {
				t.Errorf("kept without a flag: %s", problemText(rep))
			}
		})
	}
	// The header or the mapping says how to read a bare tolerance.
	for _, tc := range []struct {
		header string
		units  map[Field]string
		want   float64
	}{
		{"Tolerance (%)", nil, 0.00001},
		{"Tolerance", map[Field]string{FieldTolerance: "%"}, 0.00001},
		{"Tolerance", map[Field]string{FieldTolerance: unitFraction}, 0.001},
	} {
		p := writeFile(t, "b.csv", strings.Replace(header, "Tolerance", tc.header, 1)+"P-2,Orrin,1k,0.001,100ppm,0.10\n")
		var m *Mapping
		if tc.units != nil {
			g, err := GuessMapping(strings.Split(strings.TrimSpace(header), ","), "")
			if err != nil {
				t.Fatal(err)
			}
			g.Units = tc.units
			m = g
		}
		b, rep, err := Read(t.Context(), []string{p}, Options{Mapping: m})
		if err != nil {
			t.Fatal(err)
		}
		if len(b.Resistors) != 1 || !near(b.Resistors[0].Tolerance, tc.want) {
			t.Errorf("%s %v: %+v %s", tc.header, tc.units, b.Resistors, problemText(rep))
		}
	}
}
