package main

import (
	"io"
	"strconv"
	"testing"
)

// BenchmarkTableRender measures a 1000-row catalog table fitted to a
// terminal.
func BenchmarkTableRender(b *testing.B) {
	ios, _, _, _ := TestIO()
	ios.SetTerminal(true, false)
	b.ReportAllocs()
	for b.Loop() {
		t := newTable(ios, partTableHeader...).alignRight(2, 3, 4, 5, 6)
		for i := range 1000 {
			t.row("AR-TP1-"+strconv.Itoa(i), "resistor", "4.99k", "0.1%", "25", "0.065 USD", "9000",
				"Amberlode Resistive, 0603, E96, thin-film, 100 mW, a detail long enough to wrap on a terminal")
		}
		if err := t.render(io.Discard); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkCatalogListDemo runs `plumb catalog list --format json` on the
// embedded demo catalog, in process.
func BenchmarkCatalogListDemo(b *testing.B) {
	b.ReportAllocs()
	for b.Loop() {
		ios, _, out, _ := TestIO()
		f := newFactory(ios)
		root := newRootCmd(f)
		root.SetArgs([]string{"catalog", "list", "--format", "json"})
		if err := root.Execute(); err != nil {
			b.Fatal(err)
		}
		if out.Len() == 0 {
			b.Fatal("no output")
		}
	}
}

// BenchmarkDemo runs `plumb demo` (load the example spec, open the demo
// catalog, search, print) in process.
func BenchmarkDemo(b *testing.B) {
	b.ReportAllocs()
	for b.Loop() {
		ios, _, _, _ := TestIO()
		f := newFactory(ios)
		root := newRootCmd(f)
		root.SetArgs([]string{"demo"})
		if err := root.Execute(); err != nil {
			b.Fatal(err)
		}
	}
}
