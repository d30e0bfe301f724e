package report

import (
	"fmt"
	"math"

	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"

	"plumb/optimize/budget"
	"plumb/optimize/spec"
)

// budgetAxis says how a limit's budget is drawn: the axis label, the
// conversion of a contribution to the axis unit, and the limit and the
// design's figure in that unit. CMRR is drawn as its inverse, the
// common-mode gain over the differential gain, because that is what the
// contributors add up to (Acm/Adm, domain notes §2).
func budgetAxis(l budget.Limit) (axis string, conv func(float64) float64, limit, total float64) {
	switch {
	case l.Name == budget.LimitCMRR:
		inv := func(db float64) float64 { return 1e6 / math.Pow(10, db/20) }
		return "common-mode gain / differential gain (ppm)", func(v float64) float64 { return 1e6 * v }, inv(l.Limit), inv(l.Value)
	case l.Unit == "": // fractions: gain error, or resistor stress of its rating
		f := func(v float64) float64 { return 100 * v }
		axis := "contribution to |gain error| (%)"
		if l.Name != budget.LimitGainError {
			axis = "contribution (% of rating)"
		}
		return axis, f, f(l.Limit), f(l.Value)
	case l.Unit == "ppm/K":
		f := func(v float64) float64 { return v }
		return "contribution (ppm/K)", f, l.Limit, l.Value
	}
	u := unitSymbol(l.Unit)
	m, pu := scale(math.Max(math.Abs(l.Limit), math.Abs(l.Value)), u)
	f := func(v float64) float64 { return m * v }
	return "contribution (" + pu + ")", f, f(l.Limit), f(l.Value)
}

// statistical reports whether contributions of l combine in quadrature:
// always for noise, and under RSS and Monte Carlo for the rest.
func statistical(method string, l budget.Limit) bool {
	return method != spec.WorstCase || l.Name == budget.LimitNoiseRMS || l.Name == budget.LimitNoiseDensity
}

// budgetChart draws one limit's budget as horizontal bars, the largest
// contributor at the top and the design's total at the bottom, with the
// limit as a dashed vertical line; and lists the same terms in a table.
func budgetChart(method string, l budget.Limit) (Plot, Table, error) {
	axis, conv, limit, total := budgetAxis(l)
	quad := statistical(method, l)
	shown := l.Contributors
	var other *budget.Contribution
	if len(shown) > maxBars {
		rest := shown[maxBars-1:]
		shown = shown[:maxBars-1]
		s, share := 0.0, 0.0
		for _, c := range rest {
			if quad {
				s += c.Value * c.Value
			} else {
				s += c.Value
			}
			share += c.Share
		}
		if quad {
			s = math.Sqrt(s)
		}
		other = &budget.Contribution{Name: fmt.Sprintf("%d other terms", len(rest)), Value: s, Share: share}
	}
	// Bars from the bottom: the total, what the terms leave unexplained,
	// the lumped rest, then the smallest to the largest term.
	labels := []string{"total, summed"}
	if quad {
		labels[0] = "total, root-sum-square"
	}
	rem := remainder(l.Contributors, conv, total, quad)
	if rem > 0 {
		labels = append(labels, "not broken down")
	}
	var vals plotter.Values
	if other != nil {
		labels, vals = append(labels, other.Name), append(vals, conv(other.Value))
	}
	for i := len(shown) - 1; i >= 0; i-- {
		labels, vals = append(labels, shown[i].Name), append(vals, conv(shown[i].Value))
	}
	t := Table{Header: []string{"contributor", axis, "share"}}
	rows := shown
	if other != nil {
		rows = append(rows[:len(rows):len(rows)], *other)
	}
	for _, c := range rows {
		t.Rows = append(t.Rows, []Cell{{Text: c.Name}, {Text: sig(conv(c.Value))}, {Text: sig(100*c.Share) + " %"}})
	}
	if rem > 0 {
		t.Rows = append(t.Rows, []Cell{{Text: "not broken down by the budget", Class: "fail"}, {Text: sig(rem), Class: "fail"}, {Text: ""}})
	}
	combine := "summed (worst case)"
	if quad {
		combine = "root-sum-squared"
	}
	t.Rows = append(t.Rows, []Cell{{Text: "total, " + combine, Class: "total"}, {Text: sig(total), Class: "total"}, {Text: ""}})
	t.Rows = append(t.Rows, []Cell{{Text: "limit", Class: "limit"}, {Text: sig(limit), Class: "limit"}, {Text: l.MarginText}})

	title := fmt.Sprintf("%s: %s against %s%s (%s)", l.Name, budget.FormatFigure(l.Value, l.Unit), limitSide(l), budget.FormatFigure(l.Limit, l.Unit), l.MarginText)
	p := newPlot(title, axis, "")
	g := plotter.NewGrid()
	g.Horizontal.Width, g.Vertical.Color = 0, colGreyLight
	p.Add(g)
	n := len(labels) - 1
	barW := plotBarH * 0.6
	first := 1.0
	if rem > 0 {
		bars, err := plotter.NewBarChart(plotter.Values{rem}, barW)
		if err != nil {
			return Plot{}, Table{}, err
		}
		bars.Horizontal, bars.XMin, bars.Color, bars.LineStyle.Width = true, 1, colGrey, 0
		p.Add(bars)
		first = 2
	}
	if len(vals) > 0 {
		bars, err := plotter.NewBarChart(vals, barW)
		if err != nil {
			return Plot{}, Table{}, err
		}
		bars.Horizontal, bars.XMin, bars.Color, bars.LineStyle.Width = true, first, colBlue, 0
		p.Add(bars)
	}
	tot, err := plotter.NewBarChart(plotter.Values{math.Max(total, 0)}, barW)
	if err != nil {
		return Plot{}, Table{}, err
	}
	tot.Horizontal, tot.Color, tot.LineStyle.Width = true, colOrange, 0
	p.Add(tot)
	top := float64(n) + 0.5
	line, err := limitLine(plotter.XYs{{X: limit, Y: -0.5}, {X: limit, Y: top}})
	if err != nil {
		return Plot{}, Table{}, err
	}
	p.Add(line)
	lab, err := plotter.NewLabels(plotter.XYLabels{XYs: plotter.XYs{{X: limit, Y: top}}, Labels: []string{" limit " + budget.FormatFigure(l.Limit, l.Unit)}})
	if err != nil {
		return Plot{}, Table{}, err
	}
	for i := range lab.TextStyle {
		lab.TextStyle[i].Color, lab.TextStyle[i].Font.Variant, lab.TextStyle[i].Font.Size = colVermilion, "Sans", vg.Points(9)
	}
	p.Add(lab)
	p.NominalY(labels...)
	p.Y.Min, p.Y.Max = -0.6, top+0.6
	xmax := math.Max(limit, total)
	for _, v := range vals {
		xmax = math.Max(xmax, v)
	}
	p.X.Min, p.X.Max = 0, finiteOr(xmax*1.25, 1)
	svg, err := svgOf(p, plotWidth, plotBaseH+vg.Length(n+1)*plotBarH)
	if err != nil {
		return Plot{}, Table{}, err
	}
	caption := fmt.Sprintf("Error budget of %s under the %s method: blue bars are the contributors (largest at the top), the orange bar the design's figure (the %s total), the dashed vermilion line the limit; terms are %s.", l.Name, method, method, combine)
	if rem > 0 {
		caption += fmt.Sprintf(" The terms the budget lists add up to less than the design's figure; the grey bar is the difference (%s), which the budget does not break down.", sig(rem))
	}
	return Plot{Name: "budget-" + fileName(l.Name), Title: title, Caption: caption, SVG: svg, LimitLines: 1}, t, nil
}

// remainderSlack is how far, as a fraction of the design's figure, the
// listed terms may fall short of it before the chart shows the difference
// (corner worst cases are not exactly linear sums).
const remainderSlack = 0.02

// remainder returns what the contributors leave of the design's figure
// total (all in axis units): total - Σ|c| under worst case, or
// sqrt(total² - Σc²) when terms add in quadrature; 0 when the terms reach
// the figure within remainderSlack.
func remainder(cs []budget.Contribution, conv func(float64) float64, total float64, quad bool) float64 {
	s := 0.0
	for _, c := range cs {
		v := conv(c.Value)
		if quad {
			s += v * v
		} else {
			s += v
		}
	}
	if quad {
		s = math.Sqrt(s)
	}
	if total <= s*(1+remainderSlack) || total <= 0 {
		return 0
	}
	if quad {
		return math.Sqrt(total*total - s*s)
	}
	return total - s
}
