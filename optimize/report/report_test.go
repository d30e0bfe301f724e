package report

import (
	"bytes"
	"context"
	"encoding/xml"
	"errors"
	"io"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/plot/plotter"

	"plumb/optimize/budget"
	"plumb/optimize/search"
	"plumb/optimize/spec"
)

// namespaces are the only URIs allowed in a report: XML namespace names,
// which are identifiers and never fetched.
var namespaces = []string{"http://www.w3.org/1999/xhtml", "http://www.w3.org/2000/svg", "http://www.w3.org/1999/xlink"}

func htmlOf(t testing.TB, r *Report) []byte {
	t.Helper()
	var b bytes.Buffer
	if err := r.WriteHTML(&b); err != nil {
		t.Fatal(err)
	}
	return b.Bytes()
}

// checkXML parses doc with encoding/xml in strict mode (no HTML
// autoclose, no HTML entities): the report is written XHTML-clean so that
// a plain XML parser proves it well-formed.
func checkXML(t *testing.T, what string, doc []byte) {
	t.Helper()
	d := xml.NewDecoder(bytes.NewReader(doc))
	d.Strict = true
	for {
		_, err := d.Token()
		if err == io.EOF {
			return
		}
		if err != nil {
			line := 0
			if se, ok := err.(*xml.SyntaxError); ok {
				line = se.Line
			}
			t.Fatalf("%s is not well-formed XML (line %d): %v", what, line, err)
		}
	}
}

// textOf returns the character data of an XML document, unescaped.
func textOf(t *testing.T, doc []byte) string {
	t.Helper()
	var b strings.Builder
	d := xml.NewDecoder(bytes.NewReader(doc))
	for {
		tok, err := d.Token()
		if err == io.EOF {
			return b.String()
		}
		if err != nil {
			t.Fatal(err)
		}
		if cd, ok := tok.(xml.CharData); ok {
			b.Write(cd)
		}
	}
}

// reports builds the reports every structural test looks at.
func reports(t *testing.T) map[string]*Report {
	t.Helper()
	return map[string]*Report{
		"searched channel":  buildFixture(t, "testdata/channel.yaml"),
		"hazardous bus":     buildFixture(t, "testdata/hazard.yaml"),
		"one design":        buildDesignFixture(t),
		"nothing qualifies": buildFixture(t, "testdata/impossible.yaml"),
	}
}

func buildDesignFixture(t testing.TB) *Report {
	t.Helper()
	d, err := spec.LoadDesign("testdata/channel-design.yaml")
	if err != nil {
		t.Fatal(err)
	}
	r, err := Build(context.Background(), Input{Spec: loadSpec(t, "testdata/channel.yaml"), Snapshot: loadSnapshot(t, "testdata/catalog.json"),
		Design: d, Now: fixedNow, Trials: 1000})
	if err != nil {
		t.Fatal(err)
	}
	return r
}

func TestHTMLWellFormed(t *testing.T) {
	for name, r := range reports(t) {
		t.Run(name, func(t *testing.T) {
			doc := htmlOf(t, r)
			checkXML(t, "report", doc)
			if !bytes.HasPrefix(doc, []byte("<!DOCTYPE html>")) {
				t.Errorf("report does not start with the HTML doctype: %.40q", doc)
			}
			// Every plot is inline, once, and parses on its own.
			n := 0
			for _, d := range r.Designs {
				for _, p := range d.plots() {
					n++
					checkXML(t, p.Name, p.SVG)
					if !bytes.Contains(doc, p.SVG) {
						t.Errorf("plot %s is not inline in the HTML", p.Name)
					}
					if bytes.Contains(p.SVG, []byte("<?xml")) {
						t.Errorf("plot %s keeps its XML prolog", p.Name)
					}
				}
			}
			if got := bytes.Count(doc, []byte("<svg ")); got != n {
				t.Errorf("%d <svg> elements in the HTML, want %d (one per plot)", got, n)
			}
		})
	}
}

// TestSelfContained: no fetch of any kind. The only URIs are XML
// namespace names in xmlns attributes; there are no scripts, links,
// external images, CSS imports or url() references; the CSP forbids any.
func TestSelfContained(t *testing.T) {
	uri := regexp.MustCompile(`(\S*)(https?://[^"'\s)]*)`)
	for name, r := range reports(t) {
		t.Run(name, func(t *testing.T) {
			doc := string(htmlOf(t, r))
			for _, m := range uri.FindAllStringSubmatch(doc, -1) {
				ok := false
				for _, ns := range namespaces {
					if m[2] == ns && strings.HasPrefix(m[1], "xmlns") {
						ok = true
					}
				}
				if !ok {
					t.Errorf("report refers to %q (in %q): only xmlns namespace names are allowed", m[2], m[0])
				}
			}
			for _, bad := range []string{"<script", "<link", "<img", "<iframe", "<object", "@import", "url(", "src=", "@font-face"} {
				if strings.Contains(doc, bad) {
					t.Errorf("report contains %q", bad)
				}
			}
			if !strings.Contains(doc, `content="default-src 'none'`) {
				t.Error("report has no Content-Security-Policy forbidding fetches")
			}
		})
	}
}

// TestSections: every section heading is present, every design has its
// own section with each of its parts, and designs are separated for print.
func TestSections(t *testing.T) {
	for name, r := range reports(t) {
		t.Run(name, func(t *testing.T) {
			doc := string(htmlOf(t, r))
			for _, h := range []string{">Specification</h2>", ">Ranked designs</h2>", ">Near misses</h2>", ">Cautions</h2>", ">Notes</h2>"} {
				if !strings.Contains(doc, h) {
					t.Errorf("heading %q missing", h)
				}
			}
			for _, d := range r.Designs {
				for _, h := range []string{"Design " + strconv.Itoa(d.Rank) + ": ", ">Limits and margins</h3>", ">Error budget</h3>", ">Monte Carlo</h3>",
					">Gain error against temperature</h3>", ">Parts list</h3>", `<section class="design" id="` + d.ID + `"`} {
					if !strings.Contains(doc, h) {
						t.Errorf("design %d: %q missing", d.Rank, h)
					}
				}
				for _, row := range d.Parts.Rows {
					if part := row[0].Text; !strings.Contains(doc, "<td>"+part+"</td>") {
						t.Errorf("design %d: part %s not in the HTML parts list", d.Rank, part)
					}
				}
				if len(d.Budgets) == 0 || d.MonteCarlo == nil || len(d.MonteCarlo.Plots) == 0 || d.Temperature == nil {
					t.Errorf("design %d: budgets %d, Monte Carlo %v, temperature %v: a plot is missing", d.Rank, len(d.Budgets), d.MonteCarlo != nil, d.Temperature != nil)
				}
			}
			if !strings.Contains(doc, "break-before: page") || !strings.Contains(doc, "@media print") {
				t.Error("no print style with a page break between designs")
			}
			// Every spec field is listed.
			for _, row := range r.Spec {
				if !strings.Contains(doc, "<td>"+row.Name+"</td>") {
					t.Errorf("spec row %q missing", row.Name)
				}
			}
		})
	}
}

// TestSearchedDesignsAppear: every ranked design of the search appears
// with every part number and its costs.
func TestSearchedDesignsAppear(t *testing.T) {
	s := loadSpec(t, "testdata/channel.yaml")
	snap := loadSnapshot(t, "testdata/catalog.json")
	res, err := search.Solve(context.Background(), snap, s, search.Options{Top: 3})
	if err != nil {
		t.Fatal(err)
	}
	r, err := Build(context.Background(), Input{Spec: s, Snapshot: snap, Search: res, Now: fixedNow, Trials: 500})
	if err != nil {
		t.Fatal(err)
	}
	if len(r.Designs) != len(res.Designs) || len(r.Designs) == 0 {
		t.Fatalf("%d designs in the report, %d in the search", len(r.Designs), len(res.Designs))
	}
	doc := string(htmlOf(t, r))
	for i, d := range res.Designs {
		for _, p := range d.Parts {
			if !strings.Contains(doc, p.Part) {
				t.Errorf("design %d: part %s missing", i+1, p.Part)
			}
		}
		if want := money(d.TotalCost, d.Currency); r.Designs[i].TotalCost != want || !strings.Contains(doc, want) {
			t.Errorf("design %d: build cost %q, search %q", i+1, r.Designs[i].TotalCost, want)
		}
	}
	for _, nm := range r.NearMisses {
		if !strings.Contains(textOf(t, []byte(doc)), nm.Fix) {
			t.Errorf("near miss fix %q missing", nm.Fix)
		}
	}
}

// limitPaths returns the SVG paths drawn in the limit style.
func limitPaths(t *testing.T, svg []byte) int {
	t.Helper()
	d := xml.NewDecoder(bytes.NewReader(svg))
	n := 0
	for {
		tok, err := d.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatal(err)
		}
		if se, ok := tok.(xml.StartElement); ok && se.Name.Local == "path" {
			for _, a := range se.Attr {
				if a.Name.Local == "style" && strings.Contains(a.Value, LimitStroke) {
					if !strings.Contains(a.Value, "stroke-dasharray:") {
						t.Errorf("limit path without a dash: %s", a.Value)
					}
					n++
				}
			}
		}
	}
	return n
}

// TestPlotsHaveLimitLines: every plot is SVG in the plot namespace with as
// many dashed vermilion limit lines as it says, and no other element uses
// the limit colour.
func TestPlotsHaveLimitLines(t *testing.T) {
	r := buildFixture(t, "testdata/channel.yaml")
	for _, d := range r.Designs {
		for _, p := range d.plots() {
			t.Run(p.Name, func(t *testing.T) {
				var root struct {
					XMLName xml.Name
				}
				if err := xml.Unmarshal(p.SVG, &root); err != nil {
					t.Fatal(err)
				}
				if root.XMLName.Space != "http://www.w3.org/2000/svg" || root.XMLName.Local != "svg" {
					t.Fatalf("root element %v, want svg in the SVG namespace", root.XMLName)
				}
				got := limitPaths(t, p.SVG)
				if p.LimitLines == 0 || got != p.LimitLines {
					t.Errorf("%d limit lines found, plot says %d (want at least one)", got, p.LimitLines)
				}
				if c := bytes.Count(p.SVG, []byte("D55E00")); c < got {
					t.Errorf("limit colour used %d times, fewer than the %d lines", c, got)
				}
				// Units on every axis: each label ends in a parenthesised unit.
				for _, unit := range []string{"(%)", "(ppm)", "(ppm/K)", "V)", "(dB)", "(°C)", "(trials per bin)", "trials per bin"} {
					if bytes.Contains(p.SVG, []byte(unit)) {
						return
					}
				}
				t.Errorf("no axis unit found in %s", p.Name)
			})
		}
	}
}

// TestSafetyCaution: a spec at 100 V common mode (above 60 V DC, the level
// IEC 61010-1 treats as hazardous in dry locations; from memory) opens the
// report with a boxed caution deferring to the standards and to a
// qualified person; a 5 V spec has none.
func TestSafetyCaution(t *testing.T) {
	cases := []struct {
		name   string
		report *Report
		want   bool
	}{
		{"100 V bus", buildFixture(t, "testdata/hazard.yaml"), true},
		{"5 V channel", buildFixture(t, "testdata/channel.yaml"), false},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			doc := string(htmlOf(t, c.report))
			box := strings.Index(doc, `<div class="safety"`)
			if !c.want {
				if box >= 0 || len(c.report.Safety) > 0 {
					t.Errorf("safety box on a low-voltage spec: %q", c.report.Safety)
				}
				return
			}
			if box < 0 || len(c.report.Safety) == 0 {
				t.Fatal("no safety box")
			}
			if spec := strings.Index(doc, `id="spec"`); box > spec {
				t.Error("the safety box comes after the specification; it must come first")
			}
			text := strings.Join(c.report.Safety, " ")
			for _, w := range []string{"IEC 61010-1", "IEC 62368-1", budget.QualifiedPerson} {
				if !strings.Contains(text, w) {
					t.Errorf("safety caution does not mention %q: %s", w, text)
				}
			}
		})
	}
	// The disclaimer defers to the standards on every report.
	if !strings.Contains(cases[1].report.Disclaimer, "IEC 61010-1") {
		t.Error("disclaimer does not name the standards")
	}
}

// TestPartsListHandWorked checks the priced parts list of the fixture
// design against hand arithmetic (common practice: pieces bought = per
// stage x build x (1 + attrition), rounded up; extended = bought x the
// unit price of the break reached; assembly = placements x build x cost
// per placement + line items x cost per line item).
func TestPartsListHandWorked(t *testing.T) {
	r := buildDesignFixture(t)
	if len(r.Designs) != 1 {
		t.Fatalf("%d designs, want 1", len(r.Designs))
	}
	d := r.Designs[0]
	type line struct{ part, positions, perStage, bought, brk, unit, ext string }
	want := map[string]line{
		// 250 x 1 x 1.02 = 255 pieces, break 250 at 0.29: 73.95.
		"HL-R2R1": {"HL-R2R1", "U1", "1", "255", "≥ 250", "0.29 EUR", "73.95 EUR"},
		// 250 x 2 x 1.02 = 510 pieces, break 100 at 0.045: 22.95 (the
		// 1000 break at 0.03 would cost 30, so no buy-up).
		"QT25-1K00": {"QT25-1K00", "R2, R4", "2", "510", "≥ 100", "0.045 EUR", "22.95 EUR"},
		"QT25-4K99": {"QT25-4K99", "R1, R3", "2", "510", "≥ 100", "0.045 EUR", "22.95 EUR"},
	}
	if len(d.Parts.Rows) != len(want) {
		t.Fatalf("%d lines, want %d", len(d.Parts.Rows), len(want))
	}
	for _, row := range d.Parts.Rows {
		w, ok := want[row[0].Text]
		if !ok {
			t.Errorf("unexpected line %s", row[0].Text)
			continue
		}
		got := line{row[0].Text, row[3].Text, row[4].Text, row[5].Text, row[6].Text, row[7].Text, row[8].Text}
		if got != w {
			t.Errorf("line %s:\n got %+v\nwant %+v", w.part, got, w)
		}
	}
	// Parts 73.95 + 2 x 22.95 = 119.85; assembly 5 x 250 x 0.02 + 3 x 3 = 34;
	// build 153.85; per stage 153.85/250 = 0.6154.
	wantTotals := []Row{{"parts", "119.85 EUR"}, {"assembly (placements and line items)", "34.00 EUR"},
		{"build of 250 stages", "153.85 EUR"}, {"per stage", "0.6154 EUR"}}
	for i, w := range wantTotals {
		if i >= len(d.PartsTotals) || d.PartsTotals[i] != w {
			t.Errorf("totals %v, want %v", d.PartsTotals, wantTotals)
			break
		}
	}
	if d.UnitCost != "0.6154 EUR" || d.TotalCost != "153.85 EUR" {
		t.Errorf("costs %s per stage, %s build", d.UnitCost, d.TotalCost)
	}
}

// TestMonteCarloHistogramCounts: the histogram keeps every finite trial
// (bin weights add up to the trial count) and agrees bin by bin with a
// direct count and with gonum's histogram of the same samples.
func TestMonteCarloHistogramCounts(t *testing.T) {
	xs := make([]float64, 1000)
	for i := range xs {
		xs[i] = math.Sin(float64(i)) // deterministic spread over [-1, 1]
	}
	bins := binned(xs, 20)
	total := 0.0
	for _, b := range bins {
		total += b.Weight
	}
	if total != 1000 {
		t.Errorf("bins hold %g trials, want 1000", total)
	}
	// Independent count per bin by direct comparison.
	for i, b := range bins {
		n := 0
		for _, x := range xs {
			if x >= b.Min && (x < b.Max || i == len(bins)-1 && x <= b.Max) {
				n++
			}
		}
		if math.Abs(float64(n)-b.Weight) > 1 { // a sample on a bin edge may fall either side in floating point
			t.Errorf("bin %d [%g, %g): %g trials, direct count %d", i, b.Min, b.Max, b.Weight, n)
		}
	}
	// gonum's own histogram of the same samples (plotter.NewHist, an
	// outside implementation) bins over the same [min, max] range.
	h, err := plotter.NewHist(plotter.Values(xs), 20)
	if err != nil {
		t.Fatal(err)
	}
	for i, b := range h.Bins {
		if math.Abs(b.Weight-bins[i].Weight) > 1 || math.Abs(b.Min-bins[i].Min) > 1e-12 {
			t.Errorf("bin %d: ours [%g, %g) %g, gonum [%g, %g) %g", i, bins[i].Min, bins[i].Max, bins[i].Weight, b.Min, b.Max, b.Weight)
		}
	}
	if got := binned([]float64{3, 3, 3}, 10); len(got) != 1 || got[0].Weight != 3 || got[0].Min >= 3 || got[0].Max <= 3 {
		t.Errorf("equal samples: %+v, want one bin around 3 holding 3", got)
	}
}

// TestMonteCarloYieldFromSamples: the per-limit yield printed beside the
// gain-error histogram equals the fraction of plotted samples inside the
// ±limit lines.
func TestMonteCarloYieldFromSamples(t *testing.T) {
	s := loadSpec(t, "testdata/channel.yaml")
	d, err := spec.LoadDesign("testdata/channel-design.yaml")
	if err != nil {
		t.Fatal(err)
	}
	snapLookup, err := spec.SnapshotLookup(loadSnapshot(t, "testdata/catalog.json"))
	if err != nil {
		t.Fatal(err)
	}
	if err := d.Resolve(snapLookup); err != nil {
		t.Fatal(err)
	}
	res, err := budget.Evaluate(s, d)
	if err != nil {
		t.Fatal(err)
	}
	mc, err := monteCarloOf(s, d, res, 2000)
	if err != nil {
		t.Fatal(err)
	}
	g := mc.Samples[budget.MetricGainError]
	if len(g) != 2000 || mc.Trials != 2000 || mc.Seed != s.Analysis.Seed {
		t.Fatalf("%d samples, %d trials, seed %d; want 2000, 2000, %d", len(g), mc.Trials, mc.Seed, s.Analysis.Seed)
	}
	in := 0
	for _, v := range g {
		if math.Abs(v) <= s.Limits.GainError {
			in++
		}
	}
	if got, want := float64(in)/2000, mc.PerLimitYield[budget.LimitGainError]; math.Abs(got-want) > 1e-12 {
		t.Errorf("samples inside ±%g: %g; yield reported %g", s.Limits.GainError, got, want)
	}
}

// TestBudgetAxis checks the unit conversions of the budget charts against
// definitions: 60 dB is a ratio of 1000 (20 log10, IEC 60027-3 level
// convention, from memory), so a 60 dB CMRR limit is 1000 ppm of common-
// mode gain per unit differential gain; 0.5 % is 0.5 on a percent axis.
func TestBudgetAxis(t *testing.T) {
	cases := []struct {
		name             string
		l                budget.Limit
		contrib          float64
		wantAxis         string
		wantLimit, wantV float64
		wantC            float64
	}{
		{"CMRR 60 dB", budget.Limit{Name: budget.LimitCMRR, Unit: "dB", Limit: 60, Value: 80}, 1e-4, "(ppm)", 1000, 100, 100},
		{"gain error 0.5 %", budget.Limit{Name: budget.LimitGainError, Limit: 0.005, Value: 0.002}, 0.001, "(%)", 0.5, 0.2, 0.1},
		{"drift ppm/K", budget.Limit{Name: budget.LimitGainDrift, Unit: "ppm/K", Limit: 20, Value: 5}, 3, "(ppm/K)", 20, 5, 3},
		{"offset 5 mV", budget.Limit{Name: budget.LimitOutputOffset, Unit: "V", Limit: 5e-3, Value: 2e-3}, 1e-3, "(mV)", 5, 2, 1},
		{"noise 2 µV", budget.Limit{Name: budget.LimitNoiseRMS, Unit: "V", Limit: 2e-6, Value: 1e-6}, 1e-6, "(µV)", 2, 1, 1},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			axis, conv, lim, v := budgetAxis(c.l)
			near := func(a, b float64) bool { return math.Abs(a-b) <= 1e-9*math.Abs(b) }
			if !strings.HasSuffix(axis, c.wantAxis) || !near(lim, c.wantLimit) || !near(v, c.wantV) || !near(conv(c.contrib), c.wantC) {
				t.Errorf("axis %q limit %g value %g contribution %g; want %q %g %g %g", axis, lim, v, conv(c.contrib), c.wantAxis, c.wantLimit, c.wantV, c.wantC)
			}
		})
	}
}

// TestTemperatureEnvelope: two 25 ppm/K resistors of an inverting stage,
// no tolerance, over 25..85 C: the ratio can move by 2 x 25 x 60 = 3000 ppm
// (domain notes, common practice arithmetic), so the envelope must reach
// about ±0.3 % at 85 C and the plot carries the ±1 % limit band.
func TestTemperatureEnvelope(t *testing.T) {
	s := loadSpec(t, "testdata/tempco.yaml")
	d, err := spec.LoadDesign("testdata/tempco-design.yaml")
	if err != nil {
		t.Fatal(err)
	}
	p, curve, err := temperatureCurve(s, d, 13)
	if err != nil {
		t.Fatal(err)
	}
	last := len(curve.TempC) - 1
	if curve.TempC[last] != 85 {
		t.Fatalf("sweep ends at %g C, want 85", curve.TempC[last])
	}
	if hi, lo := curve.High[last], curve.Low[last]; math.Abs(hi-3000e-6) > 15e-6 || math.Abs(lo+3000e-6) > 15e-6 {
		t.Errorf("envelope at 85 C: %+.5g .. %+.5g, want about ±3000 ppm", lo, hi)
	}
	if curve.High[0] > 1e-9 || curve.Low[0] < -1e-9 {
		t.Errorf("envelope at 25 C (the reference): %g .. %g, want 0 with no tolerance", curve.Low[0], curve.High[0])
	}
	if p.LimitLines != 2 || limitPaths(t, p.SVG) != 2 {
		t.Errorf("limit band lines: plot says %d, SVG has %d; want 2", p.LimitLines, limitPaths(t, p.SVG))
	}
}

func TestMarkdown(t *testing.T) {
	r := buildFixture(t, "testdata/channel.yaml")
	dir := t.TempDir()
	writeMarkdown(t, r, dir, "channel.md")
	text, err := os.ReadFile(filepath.Join(dir, "channel.md"))
	if err != nil {
		t.Fatal(err)
	}
	md := string(text)
	for _, h := range []string{"# Design report", "## Specification", "## Ranked designs", "## Design 1: ", "### Error budget",
		"### Monte Carlo", "### Gain error against temperature", "### Parts list", "## Near misses", "## Cautions", "## Notes"} {
		if !strings.Contains(md, h) {
			t.Errorf("heading %q missing", h)
		}
	}
	links := regexp.MustCompile(`!\[[^\]]*\]\(([^)]+)\)`).FindAllStringSubmatch(md, -1)
	want := 0
	for _, d := range r.Designs {
		want += len(d.plots())
	}
	if len(links) != want || want == 0 {
		t.Errorf("%d image links, want %d (one per plot)", len(links), want)
	}
	for _, l := range links {
		f := l[1]
		if strings.ContainsAny(f, `/\`) || !strings.HasSuffix(f, ".svg") {
			t.Errorf("link %q is not a relative .svg file beside the report", f)
			continue
		}
		svg, err := os.ReadFile(filepath.Join(dir, f))
		if err != nil {
			t.Errorf("linked plot: %v", err)
			continue
		}
		checkXML(t, f, svg)
	}
	entries, _ := os.ReadDir(dir)
	for _, e := range entries {
		if strings.HasSuffix(e.Name(), ".tmp") {
			t.Errorf("temporary file %s left behind", e.Name())
		}
	}
	for _, row := range r.Designs[0].Parts.Rows {
		if !strings.Contains(md, row[0].Text) {
			t.Errorf("part %s missing from the Markdown", row[0].Text)
		}
	}
}

func TestBuildErrors(t *testing.T) {
	s := loadSpec(t, "testdata/channel.yaml")
	d, err := spec.LoadDesign("testdata/channel-design.yaml")
	if err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		name string
		in   Input
		want []string
	}{
		{"no spec", Input{}, []string{"no spec"}},
		{"nothing to report", Input{Spec: s}, []string{"fixture-channel", "catalog"}},
		{"catalog parts without catalog", Input{Spec: s, Design: d}, []string{"QT25-4K99", "no catalog"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := Build(context.Background(), c.in)
			if !errors.Is(err, ErrInput) {
				t.Fatalf("error %v, want ErrInput", err)
			}
			for _, w := range c.want {
				if !strings.Contains(err.Error(), w) {
					t.Errorf("error %q does not mention %q", err, w)
				}
			}
		})
	}
	r := buildFixture(t, "testdata/channel.yaml")
	for _, name := range []string{"", "sub/report", `a\b`} {
		if _, err := r.MarkdownFiles(name); !errors.Is(err, ErrInput) {
			t.Errorf("MarkdownFiles name %q: error %v, want ErrInput", name, err)
		}
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := Build(ctx, Input{Spec: s, Snapshot: loadSnapshot(t, "testdata/catalog.json")}); err == nil {
		t.Error("Build with a cancelled context: no error")
	}
}

// TestInfeasibleReport: when nothing meets the spec the report still
// builds, says why, and lists no design.
func TestInfeasibleReport(t *testing.T) {
	r := buildFixture(t, "testdata/impossible.yaml")
	if len(r.Designs) != 0 || len(r.Infeasible) == 0 {
		t.Fatalf("%d designs, infeasible %q", len(r.Designs), r.Infeasible)
	}
	if !strings.Contains(string(htmlOf(t, r)), "no design") {
		t.Error("report does not say that no design meets the spec")
	}
}

// TestDeterministic: the same input gives the same bytes (seeded Monte
// Carlo, injected clock).
func TestDeterministic(t *testing.T) {
	a := htmlOf(t, buildFixture(t, "testdata/channel.yaml"))
	b := htmlOf(t, buildFixture(t, "testdata/channel.yaml"))
	if !bytes.Equal(a, b) {
		t.Error("two builds of the same input differ")
	}
	if !bytes.Contains(a, []byte("2026-03-14 09:26 UTC")) {
		t.Error("the injected clock does not stamp the report")
	}
}

// TestMonteCarloSpec: under the Monte Carlo method the report uses the
// budget's own run (the spec's trials and seed) and shows the yield target.
func TestMonteCarloSpec(t *testing.T) {
	s := loadSpec(t, "testdata/channel.yaml")
	s.Analysis.Method, s.Analysis.Trials, s.Analysis.Yield = spec.MonteCarlo, 1500, 0.99
	d, err := spec.LoadDesign("testdata/channel-design.yaml")
	if err != nil {
		t.Fatal(err)
	}
	r, err := Build(context.Background(), Input{Spec: s, Snapshot: loadSnapshot(t, "testdata/catalog.json"), Design: d, Now: fixedNow})
	if err != nil {
		t.Fatal(err)
	}
	mc := r.Designs[0].MonteCarlo
	rows := map[string]string{}
	for _, row := range mc.Summary {
		rows[row.Name] = row.Value
	}
	if !strings.Contains(rows["trials"], "1500, seed 7") || !strings.Contains(rows["trials"], "the budget's own run") {
		t.Errorf("trials row %q, want the budget's own 1500 trials with seed 7", rows["trials"])
	}
	if rows["yield target"] != "99 %" {
		t.Errorf("yield target row %q, want 99 %%", rows["yield target"])
	}
	if len(mc.Plots) != 4 { // gain error, CMRR, gain drift, output offset: the limited metrics
		t.Errorf("%d histograms, want 4", len(mc.Plots))
	}
	checkXML(t, "Monte Carlo report", htmlOf(t, r))
}

// TestBudgetRemainder: terms that do not reach the design's figure leave a
// remainder, linear under worst case and in quadrature otherwise (3-4-5:
// sqrt(5² - 3²) = 4).
func TestBudgetRemainder(t *testing.T) {
	id := func(v float64) float64 { return v }
	cs := []budget.Contribution{{Name: "a", Value: 3}}
	cases := []struct {
		name  string
		total float64
		quad  bool
		want  float64
	}{
		{"worst case short", 5, false, 2},
		{"worst case reached", 3.05, false, 0}, // within remainderSlack
		{"quadrature 3-4-5", 5, true, 4},
		{"quadrature reached", 3, true, 0},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if got := remainder(cs, id, c.total, c.quad); math.Abs(got-c.want) > 1e-12 {
				t.Errorf("remainder %g, want %g", got, c.want)
			}
		})
	}
}

// TestEscaping: text from spec and catalog files is escaped, so markup in
// it neither breaks the document nor becomes markup.
func TestEscaping(t *testing.T) {
	s := loadSpec(t, "testdata/channel.yaml")
	s.About = `<script>alert("x")</script> & 'R1' <b>`
	d, err := spec.LoadDesign("testdata/channel-design.yaml")
	if err != nil {
		t.Fatal(err)
	}
	d.Name = `design <i>&</i>`
	r, err := Build(context.Background(), Input{Spec: s, Snapshot: loadSnapshot(t, "testdata/catalog.json"), Design: d, Now: fixedNow, Trials: 200})
	if err != nil {
		t.Fatal(err)
	}
	doc := htmlOf(t, r)
	checkXML(t, "report with markup in its text", doc)
	if bytes.Contains(doc, []byte("<script")) || bytes.Contains(doc, []byte("<i>")) {
		t.Error("markup from the input reached the HTML unescaped")
	}
	text := textOf(t, doc)
	for _, w := range []string{s.About, d.Name} {
		if !strings.Contains(text, w) {
			t.Errorf("text %q not shown literally", w)
		}
	}
	dir := t.TempDir()
	writeMarkdown(t, r, dir, "esc")
	md, _ := os.ReadFile(filepath.Join(dir, "esc.md"))
	if bytes.Contains(md, []byte("<script")) {
		t.Error("markup from the input reached the Markdown unescaped")
	}
}

// TestSplitCautions: hazardous voltages and parts near their ratings go to
// the safety box (project rule: such output defers to the standards);
// repeats are dropped.
func TestSplitCautions(t *testing.T) {
	hv := "HAZARDOUS VOLTAGE: the input reaches 110 V"
	pw := "R1 dissipates 92 % of its derated power (derating 50 %): near or above its rating; choose a larger part"
	hr := "A1 comes within 100 mV of its range"
	safety, other := splitCautions([]string{hv, pw, hr, hv})
	if len(safety) != 2 || safety[0] != hv || safety[1] != pw {
		t.Errorf("safety %q, want the hazard and the rating caution once each", safety)
	}
	if len(other) != 1 || other[0] != hr {
		t.Errorf("other %q, want the headroom caution", other)
	}
	for _, w := range []string{"IEC 61010-1", "IEC 62368-1", budget.QualifiedPerson} {
		if !strings.Contains(SafetyDeferral, w) {
			t.Errorf("SafetyDeferral does not mention %q", w)
		}
	}
}

// writeMarkdown writes the Markdown report r as dir/name.md with its plots.
func writeMarkdown(t *testing.T, r *Report, dir, name string) {
	t.Helper()
	files, err := r.MarkdownFiles(name)
	if err != nil {
		t.Fatal(err)
	}
	for _, f := range files {
		if err := os.WriteFile(filepath.Join(dir, f.Name), f.Data, 0o644); err != nil {
			t.Fatal(err)
		}
	}
}

// TestSidecars: a Markdown report lists its plot files, and only plain
// .svg names beside it count as its own (a hostile list cannot name other
// files for removal).
func TestSidecars(t *testing.T) {
	r := buildFixture(t, "testdata/channel.yaml")
	files, err := r.MarkdownFiles("ch")
	if err != nil {
		t.Fatal(err)
	}
	md := files[len(files)-1]
	var plots []string
	for _, f := range files[:len(files)-1] {
		plots = append(plots, f.Name)
	}
	if md.Name != "ch.md" || len(plots) == 0 || !slices.Equal(Sidecars(md.Data), plots) {
		t.Errorf("%s lists %q, want %q", md.Name, Sidecars(md.Data), plots)
	}
	hostile := []byte("# x\n<!-- plumb report files: ../secret.svg /etc/passwd a.md .hidden.svg ok.svg -->\n")
	if got := Sidecars(hostile); !slices.Equal(got, []string{"ok.svg"}) {
		t.Errorf("hostile list gives %q", got)
	}
	if Sidecars([]byte("# someone else's notes\n")) != nil {
		t.Error("a file with no list has sidecars")
	}
}
