package search

import (
	"context"
	"errors"
	"fmt"
	"math"
	"slices"
	"sort"
	"strings"

	"plumb/catalog"
	"plumb/optimize/budget"
	"plumb/optimize/cost"
	"plumb/optimize/spec"
)

// shunt is one sense-resistor candidate.
type shunt struct {
	part  string
	value float64
	grade catalog.ResistorGrade
	offer catalog.Offer // with this part's stock
	cost  float64       // parts and assembly for the build
	heat  float64       // self-heating at the largest current, K
}

// errors are the shunt's share of the gain error over temperature (eT)
// and at the reference temperature (e0) under p's method: worst case
// (1+t)(1+L)(1+TCR·(ΔT+heat)) - 1 and t; RSS the root-sum-square of the
// same terms, as the budget combines independent tolerances (domain notes
// §4). With gain calibration the tolerance drops out: (1+L)(1+TCR·ΔT) - 1,
// or its root-sum-square.
func (sh *shunt) errors(p *Problem) (eT, e0 float64) {
	g := &sh.grade
	dT := p.deltaT() + sh.heat
	e0 = g.Tolerance
	tol := g.Tolerance
	if p.CalGain {
		dT, e0, tol = p.deltaT(), 0, 0
	}
	tc := g.TCR * 1e-6 * dT
	if p.Method == WorstCase {
		return (1+tol)*(1+g.LoadLife)*(1+tc) - 1, e0
	}
	return math.Sqrt(tol*tol + g.LoadLife*g.LoadLife + tc*tc), e0
}

// combineDrift folds the shunt's tempco into a gain drift in ppm/K: worst
// case added, RSS in quadrature (as the budget's root-sum-square of the
// tempcos' sensitivities).
func combineDrift(method Method, d, tcr float64) float64 {
	if method == WorstCase {
		return d + tcr
	}
	return math.Hypot(d, tcr)
}

// shuntCandidates lists the resistors that can be the shunt: inside the
// shunt window, dissipating I²·Rs within the derated power, one part per
// grade and value (the cheapest at the build quantity, then the one with
// most stock, then the lower part number), read from the catalog through
// the same query as the search's resistors.
func shuntCandidates(ctx context.Context, parts *Parts, p *Problem) ([]shunt, error) {
	imax := math.Max(math.Abs(p.InMin), math.Abs(p.InMax))
	sense := p.family().Search.Sense
	type key struct {
		grade groupKey
		value float64
	}
	best := map[key]shunt{}
	add := func(r *catalog.ResistorRow) error {
		v, g := r.ValueOhm, &r.Grade
		pw := imax * imax * v
		if g.PowerW > 0 && pw > p.Derating*g.PowerW*ratingSlack {
			return nil
		}
		if gs := p.Gain / v; gs < sense.MinStageGain || gs > sense.MaxStageGain {
			return nil
		}
		ext, _, _, err := p.Build.LineCost(&r.Offer, 1)
		if err != nil {
			return nil
		}
		k := key{keyOf(g), v}
		c := ext + float64(p.Build.Quantity)*p.Build.PerPlacement + p.Build.PerLineItem
		if old, ok := best[k]; ok && (old.cost < c || (old.cost == c && (stockRank(old.offer.Stock) > stockRank(r.Offer.Stock) ||
			(old.offer.Stock == r.Offer.Stock && old.part < r.Part)))) {
			return nil
		}
		o := r.Offer
		o.PriceBreaks = append([]catalog.PriceBreak(nil), o.PriceBreaks...)
		best[k] = shunt{part: r.Part, value: v, grade: *g, offer: o, cost: c, heat: pw * g.ThermalResistance}
		return nil
	}
	q := catalog.ResistorQuery{MinOhm: sense.MinOhm, MaxOhm: sense.MaxOhm, BelowTolerance: 0.5, Currency: p.Build.Currency,
		InStock: p.Build.Stock == cost.StockExclude}
	if err := parts.resistorRows().EachResistor(ctx, q, add); err != nil {
		return nil, err
	}
	out := make([]shunt, 0, len(best))
	for _, sh := range best {
		out = append(out, sh)
	}
	sort.Slice(out, func(i, j int) bool {
		if out[i].cost != out[j].cost {
			return out[i].cost < out[j].cost
		}
		return out[i].part < out[j].part
	})
	return out, nil
}

// senseProblem is the difference-amplifier problem behind shunt sh: gain
// G/Rs, the shunt voltage as the differential input, the shunt's nodes as
// the common mode, and the limits less what the shunt takes:
// (1+L)/(1+e_shunt) - 1 for the gain errors (worst case; RSS: sqrt(L² -
// e²), e from shunt.errors) and D - TCR for the drift (RSS: sqrt(D² -
// TCR²)). Under RSS, with the systematic error s ≥ 0 the budget adds
// linearly, s + sqrt(X² + e²) <= L implies s + X <= sqrt(L² - e²), since
// s + sqrt((L-s)² - e²) falls with s. ok is false when the shunt alone
// breaks a limit.
func senseProblem(p Problem, sh *shunt) (Problem, bool) {
	q := p
	q.Circuit = Circuit(p.family().SearchFamily().Name)
	q.Families = nil // every build of the circuit behind the shunt but an integrated part's
	for _, b := range q.builds() {
		if !slices.Contains(q.partBuilds(), b) {
			q.Families = append(q.Families, b)
		}
	}
	v := sh.value
	q.Gain = p.Gain / v
	q.InMin, q.InMax, q.CMMin, q.CMMax = p.family().Search.Sense.Stage(p.InMin, p.InMax, p.CMMin, p.CMMax, v)
	shrink := func(lim, e float64) (float64, bool) {
		if lim == 0 {
			return 0, true
		}
		var out float64
		if p.Method == WorstCase {
			out = (1+lim)/(1+e) - 1
		} else {
			out = math.Sqrt(math.Max(lim*lim-e*e, 0))
		}
		return out, out > 0
	}
	var ok1, ok2 bool
	eT, e0 := sh.errors(&p)
	q.Limits.TotalGainError, ok1 = shrink(p.Limits.TotalGainError, eT)
	q.Limits.GainError, ok2 = shrink(p.Limits.GainError, e0)
	ok3 := true
	if d, t := p.Limits.DriftPPM, sh.grade.TCR; d > 0 {
		if p.Method == WorstCase {
			q.Limits.DriftPPM = d - t
		} else {
			q.Limits.DriftPPM = math.Sqrt(math.Max(d*d-t*t, 0))
		}
		ok3 = q.Limits.DriftPPM > 0
	}
	return q, ok1 && ok2 && ok3
}

// combine folds the shunt's error into a gain error: worst case
// (1+e)(1+es) - 1, RSS in quadrature.
func combine(method Method, e, es float64) float64 {
	if method == WorstCase {
		return (1+e)*(1+es) - 1
	}
	return math.Hypot(e, es)
}

// withShunt adds shunt sh to a design of the difference amplifier behind
// it. A design that carries its exact budget (run on the whole stage,
// shunt included) keeps its figures; otherwise the shunt's error is
// folded into the screening figures.
func withShunt(p *Problem, d Design, sd *spec.Design, sh *shunt) (Design, *spec.Design) {
	d.Family = string(p.family().Name) + strings.TrimPrefix(d.Family, p.family().SearchFamily().Name)
	d.TotalCost += sh.cost
	d.UnitCost = d.TotalCost / float64(p.Build.Quantity)
	q, unit, _, _ := buyLine(p, &sh.offer)
	d.Parts = append([]Part{{Position: p.family().Shunt, Kind: string(catalog.KindResistor), Part: sh.part, Quantity: 1, Bought: q,
		UnitPrice: unit, ValueOhm: sh.value, Tolerance: sh.grade.Tolerance, TCRppm: sh.grade.TCR}}, d.Parts...)
	if d.budget == nil {
		m := d.Metrics
		eT, e0 := sh.errors(p)
		m.Gain *= sh.value
		m.GainError = combine(p.Method, m.GainError, eT)
		m.GainErrorInitial = combine(p.Method, m.GainErrorInitial, e0)
		m.DriftPPMPerK = combineDrift(p.Method, m.DriftPPMPerK, sh.grade.TCR)
		d.Metrics = m
		s := &space{p: p}
		d.Limits = s.limitSet(&metrics{gain: m.Gain, gainErr: m.GainErrorInitial, totalErr: m.GainError, drift: m.DriftPPMPerK,
			cmrrDB: m.CMRRdB, offset: m.OutputOffsetV, offDrift: m.OffsetDriftVPerK, noise: m.NoiseDensity, noiseRMS: m.NoiseRMSV, bw: m.BandwidthHz})
		if bl, ok := binding(d.Limits); ok {
			d.Binding = bl.Name
		}
	}
	return d, shuntDesign(p, sd, sh)
}

// shuntDesign is spec design sd of the difference amplifier behind shunt
// sh with the shunt added: the whole stage the exact budget runs on.
func shuntDesign(p *Problem, sd *spec.Design, sh *shunt) *spec.Design {
	sd2 := *sd
	sd2.Family = p.family().Name
	g := sh.grade
	sd2.Positions = append([]spec.Position{{Name: p.family().Shunt, Elements: []spec.Element{{Part: sh.part, Ohm: sh.value, Tolerance: g.Tolerance,
		TCR: g.TCR * 1e-6, PowerW: g.PowerW, MaxVoltageV: g.MaxVoltageV, ThermalResistance: g.ThermalResistance, LoadLife: g.LoadLife, Resolved: true}}}},
		sd.Positions...)
	sortPositions(sd2.Positions)
	sd2.Name = "current-sense with " + sh.part
	return &sd2
}

// senseReasons rebuilds a current-sense design's reasons on the merged
// ranking: the shunt, the limits of the whole stage, the binding limit and
// the shunt's share of it, why it ranks below the design above, and the
// amplifier stage's own notes (value variants, stock).
func senseReasons(p *Problem, d *Design, above []Design) []string {
	rs := d.Parts[0]
	out := []string{fmt.Sprintf("shunt %s: %g ohm, %.3g %% %.3g ppm/K", rs.Part, rs.ValueOhm, 100*rs.Tolerance, rs.TCRppm),
		limitSummary(d.Limits)}
	if txt, ok := bindingLine(d, nil); ok {
		if bl, _ := binding(d.Limits); bl.Name == limDrift && bl.Value > 0 {
			txt += fmt.Sprintf("; the shunt's tempco is %.0f %% of it", 100*rs.TCRppm/bl.Value)
		}
		out = append(out, txt)
	}
	s := &space{p: p}
	if len(above) == 0 {
		out = append(out, "cheapest passing shunt and amplifier stage in the catalog")
	} else {
		out = append(out, s.rankLine(&above[len(above)-1], d))
	}
	for _, r := range d.Reasons {
		if strings.Contains(r, "of values in these grades") || strings.HasPrefix(r, "stock is short") {
			out = append(out, r)
		}
	}
	return out
}

// buyLine is the quantity bought and unit price of one placement per stage.
func buyLine(p *Problem, o *catalog.Offer) (int, float64, string, error) {
	return cost.Buy(o, p.Build.Needed(1), p.Build.ExactQuantity)
}

// solveCurrentSense searches every shunt candidate: for each, the
// difference amplifier behind it is an ordinary difference search with the
// limits less the shunt's share, whose designs the exact budget confirms
// on the whole stage, shunt included (a design it fails leaves the space
// and its class offers its next); the designs of all shunts are merged by
// cost. Each sub-search is exact, so the merged top N is too.
func solveCurrentSense(ctx context.Context, parts *Parts, p Problem, opt Options, verify verifier, exhaustive bool) (*Result, error) {
	if opt.Top <= 0 {
		opt.Top = defaultTop
	}
	var all, pool []subDesign
	var near []NearMiss
	res := &Result{Method: string(p.Method), Designs: []Design{}, NearMisses: []NearMiss{}}
	shunts, err := shuntCandidates(ctx, parts, &p)
	if err != nil {
		return nil, err
	}
	failed := 0
	for i := range shunts {
		sh := &shunts[i]
		q, ok := senseProblem(p, sh)
		if !ok {
			continue
		}
		if verify != nil && opt.ceiling == 0 {
			// A chain's listing (opt.ceiling) widens its stages' screens
			// itself.
			q.loosen(mergedSlack(false, p.Method))
		}
		so, ok := subOptions(opt, verify, &failed, all, sh.cost)
		if !ok {
			continue
		}
		var whole verifier
		if verify != nil {
			whole = func(sd *spec.Design) (*budget.Result, []Failure, error) { return verify(shuntDesign(&p, sd, sh)) }
		}
		r, err := solve(ctx, parts, q, so, whole, exhaustive)
		if errors.Is(err, ErrProblem) {
			continue
		}
		if err != nil && !errors.Is(err, ErrInfeasible) {
			return nil, err
		}
		res.Search.add(r.Search)
		res.verdict.add(&r.verdict)
		for j, d := range r.Designs {
			d2, sd2 := withShunt(&p, d, r.designs[j], sh)
			all = append(all, subDesign{d2, sd2})
		}
		for _, c := range r.pool {
			d2, sd2 := withShunt(&p, c.d, c.sd, sh)
			pool = append(pool, subDesign{d2, sd2})
		}
		for _, nm := range r.NearMisses {
			nm.Design, nm.sd = withShunt(&p, nm.Design, nm.sd, sh)
			if nm.fixSD != nil {
				nm.fixSD = shuntDesign(&p, nm.fixSD, sh)
			}
			near = append(near, nm)
		}
	}
	rankMerged(res, all, opt.Top, func(d *Design, above []Design) []string { return senseReasons(&p, d, above) })
	addNear(res, near, verify, opt.spec)
	if opt.Frontier && !opt.quick && len(res.Designs) > 0 {
		mergedFrontier(res, pool, verify)
	}
	if p.hazardous() {
		res.Cautions = append(res.Cautions, hazardCaution)
	}
	res.Notes = append(res.Notes, fmt.Sprintf("%d shunt candidates searched; the reasons below each design compare it within its shunt", len(shunts)))
	if err := res.finish(ctx); err != nil {
		return nil, err
	}
	if len(res.Designs) == 0 {
		res.Infeasible = &Infeasible{Message: ErrInfeasible.Error() + "; no shunt and difference amplifier in the catalog meet every limit together" + res.verdict.infeasibleWhy()}
		return res, ErrInfeasible
	}
	return res, nil
}
