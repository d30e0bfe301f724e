package report

import (
	"fmt"
	"math"
	"slices"
	"strings"

	"plumb/catalog"

	"plumb/optimize/budget"
	"plumb/optimize/search"
	"plumb/optimize/spec"
)

// buildDesign computes one design's section: the exact budget under the
// spec's method, its charts, the Monte Carlo histograms, the temperature
// sweep and the priced parts list. sr is the search's view of the design
// (nil for a design given directly).
func buildDesign(s *spec.Spec, d *spec.Design, sr *search.Design, rank int, in *Input, pr *pricer) (*Design, error) {
	res, err := budget.Evaluate(s, d)
	if err != nil {
		return nil, fmt.Errorf("error budget: %w", err)
	}
	dr := &Design{Rank: rank, ID: fmt.Sprintf("d%d", rank), Family: d.Family, Pass: res.Pass, Binding: res.Binding,
		Cautions: res.Cautions, Notes: res.Notes, WorstCorner: res.WorstCorner, result: res}
	dr.Title = designTitle(d, sr)
	if sr != nil {
		dr.Reasons, dr.Family = sr.Reasons, sr.Family
	}
	dr.Limits = limitTable(res)
	for _, l := range res.Limits {
		if len(l.Contributors) == 0 {
			continue
		}
		p, t, err := budgetChart(res.Method, l)
		if err != nil {
			return nil, fmt.Errorf("budget chart of %s: %w", l.Name, err)
		}
		dr.Budgets = append(dr.Budgets, Budget{Limit: l.Name, Plot: p, Table: t})
	}
	mc, err := monteCarloOf(s, d, res, in.Trials)
	if err != nil {
		return nil, fmt.Errorf("Monte Carlo: %w", err)
	}
	if dr.MonteCarlo, err = monteCarloSection(s, res, mc); err != nil {
		return nil, err
	}
	if dr.Temperature, err = temperaturePlot(s, d, in.TempPoints); err != nil {
		return nil, fmt.Errorf("gain error against temperature: %w", err)
	}
	bom, err := pr.price(d, sr)
	if err != nil {
		return nil, fmt.Errorf("parts list: %w", err)
	}
	dr.Parts, dr.PartsTotals = bom.table, bom.totals
	dr.UnitCost, dr.TotalCost = bom.unit, bom.total
	if sr != nil {
		dr.UnitCost, dr.TotalCost = money(sr.UnitCost, sr.Currency), money(sr.TotalCost, sr.Currency)
	}
	dr.Cautions = append(dr.Cautions, bom.cautions...)
	// Plot names become element ids and file names: unique per report.
	for _, p := range dr.plots() {
		p.Name = dr.ID + "-" + p.Name
	}
	return dr, nil
}

// designTitle names a design by its parts: "difference-discrete:
// QT25-4K99, QT25-1K00 on HL-R2R1". A design given directly keeps its name.
func designTitle(d *spec.Design, sr *search.Design) string {
	if sr == nil {
		if d.Name != "" {
			return d.Name
		}
		return d.Family + " design"
	}
	var parts []string
	amp := ""
	for _, p := range sr.Parts {
		if p.Kind == string(catalog.KindAmplifier) {
			amp = p.Part
		} else if !slices.Contains(parts, p.Part) {
			parts = append(parts, p.Part)
		}
	}
	t := sr.Family + ": " + strings.Join(parts, ", ")
	if amp != "" {
		if len(parts) > 0 {
			t += " on "
		}
		t += amp
	}
	return t
}

// plots returns every figure of the design, in report order.
func (d *Design) plots() []*Plot {
	var out []*Plot
	for i := range d.Budgets {
		out = append(out, &d.Budgets[i].Plot)
	}
	if d.MonteCarlo != nil {
		for i := range d.MonteCarlo.Plots {
			out = append(out, &d.MonteCarlo.Plots[i])
		}
	}
	if d.Temperature != nil {
		out = append(out, d.Temperature)
	}
	return out
}

// monteCarloOf returns the Monte Carlo summary with samples: the budget's
// own when the spec's method is Monte Carlo, else a run of a copy of the
// spec switched to Monte Carlo (same seed and distribution).
func monteCarloOf(s *spec.Spec, d *spec.Design, res *budget.Result, trials int) (*budget.MCSummary, error) {
	if res.MonteCarlo != nil && len(res.MonteCarlo.Samples) > 0 {
		return res.MonteCarlo, nil
	}
	c := *s
	c.Analysis.Method = spec.MonteCarlo
	c.Analysis.Yield = 0
	if trials <= 0 {
		trials = min(s.Analysis.Trials, DefaultTrials)
		if trials <= 0 {
			trials = DefaultTrials
		}
	}
	c.Analysis.Trials = trials
	mres, err := budget.Evaluate(&c, d)
	if err != nil {
		return nil, err
	}
	if mres.MonteCarlo == nil {
		return nil, fmt.Errorf("the budget returned no Monte Carlo summary")
	}
	return mres.MonteCarlo, nil
}

// limitTable lists every checked limit of a design.
func limitTable(res *budget.Result) Table {
	t := Table{Header: []string{"limit", "value", "limit", "margin", "verdict"}}
	for _, l := range res.Limits {
		verdict, class := "pass", "pass"
		if !l.Pass {
			verdict, class = "FAIL", "fail"
		}
		if l.Name == res.Binding {
			verdict += ", binding"
			class += " binding"
		}
		t.Rows = append(t.Rows, []Cell{{Text: l.Name}, {Text: budget.FormatFigure(l.Value, l.Unit)}, {Text: limitSide(l) + budget.FormatFigure(l.Limit, l.Unit)},
			{Text: l.MarginText}, {Text: verdict, Class: class}})
	}
	return t
}

// limitSide says whether a limit is a maximum or a minimum.
func limitSide(l budget.Limit) string {
	if l.Max {
		return "≤ "
	}
	return "≥ "
}

// compareTable puts the designs side by side: costs, every limit's value
// against its limit with the margin, and the binding limit.
func compareTable(ds []*Design) Table {
	t := Table{Header: []string{""}}
	if len(ds) == 0 {
		return t
	}
	for _, d := range ds {
		t.Header = append(t.Header, fmt.Sprintf("#%d %s", d.Rank, d.Title))
	}
	row := func(name string, f func(d *Design) Cell) {
		r := []Cell{{Text: name}}
		for _, d := range ds {
			r = append(r, f(d))
		}
		t.Rows = append(t.Rows, r)
	}
	row("family", func(d *Design) Cell { return Cell{Text: d.Family} })
	row("cost per stage", func(d *Design) Cell { return Cell{Text: d.UnitCost} })
	row("cost of the build", func(d *Design) Cell { return Cell{Text: d.TotalCost} })
	// Limits in the order of the first design that checks them.
	var names []string
	seen := map[string]bool{}
	for _, d := range ds {
		for _, l := range d.result.Limits {
			if !seen[l.Name] {
				seen[l.Name] = true
				names = append(names, l.Name)
			}
		}
	}
	for _, n := range names {
		row(n, func(d *Design) Cell {
			for _, l := range d.result.Limits {
				if l.Name == n {
					c := Cell{Text: fmt.Sprintf("%s / %s%s (%s)", budget.FormatFigure(l.Value, l.Unit), limitSide(l), budget.FormatFigure(l.Limit, l.Unit), l.MarginText), Class: "pass"}
					if !l.Pass {
						c.Class = "fail"
					}
					if l.Name == d.Binding {
						c.Class += " binding"
					}
					return c
				}
			}
			return Cell{Text: "not checked"}
		})
	}
	row("binding limit", func(d *Design) Cell { return Cell{Text: d.Binding, Class: "binding"} })
	row("verdict", func(d *Design) Cell {
		if d.Pass {
			return Cell{Text: "meets every limit", Class: "pass"}
		}
		return Cell{Text: "fails the exact budget", Class: "fail"}
	})
	return t
}

// finiteOr returns v, or alt when v is not finite.
func finiteOr(v, alt float64) float64 {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return alt
	}
	return v
}
