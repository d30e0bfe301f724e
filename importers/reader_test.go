package importers

import (
	"io"
	"strings"
	"testing"
)

func TestSniff(t *testing.T) {
	tests := []struct {
		name  string
		text  string
		sep   rune
		comma bool
	}{
		{"comma", "a,b,c\n1,2,3\n", ',', false},
		{"semicolon decimal comma", "a;b;c\nx;0,125;4,99k\n", ';', true},
		{"semicolon decimal point", "a;b;c\nx;0.125;4.99k\n", ';', false},
		// "1,000" is a thousands group, not a decimal comma.
		{"semicolon thousands", "a;b\nx;1,000\ny;0.5\n", ';', false},
		{"tab", "a\tb, c\tc\n1\t2\t3\n", '\t', false},
		{"comma inside quotes", "a;\"b,c,d,e\";f\n1;\"x,y,z,w\";2\n", ';', false},
		{"pipe", "a|b|c\n1|2|3\n", '|', false},
		{"title line above", "Search results, 30 Nov 2026\na;b;c\nx;0,1;2\ny;0,2;3\n", ';', true},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			sh, _ := sniff([]byte(tc.text))
			if sh.Separator != tc.sep || sh.DecimalComma != tc.comma {
				t.Errorf("sniff = %q comma %v, want %q %v", sh.Separator, sh.DecimalComma, tc.sep, tc.comma)
			}
		})
	}
}

func TestReaderQuotedNewlinesAndLines(t *testing.T) {
	text := "\ufeffPart,Description,Value\r\nA,\"two\nlines, and a comma\",1k\r\nB,\"say \"\"hi\"\"\",2k\r\n"
	r, err := NewReader("q.csv", strings.NewReader(text))
	if err != nil {
		t.Fatal(err)
	}
	if r.Header()[0] != "Part" {
		t.Errorf("BOM not dropped: %q", r.Header()[0])
	}
	var lines []int
	var descs []string
	for {
		rec, line, err := r.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatal(err)
		}
		lines = append(lines, line)
		descs = append(descs, rec[1])
	}
	if len(lines) != 2 || lines[0] != 2 || lines[1] != 4 {
		t.Errorf("record lines %v, want [2 4]", lines)
	}
	if descs[0] != "two\nlines, and a comma" || descs[1] != `say "hi"` {
		t.Errorf("fields %q", descs)
	}
}

func TestTitleLinesAboveHeader(t *testing.T) {
	text := "Parametric search export\n\nPart Number;Manufacturer;Resistance\nA-1;Orrin Resistive;4,99k\n"
	r, err := NewReader("t.csv", strings.NewReader(text))
	if err != nil {
		t.Fatal(err)
	}
	if got := strings.Join(r.Header(), "|"); got != "Part Number|Manufacturer|Resistance" || len(r.Preamble) != 1 || r.Preamble[0] != 1 {
		t.Errorf("header %q, preamble %v", got, r.Preamble)
	}
}
