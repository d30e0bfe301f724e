package main

import (
	"strings"
	"testing"
)

func TestTable(t *testing.T) {
	long := "a long note that has to be wrapped because the table would not fit otherwise in the terminal width"
	tests := []struct {
		name     string
		terminal bool
		width    int
		header   []string
		rows     [][]string
		right    []int
		want     string
	}{
		{
			name:   "aligned columns, numbers right",
			header: []string{"PART", "VALUE", "NOTE"},
			rows:   [][]string{{"R1", "4.99k", "ok"}, {"R22", "100", ""}},
			right:  []int{1},
			want: "PART  VALUE  NOTE\n" +
				"R1    4.99k  ok\n" +
				"R22     100\n",
		},
		{
			name:   "pipe keeps long text on one line",
			header: []string{"PART", "NOTE"},
			rows:   [][]string{{"R1", long}},
			width:  40,
			want:   "PART  NOTE\nR1    " + long + "\n",
		},
		{
			name:     "terminal wraps the widest column to fit",
			terminal: true,
			width:    40,
			header:   []string{"PART", "NOTE"},
			rows:     [][]string{{"R1", long}},
			want: "PART  NOTE\n" +
				"R1    a long note that has to be wrapped\n" +
				"      because the table would not fit\n" +
				"      otherwise in the terminal width\n",
		},
		{
			name:     "unicode and colour codes count as their visible width",
			terminal: true,
			width:    100,
			header:   []string{"V", "X"},
			rows:     [][]string{{"±0.1 %", "y"}, {"\x1b[32mpass\x1b[0m", "z"}},
			want:     "V       X\n±0.1 %  y\n\x1b[32mpass\x1b[0m    z\n",
		},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			ios, _, _, _ := TestIO()
			ios.SetTerminal(tt.terminal, false)
			ios.width = tt.width
			tb := newTable(ios, tt.header...).alignRight(tt.right...)
			for _, r := range tt.rows {
				tb.row(r...)
			}
			var b strings.Builder
			if err := tb.render(&b); err != nil {
				t.Fatal(err)
			}
			if b.String() != tt.want {
				t.Errorf("got\n%q\nwant\n%q", b.String(), tt.want)
			}
		})
	}
}

func TestWrapText(t *testing.T) {
	tests := []struct {
		name  string
		in    string
		width int
		want  []string
	}{
		{name: "fits", in: "abc def", width: 7, want: []string{"abc def"}},
		{name: "at spaces", in: "abc def ghi", width: 7, want: []string{"abc def", "ghi"}},
		{name: "word longer than the column is cut", in: "abcdefghij k", width: 4, want: []string{"abcd", "efgh", "ij k"}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			got := wrapText(tt.in, tt.width)
			if strings.Join(got, "|") != strings.Join(tt.want, "|") {
				t.Errorf("wrapText(%q, %d) = %q, want %q", tt.in, tt.width, got, tt.want)
			}
		})
	}
}
