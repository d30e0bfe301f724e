package cost

import (
	"bytes"
	"errors"
	"os"
	"strings"
	"testing"

	"plumb/catalog"
	"plumb/optimize/spec"
)

// fixtureLookup finds parts in testdata/catalog.json (invented makers and
// prices).
func fixtureLookup(t testing.TB) spec.Lookup {
	t.Helper()
	data, err := os.ReadFile("testdata/catalog.json")
	if err != nil {
		t.Fatal(err)
	}
	snap, err := catalog.ReadSnapshotJSON(bytes.NewReader(data))
	if err == nil {
		var l spec.Lookup
		if l, err = spec.SnapshotLookup(snap); err == nil {
			return l
		}
	}
	t.Fatal(err)
	return nil
}

// networkYAML is testdata/network.yaml: R1..R4 on elements 1..4 of
// TN4-1K10K with op-amp PL-1.
func networkYAML(t testing.TB) string {
	t.Helper()
	data, err := os.ReadFile("testdata/network.yaml")
	if err != nil {
		t.Fatal(err)
	}
	return string(data)
}

func design(t testing.TB, yaml string) *spec.Design {
	t.Helper()
	d, err := spec.ParseDesign([]byte(yaml), "test.yaml")
	if err != nil {
		t.Fatal(err)
	}
	return d
}

// wantLine is the part of a BOM line a case checks.
type wantLine struct {
	part      string
	positions string
	perStage  int
	needed    int
	bought    int
	breakQty  int
	unit      float64
	extended  float64
	short     bool
}

// Every expected figure below is common practice BOM arithmetic worked on
// paper from the fixture catalog: needed = ceil(per stage x stages x
// (1 + attrition)); bought is raised to the first break and up to a
// higher break when that costs less; extended = bought x unit price.
func TestDesignBOM(t *testing.T) {
	const discrete = `family: difference
positions:
  R1: {part: OR-1K00}
  R2: {part: OR-4K99}
  R3: {part: OR-1K00}
  R4: {series: [{part: OR-4K99}, {value: 10, tolerance: 1%, tcr: 100ppm/K}]}
amplifier: {part: PL-1}
`
	network := networkYAML(t)
	inamp := func(amp string) string {
		s := "family: inamp\npositions:\n"
		for _, p := range []string{"Rf1", "Rg", "Rf2", "R1", "R2", "R3", "R4"} {
			s += "  " + p + ": {value: 10k, tolerance: 0.1%, tcr: 25ppm/K}\n"
		}
		return s + "amplifier: {part: " + amp + "}\n"
	}
	inampInline := []string{"R1", "R2", "R3", "R4", "Rf1", "Rf2", "Rg"}
	const divider = `family: divider
positions:
  Rtop: {value: 90k, tolerance: 0.1%, tcr: 25ppm/K}
  Rbot: {value: 10k, tolerance: 0.1%, tcr: 25ppm/K}
`
	tests := []struct {
		name     string
		yaml     string
		build    Build
		lines    []wantLine
		unpriced []string
		parts    float64
		assembly float64
	}{
		{
			// OR-1K00 at R1, R3: ceil(200 x 1.02) = 204; 204 x 0.08 = 16.32
			//   against 500 x 0.03 = 15.00, so 500 at the 500 break.
			// OR-4K99 at R2, R4.a: 204 x 0.05 = 10.20 against
			//   1000 x 0.01 = 10.00, so 1000.
			// PL-1: ceil(100 x 1.02) = 102 x 1.50 = 153.00.
			// Parts 178.00; 5 placements x 100 x 0.01 = 5.00 and 3 line
			// items x 1.00 = 3.00: assembly 8.00, total 186.00.
			name: "discrete difference, buy-up and attrition", yaml: discrete,
			build: Build{Quantity: 100, Attrition: 0.02, PerPlacement: 0.01, PerLineItem: 1},
			lines: []wantLine{
				{"OR-1K00", "R1 R3", 2, 204, 500, 500, 0.03, 15, false},
				{"OR-4K99", "R2 R4.a", 2, 204, 1000, 1000, 0.01, 10, false},
				{"PL-1", "U1", 1, 102, 102, 100, 1.50, 153, false},
			},
			unpriced: []string{"R4.b"}, parts: 178, assembly: 8,
		},
		{
			// One network covers R1..R4: 100 at 0.90 = 90; PL-1 100 x 1.50.
			name: "network is one piece for four positions", yaml: network, build: Build{Quantity: 100},
			lines: []wantLine{
				{"TN4-1K10K", "R1 R2 R3 R4", 1, 100, 100, 100, 0.90, 90, false},
				{"PL-1", "U1", 1, 100, 100, 100, 1.50, 150, false},
			},
			parts: 240,
		},
		{
			// Element 1 at R1 and R3 needs two networks per stage: 2 x 1.20.
			name: "network element used twice", build: Build{Quantity: 1},
			yaml: strings.Replace(network, "R3: {network: TN4-1K10K, element: 3}", "R3: {network: TN4-1K10K, element: 1}", 1),
			lines: []wantLine{
				{"TN4-1K10K", "R1 R2 R3 R4", 2, 2, 2, 1, 1.20, 2.40, false},
				{"PL-1", "U1", 1, 1, 1, 1, 2.00, 2.00, false},
			},
			parts: 4.40,
		},
		{
			// Three op-amps in single packages: 30 x 2.00 = 60 (100 x 1.50
			// = 150 is dearer).
			name: "in-amp on a single op-amp", yaml: inamp("PL-1"), build: Build{Quantity: 10},
			lines:    []wantLine{{"PL-1", "U1 U2 U3", 3, 30, 30, 1, 2.00, 60, false}},
			unpriced: inampInline, parts: 60,
		},
		{
			// ceil(3/2) = 2 duals per stage: 20 x 3.00.
			name: "in-amp on a dual", yaml: inamp("PL-2"), build: Build{Quantity: 10},
			lines:    []wantLine{{"PL-2", "U1 U2", 2, 20, 20, 1, 3.00, 60, false}},
			unpriced: inampInline, parts: 60,
		},
		{
			// ceil(3/4) = 1 quad per stage: 10 x 4.00.
			name: "in-amp on a quad", yaml: inamp("PL-4"), build: Build{Quantity: 10},
			lines:    []wantLine{{"PL-4", "U1", 1, 10, 10, 1, 4.00, 40, false}},
			unpriced: inampInline, parts: 40,
		},
		{
			name: "matched amplifier", yaml: "family: matched\namplifier: {part: PL-D10, gain: 10}\n", build: Build{Quantity: 3},
			lines: []wantLine{{"PL-D10", "U1", 1, 3, 3, 1, 3.80, 11.40, false}},
			parts: 11.40,
		},
		{
			name: "unbuffered divider has no amplifier", yaml: divider, build: Build{Quantity: 5},
			unpriced: []string{"Rbot", "Rtop"},
		},
		{
			name: "buffered divider with an inline amplifier", build: Build{Quantity: 5},
			yaml:     divider + "options: {buffer: true}\namplifier: {aol: 120dB, gbw: 1MHz}\n",
			unpriced: []string{"Rbot", "Rtop", "U1"},
		},
		{
			// OR-100K at Rf: 2 x 100 = 200 bought against 50 in stock.
			name: "short stock flagged", build: Build{Quantity: 100},
			yaml: "family: noninverting\npositions:\n  Rg: {part: OR-1K00}\n  Rf: {series: [{part: OR-100K}, {part: OR-100K}]}\namplifier: {part: PL-1}\n",
			lines: []wantLine{
				{"OR-100K", "Rf.a Rf.b", 2, 200, 200, 1, 0.02, 4, true},
				{"OR-1K00", "Rg", 1, 100, 100, 10, 0.08, 8, false},
				{"PL-1", "U1", 1, 100, 100, 100, 1.50, 150, false},
			},
			parts: 162,
		},
	}
	find := fixtureLookup(t)
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			b, err := DesignBOM(design(t, tc.yaml), find, tc.build)
			if err != nil {
				t.Fatal(err)
			}
			if len(b.Lines) != len(tc.lines) {
				t.Fatalf("%d lines, want %d: %+v", len(b.Lines), len(tc.lines), b.Lines)
			}
			for i, w := range tc.lines {
				g := b.Lines[i]
				got := wantLine{g.Part, strings.Join(g.Positions, " "), g.PerStage, g.Needed, g.Bought, g.BreakQty, g.UnitPrice, g.Extended, g.Short}
				if got.part != w.part || got.positions != w.positions || got.perStage != w.perStage || got.needed != w.needed ||
					got.bought != w.bought || got.breakQty != w.breakQty || !near(got.unit, w.unit) || !near(got.extended, w.extended) || got.short != w.short {
					t.Errorf("line %d = %+v, want %+v", i, got, w)
				}
				if g.Currency != "EUR" || g.Source != "fixture" || g.Maker == "" {
					t.Errorf("line %d: currency %q, source %q, maker %q", i, g.Currency, g.Source, g.Maker)
				}
			}
			if strings.Join(b.Unpriced, " ") != strings.Join(tc.unpriced, " ") {
				t.Errorf("unpriced %q, want %q", b.Unpriced, tc.unpriced)
			}
			total := tc.parts + tc.assembly
			if !near(b.Parts, tc.parts) || !near(b.Assembly, tc.assembly) || !near(b.Total, total) {
				t.Errorf("parts %.4f assembly %.4f total %.4f, want %.4f %.4f %.4f", b.Parts, b.Assembly, b.Total, tc.parts, tc.assembly, total)
			}
			if b.Stages != tc.build.Quantity || !near(b.PerStage, total/float64(tc.build.Quantity)) {
				t.Errorf("%d stages at %.4f, want %d at %.4f", b.Stages, b.PerStage, tc.build.Quantity, total/float64(tc.build.Quantity))
			}
		})
	}
}

// TestDesignBOMDescribe checks the descriptive fields of each kind.
func TestDesignBOMDescribe(t *testing.T) {
	find := fixtureLookup(t)
	tests := []struct {
		name, yaml string
		line       int
		kind       catalog.Kind
		value, pkg string
		tol, tcr   float64
	}{
		// Engineering notation as catalog/units writes it: 4990 ohm is 4.99k.
		{"resistor", "family: inverting\npositions:\n  Rg: {part: OR-4K99}\n  Rf: {part: OR-100K}\namplifier: {part: PL-1}\n", 1, catalog.KindResistor, "4.99k", "0603", 0.001, 25},
		{"network", networkYAML(t), 0, catalog.KindNetwork, "1k/10k/1k/10k", "SOT-23-6", 0.001, 25},
		{"op-amp", "family: inverting\npositions:\n  Rg: {part: OR-4K99}\n  Rf: {part: OR-100K}\namplifier: {part: PL-2}\n", 2, catalog.KindAmplifier, "opamp", "SOIC-8", 0, 0},
		{"matched amplifier: gain error and drift", "family: matched\namplifier: {part: PL-D10, gain: 10}\n", 0, catalog.KindAmplifier, "matched", "SOIC-8", 0.0002, 1},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			b, err := DesignBOM(design(t, tc.yaml), find, Build{Quantity: 1})
			if err != nil {
				t.Fatal(err)
			}
			l := b.Lines[tc.line]
			if l.Kind != tc.kind || l.Value != tc.value || l.Package != tc.pkg || l.Tolerance != tc.tol || l.TCR != tc.tcr || l.Item == nil {
				t.Errorf("line = %+v", l)
			}
		})
	}
}

func TestDesignBOMErrors(t *testing.T) {
	find := fixtureLookup(t)
	const good = "family: inverting\npositions:\n  Rg: {part: OR-1K00}\n  Rf: {part: OR-4K99}\namplifier: {part: PL-1}\n"
	tests := []struct {
		name, yaml string
		build      Build
		want       error
		mention    string
	}{
		{"unknown part names its position", strings.Replace(good, "OR-4K99", "OR-9K99", 1), Build{Quantity: 1}, catalog.ErrNotFound, "Rf"},
		{"resistor named as amplifier", strings.Replace(good, "part: PL-1", "part: OR-100K", 1), Build{Quantity: 1}, ErrDesign, "not an amplifier"},
		{"amplifier at a resistor position", strings.Replace(good, "OR-4K99", "PL-2", 1), Build{Quantity: 1}, ErrDesign, "Rf"},
		{"same part as resistor and amplifier", strings.Replace(good, "part: PL-1", "part: OR-1K00", 1), Build{Quantity: 1}, ErrDesign, "Rg"},
		{"no stages", good, Build{}, ErrBuild, "quantity"},
		{"short stock excluded", strings.Replace(good, "OR-4K99", "OR-100K", 1), Build{Quantity: 60, Stock: StockExclude}, ErrShortStock, "OR-100K"},
		{"build currency differs", good, Build{Quantity: 1, Currency: "USD"}, ErrMixedCurrency, "USD"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			_, err := DesignBOM(design(t, tc.yaml), find, tc.build)
			if !errors.Is(err, tc.want) || !strings.Contains(err.Error(), tc.mention) {
				t.Fatalf("error %v, want %v mentioning %q", err, tc.want, tc.mention)
			}
		})
	}
}

func TestBuildOf(t *testing.T) {
	tests := []struct {
		name string
		in   spec.Build
		want Build
		err  error
	}{
		{"every field", spec.Build{Quantity: 250, Attrition: 0.02, PlacementCost: 0.01, LineItemCost: 1.5, Currency: "EUR", Stock: "exclude"},
			Build{Quantity: 250, Attrition: 0.02, PerPlacement: 0.01, PerLineItem: 1.5, Currency: "EUR", Stock: StockExclude}, nil},
		{"flag", spec.Build{Quantity: 3, Stock: "flag"}, Build{Quantity: 3, Stock: StockFlag}, nil},
		{"no build section is one stage", spec.Build{}, Build{Quantity: 1, Stock: StockFlag}, nil},
		{"unknown stock policy", spec.Build{Quantity: 1, Stock: "ignore"}, Build{}, ErrBuild},
		{"negative attrition", spec.Build{Quantity: 1, Attrition: -0.1}, Build{}, ErrBuild},
		// A build of 10^18 stages overflowed the piece counts (hardening
		// finding 7); the spec reader refuses it, and so does the build.
		{"quantity past the bound", spec.Build{Quantity: spec.MaxQuantity + 1}, Build{}, ErrBuild},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got, err := BuildOf(tc.in)
			if !errors.Is(err, tc.err) || got != tc.want {
				t.Errorf("BuildOf = %+v, %v; want %+v, %v", got, err, tc.want, tc.err)
			}
		})
	}
}

func BenchmarkDesignBOM(b *testing.B) {
	find := fixtureLookup(b)
	d := design(b, "family: difference\npositions:\n  R1: {part: OR-1K00}\n  R2: {part: OR-4K99}\n  R3: {part: OR-1K00}\n  R4: {part: OR-4K99}\namplifier: {part: PL-1}\n")
	bl := Build{Quantity: 250, Attrition: 0.02, PerPlacement: 0.01, PerLineItem: 1}
	b.ReportAllocs()
	for b.Loop() {
		if _, err := DesignBOM(d, find, bl); err != nil {
			b.Fatal(err)
		}
	}
}
