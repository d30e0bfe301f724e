package search

import (
	"context"
	"fmt"
	"math"
	"slices"
	"sort"
	"strings"

	"plumb/catalog"
	"plumb/optimize/budget"
	"plumb/optimize/spec"
)

// specLimit reaches one limit of a spec: its field, whether it is a
// maximum, the unit of the budget's figure and the factor from the spec's
// field to that figure (gain drift: fraction per K -> ppm/K). A channel
// limit (total error, total drift at the ADC) has inLSB instead: its field
// is a fraction of full scale and the budget shows it in LSB (2^bits per
// full scale) or in % FS, as the spec wrote it.
type specLimit struct {
	name  string
	field func(l *spec.Limits) *float64
	max   bool
	unit  string
	scale float64
	inLSB func(l *spec.Limits) *bool
}

// unitOf is the unit of the budget's figure of l under spec s.
func (l specLimit) unitOf(s *spec.Spec) string {
	switch {
	case l.inLSB == nil:
		return l.unit
	case *l.inLSB(&s.Limits):
		return budget.UnitLSB
	}
	return budget.UnitFS
}

// scaleOf is the factor from l's field in s to the budget's figure.
func (l specLimit) scaleOf(s *spec.Spec) float64 {
	switch {
	case l.inLSB == nil:
		return l.scale
	case *l.inLSB(&s.Limits) && s.ADC != nil:
		return s.ADC.Codes()
	}
	return 1
}

// specLimits are the limits a spec can set, in the order the budget lists
// them.
var specLimits = []specLimit{
	{budget.LimitGainError, func(l *spec.Limits) *float64 { return &l.GainError }, true, "", 1, nil},
	{budget.LimitCMRR, func(l *spec.Limits) *float64 { return &l.CMRRdB }, false, "dB", 1, nil},
	{budget.LimitGainDrift, func(l *spec.Limits) *float64 { return &l.GainDrift }, true, "ppm/K", 1e6, nil},
	{budget.LimitOutputOffset, func(l *spec.Limits) *float64 { return &l.OutputOffsetV }, true, "V", 1, nil},
	{budget.LimitOffsetDrift, func(l *spec.Limits) *float64 { return &l.OffsetDriftVK }, true, "V/K", 1, nil},
	{budget.LimitNoiseRMS, func(l *spec.Limits) *float64 { return &l.NoiseRMSV }, true, "V", 1, nil},
	{budget.LimitNoiseDensity, func(l *spec.Limits) *float64 { return &l.NoiseDensity }, true, "V/rtHz", 1, nil},
	{budget.LimitBandwidth, func(l *spec.Limits) *float64 { return &l.BandwidthHz }, false, "Hz", 1, nil},
	{budget.LimitInputImpedance, func(l *spec.Limits) *float64 { return &l.InputImpedance }, false, "ohm", 1, nil},
	{budget.LimitTotalError, func(l *spec.Limits) *float64 { return &l.TotalError }, true, "", 1, func(l *spec.Limits) *bool { return &l.TotalErrorInLSB }},
	{budget.LimitTotalDrift, func(l *spec.Limits) *float64 { return &l.TotalDrift }, true, "", 1, func(l *spec.Limits) *bool { return &l.TotalDriftInLSB }},
}

// relaxed returns the limit value relaxed by factor f >= 1: a maximum
// times f, a minimum divided by f, a dB minimum lowered by 20·log10(f).
func (l specLimit) relaxed(v, f float64) float64 {
	switch {
	case l.unit == "dB":
		return v - 20*math.Log10(f)
	case l.max:
		return v * f
	}
	return v / f
}

// factorTo is the relaxation factor that takes limit l of s to the
// budget's figure v (relaxed's inverse).
func (l specLimit) factorTo(s *spec.Spec, v float64) float64 {
	lim := *l.field(&s.Limits)
	switch {
	case l.unit == "dB":
		return math.Pow(10, (lim-v)/20)
	case l.max:
		return v / (lim * l.scaleOf(s))
	}
	return lim * l.scaleOf(s) / v
}

// onlyLimits returns a copy of s with only the named limits set.
func onlyLimits(s *spec.Spec, keep ...specLimit) *spec.Spec {
	c := *s
	c.Limits = spec.Limits{}
	for _, l := range keep {
		*l.field(&c.Limits) = *l.field(&s.Limits)
		if l.inLSB != nil {
			*l.inLSB(&c.Limits) = *l.inLSB(&s.Limits)
		}
	}
	return &c
}

// withLimit returns a copy of s with limit l set to v.
func withLimit(s *spec.Spec, l specLimit, v float64) *spec.Spec {
	c := *s
	*l.field(&c.Limits) = v
	return &c
}

// Diagnosis search bounds: a limit is relaxed by factors up to maxRelax
// (for dB limits 20·log10 of it), found to relaxSteps bisection steps on
// the log of the factor.
const (
	maxRelax   = 1e4
	relaxSteps = 5
	// causeSteps bisect the best value with a spec figure made ideal.
	causeSteps = 3
)

// diagnoser re-solves variants of an infeasible spec on the same parts.
type diagnoser struct {
	ctx   context.Context
	parts *Parts
	opt   Options
	runs  int
	// unproven is set when a re-solve found no design but stopped short
	// of its budget caps (Result.unproven), or when a design was seen
	// that meets what a re-solve called unmet.
	unproven bool
	// solve re-solves a variant of the spec (nil: solveOn on parts); a
	// test puts a re-solve that stops short in its place.
	solve func(p Problem, s *spec.Spec, opt Options) (*Result, error)
}

// resolve re-solves a variant s of the spec with options opt.
func (d *diagnoser) resolve(p Problem, s *spec.Spec, opt Options) (*Result, error) {
	d.runs++
	if d.solve != nil {
		return d.solve(p, s, opt)
	}
	return solveOn(d.ctx, d.parts, p, s, opt)
}

// feasible solves spec s for one design without near misses; it returns
// the first design (nil: none passes).
func (d *diagnoser) feasible(s *spec.Spec) (*Result, error) {
	p, err := FromSpec(s)
	if err != nil {
		return nil, err
	}
	r, err := d.resolve(p, s, Options{Top: 1, Combos: d.opt.Combos, quick: true})
	if IsInfeasible(err) {
		if r != nil && r.unproven {
			d.unproven = true
		}
		return nil, nil
	}
	if err != nil {
		return nil, err
	}
	if len(r.Designs) == 0 {
		return nil, nil
	}
	return r, nil
}

// relax finds the smallest relaxation of limit l in spec s that lets a
// design pass: the relaxed limit and the result that passes it (nil when no
// relaxation up to maxRelax does).
func (d *diagnoser) relax(s *spec.Spec, l specLimit) (float64, *Result, error) {
	return d.relaxFrom(s, l, 2, relaxSteps)
}

// relaxFrom is relax with the first factor tried and the bisection steps
// given: a known-near factor saves re-solves.
func (d *diagnoser) relaxFrom(s *spec.Spec, l specLimit, first float64, steps int) (float64, *Result, error) {
	v := *l.field(&s.Limits)
	lo, hi := 1.0, math.Max(first, 1+1e-6)
	var found *Result
	for hi <= maxRelax {
		r, err := d.feasible(withLimit(s, l, l.relaxed(v, hi)))
		if err != nil {
			return 0, nil, err
		}
		if r != nil {
			found = r
			break
		}
		lo, hi = hi, hi*4
	}
	if found == nil {
		return 0, nil, nil
	}
	for range steps {
		mid := math.Sqrt(lo * hi)
		r, err := d.feasible(withLimit(s, l, l.relaxed(v, mid)))
		if err != nil {
			return 0, nil, err
		}
		if r != nil {
			hi, found = mid, r
		} else {
			lo = mid
		}
	}
	return l.relaxed(v, hi), found, nil
}

// diagnose explains why spec s is infeasible on parts: for each limit no
// design meets even alone, the best value reachable, what sets it (catalog
// and spec side) and the smallest relaxation that lets a design exist with
// every other limit kept; when each limit can be met alone, the pairs of
// limits that cannot be met together and the design closest to both.
func diagnose(ctx context.Context, parts *Parts, s *spec.Spec, opt Options, res *Result) error {
	d := &diagnoser{ctx: ctx, parts: parts, opt: opt}
	return d.diagnose(s, res)
}

// notProven ends the message of a diagnosis that rests on a search which
// stopped short.
const notProven = "not proven: the exact budget failed so many designs that pass the screening figures that a search behind this verdict stopped short, so a design may exist (see the notes; check one by hand with plumb check)"

// diagnose is the package's diagnose on d's parts: it words the message,
// then says when the verdict is not proven.
func (d *diagnoser) diagnose(s *spec.Spec, res *Result) error {
	if res.Infeasible == nil {
		return nil
	}
	if err := d.limits(s, res); err != nil {
		return err
	}
	if inf := res.Infeasible; (res.unproven || d.unproven) && !strings.Contains(inf.Message, "not proven") {
		inf.Message += "; " + notProven
	}
	return nil
}

// metBy reports whether a design of res the exact budget ran (a near
// miss, a cheapest failing design) meets every one of limits ls: proof
// that they can be met together, whatever a re-solve found.
func metBy(res *Result, ls ...specLimit) bool {
	for _, list := range [][]NearMiss{res.NearMisses, res.CheapestFailing} {
	designs:
		for i := range list {
			for _, l := range ls {
				if lim, ok := findLimit(list[i].Limits, l.name); !ok || !lim.Pass {
					continue designs
				}
			}
			return true
		}
	}
	return false
}

// meets reports whether figure v of limit l meets the limit of s.
func (l specLimit) meets(s *spec.Spec, v float64) bool {
	lim := *l.field(&s.Limits) * l.scaleOf(s)
	return v == lim || better(l, v, lim)
}

// limits finds the limits of s no design meets even alone, else the pairs
// no design meets together, and the relaxations (see diagnose).
func (d *diagnoser) limits(s *spec.Spec, res *Result) error {
	inf := res.Infeasible
	var set []specLimit
	for _, l := range specLimits {
		if *l.field(&s.Limits) != 0 {
			set = append(set, l)
		}
	}
	if len(set) == 0 {
		return nil
	}
	if r, err := d.feasible(onlyLimits(s)); err != nil || r == nil {
		// Nothing passes even without limits: the hard limits (supply,
		// headroom, swing, ratings) or the resistor window are the cause.
		if err != nil {
			return err
		}
		if err := d.checkRails(s, inf); err != nil {
			return err
		}
		return d.withoutLimits(s, inf)
	}
	var alone []specLimit
	for _, l := range set {
		if metBy(res, l) {
			continue
		}
		r, err := d.feasible(onlyLimits(s, l))
		if err != nil {
			return err
		}
		if r == nil {
			alone = append(alone, l)
		}
	}
	inf.Limits = inf.Limits[:0]
	unmet := alone[:0]
	for _, l := range alone {
		il, err := d.limitAlone(s, l)
		if err != nil {
			return err
		}
		if err := d.nearerBest(s, l, &il, res); err != nil {
			return err
		}
		if il.BestParts != "" && l.meets(s, il.Best) {
			// A design reaches the limit: the re-solve that found none
			// stopped short, and the limit can be met alone.
			d.unproven = true
			continue
		}
		inf.Limits = append(inf.Limits, il)
		unmet = append(unmet, l)
	}
	alone = unmet
	if len(alone) > 0 {
		inf.Message = ErrInfeasible.Error() + fmt.Sprintf("; %s cannot be met by any design in the catalog, even alone", nameList(alone))
		return nil
	}
	for i := range set {
		for j := i + 1; j < len(set); j++ {
			if metBy(res, set[i], set[j]) {
				continue
			}
			r, err := d.feasible(onlyLimits(s, set[i], set[j]))
			if err != nil {
				return err
			}
			if r != nil {
				continue
			}
			c, err := d.conflict(s, set[i], set[j])
			if err != nil {
				return err
			}
			inf.Conflicts = append(inf.Conflicts, c)
		}
	}
	switch {
	case len(inf.Conflicts) > 0:
		var pairs []string
		for _, c := range inf.Conflicts {
			pairs = append(pairs, strings.Join(c.Limits, " and "))
		}
		inf.Message = ErrInfeasible.Error() + "; each limit can be met alone, but no design meets " + strings.Join(pairs, ", nor ") + " together"
	default:
		inf.Message = ErrInfeasible.Error() + "; each limit, and each pair of limits, can be met, but no design meets all of them together; the near misses are the closest designs"
	}
	for _, l := range set {
		to, r, err := d.relax(s, l)
		if err == nil && r != nil {
			to, r, err = d.tightest(s, l, to, r)
		}
		if err != nil {
			return err
		}
		if r != nil {
			inf.Relaxations = append(inf.Relaxations, relaxation(l, s, to, r))
		}
	}
	return nil
}

// tightSteps bounds the re-solves that narrow a relaxation (tightest).
const tightSteps = 24

// tightest narrows the relaxation of limit l to (a field value of s's
// limit, passed by found) to the grid budget.FormatFigure prints it on
// (four significant figures; tenths of a dB): to is first rounded to the
// grid in the direction that relaxes the limit (up for a maximum, down for
// a minimum); then the passing design's own figure, rounded so, is tried,
// and the grid values tighter than the relaxation, galloping, until no
// design passes the one a step tighter (at most tightSteps rounds). Every
// value kept is one a solve found a design for, so the printed relaxation
// lets a design exist, and one printed step tighter does not.
func (d *diagnoser) tightest(s *spec.Spec, l specLimit, to float64, found *Result) (float64, *Result, error) {
	sc := l.scaleOf(s)
	dir := 1.0 // a maximum: tighter is lower
	if !l.max {
		dir = -1
	}
	p, _ := l.loosest(to * sc)
	to = p / sc
	try := func(v float64) (bool, error) {
		r, err := d.feasible(withLimit(s, l, v/sc))
		if err != nil || r == nil {
			return false, err
		}
		to, found = v/sc, r
		return true, nil
	}
	k := 1.0
	for range tightSteps {
		if lim, ok := findLimit(found.Designs[0].Limits, l.name); ok && (lim.Value > 0 || l.unit == "dB") {
			if p, _ := l.loosest(lim.Value); dir*(to*sc-p) > 0 {
				if _, err := try(p); err != nil {
					return 0, nil, err
				}
			}
		}
		// Gallop along the grid: twice as many steps after a value passes,
		// half as many after one fails; a fail one step tighter ends it.
		_, step := l.loosest(to * sc)
		q := math.Round(to*sc/step-dir*k) * step
		if (l.max && !(q > 0)) || dir*(to*sc-q) <= 0 {
			break
		}
		ok, err := try(q)
		switch {
		case err != nil:
			return 0, nil, err
		case ok:
			k *= 2
		case k == 1:
			return to, found, nil
		default:
			k = math.Max(1, k/2)
		}
	}
	return to, found, nil
}

// loosest rounds v, a figure of limit l in the budget's unit, to the grid
// budget.FormatFigure prints it on, in the direction that relaxes the
// limit, and returns the grid's step there (see ceilFigure).
func (l specLimit) loosest(v float64) (p, step float64) {
	switch {
	case l.unit == "dB":
		step = 0.1
		return math.Floor(v/step-1e-9) * step, step
	case l.max:
		return ceilFigure(v)
	}
	return floorFigure(v)
}

// ceilFigure rounds v > 0 up to four significant figures (the figures
// budget.FormatFigure prints) and returns the grid's step there; a value
// on the grid moves up a step only by a rounding error (the factor 1+1e-9
// keeps a limit set to it from failing by one).
func ceilFigure(v float64) (p, step float64) {
	step = math.Pow(10, math.Floor(math.Log10(v))-3)
	return math.Ceil(v*(1+1e-9)/step) * step, step
}

// floorFigure is ceilFigure rounding down, for a minimum.
func floorFigure(v float64) (p, step float64) {
	step = math.Pow(10, math.Floor(math.Log10(v))-3)
	return math.Floor(v*(1-1e-9)/step) * step, step
}

// nameList joins limit names: "gain error", "gain error and CMRR".
func nameList(ls []specLimit) string {
	var n []string
	for _, l := range ls {
		n = append(n, l.name)
	}
	if len(n) > 1 {
		return strings.Join(n[:len(n)-1], ", ") + " and " + n[len(n)-1]
	}
	return strings.Join(n, "")
}

// relaxation describes relaxing limit l of s to value to, met by the first
// design of r.
func relaxation(l specLimit, s *spec.Spec, to float64, r *Result) Relaxation {
	from := *l.field(&s.Limits)
	d := &r.Designs[0]
	sc := l.scaleOf(s)
	return Relaxation{Limit: l.name, From: from * sc, To: to * sc, Unit: l.unitOf(s),
		Parts: partsText(d), TotalCost: d.TotalCost, UnitCost: d.UnitCost, Currency: d.Currency}
}

// PartsText names the design's parts by position, one grade or part per
// group of positions (see partsText).
func (d *Design) PartsText() string { return partsText(d) }

// partsText names a design's parts by position, one grade or part per
// group of positions: "R1, R3: AR-TP1-59K0 (0.1 % 25 ppm/K); U1: IM-JH36".
func partsText(d *Design) string {
	var order []string
	byPart := map[string][]string{}
	for _, p := range d.Parts {
		key := p.Part
		if p.Kind == "resistor" {
			key = fmt.Sprintf("%s (%s)", p.Part, gradeText(p))
		}
		if _, ok := byPart[key]; !ok {
			order = append(order, key)
		}
		byPart[key] = append(byPart[key], p.Position)
	}
	var out []string
	for _, k := range order {
		out = append(out, strings.Join(byPart[k], ", ")+": "+k)
	}
	return strings.Join(out, "; ")
}

// limitAlone diagnoses limit l that no design meets even alone: the best
// value any design reaches (the design that passes the smallest relaxation
// of l with no other limit set), what sets it, and the smallest relaxation
// with every other limit kept.
func (d *diagnoser) limitAlone(s *spec.Spec, l specLimit) (InfeasibleLimit, error) {
	v := *l.field(&s.Limits)
	unit := l.unitOf(s)
	il := InfeasibleLimit{Name: l.name, Limit: v * l.scaleOf(s), Unit: unit}
	bv, r, err := d.bestValue(s, l)
	if err != nil || r == nil {
		il.Needed = fmt.Sprintf("no design reaches %s even with the limit relaxed %gx", l.name, maxRelax)
		return il, err
	}
	best := &r.Designs[0]
	il.Best, il.BestParts = bv, partsText(best)
	if il.SetBy, err = d.causes(s, best, l, bv); err != nil {
		return il, err
	}
	// With every other limit kept the relaxation is at least the best value.
	to, full, err := d.relaxFrom(s, l, l.factorTo(s, bv)*1.0001, relaxSteps)
	if err != nil {
		return il, err
	}
	if full != nil {
		if to, full, err = d.tightest(s, l, to, full); err != nil {
			return il, err
		}
		// The relaxation is exact to the printed figure, the best value
		// alone only to the bisection's step: the design that passes the
		// relaxation may reach further, and then it sets the best value.
		if lim, ok := findLimit(full.Designs[0].Limits, l.name); ok && better(l, lim.Value, il.Best) {
			il.Best, il.BestParts = lim.Value, partsText(&full.Designs[0])
			if il.SetBy, err = d.causes(s, &full.Designs[0], l, lim.Value); err != nil {
				return il, err
			}
		}
	}
	if full != nil {
		rx := relaxation(l, s, to, full)
		il.Relax = &rx
		il.Needed = fmt.Sprintf("relax %s to %s: %s, %s per stage", l.name, budget.FormatFigure(rx.To, unit), rx.Parts, units4(rx.UnitCost)+" "+rx.Currency)
	} else {
		il.Needed = fmt.Sprintf("relaxing %s alone (up to %gx) does not let a design pass: other limits bind too", l.name, maxRelax)
	}
	return il, nil
}

// better reports whether figure v of limit l is better than w (lower for
// a maximum, higher for a minimum).
func better(l specLimit, v, w float64) bool {
	if l.max {
		return v < w
	}
	return v > w
}

// nearerBest lowers il's best value to a failing design of res that
// reaches further on limit l (a near miss the exact budget figures better
// than the screening that the re-solves rely on), with that design's
// parts and causes, so that no design the result lists beats the best
// value the diagnosis reports.
func (d *diagnoser) nearerBest(s *spec.Spec, l specLimit, il *InfeasibleLimit, res *Result) error {
	if il.BestParts == "" {
		return nil
	}
	var best *Design
	for _, list := range [][]NearMiss{res.NearMisses, res.CheapestFailing} {
		for i := range list {
			if lim, ok := findLimit(list[i].Limits, l.name); ok && better(l, lim.Value, il.Best) {
				il.Best, best = lim.Value, &list[i].Design
			}
		}
	}
	if best == nil {
		return nil
	}
	il.BestParts = partsText(best)
	var err error
	il.SetBy, err = d.causes(s, best, l, il.Best)
	return err
}

// minCauseShare is the smallest share of a limit's value a cause must
// carry to be named.
const minCauseShare = 0.02

// specFigure is a figure on the spec's side that can set a limit's best
// value, and the spec with that figure made ideal.
type specFigure struct {
	name  string
	ideal func(s *spec.Spec) *spec.Spec // nil: the spec does not set it
}

// specFigures lists the spec-side figures of s that can be made ideal:
// the source impedance, the reference's tolerance, drift and source
// impedance, the load, the temperature range (not for a drift, which is
// per kelvin) and the impedance window.
func specFigures(s *spec.Spec, l specLimit) []specFigure {
	var out []specFigure
	mod := func(name string, on bool, f func(c *spec.Spec)) {
		if on {
			out = append(out, specFigure{name, func(s *spec.Spec) *spec.Spec {
				c := *s
				if c.Reference != nil {
					r := *c.Reference
					c.Reference = &r
				}
				if c.ADC != nil {
					a := *c.ADC
					c.ADC = &a
				}
				f(&c)
				return &c
			}})
		}
	}
	mod("source impedance "+budget.FormatFigure(s.SourceOhm, "ohm"), s.SourceOhm > 0, func(c *spec.Spec) { c.SourceOhm = 0 })
	if r := s.Reference; r != nil && r.Part == "" {
		// A reference picked from the catalog is the catalog's side.
		mod("reference tolerance "+budget.FormatFigure(r.Tolerance, ""), r.Tolerance > 0, func(c *spec.Spec) { c.Reference.Tolerance = 0 })
		mod("reference drift "+budget.FormatFigure(r.Drift*1e6, "ppm/K"), r.Drift > 0, func(c *spec.Spec) { c.Reference.Drift = 0 })
		mod("reference source impedance "+budget.FormatFigure(r.SourceOhm, "ohm"), r.SourceOhm > 0, func(c *spec.Spec) { c.Reference.SourceOhm = 0 })
	}
	mod("load "+budget.FormatFigure(s.LoadOhm, "ohm"), s.LoadOhm > 0, func(c *spec.Spec) { c.LoadOhm = 0 })
	lo, hi := windowOf(s)
	mod(fmt.Sprintf("impedance window %s..%s", budget.FormatFigure(lo, "ohm"), budget.FormatFigure(hi, "ohm")), true,
		func(c *spec.Spec) { c.Impedance = spec.Range{Min: lo / 10, Max: hi * 10} })
	perK := l.unit == "ppm/K" || l.unit == "V/K"
	mod(fmt.Sprintf("temperature range %g..%g °C", s.Temp.Min, s.Temp.Max), !perK && (s.Temp.Min != s.TempRef || s.Temp.Max != s.TempRef),
		func(c *spec.Spec) { c.Temp = spec.Range{Min: c.TempRef, Max: c.TempRef} })
	return out
}

// causes splits what sets limit l at its best value base (reached by
// design best) into the catalog's side, the exact budget's largest
// contributors of that design (a grade's tolerance or tempco, an amplifier
// figure; the reference's terms count on the spec's side), and the spec's
// side: for each spec figure (specFigures), how much better the best value
// any design reaches gets when that figure is ideal (the search re-run on
// the changed spec, so the parts may change too).
func (d *diagnoser) causes(s *spec.Spec, best *Design, l specLimit, base float64) ([]Cause, error) {
	var out []Cause
	unit := l.unitOf(s)
	if best.budget != nil {
		for _, bl := range best.budget.Limits {
			switch {
			case bl.Name != l.name:
			case l.inLSB != nil:
				return channelCauses(s, best, bl, l), nil
			default:
				out = catalogCauses(best, bl.Contributors, l)
			}
		}
	}
	// A reference given by figures moves the output whatever the parts:
	// its terms in the best design's budget are what making it ideal
	// gains, with the same design (worst case: the term; RSS:
	// F - sqrt(F² - t²)), no re-solve needed (as channelCauses).
	fixed := map[string]float64{}
	if best.budget != nil && s.Reference != nil && s.Reference.Part == "" && l.unit != "dB" {
		for _, bl := range best.budget.Limits {
			if bl.Name != l.name {
				continue
			}
			for _, c := range bl.Contributors {
				if c.Name == "reference tolerance" || c.Name == "reference drift" {
					t := math.Abs(c.Value)
					if s.Analysis.Method != spec.WorstCase {
						t = math.Abs(bl.Value) - math.Sqrt(math.Max(0, bl.Value*bl.Value-t*t))
					}
					fixed[c.Name] = t
				}
			}
		}
	}
	// The ideal spec reaches at least base: start the search there.
	first := l.factorTo(s, base)
	for _, f := range specFigures(s, l) {
		if t, ok := fixed[f.name[:strings.LastIndex(f.name, " ")]]; ok {
			if t > minCauseShare*math.Abs(base) {
				out = append(out, Cause{Name: f.name, Side: "spec", Value: t, Share: t / math.Abs(base), Unit: unit})
			}
			continue
		}
		_, r, err := d.relaxFrom(onlyLimits(f.ideal(s), l), l, first*1.0001, causeSteps)
		if err != nil {
			return nil, err
		}
		v := math.NaN()
		if r != nil {
			if lim, ok := findLimit(r.Designs[0].Limits, l.name); ok {
				v = lim.Value
			}
		}
		if math.IsNaN(v) {
			continue
		}
		gain := base - v
		if !l.max {
			gain = v - base
		}
		if l.unit == "dB" {
			// The dB figure's share is the ratio of the linear values.
			if gain > 0 {
				out = append(out, Cause{Name: f.name, Side: "spec", Value: gain, Share: 1 - math.Pow(10, -gain/20), Unit: l.unit})
			}
			continue
		}
		if gain > minCauseShare*math.Abs(base) {
			out = append(out, Cause{Name: f.name, Side: "spec", Value: gain, Share: gain / math.Abs(base), Unit: unit})
		}
	}
	sort.SliceStable(out, func(i, j int) bool { return out[i].Share > out[j].Share })
	return out, nil
}

// catalogCauses groups an exact budget's contributors on the catalog's
// side: every resistor term (tolerance, tempco, load life, ratio) as one
// cause naming the best design's grades, each amplifier term on its own
// with the amplifier's part. Shares add (worst case |v|/Σ|v|, RSS v²/Σv²);
// for a dB limit the terms of 1/CMRR add likewise, and each cause's value
// is the CMRR its term alone would leave, -20·log10(term), in dB.
func catalogCauses(best *Design, cs []budget.Contribution, l specLimit) []Cause {
	var grades, amp []string
	for _, p := range best.Parts {
		switch p.Kind {
		case "amplifier":
			amp = append(amp, p.Part)
		default:
			if g := gradeText(p); !slices.Contains(grades, g) {
				grades = append(grades, g)
			}
		}
	}
	res := Cause{Name: "resistors (best grade here: " + strings.Join(grades, ", ") + ")", Side: "catalog", Unit: l.unit}
	var out []Cause
	for _, c := range cs {
		if strings.HasPrefix(c.Name, "reference") {
			continue // the spec's side: found by making it ideal
		}
		if resistorTerm(c.Name) {
			res.Value += c.Value
			res.Share += c.Share
			continue
		}
		if c.Share < minCauseShare {
			continue
		}
		name := c.Name
		if len(amp) > 0 && !strings.Contains(name, amp[0]) {
			name += " (" + amp[0] + ")"
		}
		out = append(out, Cause{Name: name, Side: "catalog", Value: c.Value, Share: c.Share, Unit: l.unit})
	}
	if res.Share >= minCauseShare {
		out = append(out, res)
	}
	if l.unit == "dB" {
		// A term of 1/CMRR in dB: the CMRR that term alone would leave.
		for i := range out {
			out[i].Value = -20 * math.Log10(out[i].Value)
		}
	}
	return out
}

// channelCauses splits channel limit l's figure bl of design best into
// its contributors. The catalog's side: each of the stage's terms, naming
// the stage's parts, and the reference's terms when the reference is a
// catalog part (position REF). The spec's side: the ADC's own terms, a
// reference given by figures, and the temperature range (its part of a
// total error is the channel's total drift; all of a total drift). A
// spec-side term is fixed by the spec whatever the parts, so making it
// ideal leaves the same best design and improves the figure by the term
// itself under worst case (terms add) and by F - sqrt(F² - t²) under RSS
// (terms add in quadrature; Monte Carlo is read the same way, an
// approximation); no re-solve is needed.
func channelCauses(s *spec.Spec, best *Design, bl budget.Limit, l specLimit) []Cause {
	unit := l.unitOf(s)
	worst := s.Analysis.Method == spec.WorstCase
	better := func(t float64) float64 {
		if worst {
			return t
		}
		return bl.Value - math.Sqrt(math.Max(0, bl.Value*bl.Value-t*t))
	}
	var stage []string
	ref := ""
	for _, p := range best.Parts {
		switch {
		case p.Kind == "reference":
			ref = p.Part
		case p.Kind == "resistor":
			if g := gradeText(p); !slices.Contains(stage, g) {
				stage = append(stage, g)
			}
		default:
			if !slices.Contains(stage, p.Part) {
				stage = append(stage, p.Part)
			}
		}
	}
	var out []Cause
	for _, c := range bl.Contributors {
		if c.Share < minCauseShare {
			continue
		}
		name, side, v := c.Name, "catalog", c.Value
		switch refTerm := strings.Contains(name, "reference"); {
		case refTerm && ref != "" && !strings.HasPrefix(name, "ADC reference"):
			name += " (" + ref + ")"
		case refTerm, strings.HasPrefix(name, "ADC"):
			side, v = "spec", better(c.Value)
		default:
			name += " (" + strings.Join(stage, ", ") + ")"
		}
		out = append(out, Cause{Name: name, Side: side, Value: v, Share: c.Share, Unit: unit})
	}
	if ch := best.budget.Channel; ch != nil && s.WorstExcursion() > 0 {
		t := bl.Value // a total drift is all the temperature range's
		if l.name == budget.LimitTotalError {
			t = better(ch.TotalDriftFS * l.scaleOf(s))
		}
		if t > minCauseShare*bl.Value {
			out = append(out, Cause{Name: fmt.Sprintf("temperature range %g..%g °C", s.Temp.Min, s.Temp.Max), Side: "spec", Value: t, Share: t / bl.Value, Unit: unit})
		}
	}
	sort.SliceStable(out, func(i, j int) bool { return out[i].Share > out[j].Share })
	return out
}

// resistorTerm reports a contributor that is a resistor's (its position
// and a resistor figure), not an amplifier's or the reference's.
func resistorTerm(name string) bool {
	for _, suffix := range []string{" tolerance", " TCR", " load life", " TCR tracking", " absolute tolerance", " absolute TCR", " ratio tolerance"} {
		if strings.HasSuffix(name, suffix) {
			return true
		}
	}
	return false
}

// bestValue is the best value of limit l any design reaches under spec s
// with no other limit: the exact figure of the design that passes the
// smallest relaxation of l (NaN when none does up to maxRelax).
func (d *diagnoser) bestValue(s *spec.Spec, l specLimit) (float64, *Result, error) {
	_, r, err := d.relax(onlyLimits(s, l), l)
	if err != nil || r == nil {
		return math.NaN(), nil, err
	}
	if lim, ok := findLimit(r.Designs[0].Limits, l.name); ok {
		return lim.Value, r, nil
	}
	return math.NaN(), nil, nil
}

// conflict names limits a and b that no design meets together (each alone
// can be met) and the design closest to both: the first near miss of the
// spec with those two limits alone.
func (d *diagnoser) conflict(s *spec.Spec, a, b specLimit) (Conflict, error) {
	c := Conflict{Limits: []string{a.name, b.name}}
	two := onlyLimits(s, a, b)
	p, err := FromSpec(two)
	if err != nil {
		return c, err
	}
	r, err := d.resolve(p, two, Options{Top: 1, Combos: d.opt.Combos})
	if err != nil && !IsInfeasible(err) {
		return c, err
	}
	if r != nil && len(r.NearMisses) > 0 {
		nm := r.NearMisses[0]
		c.Closest = &nm
	}
	return c, nil
}

// hardCauses explains, with the figures, each hard limit that leaves no
// amplifier: the output range against the rails less the best output swing
// in the catalog, the input pins' range against the rails less the best
// common-mode range, the supply span against the amplifiers' ratings, and
// the gain-bandwidth the bandwidth needs. Each says what to change on the
// spec's side (the rails, the ranges) or which figure a part would need.
func hardCauses(parts *Parts, p *Problem) ([]string, railNeed) {
	v := func(x float64) string { return budget.FormatFigure(x, "V") }
	var out []string
	need := railNeed{pos: math.Inf(-1), neg: math.Inf(1)}
	olo, ohi := outRange(p)
	if r := p.family().Search.Ratio; r != nil && r.Passive {
		if olo < p.SupplyNeg || ohi > p.SupplyPos {
			out = append(out, fmt.Sprintf("the output spans %s..%s, outside the supply %s..%s: widen the supply or narrow the input range", v(olo), v(ohi), v(p.SupplyNeg), v(p.SupplyPos)))
		}
		return out, need
	}
	span := p.SupplyPos - p.SupplyNeg
	var ops []*catalog.Amplifier
	bestSwingP, bestSwingN, bestCMP, bestCMN := math.Inf(1), math.Inf(1), math.Inf(1), math.Inf(1)
	var partSP, partSN, partCP, partCN string
	maxSupply, minSupply, bestGBW := 0.0, math.Inf(1), 0.0
	var partGBW string
	for i := range parts.Amplifiers {
		a := &parts.Amplifiers[i]
		if a.Type != catalog.OpAmp {
			continue
		}
		maxSupply = math.Max(maxSupply, a.SupplyMaxV)
		minSupply = math.Min(minSupply, a.SupplyMinV)
		if span < a.SupplyMinV || (a.SupplyMaxV > 0 && span > a.SupplyMaxV) {
			continue
		}
		ops = append(ops, a)
		if a.SwingPosV < bestSwingP {
			bestSwingP, partSP = a.SwingPosV, a.Part
		}
		if a.SwingNegV < bestSwingN {
			bestSwingN, partSN = a.SwingNegV, a.Part
		}
		if a.CMPosV < bestCMP {
			bestCMP, partCP = a.CMPosV, a.Part
		}
		if a.CMNegV < bestCMN {
			bestCMN, partCN = a.CMNegV, a.Part
		}
		if a.GBWHz > bestGBW {
			bestGBW, partGBW = a.GBWHz, a.Part
		}
	}
	if len(ops) == 0 {
		if len(parts.Amplifiers) > 0 {
			out = append(out, fmt.Sprintf("the supply spans %s; the catalog's op-amps take %s to %s: change the supply", v(span), v(minSupply), v(maxSupply)))
		}
		return out, need
	}
	if top := p.SupplyPos - bestSwingP; ohi > top {
		need.pos = math.Max(need.pos, ohi+bestSwingP)
		out = append(out, fmt.Sprintf("the output must reach %s; with V+ at %s the op-amp that swings nearest its rail (%s, within %s) stops at %s: raise V+ to at least %s, or lower the top of the output range by %s",
			v(ohi), v(p.SupplyPos), partSP, v(bestSwingP), v(top), v(ohi+bestSwingP), v(ohi-top)))
	}
	if bot := p.SupplyNeg + bestSwingN; olo < bot {
		need.neg = math.Min(need.neg, olo-bestSwingN)
		out = append(out, fmt.Sprintf("the output must reach %s; with V- at %s the op-amp that swings nearest its rail (%s, within %s) stops at %s: lower V- to at most %s, or raise the bottom of the output range by %s",
			v(olo), v(p.SupplyNeg), partSN, v(bestSwingN), v(bot), v(olo-bestSwingN), v(bot-olo)))
	}
	lo, hi := pinRange(p, p.ratio())
	if top := p.SupplyPos - bestCMP; hi > top {
		need.pos = math.Max(need.pos, hi+bestCMP)
		out = append(out, fmt.Sprintf("the amplifier's inputs reach %s; the widest common-mode range (%s, to %s below V+) ends at %s: raise V+ to at least %s, or lower the input or common-mode range",
			v(hi), partCP, v(bestCMP), v(top), v(hi+bestCMP)))
	}
	if bot := p.SupplyNeg + bestCMN; lo < bot {
		need.neg = math.Min(need.neg, lo-bestCMN)
		out = append(out, fmt.Sprintf("the amplifier's inputs reach %s; the widest common-mode range (%s, to %s above V-) ends at %s: lower V- to at most %s, or raise the input or common-mode range",
			v(lo), partCN, v(bestCMN), v(bot), v(lo-bestCMN)))
	}
	if ng := 1 + p.ratio(); p.BandwidthHz > 0 && bestGBW/ng < p.BandwidthHz {
		out = append(out, fmt.Sprintf("the bandwidth %s at a noise gain of %.4g needs a gain-bandwidth of %s; the catalog's best is %s (%s)",
			budget.FormatFigure(p.BandwidthHz, "Hz"), ng, budget.FormatFigure(p.BandwidthHz*ng, "Hz"), budget.FormatFigure(bestGBW, "Hz"), partGBW))
	}
	return out, need
}

// railNeed is where the rails must go for the best amplifier's swing and
// common-mode range to cover the stage (pos -Inf, neg +Inf: that rail
// need not move), as hardCauses words it; the diagnosis checks it.
type railNeed struct{ pos, neg float64 }

// railSteps bounds the printed steps (1 mV near 1..10 V) a rail is moved
// past the figure hardCauses computes from the nominal ranges.
const railSteps = 4096

// checkRails moves the rails hardCauses names (inf.rails) to where a
// design exists with every limit of s kept: the nominal figures (the
// nominal output against the best swing) are the least the rails need;
// worst-case gain moves the output a little further, so each rail moves on
// in printed steps, galloping, until a solve finds a design, and is then
// narrowed step by step with the other rail held until one printed step
// tighter finds none. The words in inf.Hard take the figures found.
func (d *diagnoser) checkRails(s *spec.Spec, inf *Infeasible) error {
	if inf.rails == nil {
		return nil
	}
	need := *inf.rails
	movePos, moveNeg := !math.IsInf(need.pos, -1), !math.IsInf(need.neg, 1)
	if !movePos && !moveNeg {
		return nil
	}
	// grid rounds a rail away from the stage's range (up for V+, down for
	// V-) to the printed figure; a figure on the grid stays.
	grid := func(v float64, up bool) (float64, float64) {
		_, step := ceilFigure(math.Abs(v))
		if !(step > 0) {
			step = 1e-3 // a rail at 0 V: millivolts
		}
		if up {
			return math.Ceil(v/step-1e-6) * step, step
		}
		return math.Floor(v/step+1e-6) * step, step
	}
	pos, neg := s.Supply.Max, s.Supply.Min
	var sp, sn float64
	if movePos {
		pos, sp = grid(need.pos, true)
	}
	if moveNeg {
		neg, sn = grid(need.neg, false)
	}
	ok := func(n, p float64) (bool, error) {
		c := *s
		c.Supply = spec.Range{Min: n, Max: p}
		r, err := d.feasible(&c)
		return r != nil, err
	}
	// Gallop both rails out until a design exists.
	k := 0.0
	for {
		found, err := ok(neg-k*sn, pos+k*sp)
		if err != nil {
			return err
		}
		if found {
			break
		}
		if k >= railSteps {
			return nil // a limit, not the rails, stops it: the words stay
		}
		k = math.Max(1, 2*k)
	}
	// Narrow each rail with the other held: the fewest steps that solve.
	narrow := func(solves func(j float64) (bool, error)) (float64, error) {
		lo, hi := -1.0, k // hi solves; lo, one step inside the start, need not
		for hi-lo > 1 {
			mid := math.Floor((lo + hi) / 2)
			f, err := solves(mid)
			if err != nil {
				return 0, err
			}
			if f {
				hi = mid
			} else {
				lo = mid
			}
		}
		return hi, nil
	}
	kp, kn := k, k
	var err error
	if movePos {
		if kp, err = narrow(func(j float64) (bool, error) { return ok(neg-k*sn, pos+j*sp) }); err != nil {
			return err
		}
	}
	if moveNeg {
		if kn, err = narrow(func(j float64) (bool, error) { return ok(neg-j*sn, pos+kp*sp) }); err != nil {
			return err
		}
	}
	v := func(x float64) string { return budget.FormatFigure(x, "V") }
	for i, h := range inf.Hard {
		if movePos {
			h = strings.Replace(h, "raise V+ to at least "+v(need.pos), "raise V+ to at least "+v(pos+kp*sp), 1)
		}
		if moveNeg {
			h = strings.Replace(h, "lower V- to at most "+v(need.neg), "lower V- to at most "+v(neg-kn*sn), 1)
		}
		inf.Hard[i] = h
	}
	inf.Hard = append(inf.Hard, fmt.Sprintf("with the rails at %s..%s a design meets every limit (solved; the worst-case gain carries the output past its nominal range), one printed step less on either rail none does",
		v(neg-kn*sn), v(pos+kp*sp)))
	return nil
}

// withoutLimits explains a spec no design meets even with every limit
// taken away: it tries the spec-side changes that can let a design exist
// (the impedance window ten times wider each way, no source impedance, no
// load) and names those that do, with the cheapest design then.
func (d *diagnoser) withoutLimits(s *spec.Spec, inf *Infeasible) error {
	if len(inf.Hard) == 0 {
		inf.Message = ErrInfeasible.Error() + "; no design passes even with every limit taken away: the impedance window, the ratings, the headroom or the swing rule every design out"
	}
	lo, hi := windowOf(s)
	tries := []struct {
		text string
		on   bool
		mod  func(c *spec.Spec)
	}{
		{fmt.Sprintf("the impedance window widened from %s..%s to %s..%s", budget.FormatFigure(lo, "ohm"), budget.FormatFigure(hi, "ohm"), budget.FormatFigure(lo/10, "ohm"), budget.FormatFigure(hi*10, "ohm")), true,
			func(c *spec.Spec) { c.Impedance = spec.Range{Min: lo / 10, Max: hi * 10} }},
		{"no source impedance (the spec gives " + budget.FormatFigure(s.SourceOhm, "ohm") + ")", s.SourceOhm > 0, func(c *spec.Spec) { c.SourceOhm = 0 }},
		{"no load (the spec gives " + budget.FormatFigure(s.LoadOhm, "ohm") + ")", s.LoadOhm > 0, func(c *spec.Spec) { c.LoadOhm = 0 }},
	}
	for _, t := range tries {
		if !t.on {
			continue
		}
		c := onlyLimits(s)
		t.mod(c)
		r, err := d.feasible(c)
		if err != nil {
			return err
		}
		if r != nil {
			dz := &r.Designs[0]
			inf.Hard = append(inf.Hard, fmt.Sprintf("with %s a design exists (limits aside): %s, %s %s per stage", t.text, partsText(dz), units4(dz.UnitCost), dz.Currency))
		}
	}
	return nil
}

// windowOf is the spec's resistor window, defaults filled in.
func windowOf(s *spec.Spec) (lo, hi float64) {
	lo, hi = s.Impedance.Min, s.Impedance.Max
	if lo == 0 {
		lo = defaultRMin
	}
	if hi == 0 {
		hi = defaultRMax
	}
	return lo, hi
}

// NoDesign starts the first line of Infeasible.Lines.
const NoDesign = "no design in the catalog meets the spec"

// Lines words the diagnosis for a reader, one paragraph a line: the
// message, then per limit no design meets its best value, the design that
// reaches it, what sets it on each side and the smallest relaxation; the
// conflicting pairs with the design closest to both; the relaxations; the
// hard limits. The command line and the reports print these same lines.
func (inf *Infeasible) Lines() []string {
	out := []string{NoDesign}
	if why := strings.TrimLeft(strings.TrimPrefix(inf.Message, ErrInfeasible.Error()), "; "); why != "" {
		out[0] += ": " + why
	}
	for _, l := range inf.Limits {
		unit := l.Unit
		if unit == "" {
			unit = budget.UnitOf(l.Name)
		}
		f := func(v float64) string { return budget.FormatFigure(v, unit) }
		if l.BestParts == "" {
			out = append(out, fmt.Sprintf("%s: limit %s, best reachable %s; needs %s", l.Name, f(l.Limit), f(l.Best), l.Needed))
			continue
		}
		out = append(out, fmt.Sprintf("%s: limit %s, best any design reaches %s (%s)", l.Name, f(l.Limit), f(l.Best), l.BestParts))
		for _, side := range []string{"catalog", "spec"} {
			var cs []string
			for _, c := range l.SetBy {
				if c.Side != side {
					continue
				}
				v := budget.FormatFigure(c.Value, c.Unit)
				if c.Unit == "dB" && side == "catalog" {
					v = "(alone " + v + ")"
				}
				if side == "spec" {
					cs = append(cs, fmt.Sprintf("%s (ideal, it would be %s better)", c.Name, v))
				} else {
					cs = append(cs, fmt.Sprintf("%s %s (%.0f %%)", c.Name, v, 100*c.Share))
				}
			}
			if len(cs) > 0 {
				out = append(out, fmt.Sprintf("  set on the %s's side by %s", side, strings.Join(cs, "; ")))
			}
		}
		out = append(out, "  "+l.Needed)
	}
	for _, c := range inf.Conflicts {
		line := fmt.Sprintf("%s conflict: each can be met alone, never together", strings.Join(c.Limits, " and "))
		if nm := c.Closest; nm != nil {
			line += fmt.Sprintf("; closest to both: %s, %s %s per stage, %s", partsText(&nm.Design), units4(nm.UnitCost), nm.Currency, failText(nm.Fails))
		}
		out = append(out, line)
	}
	for _, r := range inf.Relaxations {
		out = append(out, fmt.Sprintf("relax %s from %s to %s (the other limits kept): %s, %s %s per stage", r.Limit,
			budget.FormatFigure(r.From, r.Unit), budget.FormatFigure(r.To, r.Unit), r.Parts, units4(r.UnitCost), r.Currency))
	}
	out = append(out, inf.Hard...)
	return out
}
