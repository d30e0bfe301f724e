package report

import (
	"bytes"
	"fmt"
	"image/color"
	"math"
	"regexp"
	"strconv"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgsvg"
)

// The Okabe–Ito palette (Okabe and Ito, "Color Universal Design", 2008).
var (
	colBlue       = color.RGBA{0x00, 0x72, 0xB2, 0xFF}
	colSky        = color.RGBA{0x56, 0xB4, 0xE9, 0xFF}
	colOrange     = color.RGBA{0xE6, 0x9F, 0x00, 0xFF}
	colGreen      = color.RGBA{0x00, 0x9E, 0x73, 0xFF}
	colVermilion  = color.RGBA{0xD5, 0x5E, 0x00, 0xFF}
	colGrey       = color.RGBA{0x66, 0x66, 0x66, 0xFF}
	colSkyLight   = color.NRGBA{0x56, 0xB4, 0xE9, 0x60}
	colGreyLight  = color.RGBA{0xDD, 0xDD, 0xDD, 0xFF}
	limitDash     = []vg.Length{vg.Points(6), vg.Points(3)}
	plotWidth     = 16 * vg.Centimeter
	plotBaseH     = 4 * vg.Centimeter
	plotBarH      = 0.7 * vg.Centimeter
	plotStandardH = 8 * vg.Centimeter
)

// LimitStroke is the SVG style fragment of every limit line: vermilion,
// dashed. Tests and readers find limit lines by it.
const LimitStroke = "stroke:#D55E00"

// newPlot returns a plot whose text is set in the sans-serif Liberation
// face (bundled with gonum for metrics; the SVG names the family only, so
// the viewer's own sans-serif font draws it and nothing is fetched).
func newPlot(title, xLabel, yLabel string) *plot.Plot {
	p := plot.New()
	p.Title.Text, p.X.Label.Text, p.Y.Label.Text = title, xLabel, yLabel
	for _, f := range []*font.Font{&p.Title.TextStyle.Font, &p.X.Label.TextStyle.Font, &p.Y.Label.TextStyle.Font,
		&p.X.Tick.Label.Font, &p.Y.Tick.Label.Font, &p.Legend.TextStyle.Font} {
		f.Variant = "Sans"
	}
	p.Title.TextStyle.Font.Size = vg.Points(11)
	p.Legend.Top = true
	p.X.Tick.Marker, p.Y.Tick.Marker = ticks{}, ticks{}
	return p
}

// ticks are gonum's default tick positions with labels written to at most
// four significant figures and no padding zeros ("2500", "0.25").
type ticks struct{}

// Ticks implements plot.Ticker.
func (ticks) Ticks(lo, hi float64) []plot.Tick {
	ts := plot.DefaultTicks{}.Ticks(lo, hi)
	for i := range ts {
		if ts[i].Label != "" {
			v := ts[i].Value
			if math.Abs(v) < 1e-9*math.Max(math.Abs(lo), math.Abs(hi)) {
				v = 0
			}
			ts[i].Label = strconv.FormatFloat(v, 'g', 4, 64)
		}
	}
	return ts
}

// limitLine draws a vertical (or horizontal) dashed vermilion line.
func limitLine(pts plotter.XYs) (*plotter.Line, error) {
	l, err := plotter.NewLine(pts)
	if err != nil {
		return nil, err
	}
	l.Color, l.Width, l.Dashes = colVermilion, vg.Points(2), limitDash
	return l, nil
}

// prolog matches the XML declaration and the generator comment vgsvg
// writes before the <svg> element.
var prolog = regexp.MustCompile(`(?s)^\s*<\?xml[^>]*\?>\s*(<!--.*?-->\s*)?`)

// svgOf renders p as SVG without its prolog.
func svgOf(p *plot.Plot, w, h vg.Length) ([]byte, error) {
	c := vgsvg.New(w, h)
	p.Draw(draw.New(c))
	var b bytes.Buffer
	if _, err := c.WriteTo(&b); err != nil {
		return nil, fmt.Errorf("writing SVG: %w", err)
	}
	return prolog.ReplaceAll(b.Bytes(), nil), nil
}

// scale picks an SI prefix for values of size up to x in unit: it returns
// the multiplier and the prefixed unit ("mV", "µV/K").
func scale(x float64, unit string) (float64, string) {
	if x == 0 || math.IsNaN(x) || math.IsInf(x, 0) {
		return 1, unit
	}
	prefixes := map[int]string{-15: "f", -12: "p", -9: "n", -6: "µ", -3: "m", 0: "", 3: "k", 6: "M", 9: "G"}
	e := 3 * int(math.Floor(math.Log10(math.Abs(x))/3))
	e = max(-15, min(9, e))
	return math.Pow(10, -float64(e)), prefixes[e] + unit
}

// fileName turns a limit name into a file-name part.
func fileName(s string) string {
	return strings.Trim(strings.Map(func(r rune) rune {
		if r >= 'a' && r <= 'z' || r >= '0' && r <= '9' {
			return r
		}
		if r >= 'A' && r <= 'Z' {
			return r + 'a' - 'A'
		}
		return '-'
	}, s), "-")
}
