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
	return func(sd *spec.Design) ([]Failure, error) {
		br, err := budget.Evaluate(s, sd)
		if err != nil {
			return nil, err
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
				Text: fmt.Sprintf("%s %.4g %s against %.4g (%s)", l.Name, l.Value, l.Unit, l.Limit, l.MarginText)})
		}
		if len(out) == 0 && !br.Pass && br.MonteCarlo != nil {
			mc := br.MonteCarlo
			out = append(out, Failure{Name: "yield", Value: mc.Yield, Limit: mc.YieldTarget, By: mc.YieldTarget - mc.Yield,
				Text: fmt.Sprintf("Monte Carlo yield %.4g against %.4g", mc.Yield, mc.YieldTarget)})
		}
		return out, nil
	}
}
