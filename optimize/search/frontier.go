package search

import (
	"context"
	"fmt"
	"sort"
)

// FrontierPool is how many of the cheapest passing classes the frontier is
// drawn from (each confirmed by the exact budget).
const FrontierPool = 48

// dominates reports whether design a is at least as cheap as b and has at
// least as much margin on every limit b is checked against, and is
// strictly better in one of them: then b is not on the frontier.
func dominates(a, b *Design) bool {
	if a.TotalCost > b.TotalCost {
		return false
	}
	strict := a.TotalCost < b.TotalCost
	for _, lb := range b.Limits {
		la, ok := findLimit(a.Limits, lb.Name)
		if !ok || la.Margin < lb.Margin {
			return false
		}
		strict = strict || la.Margin > lb.Margin
	}
	return strict
}

// frontierOf returns the designs of ds no other design dominates, by cost
// (then by the worst margin, larger first).
func frontierOf(ds []Design) []Design {
	var out []Design
	for i := range ds {
		dominated := false
		for j := range ds {
			if i != j && dominates(&ds[j], &ds[i]) {
				dominated = true
				break
			}
		}
		if !dominated {
			out = append(out, ds[i])
		}
	}
	sort.SliceStable(out, func(i, j int) bool {
		if out[i].TotalCost != out[j].TotalCost {
			return out[i].TotalCost < out[j].TotalCost
		}
		return worstMargin(&out[i]) > worstMargin(&out[j])
	})
	return out
}

// worstMargin is a design's smallest margin.
func worstMargin(d *Design) float64 {
	if l, ok := binding(d.Limits); ok {
		return l.Margin
	}
	return 0
}

// addFrontier fills res.Frontier: the FrontierPool cheapest passing classes
// (one design per set of grades, the cheaper), each confirmed by the exact
// budget when there is one, with the ranked designs, reduced to those no
// cheaper design matches in margin on every limit.
func (s *space) addFrontier(ctx context.Context, res *Result, verify verifier) error {
	cands, err := s.frontierPool(ctx)
	if err != nil {
		return err
	}
	res.Frontier = frontierFrom(res, cands, verify)
	return nil
}

// frontierPool lists the designs of the FrontierPool cheapest passing
// classes by cost, on the screening figures.
func (s *space) frontierPool(ctx context.Context) ([]subDesign, error) {
	top, _, err := s.branchAndBound(ctx, FrontierPool, nil)
	if err != nil {
		return nil, fmt.Errorf("search: %w", err)
	}
	out := make([]subDesign, 0, len(top))
	for i := range top {
		d, sd, err := s.describe(&top[i])
		if err != nil {
			return nil, err
		}
		d.ValueVariants = s.variants(&top[i])
		out = append(out, subDesign{d, sd})
	}
	return out, nil
}

// frontierFrom is the frontier of the ranked designs of res and of the
// candidates (by cost), one per set of grades, up to FrontierPool beside
// the ranked ones, each confirmed by verify unless it carries its exact
// budget already (nil: taken as it is), marked.
func frontierFrom(res *Result, cands []subDesign, verify verifier) []Design {
	pool := append([]Design(nil), res.Designs...)
	seen := map[string]bool{}
	for i := range pool {
		seen[gradeKey(&pool[i])] = true
	}
	for _, c := range cands {
		if len(pool) >= len(res.Designs)+FrontierPool {
			break
		}
		if seen[gradeKey(&c.d)] {
			continue
		}
		seen[gradeKey(&c.d)] = true
		if verify != nil && c.d.budget == nil {
			br, fails, err := verify(c.sd)
			if err != nil || len(fails) > 0 {
				continue
			}
			adopt(&c.d, br)
		}
		c.d.Rank = 0
		pool = append(pool, c.d)
	}
	return markFrontier(frontierOf(pool))
}

// markFrontier adds to each frontier design the line that says why it is
// there (a design not among the ranked ones gets its limits first).
func markFrontier(f []Design) []Design {
	for i := range f {
		d := &f[i]
		line := fmt.Sprintf("on the cost-versus-margin frontier: no design at or below %.4g per stage has as much margin on every limit", d.UnitCost)
		if d.Rank == 0 {
			d.Reasons = []string{limitSummary(d.Limits), line}
		} else {
			d.Reasons = append(append([]string(nil), d.Reasons...), line)
		}
	}
	return f
}

// mergedFrontier fills res.Frontier for a search merged from
// sub-searches (the in-amp's second-stage gains, the current sense's
// shunts): the ranked designs and the cheapest designs of every
// sub-search's frontier pool (cands), by cost, as frontierFrom takes them.
func mergedFrontier(res *Result, cands []subDesign, verify verifier) {
	sort.SliceStable(cands, func(i, j int) bool { return cands[i].d.TotalCost < cands[j].d.TotalCost })
	res.Frontier = frontierFrom(res, cands, verify)
}
