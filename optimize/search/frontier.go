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
	top, _, err := s.branchAndBound(ctx, FrontierPool, nil)
	if err != nil {
		return fmt.Errorf("search: %w", err)
	}
	pool := append([]Design(nil), res.Designs...)
	seen := map[string]bool{}
	for i := range pool {
		seen[gradeKey(&pool[i])] = true
	}
	for i := range top {
		d, sd, err := s.describe(&top[i])
		if err != nil {
			return err
		}
		if seen[gradeKey(&d)] {
			continue
		}
		seen[gradeKey(&d)] = true
		if verify != nil {
			br, fails, err := verify(sd)
			if err != nil || len(fails) > 0 {
				continue
			}
			adopt(&d, br)
		}
		d.ValueVariants = s.variants(&top[i])
		pool = append(pool, d)
	}
	res.Frontier = markFrontier(frontierOf(pool))
	return nil
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

// mergedFrontier fills res.Frontier for a search merged from exact
// sub-searches (the in-amp's second-stage gains, the current sense's
// shunts): the ranked designs and the cheapest designs of every
// sub-search, by cost, one per set of grades, up to FrontierPool beside
// the ranked ones, each confirmed by verify (nil: taken as it is), reduced
// to the frontier. all is sorted by cost.
func mergedFrontier(res *Result, all []subDesign, verify verifier) {
	pool := append([]Design(nil), res.Designs...)
	seen := map[string]bool{}
	for i := range pool {
		seen[gradeKey(&pool[i])] = true
	}
	for _, c := range all {
		if len(pool) >= len(res.Designs)+FrontierPool {
			break
		}
		if seen[gradeKey(&c.d)] {
			continue
		}
		seen[gradeKey(&c.d)] = true
		if verify != nil {
			br, fails, err := verify(c.sd)
			if err != nil || len(fails) > 0 {
				continue
			}
			adopt(&c.d, br)
		}
		c.d.Rank = 0
		pool = append(pool, c.d)
	}
	res.Frontier = markFrontier(frontierOf(pool))
}
