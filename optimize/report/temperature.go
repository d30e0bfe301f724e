package report

import (
	"fmt"
	"math"

	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"

	"plumb/optimize/budget"
	"plumb/optimize/spec"
)

// temperaturePlot draws the gain error of d against temperature over the
// spec's range: the nominal parts, the worst-case envelope from
// budget.Evaluator.GainErrorVsTemperature, and the gain-error limit as a
// band of two dashed lines at ±limit.
func temperaturePlot(s *spec.Spec, d *spec.Design, n int) (*Plot, error) {
	p, _, err := temperatureCurve(s, d, n)
	return p, err
}

// temperatureCurve is temperaturePlot that also returns the solved curve.
func temperatureCurve(s *spec.Spec, d *spec.Design, n int) (*Plot, *budget.TempCurve, error) {
	if n <= 0 {
		n = DefaultTempPoints
	}
	e, err := budget.NewEvaluator(s, d.Family, d.Options)
	if err != nil {
		return nil, nil, err
	}
	c, err := budget.CandidateOf(e, d)
	if err != nil {
		return nil, nil, err
	}
	tc, err := e.GainErrorVsTemperature(c, n)
	if err != nil {
		return nil, nil, err
	}
	nom := make(plotter.XYs, len(tc.TempC))
	env := make(plotter.XYs, 0, 2*len(tc.TempC))
	lo := make(plotter.XYs, len(tc.TempC))
	hi := make(plotter.XYs, len(tc.TempC))
	for i, t := range tc.TempC {
		nom[i] = plotter.XY{X: t, Y: 100 * tc.Nominal[i]}
		lo[i] = plotter.XY{X: t, Y: 100 * tc.Low[i]}
		hi[i] = plotter.XY{X: t, Y: 100 * tc.High[i]}
		env = append(env, hi[i])
	}
	for i := len(lo) - 1; i >= 0; i-- {
		env = append(env, lo[i])
	}
	ref := "against the target gain"
	if s.Calibrate.Gain {
		ref = fmt.Sprintf("against the gain calibrated at %s °C", sig(s.TempRef))
	}
	title := "Gain error against temperature, " + ref
	p := newPlot(title, "temperature (°C)", "gain error (%)")
	p.Add(plotter.NewGrid())
	band, err := plotter.NewPolygon(env)
	if err != nil {
		return nil, nil, err
	}
	band.Color, band.LineStyle.Width = colSkyLight, 0
	p.Add(band)
	p.Legend.Add("worst-case envelope", band)
	for _, edge := range []plotter.XYs{lo, hi} {
		l, err := plotter.NewLine(edge)
		if err != nil {
			return nil, nil, err
		}
		l.Color, l.Width = colBlue, vg.Points(1)
		p.Add(l)
	}
	nl, err := plotter.NewLine(nom)
	if err != nil {
		return nil, nil, err
	}
	nl.Color, nl.Width = colGreen, vg.Points(2)
	p.Add(nl)
	p.Legend.Add("nominal parts", nl)
	lines := 0
	caption := "Gain error of the design over the spec's temperature range: the green line with nominal parts, the shaded band every tolerance and tempco at its worst end (linear envelope)"
	if lim := s.Limits.GainError; lim > 0 {
		for _, y := range []float64{-100 * lim, 100 * lim} {
			l, err := limitLine(plotter.XYs{{X: s.Temp.Min, Y: y}, {X: s.Temp.Max, Y: y}})
			if err != nil {
				return nil, nil, err
			}
			p.Add(l)
			lab, err := plotter.NewLabels(plotter.XYLabels{XYs: plotter.XYs{{X: s.Temp.Min + 0.01*(s.Temp.Max-s.Temp.Min), Y: y}}, Labels: []string{" limit " + sig(y) + " %"}})
			if err != nil {
				return nil, nil, err
			}
			for i := range lab.TextStyle {
				lab.TextStyle[i].Color, lab.TextStyle[i].Font.Variant, lab.TextStyle[i].Font.Size = colVermilion, "Sans", vg.Points(9)
			}
			p.Add(lab)
			lines++
		}
		caption += "; the dashed vermilion lines bound the gain-error limit ±" + budget.FormatFigure(lim, "") + "."
	} else {
		caption += "; the spec sets no gain-error limit, so no limit band is drawn."
	}
	// Room above the curves and the band for the legend.
	ylo, yhi := -100*s.Limits.GainError, 100*s.Limits.GainError
	for i := range lo {
		ylo, yhi = math.Min(ylo, lo[i].Y), math.Max(yhi, hi[i].Y)
	}
	if span := yhi - ylo; span > 0 {
		p.Y.Min, p.Y.Max = ylo-0.05*span, yhi+0.4*span
	}
	p.X.Min, p.X.Max = s.Temp.Min, s.Temp.Max
	if s.Temp.Max == s.Temp.Min {
		p.X.Min, p.X.Max = s.Temp.Min-1, s.Temp.Max+1
	}
	svg, err := svgOf(p, plotWidth, plotStandardH)
	if err != nil {
		return nil, nil, err
	}
	return &Plot{Name: "temperature", Title: title, Caption: caption, SVG: svg, LimitLines: lines}, tc, nil
}
