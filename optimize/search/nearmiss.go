package search

import (
	"fmt"
	"slices"
	"strings"
)

// maxNearEvals bounds the exact budgets a solve runs for its near misses
// (the design and its fix each take one), so that reporting near misses
// costs at most this many budget evaluations beyond the ranked designs.
const maxNearEvals = 12

// nearCheck confirms near misses with the exact budget: the screening
// figures find them, the budget has the last word on their figures, their
// failures and whether their fix really passes.
type nearCheck struct {
	verify verifier // nil: no spec, near misses keep the screening figures
	evals  int      // budget evaluations run so far
	// pessimistic counts near misses the screening failed and the exact
	// budget passes; they are not listed.
	pessimistic int
	// broken counts near misses the exact budget could not evaluate; they
	// are not listed either.
	broken unchecked
}

// confirm evaluates near miss nm with the exact budget and adopts its
// figures and failures. It returns false when the budget passes the design
// (the screening was pessimistic for it: it is no near miss) or cannot
// evaluate it (its screening figures would be all there is to show). Once
// maxNearEvals evaluations have run, or without a spec, nm keeps its
// screening figures and a reason says so.
func (c *nearCheck) confirm(nm *NearMiss) bool {
	if c.verify == nil || nm.sd == nil {
		return true
	}
	if c.evals >= maxNearEvals {
		nm.Reasons = append(nm.Reasons, fmt.Sprintf("screening figures: not checked by the exact budget (at most %d budget runs per search go to near misses)", maxNearEvals))
		return true
	}
	c.evals++
	br, fails, err := c.verify(nm.sd)
	if err != nil {
		c.broken.add(err)
		return false
	}
	if len(fails) == 0 {
		c.pessimistic++
		return false
	}
	adopt(&nm.Design, br)
	nm.Fails = fails
	rest := nm.Reasons
	if len(rest) > 0 && strings.HasPrefix(rest[0], "cheaper than rank 1") {
		rest = rest[1:]
	}
	nm.Reasons = append([]string{fmt.Sprintf("cheaper than rank 1 but the exact budget fails %d limit(s): %s", len(fails), failText(fails))}, rest...)
	c.checkFix(nm)
	return true
}

// checkFix runs the exact budget on nm's fixed design and says so in the
// reasons when it still fails.
func (c *nearCheck) checkFix(nm *NearMiss) {
	if nm.Fix == nil || nm.fixSD == nil || c.evals >= maxNearEvals {
		return
	}
	c.evals++
	_, fails, err := c.verify(nm.fixSD)
	switch {
	case err != nil:
		// A fix the exact budget cannot evaluate is no fix.
		nm.Reasons = slices.DeleteFunc(nm.Reasons, func(r string) bool { return strings.HasPrefix(r, fixReason) })
		nm.Reasons = append(nm.Reasons, fmt.Sprintf("the cheapest single change the screening found (%s) could not be checked by the exact budget: %v", nm.Fix.Change, err))
		nm.Fix, nm.fixSD = nil, nil
	case len(fails) > 0:
		var names []string
		for _, f := range fails {
			names = append(names, f.Name)
		}
		nm.Reasons = append(nm.Reasons, "the fix passes the screening figures; the exact budget still fails "+strings.Join(names, ", "))
	}
}

// notes say how many near-miss candidates the screening failed and the
// budget passes, and how many the budget could not evaluate (none: no note).
func (c *nearCheck) notes() []string {
	var out []string
	if c.pessimistic > 0 {
		out = append(out, fmt.Sprintf("%d near-miss candidate(s) fail the screening figures but pass the exact budget (the screening is pessimistic for them); they are not listed as near misses", c.pessimistic))
	}
	if n := c.broken.note("near-miss candidate(s) are not listed"); n != "" {
		out = append(out, n)
	}
	return out
}

// failText joins the failures' texts.
func failText(fails []Failure) string {
	var names []string
	for _, f := range fails {
		names = append(names, f.Text)
	}
	return strings.Join(names, "; ")
}
