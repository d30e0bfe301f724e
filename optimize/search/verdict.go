package search

import (
	"context"
	"fmt"
	"slices"
	"strings"

	"plumb/optimize/budget"
)

// maxUncheckedTexts is how many distinct budget errors a note quotes.
const maxUncheckedTexts = 2

// unchecked counts the designs the exact budget could not evaluate (a part
// figure the model refuses, a figure that is not finite). A design is
// ranked, listed, exported or reported only when the exact budget passed
// it with finite figures, so these are dropped, and a note counts them and
// quotes the budget's messages.
type unchecked struct {
	n     int
	texts []string
}

func (u *unchecked) add(err error) {
	u.n++
	if t := err.Error(); len(u.texts) < maxUncheckedTexts && !slices.Contains(u.texts, t) {
		u.texts = append(u.texts, t)
	}
}

// note says how many designs were dropped and why, after what (which
// designs, and what happened to them); "" when none was.
func (u *unchecked) note(what string) string {
	if u.n == 0 {
		return ""
	}
	txt := fmt.Sprintf("%d %s: the exact budget could not be run on them: %s", u.n, what, strings.Join(u.texts, "; "))
	if u.n > len(u.texts) {
		txt += " (and the like)"
	}
	return txt
}

// finish is the last check of a result before it is returned: a
// search stopped by ctx returns its error (the budgets it could not finish
// are not to be read as designs the budget refused); no figure of a ranked
// design may be infinite or NaN (an error naming it), and a near miss with
// such a figure is dropped with a note.
func (r *Result) finish(ctx context.Context) error {
	if err := ctx.Err(); err != nil {
		return fmt.Errorf("search: stopped: %w", err)
	}
	for i := range r.Designs {
		if err := budget.CheckFinite(fmt.Sprintf("design %d (%s)", r.Designs[i].Rank, r.Designs[i].Family), &r.Designs[i]); err != nil {
			return fmt.Errorf("search: %w", err)
		}
	}
	var broken unchecked
	r.NearMisses = keepFinite(r.NearMisses, "near miss ", &broken)
	r.CheapestFailing = keepFinite(r.CheapestFailing, "failing design ", &broken)
	if n := broken.note("near miss(es) are not listed"); n != "" {
		r.Notes = append(r.Notes, n)
	}
	if r.Infeasible != nil {
		if err := budget.CheckFinite("the infeasibility report", r.Infeasible); err != nil {
			return fmt.Errorf("search: %w", err)
		}
	}
	return nil
}

// keepFinite drops the failing designs with a figure that is not finite,
// counting them in broken.
func keepFinite(list []NearMiss, what string, broken *unchecked) []NearMiss {
	kept := list[:0]
	for i := range list {
		if err := budget.CheckFinite(what+list[i].Family, &list[i]); err != nil {
			broken.add(err)
			continue
		}
		kept = append(kept, list[i])
	}
	return kept
}
