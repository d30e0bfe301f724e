package search

import (
	"context"
	"fmt"
	"slices"
	"strings"

	"plumb/optimize/budget"
	"plumb/optimize/spec"
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

// verdict counts what the exact budget refused while a search ranked its
// designs: the designs that pass the screening figures and fail the
// budget (rejected, listed among the near misses), those it could not run
// (broken), and the classes whose dearer designs were not tried because
// the budget failed more of their designs than the caps allow (cut).
type verdict struct {
	rejected int
	broken   unchecked
	cut      int
	maxOut   int // the cap on the designs of one search the budget fails
}

// add sums a sub-search's counts into v.
func (v *verdict) add(o *verdict) {
	v.rejected += o.rejected
	v.cut += o.cut
	v.maxOut = max(v.maxOut, o.maxOut)
	v.broken.n += o.broken.n
	for _, t := range o.broken.texts {
		if len(v.broken.texts) < maxUncheckedTexts && !slices.Contains(v.broken.texts, t) {
			v.broken.texts = append(v.broken.texts, t)
		}
	}
}

// notes are the notes a result carries about its verdict.
func (v *verdict) notes() []string {
	var out []string
	if v.cut > 0 {
		out = append(out, fmt.Sprintf("the exact budget failed the cheaper designs of %d class(es) that pass the screening figures; their dearer designs were not tried (at most %d per class, %d in all), so a design cheaper than those listed may pass: check one by hand with plumb check", v.cut, maxClassRejected, v.maxOut))
	}
	if v.rejected > 0 {
		out = append(out, fmt.Sprintf("%d design(s) that pass the screening figures fail the exact budget; they are among the near misses", v.rejected))
	}
	if n := v.broken.note("design(s) that pass the screening figures are not ranked"); n != "" {
		out = append(out, n)
	}
	return out
}

// infeasibleWhy is what an infeasible verdict adds to its message.
func (v *verdict) infeasibleWhy() string {
	switch {
	case v.cut > 0:
		return "; not proven: the exact budget failed so many designs that pass the screening figures that the dearer designs of some classes were not tried (see the notes)"
	case v.rejected > 0:
		return "; the designs that pass the screening figures all fail the exact budget (see the near misses)"
	case v.broken.n > 0:
		return "; the exact budget could not be run on the designs that pass the screening figures (see the notes)"
	}
	return ""
}

// rejectedDesign is the near miss of a design that passes the screening
// figures and fails the exact budget.
func rejectedDesign(d Design, sd *spec.Design, b classBest, fails []Failure) NearMiss {
	nm := NearMiss{Design: d, Fails: fails, sd: sd, class: b, Shortfall: exactShortfall(d.Limits)}
	nm.Reasons = []string{"passes the search's screening figures, but the exact budget fails it: " + failText(fails)}
	return nm
}
