package search

import (
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
func budgetVerifier(s *spec.Spec) verifier {
	return func(sd *spec.Design) (*budget.Result, []Failure, error) {
		br, err := budget.Evaluate(s, sd)
		if err != nil {
			return nil, nil, err
		}
		var out []Failure
		for _, l := range br.Limits {
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
		if len(out) == 0 && !br.Pass && br.MonteCarlo != nil {
			mc := br.MonteCarlo
			out = append(out, Failure{Name: "yield", Value: mc.Yield, Limit: mc.YieldTarget, By: mc.YieldTarget - mc.Yield,
				Text: fmt.Sprintf("Monte Carlo yield %.2f %% against a target of %.2f %%", 100*mc.Yield, 100*mc.YieldTarget)})
		}
		return br, out, nil
	}
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
		d.Limits = append(d.Limits, Limit{Name: l.Name, Value: l.Value, Limit: l.Limit, Margin: l.Margin, Pass: l.Pass, Unit: l.Unit})
	}
	d.Binding = br.Binding
	d.Cautions = br.Cautions
	d.budget = br
}

// metricsOf is the budget's metrics in the search's result contract.
func metricsOf(m budget.Metrics) Metrics {
	return Metrics{Gain: m.Gain, GainError: m.GainError, GainErrorInitial: m.GainErrorInitial, CMRRdB: m.CMRRdB,
		DriftPPMPerK: m.DriftPPMPerK, OutputOffsetV: m.OutputOffsetV, OffsetDriftVPerK: m.OffsetDriftVPerK,
		NoiseDensity: m.NoiseDensity, NoiseRMSV: m.NoiseRMSV, BandwidthHz: m.BandwidthHz}
}

// budgetDominant returns the largest contributor to limit in the exact
// budget d adopted, and its share; found is false without a budget or a
// breakdown of that limit.
func budgetDominant(d *Design, limit string) (name string, share float64, found bool) {
	if d.budget == nil {
		return "", 0, false
	}
	for _, l := range d.budget.Limits {
		if l.Name == limit && len(l.Contributors) > 0 {
			return l.Contributors[0].Name, l.Contributors[0].Share, true
		}
	}
	return "", 0, false
}
