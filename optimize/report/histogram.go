package report

import (
	"fmt"
	"math"
	"slices"
	"strings"

	"gonum.org/v1/plot/plotter"

	"plumb/optimize/budget"
	"plumb/optimize/spec"
)

// histMetric ties a Monte Carlo sample column to its limit and display.
type histMetric struct {
	key   string // budget.Metric* sample name
	limit string // budget.Limit* name
	title string
	unit  string // sample unit before scaling: "%" (fraction), "dB", "ppm/K", "V", "V/K"
}

var histMetrics = []histMetric{
	{budget.MetricGainError, budget.LimitGainError, "signed gain error", "%"},
	{budget.MetricCMRR, budget.LimitCMRR, "CMRR", "dB"},
	{budget.MetricDrift, budget.LimitGainDrift, "gain drift", "ppm/K"},
	{budget.MetricOffset, budget.LimitOutputOffset, "|output offset|", "V"},
	{budget.MetricOffsetDrift, budget.LimitOffsetDrift, "|offset drift|", "V/K"},
}

// specLimit returns the spec's limit for a limit name in the sample's own
// unit, and whether the spec sets one.
func specLimit(s *spec.Spec, name string) (float64, bool) {
	l := s.Limits
	v := map[string]float64{budget.LimitGainError: l.GainError, budget.LimitCMRR: l.CMRRdB, budget.LimitGainDrift: l.GainDrift * 1e6,
		budget.LimitOutputOffset: l.OutputOffsetV, budget.LimitOffsetDrift: l.OffsetDriftVK}[name]
	return v, v > 0
}

// monteCarloSection summarises a Monte Carlo run and draws the histogram of
// every metric the spec limits, with its limit lines.
func monteCarloSection(s *spec.Spec, res *budget.Result, mc *budget.MCSummary) (*MonteCarlo, error) {
	out := &MonteCarlo{}
	source := "the budget's own run"
	if res.MonteCarlo != mc {
		source = "a run for this report (the spec's method is " + res.Method + ")"
	}
	out.Summary = append(out.Summary,
		Row{"trials", fmt.Sprintf("%d, seed %d, %s distribution; %s", mc.Trials, mc.Seed, mc.Distribution, source)},
		Row{"yield (every limit)", sig(100*mc.Yield) + " %"})
	if mc.YieldTarget > 0 {
		out.Summary = append(out.Summary, Row{"yield target", sig(100*mc.YieldTarget) + " %"})
	}
	var names []string
	for n := range mc.PerLimitYield {
		names = append(names, n)
	}
	slices.Sort(names)
	var per []string
	for _, n := range names {
		per = append(per, n+" "+sig(100*mc.PerLimitYield[n])+" %")
	}
	if len(per) > 0 {
		out.Summary = append(out.Summary, Row{"yield per limit", strings.Join(per, ", ")})
	}
	for _, hm := range histMetrics {
		lim, ok := specLimit(s, hm.limit)
		samples := mc.Samples[hm.key]
		if !ok || len(samples) == 0 {
			continue
		}
		p, err := histogram(hm, samples, lim, mc)
		if err != nil {
			return nil, fmt.Errorf("histogram of %s: %w", hm.title, err)
		}
		out.Plots = append(out.Plots, p)
	}
	return out, nil
}

// histogram bins the finite samples into histBins equal bins over their
// range and draws them with the limit lines: ±limit for the signed gain
// error, the minimum for CMRR, the maximum for the rest.
func histogram(hm histMetric, samples []float64, lim float64, mc *budget.MCSummary) (Plot, error) {
	conv := func(v float64) float64 { return v }
	unit := hm.unit
	switch hm.unit {
	case "%":
		conv = func(v float64) float64 { return 100 * v }
	case "V", "V/K":
		hi := lim
		for _, v := range samples {
			hi = math.Max(hi, finiteOr(math.Abs(v), 0))
		}
		m, pu := scale(hi, hm.unit)
		conv, unit = func(v float64) float64 { return m * v }, pu
	}
	xs := make([]float64, 0, len(samples))
	dropped := 0
	for _, v := range samples {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			dropped++
			continue
		}
		xs = append(xs, conv(v))
	}
	limits := []float64{conv(lim)}
	if hm.key == budget.MetricGainError {
		limits = []float64{-conv(lim), conv(lim)}
	}
	bins := binned(xs, histBins)
	yield := mc.PerLimitYield[hm.limit]
	title := fmt.Sprintf("%s: %d trials, %s %% within the limit", hm.title, mc.Trials, sig(100*yield))
	p := newPlot(title, hm.title+" ("+unit+")", "trials per bin")
	p.Add(plotter.NewGrid())
	peak := 1.0
	if len(bins) > 0 {
		h := &plotter.Histogram{Bins: bins, FillColor: colSky, LineStyle: plotter.DefaultLineStyle}
		h.LineStyle.Color, h.LineStyle.Width = colBlue, 0.5
		p.Add(h)
		for _, b := range bins {
			peak = math.Max(peak, b.Weight)
		}
	}
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, b := range bins {
		lo, hi = math.Min(lo, b.Min), math.Max(hi, b.Max)
	}
	for _, x := range limits {
		l, err := limitLine(plotter.XYs{{X: x, Y: 0}, {X: x, Y: peak * 1.1}})
		if err != nil {
			return Plot{}, err
		}
		p.Add(l)
		lo, hi = math.Min(lo, x), math.Max(hi, x)
	}
	pad := 0.05 * (hi - lo)
	if pad == 0 {
		pad = math.Max(1e-12, 0.05*math.Abs(hi))
	}
	p.X.Min, p.X.Max, p.Y.Min, p.Y.Max = lo-pad, hi+pad, 0, peak*1.15
	svg, err := svgOf(p, plotWidth, plotStandardH)
	if err != nil {
		return Plot{}, err
	}
	caption := fmt.Sprintf("Distribution of %s over %d Monte Carlo trials (seed %d); the dashed vermilion line is the limit %s.",
		hm.title, mc.Trials, mc.Seed, budget.FormatFigure(lim, budget.UnitOf(hm.limit)))
	if dropped > 0 {
		caption += fmt.Sprintf(" %d trials with no finite value (a perfect match) are left out of the bins.", dropped)
	}
	return Plot{Name: "hist-" + fileName(hm.limit), Title: title, Caption: caption, SVG: svg, LimitLines: len(limits)}, nil
}

// binned counts xs into n equal bins over [min, max]; a range of zero
// width gets one bin around the value.
func binned(xs []float64, n int) []plotter.HistogramBin {
	if len(xs) == 0 {
		return nil
	}
	lo, hi := slices.Min(xs), slices.Max(xs)
	if hi == lo {
		w := math.Max(math.Abs(lo)*1e-3, 1e-12)
		return []plotter.HistogramBin{{Min: lo - w, Max: hi + w, Weight: float64(len(xs))}}
	}
	w := (hi - lo) / float64(n)
	bins := make([]plotter.HistogramBin, n)
	for i := range bins {
		bins[i].Min, bins[i].Max = lo+float64(i)*w, lo+float64(i+1)*w
	}
	for _, x := range xs {
		i := min(int((x-lo)/w), n-1)
		bins[i].Weight++
	}
	return bins
}
