package report

import (
	"fmt"
	"math"

	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"plumb/optimize/search"
)

// frontierPlot draws the cost-versus-margin trade-off: each frontier
// design's cost per stage against its worst margin (the binding limit's,
// above 1 passes), joined in cost order, with a dashed vermilion line at a
// margin of 1, the limit. Margins are on a log scale when they span more
// than a decade.
func frontierPlot(res *search.Result) (*Plot, error) {
	f := res.Frontier
	if len(f) == 0 {
		return nil, nil
	}
	pts := make(plotter.XYs, len(f))
	lo, hi := math.Inf(1), math.Inf(-1)
	for i := range f {
		m := 0.0
		for _, l := range f[i].Limits {
			if l.Name == f[i].Binding {
				m = l.Margin
			}
		}
		pts[i] = plotter.XY{X: f[i].UnitCost, Y: m}
		lo, hi = math.Min(lo, f[i].UnitCost), math.Max(hi, f[i].UnitCost)
	}
	cur := f[0].Currency
	title := "Cost against margin: the designs no cheaper design matches in margin on every limit"
	p := newPlot(title, fmt.Sprintf("cost per stage (%s)", cur), "worst margin (x)")
	p.Add(plotter.NewGrid())
	line, err := plotter.NewLine(pts)
	if err != nil {
		return nil, err
	}
	line.Color, line.Width = colBlue, vg.Points(1.5)
	p.Add(line)
	sc, err := plotter.NewScatter(pts)
	if err != nil {
		return nil, err
	}
	sc.Color, sc.Shape, sc.Radius = colBlue, draw.CircleGlyph{}, vg.Points(3.5)
	p.Add(sc)
	p.Legend.Add("frontier designs", line, sc)
	if hi == lo {
		lo, hi = lo*0.9, hi*1.1+1e-9
	}
	lim, err := limitLine(plotter.XYs{{X: lo, Y: 1}, {X: hi, Y: 1}})
	if err != nil {
		return nil, err
	}
	p.Add(lim)
	p.Legend.Add("limit (margin 1)", lim)
	p.Y.Min = 0
	svg, err := svgOf(p, plotWidth, plotStandardH)
	if err != nil {
		return nil, err
	}
	caption := fmt.Sprintf("%d designs on the cost-versus-margin frontier, by cost per stage: each buys more margin on some limit than every cheaper one; the worst margin is the binding limit's (above 1 passes). Drawn from the %d cheapest passing design classes.",
		len(f), search.FrontierPool)
	return &Plot{Name: "frontier", Title: title, Caption: caption, SVG: svg, LimitLines: 1}, nil
}
