package search

import (
	"fmt"
	"math"
	"slices"
	"sort"
	"strings"

	"plumb/catalog"
	"plumb/catalog/units"
	"plumb/optimize/assume"
	"plumb/optimize/cost"
	"plumb/optimize/spec"
)

// refOption is one catalog reference the search may pick for a spec whose
// reference is reference.part: auto.
type refOption struct {
	part          string
	v, tol, drift float64 // V, fraction, fraction per K
	offer         catalog.Offer
	assumed       []assume.Assumption
	// unusable says why the reference cannot run from the spec's supply
	// ("" when it can); such a reference is named in a note, not searched.
	unusable string
}

// refSupplyProblem says why reference r cannot run from the spec's positive
// rail vplus (V, from ground, as the stage's reference is referred): below
// its minimum input voltage, or its output voltage plus its dropout, or
// above its maximum input; with none of those figures known, not above its
// output voltage, which no reference makes from a lower input (common
// practice: a series reference needs headroom over its output, a shunt
// reference a feed resistor from a higher rail). It returns "" when r can
// run.
func refSupplyProblem(r catalog.Reference, vplus float64) string {
	v := func(x float64) string { return units.Format(x, "V") }
	switch {
	case catalog.Known(r.SupplyMinV) && vplus < r.SupplyMinV:
		return fmt.Sprintf("%s needs at least %s in; the positive rail is %s", r.Part, v(r.SupplyMinV), v(vplus))
	case catalog.Known(r.SupplyMaxV) && vplus > r.SupplyMaxV:
		return fmt.Sprintf("%s takes at most %s in; the positive rail is %s", r.Part, v(r.SupplyMaxV), v(vplus))
	case catalog.Known(r.DropoutV) && vplus < r.OutputV+r.DropoutV:
		return fmt.Sprintf("%s needs %s in (its output plus %s dropout); the positive rail is %s", r.Part, v(r.OutputV+r.DropoutV), v(r.DropoutV), v(vplus))
	case vplus <= r.OutputV:
		return fmt.Sprintf("%s cannot make %s from a positive rail of %s", r.Part, v(r.OutputV), v(vplus))
	}
	return ""
}

// refOptions lists the references of the catalog of the spec's voltage,
// their unknown figures at their defaults (assume.Reference), their prices in the build
// currency (c nil: as they are); a reference priced in a currency without a
// rate is left out, as every part is.
func refOptions(refs []catalog.Reference, s *spec.Spec, c *cost.Converter) []refOption {
	var out []refOption
	for _, r := range refs {
		if math.Abs(r.OutputV-s.Reference.V) > spec.RefVoltageMatch*s.Reference.V {
			continue
		}
		o := refOption{part: r.Part, v: r.OutputV, tol: r.Tolerance, drift: r.DriftPPM * 1e-6, offer: r.Offer,
			unusable: refSupplyProblem(r, s.Supply.Max)}
		if c != nil {
			conv, ok := c.Offer(r.Part, r.Offer)
			if !ok {
				continue
			}
			o.offer = conv
		}
		tol, ppm := o.tol, 1e6*o.drift
		o.assumed = assume.Reference(r.Part, &tol, &ppm)
		o.tol, o.drift = tol, ppm*1e-6
		out = append(out, o)
	}
	return out
}

// solveReferences is the search of a spec that picks its reference from
// the catalog (reference.part: auto): an outer choice over the catalog's
// references of the spec's voltage, each searched with its own figures by
// solve and its price added to every design (one placement per stage,
// priced at the build quantity as every part is). The ranked designs of
// all of them are merged by total cost, so the ranking is the same as one
// search over the references and the stage's parts together: each
// reference's own search ranks its cheapest designs, and the cheapest
// overall are among those. The near misses, the cheapest failing designs
// and the frontier are merged from every reference's search
// (mergeFailing, frontierOf); the diagnosis when nothing passes comes from
// the search of the reference whose closest near miss is nearest to
// passing. Under strict assumptions a
// reference with an unknown figure is left out.
func solveReferences(s *spec.Spec, refs []refOption, opt Options, solve func(*spec.Spec) (*Result, error)) (*Result, error) {
	if s.Assumptions == spec.AssumeStrict {
		refs = slices.DeleteFunc(refs, func(r refOption) bool { return len(r.assumed) > 0 })
	}
	var unusable []string
	refs = slices.DeleteFunc(refs, func(r refOption) bool {
		if r.unusable != "" {
			unusable = append(unusable, r.unusable)
		}
		return r.unusable != ""
	})
	if len(refs) == 0 {
		why := ""
		if len(unusable) > 0 {
			why = " that runs from the spec's supply (" + strings.Join(unusable, "; ") + ")"
		}
		return nil, fmt.Errorf("%w: reference.part auto: the catalog has no reference of %s%s%s; add one, raise the supply, or give the reference's figures instead of part: auto",
			ErrCatalogLacks, units.Format(s.Reference.V, "V"), map[bool]string{true: " with every figure given (assumptions: strict)"}[s.Assumptions == spec.AssumeStrict], why)
	}
	b, err := cost.BuildOf(s.Build)
	if err != nil {
		return nil, fmt.Errorf("%w: %w", ErrProblem, err)
	}
	top := opt.Top
	if top <= 0 {
		top = defaultTop
	}
	type ranked struct {
		d  Design
		sd *spec.Design
	}
	var all []ranked
	// near, cheap and front gather every reference's near misses,
	// cheapest failing designs and frontier, merged below.
	var front []Design
	var nears, cheaps []NearMiss
	nearest := math.Inf(1)
	var base *Result
	var baseErr error
	best := math.Inf(1)
	for _, ref := range refs {
		sr := *s
		r := *s.Reference
		r.Part, r.Tolerance, r.Drift = "", ref.tol, ref.drift
		sr.Reference = &r
		res, err := solve(&sr)
		if err != nil && !IsInfeasible(err) {
			return nil, err
		}
		if res == nil {
			continue
		}
		br, perr := cost.Price(b, []cost.Use{{Part: ref.part, Offer: &ref.offer, Placements: 1}})
		if perr != nil {
			res.Notes = append(res.Notes, fmt.Sprintf("reference %s left out: %v", ref.part, perr))
			continue
		}
		line := br.Lines[0]
		// A reference's tolerance and drift print in the columns of a
		// resistor's tolerance and tempco.
		part := Part{Position: "REF", Kind: string(catalog.KindReference), Part: ref.part, Quantity: 1, Bought: line.Bought, UnitPrice: line.UnitPrice,
			Tolerance: ref.tol, TCRppm: 1e6 * ref.drift}
		withRef := func(d *Design, sd *spec.Design) {
			d.TotalCost += br.Total
			d.UnitCost += br.PerUnit
			d.Parts = append(d.Parts, part)
			d.Assumptions = append(d.Assumptions, ref.assumed...)
			if sd != nil {
				sd.Reference = &spec.DesignReference{Part: ref.part, V: ref.v, Tolerance: ref.tol, Drift: ref.drift, Resolved: true}
			}
		}
		for i := range res.Designs {
			sd := res.designs[i]
			withRef(&res.Designs[i], sd)
			all = append(all, ranked{res.Designs[i], sd})
		}
		for _, list := range [][]NearMiss{res.NearMisses, res.CheapestFailing} {
			for i := range list {
				nm := &list[i]
				withRef(&nm.Design, nm.sd)
				if nm.fixSD != nil && nm.sd != nil {
					nm.fixSD.Reference = nm.sd.Reference
				}
				// A fix keeps the reference: the build's total carries it.
				if nm.Fix != nil && nm.Fix.TotalCost > 0 {
					nm.Fix.TotalCost += br.Total
				}
				for j := range nm.Alternatives {
					if nm.Alternatives[j].TotalCost > 0 {
						nm.Alternatives[j].TotalCost += br.Total
					}
				}
			}
		}
		for i := range res.Frontier {
			withRef(&res.Frontier[i], nil)
		}
		nears, cheaps = append(nears, res.NearMisses...), append(cheaps, res.CheapestFailing...)
		front = append(front, res.Frontier...)
		res.Notes = append(res.Notes, fmt.Sprintf("reference %s: %s %s, %s, priced %s per stage", ref.part,
			units.Format(ref.v, "V"), units.FormatPercent(ref.tol), units.FormatPPM(1e6*ref.drift), strconvCost(br.PerUnit, line.Currency)))
		// The base result (its diagnosis when nothing passes) is the
		// reference of the cheapest design, or with none the reference
		// whose closest near miss is nearest to passing.
		closest := math.Inf(1)
		if len(res.NearMisses) > 0 {
			closest = res.NearMisses[0].Shortfall
		}
		switch {
		case base == nil, len(res.Designs) > 0 && res.Designs[0].TotalCost < best,
			math.IsInf(best, 1) && len(res.Designs) == 0 && closest < nearest:
			if len(res.Designs) > 0 {
				best = res.Designs[0].TotalCost
			}
			base, baseErr = res, err
		}
		if len(res.Designs) == 0 {
			nearest = min(nearest, closest)
		}
	}
	if base == nil {
		return nil, fmt.Errorf("%w: reference.part auto: no reference of %s could be priced", ErrCatalogLacks, units.Format(s.Reference.V, "V"))
	}
	if len(unusable) > 0 {
		base.Notes = append(base.Notes, fmt.Sprintf("%d reference(s) of %s left out by the supply: %s", len(unusable), units.Format(s.Reference.V, "V"), strings.Join(unusable, "; ")))
	}
	cheapest := math.Inf(1)
	for _, r := range all {
		cheapest = min(cheapest, r.d.TotalCost)
	}
	mergeFailing(base, nears, cheaps, cheapest, len(refs))
	if len(front) > 0 {
		base.Frontier = frontierOf(front)
	}
	if len(all) == 0 {
		return base, baseErr
	}
	sort.SliceStable(all, func(i, j int) bool { return all[i].d.TotalCost < all[j].d.TotalCost })
	all = all[:min(top, len(all))]
	base.Designs, base.designs = base.Designs[:0:0], nil
	for i, r := range all {
		r.d.Rank = i + 1
		// The reasons that compare a design with the others of its own
		// reference's search are said again against the merged ranking.
		r.d.Reasons = slices.DeleteFunc(slices.Clone(r.d.Reasons), func(t string) bool {
			return strings.HasPrefix(t, "costs ") || strings.HasPrefix(t, "cheapest passing design")
		})
		if i == 0 {
			r.d.Reasons = append(r.d.Reasons, fmt.Sprintf("cheapest passing design over the %d reference(s) of %s and the stage's parts", len(refs), units.Format(s.Reference.V, "V")))
		} else {
			r.d.Reasons = append(r.d.Reasons, fmt.Sprintf("costs %.4g more per stage than rank 1", r.d.UnitCost-all[0].d.UnitCost))
		}
		base.Designs = append(base.Designs, r.d)
		base.designs = append(base.designs, r.sd)
	}
	parts := make([]string, len(refs))
	for i, r := range refs {
		parts[i] = r.part
	}
	base.Notes = append(base.Notes, fmt.Sprintf("reference picked from the catalog's %d reference(s) of %s (%s): each searched with its own figures and priced with the stage, the designs ranked together",
		len(refs), units.Format(s.Reference.V, "V"), strings.Join(parts, ", ")))
	// A frontier design among the merged ranking takes its rank there.
	rankOf := map[string]int{}
	for _, d := range base.Designs {
		rankOf[designKey(&d)] = d.Rank
	}
	for i := range base.Frontier {
		base.Frontier[i].Rank = rankOf[designKey(&base.Frontier[i])]
	}
	base.spec = s
	return base, nil
}

// mergeFailing sets res's near misses and cheapest failing designs from
// those of every reference's search (nears, cheaps): the near misses
// cheaper than limit, the cheapest passing design of all references
// (+Inf when none passes), closest first (by shortfall), at most
// maxNearMisses; the cheapest failing designs not among them, as many as
// one search lists on average.
func mergeFailing(res *Result, nears, cheaps []NearMiss, limit float64, nrefs int) {
	keep := slices.DeleteFunc(slices.Clone(nears), func(nm NearMiss) bool { return nm.TotalCost >= limit })
	sort.SliceStable(keep, func(i, j int) bool { return keep[i].Shortfall < keep[j].Shortfall })
	res.NearMisses = keep[:min(len(keep), maxNearMisses)]
	listed := map[string]bool{}
	for i := range res.NearMisses {
		listed[designKey(&res.NearMisses[i].Design)] = true
	}
	n := len(cheaps) / max(nrefs, 1)
	if len(cheaps) > 0 {
		n = max(n, 1)
	}
	rest := slices.DeleteFunc(slices.Clone(cheaps), func(nm NearMiss) bool { return listed[designKey(&nm.Design)] })
	sort.SliceStable(rest, func(i, j int) bool { return rest[i].TotalCost < rest[j].TotalCost })
	res.CheapestFailing = rest[:min(len(rest), n)]
}

// strconvCost writes a price with its currency.
func strconvCost(v float64, currency string) string {
	return strings.TrimSpace(fmt.Sprintf("%.4g %s", v, currency))
}
