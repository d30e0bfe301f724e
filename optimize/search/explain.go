package search

import (
	"context"
	"fmt"

	"plumb/optimize/budget"
	"plumb/optimize/spec"
)

// ExplainN returns the full error budget of design n (1-based): the exact
// solve of package budget under the spec's method, with every limit's
// contributors, the worst corner and the cautions.
func (r *Result) ExplainN(n int) (*budget.Result, error) {
	d, err := r.DesignN(n)
	if err != nil {
		return nil, err
	}
	if r.spec == nil {
		return nil, ErrNoSpec
	}
	return budget.Evaluate(r.spec, d)
}

// budgetVerifier confirms designs with the exact budget of spec s: the
// search ranks on its screening figures, the budget has the last word.
func budgetVerifier(ctx context.Context, s *spec.Spec, trials func(done, total int)) verifier {
	return func(sd *spec.Design) (*budget.Result, []Failure, error) {
		br, err := budget.EvaluateContext(ctx, s, sd, trials)
		if err != nil {
			return nil, nil, err
		}
		out := limitFailures(br.Limits)
		if len(out) == 0 && !br.Pass && br.MonteCarlo != nil {
			mc := br.MonteCarlo
			out = append(out, Failure{Name: "yield", Value: mc.Yield, Limit: mc.YieldTarget, By: mc.YieldTarget - mc.Yield,
				Text: fmt.Sprintf("Monte Carlo yield %.2f %% against a target of %.2f %%", 100*mc.Yield, 100*mc.YieldTarget)})
		}
		return br, out, nil
	}
}

// limitFailures lists the failing limits of an exact budget (a stage's or
// a chain's), each with how far past its limit.
func limitFailures(ls []budget.Limit) []Failure {
	var out []Failure
	for _, l := range ls {
		if l.Pass {
			continue
		}
		by := 0.0
		if l.Limit != 0 {
			by = l.Value/l.Limit - 1
		}
		switch {
		case l.Unit == "dB":
			by = l.Limit - l.Value
		case !l.Max:
			by = -by
		}
		out = append(out, Failure{Name: l.Name, Value: l.Value, Limit: l.Limit, By: by,
			Text: fmt.Sprintf("%s %s against a limit of %s (%s)", l.Name, limitText(Limit{Value: l.Value, Unit: l.Unit}),
				limitText(Limit{Value: l.Limit, Unit: l.Unit}), l.MarginText)})
	}
	return out
}

// adopt replaces a design's screening figures by the exact budget's: its
// metrics, every limit the budget checks, the binding limit and the reason
// lines that quote them. What the tool prints and the JSON it writes for a
// ranked design are then the figures `plumb check` gives for the same
// parts; the screening figures only ever order and prune the search.
func adopt(d *Design, br *budget.Result) {
	d.Metrics = metricsOf(br.Metrics)
	d.Limits = d.Limits[:0:0]
	for _, l := range br.Limits {
		d.Limits = append(d.Limits, Limit{Name: l.Name, Value: l.Value, Limit: l.Limit, Margin: l.Margin, Pass: l.Pass, Unit: l.Unit, MarginText: l.MarginText})
	}
	d.Binding = br.Binding
	d.Cautions = br.Cautions
	d.budget = br
}

// metricsOf is the budget's metrics in the search's result contract.
func metricsOf(m budget.Metrics) Metrics {
	return Metrics{Gain: m.Gain, GainError: m.GainError, GainErrorInitial: m.GainErrorInitial, CMRRdB: m.CMRRdB,
		DriftPPMPerK: m.DriftPPMPerK, OutputOffsetV: m.OutputOffsetV, OffsetDriftVPerK: m.OffsetDriftVPerK,
		NoiseDensity: m.NoiseDensity, NoiseRMSV: m.NoiseRMSV, BandwidthHz: m.BandwidthHz,
		TotalErrorFS: m.TotalErrorFS, TotalErrorLSB: m.TotalErrorLSB, TotalDriftFS: m.TotalDriftFS, TotalDriftLSB: m.TotalDriftLSB}
}

// bindingLine says which limit binds design d, with its margin and its
// largest contributor: from the exact budget d adopted when it has one
// (no contributor named when that budget does not break the limit down),
// else from screen, the search's own estimate (nil: none). ok is false
// when no limit applies.
func bindingLine(d *Design, screen func(limit string) (string, float64)) (line string, ok bool) {
	bl, ok := binding(d.Limits)
	if !ok {
		return "", false
	}
	line = fmt.Sprintf("binding limit: %s, %s", bl.Name, marginWords(bl))
	var name string
	var share float64
	switch {
	case d.budget != nil:
		for _, l := range d.budget.Limits {
			if l.Name == bl.Name && len(l.Contributors) > 0 {
				name, share = l.Contributors[0].Name, l.Contributors[0].Share
			}
		}
	case screen != nil:
		name, share = screen(bl.Name)
	}
	if name != "" {
		line += fmt.Sprintf(", dominated by %s (%.0f %% of it)", name, 100*share)
	}
	return line, true
}

// marginWords is a limit's margin as plumb check words it when the exact
// budget gave the words, else as a ratio (above 1 passes).
func marginWords(l Limit) string {
	if l.MarginText != "" {
		return l.MarginText
	}
	return fmt.Sprintf("margin %.2fx", l.Margin)
}
