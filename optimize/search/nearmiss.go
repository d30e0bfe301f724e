package search

import (
	"fmt"
	"math"
	"regexp"
	"slices"
	"sort"
	"strings"

	"plumb/catalog"
	"plumb/optimize/budget"
	"plumb/optimize/spec"
)

// maxNearEvals bounds the exact budgets a solve runs for its near misses
// (confirming candidates, their fixes and the cheapest failing designs), so
// that reporting near misses costs at most this many budget evaluations
// beyond the ranked designs.
const maxNearEvals = 40

// maxNearConfirm is how many of the closest candidates (by the screening
// figures) the exact budget confirms before the closest are chosen by the
// exact figures.
const maxNearConfirm = 8

// nearCheck confirms near misses with the exact budget: the screening
// figures find them, the budget has the last word on their figures, their
// failures and whether their fix really passes.
type nearCheck struct {
	verify verifier   // nil: no spec, near misses keep the screening figures
	spec   *spec.Spec // for changes on the spec's side (nil: none tried)
	evals  int        // budget evaluations run so far
	// pessimistic counts near misses the screening failed and the exact
	// budget passes; they are not listed.
	pessimistic int
	// broken counts near misses the exact budget could not evaluate; they
	// are not listed either.
	broken unchecked
}

// confirm evaluates near miss nm with the exact budget and adopts its
// figures, failures and shortfall. It returns false when the budget passes
// the design (the screening was pessimistic for it: it is no near miss) or
// cannot evaluate it. Once maxNearEvals evaluations have run, or without a
// spec, nm keeps its screening figures and a reason says so.
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
	nm.Shortfall = exactShortfall(nm.Limits)
	rest := nm.Reasons
	if len(rest) > 0 && strings.HasPrefix(rest[0], "fails ") {
		rest = rest[1:]
	}
	nm.Reasons = append([]string{fmt.Sprintf("the exact budget fails %d limit(s): %s", len(fails), failText(fails))}, rest...)
	return true
}

// passes reports whether spec design sd passes the exact budget (true
// without a verifier: the screening figures decided). It spends one of the
// near misses' budget runs; none left counts as not passing.
func (c *nearCheck) passes(sd *spec.Design) bool {
	if c.verify == nil {
		return true
	}
	if c.evals >= maxNearEvals || sd == nil {
		return false
	}
	c.evals++
	_, fails, err := c.verify(sd)
	return err == nil && len(fails) == 0
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

// exactShortfall is the normalised shortfall of a failing design: the
// product over its failing limits of 1/margin (value/limit for a maximum,
// limit/value for a minimum, the linear ratio for dB), so 1.4 means one
// limit missed by 1.4x, or two by about 1.18x each. It is 1 for a design
// that fails nothing and at most budget.MaxMargin.
func exactShortfall(ls []Limit) float64 {
	sum := 0.0
	for _, l := range ls {
		if l.Pass {
			continue
		}
		if !(l.Margin > 0) {
			return budget.MaxMargin
		}
		if l.Margin < 1 {
			sum -= math.Log(l.Margin)
		}
	}
	return math.Min(math.Exp(sum), budget.MaxMargin)
}

// shortfall is exactShortfall of screening metrics m as a sum of logs (0:
// passes), without allocating: the terms of eachMargin (no input impedance,
// no stresses) in its order, each failing margin adding -ln(margin). The
// near-miss search calls it for every value option it looks at, so it
// skips what cannot fail: a CMRR at or above its limit has margin
// 10^(Δ/20) ≥ 1 and needs no power (TestShortfallMatchesMargins keeps it
// equal to the sum over eachMargin).
func (s *space) shortfall(m *metrics) float64 { return s.shortfallUpTo(m, math.Inf(1)) }

// shortfallUpTo is shortfall, except that once the sum passes stop it
// returns the partial sum, itself above stop: every term is positive, so
// the whole sum is too, and a caller looking for the least shortfall below
// stop needs no more.
func (s *space) shortfallUpTo(m *metrics, stop float64) float64 {
	l := &s.p.Limits
	sum := 0.0
	for _, t := range [...]struct{ v, lim float64 }{
		{m.totalErr, l.TotalGainError}, {m.gainErr, l.GainError}, {m.drift, l.DriftPPM}, {m.offset, l.OffsetV},
		{m.offDrift, l.OffsetDriftVK}, {m.noise, l.NoiseDensity}, {m.noiseRMS, l.NoiseRMS},
	} {
		if t.lim > 0 && t.v > 0 {
			if sum = addShortfall(sum, t.lim/t.v); sum > stop {
				return sum
			}
		}
	}
	if l.CMRRdB > 0 {
		if d := (m.cmrrDB - l.CMRRdB) / 20; !(d >= 0) {
			if sum = addShortfall(sum, math.Pow(10, d)); sum > stop {
				return sum
			}
		}
	}
	if s.p.BandwidthHz > 0 {
		sum = addShortfall(sum, m.bw/s.p.BandwidthHz)
	}
	return sum
}

// addShortfall adds the shortfall of one margin mg to sum: nothing when it
// passes (mg ≥ 1), -ln(mg) when it fails, +Inf when mg is not positive.
func addShortfall(sum, mg float64) float64 {
	switch {
	case mg >= 1:
		return sum
	case !(mg > 0):
		return math.Inf(1)
	default:
		return sum - math.Log(mg)
	}
}

// nearPool is how many configurations and how many amplifiers, each the
// closest to passing on its own bound, the near-miss search pairs up.
const nearPool = 16

// closestOption returns the option of class (ci, ai) nearest to passing
// (least shortfall, then least cost); pass is true when some option of the
// class passes (it is then no near miss).
func (s *space) closestOption(ci, ai int) (best classBest, short float64, pass bool) {
	c := &s.cfgs[ci]
	a := &s.amps[ai]
	short = math.Inf(1)
	var m metrics
	opts := s.options(c)
	for i := range opts {
		s.evalOpt(c, &opts[i], a, &m)
		if s.pass(&m) {
			return classBest{}, 0, true
		}
		sf := s.shortfallUpTo(&m, short)
		if sf < short || (sf == short && opts[i].cost+a.cost < best.cost) {
			short = sf
			best = classBest{id: s.classID(ci, ai), cfg: ci, amp: ai, opt: i, cost: opts[i].cost + a.cost, m: m, key: s.tie(c, &opts[i], a, &m)}
		}
	}
	return best, short, false
}

// closeCandidates returns failing classes cheaper than limit, each at its
// option nearest to passing, the nearest first: every matched amplifier,
// the pairs of the nearPool configurations and the nearPool amplifiers
// whose own error bounds come closest to the limits, and the cheapest
// classes (as nearCandidates looks at them). A class some option of which
// passes is no near miss and is left out.
func (s *space) closeCandidates(limit float64) []classBest {
	type scored struct {
		b  classBest
		sf float64
	}
	var out []scored
	for mi := range s.matched {
		if b := s.evalMatchedClass(mi); !b.pass && b.cost < limit {
			out = append(out, scored{b, s.shortfall(&b.m)})
		}
	}
	var m metrics
	pool := func(n int, score func(i int) (float64, float64)) []int {
		idx := make([]int, n)
		sf := make([]float64, n)
		cost := make([]float64, n)
		for i := range idx {
			idx[i] = i
			sf[i], cost[i] = score(i)
		}
		sort.SliceStable(idx, func(a, b int) bool {
			if sf[idx[a]] != sf[idx[b]] {
				return sf[idx[a]] < sf[idx[b]]
			}
			return cost[idx[a]] < cost[idx[b]]
		})
		return idx[:min(n, nearPool)]
	}
	cfgs := pool(len(s.cfgs), func(ci int) (float64, float64) {
		s.bound(&s.cfgs[ci].g, nil, &m)
		return s.shortfall(&m), s.cfgs[ci].costLB
	})
	amps := pool(len(s.amps), func(ai int) (float64, float64) {
		s.bound(nil, &s.amps[ai], &m)
		return s.shortfall(&m), s.amps[ai].cost
	})
	seen := map[[2]int]bool{}
	try := func(ci, ai int) {
		if seen[[2]int{ci, ai}] {
			return
		}
		seen[[2]int{ci, ai}] = true
		if b, sf, pass := s.closestOption(ci, ai); !pass && !math.IsInf(sf, 1) && b.cost < limit {
			out = append(out, scored{b, sf})
		}
	}
	for _, ci := range cfgs {
		for _, ai := range amps {
			try(ci, ai)
		}
	}
	for _, b := range s.nearCandidates(limit) {
		if b.cfg >= 0 {
			try(b.cfg, b.amp)
		}
	}
	sort.SliceStable(out, func(i, j int) bool {
		if out[i].sf != out[j].sf {
			return out[i].sf < out[j].sf
		}
		return out[i].b.less(&out[j].b)
	})
	res := make([]classBest, len(out))
	for i := range out {
		res[i] = out[i].b
	}
	return res
}

// findFix finds the cheapest change that makes near miss nm pass and sets
// nm.Fix: a single change of amplifier, grade or network; a pair of them
// when no single one passes; or, on the spec's side, a calibration. Each
// change the screening passes is confirmed by the exact budget, cheapest
// first. A ranked design of the same family that differs from nm by one or
// two changes counts as such a change (the exact budget passed it).
// Calibrations that pass are kept as alternatives beside a part change.
func (s *space) findFix(nm *NearMiss, res *Result, c *nearCheck) error {
	ranked := res.Designs
	f := &nm.class
	singles, doubles := s.fixCandidates(f, true)
	var fixSD *spec.Design
	try := func(list []fixOpt, kind string) (*Fix, *spec.Design, error) {
		for _, o := range list {
			bd, fsd, err := s.describe(&o.b)
			if err != nil {
				return nil, nil, err
			}
			if !c.passes(fsd) {
				continue
			}
			k := o.cand.kind
			if kind != "" {
				k = kind
			}
			return partFix(k, &nm.Design, &bd, ""), fsd, nil
		}
		return nil, nil, nil
	}
	fromRanked := func(n int) (*Fix, *spec.Design) {
		var best *Fix
		var bestSD *spec.Design
		for i := range ranked {
			r := &ranked[i]
			if r.Family != nm.Family {
				continue
			}
			items := s.differences(&nm.Design, r)
			if len(items) != n || (best != nil && r.TotalCost >= best.TotalCost) {
				continue
			}
			kind := "pair"
			if n == 1 {
				kind = fixKind(items[0])
			}
			best = partFix(kind, &nm.Design, r, fmt.Sprintf(" (design %d)", r.Rank))
			bestSD = res.designs[i]
		}
		return best, bestSD
	}
	cheaper := func(n int, a *Fix, asd *spec.Design) (*Fix, *spec.Design) {
		b, bsd := fromRanked(n)
		if a == nil || (b != nil && b.TotalCost < a.TotalCost) {
			return b, bsd
		}
		return a, asd
	}
	fix, fsd, err := try(singles, "")
	if err != nil {
		return err
	}
	fix, fixSD = cheaper(1, fix, fsd)
	if fix == nil {
		if fix, fsd, err = try(doubles, "pair"); err != nil {
			return err
		}
		fix, fixSD = cheaper(2, fix, fsd)
	}
	nm.Fix, nm.fixSD = fix, fixSD
	c.addCalibration(nm)
	return nil
}

// addCalibration tries a calibration on near miss nm (calibration): the
// fix when nm has none, else an alternative beside its part change; then
// it words the outcome as nm's last reason.
func (c *nearCheck) addCalibration(nm *NearMiss) {
	cal := c.calibration(nm)
	switch {
	case nm.Fix != nil:
		if cal != nil {
			nm.Alternatives = append(nm.Alternatives, *cal)
		}
	case cal != nil:
		nm.Fix = cal
	}
	switch {
	case nm.Fix != nil && nm.Fix.ExtraCost == 0 && nm.Fix.Kind == kindCalibration:
		nm.Reasons = append(nm.Reasons, "no part change found; passes with "+nm.Fix.Change)
	case nm.Fix != nil:
		nm.Reasons = append(nm.Reasons, fmt.Sprintf("cheapest change that passes: %s (%s more per stage)", nm.Fix.Change, units4(nm.Fix.ExtraCost)))
	default:
		nm.Reasons = append(nm.Reasons, "no change found: no other amplifier, grade or network, alone or in pairs, and no calibration makes it pass")
	}
}

// subRank is the "(design N)" a fix names a ranked design of its search by.
var subRank = regexp.MustCompile(` \(design [0-9]+\)$`)

// settleFix confirms, with the exact budget, the part change a sub-search
// found for near miss nm on its screening figures, drops it when the
// budget fails it, and adds a calibration (addCalibration): the merged
// searches (in-amp, current sense) give their near misses the same fixes
// as the others.
func (c *nearCheck) settleFix(nm *NearMiss) {
	if n := len(nm.Reasons); n > 0 && (strings.HasPrefix(nm.Reasons[n-1], "cheapest change that passes") || strings.HasPrefix(nm.Reasons[n-1], "no change found") || strings.HasPrefix(nm.Reasons[n-1], "no part change found")) {
		nm.Reasons = nm.Reasons[:n-1]
	}
	if nm.Fix != nil && nm.Fix.Kind != kindCalibration && (nm.fixSD == nil || !c.passes(nm.fixSD)) {
		nm.Fix, nm.fixSD = nil, nil
	}
	if nm.Fix != nil && nm.Fix.Kind == kindCalibration {
		nm.Fix = nil
	}
	if nm.Fix != nil {
		// A sub-search's rank is not the merged ranking's.
		f := *nm.Fix
		f.Change = subRank.ReplaceAllString(f.Change, "")
		nm.Fix = &f
	}
	nm.Alternatives = nil
	c.addCalibration(nm)
}

// kindCalibration is the kind of a fix on the spec's side.
const kindCalibration = "calibration"

// calibration returns the spec-side change that makes near miss nm pass
// with the same parts: a one-time gain calibration, an offset calibration,
// or both, where nm fails gain error or output offset and the spec does not
// calibrate them yet (nil: none passes, or no spec to try it on). The exact
// budget of the same design under the changed spec decides.
func (c *nearCheck) calibration(nm *NearMiss) *Fix {
	if c.spec == nil || nm.sd == nil {
		return nil
	}
	var gain, offset bool
	for _, f := range nm.Fails {
		switch f.Name {
		case limGain, limGainInitial, limDrift:
			gain = f.Name != limDrift && !c.spec.Calibrate.Gain
		case limOffset:
			offset = !c.spec.Calibrate.Offset
		}
	}
	type try struct {
		gain, offset bool
		text         string
	}
	var tries []try
	if gain {
		tries = append(tries, try{true, false, "gain"})
	}
	if offset {
		tries = append(tries, try{false, true, "offset"})
	}
	if gain && offset {
		tries = append(tries, try{true, true, "gain and offset"})
	}
	for _, t := range tries {
		if c.evals >= maxNearEvals {
			return nil
		}
		c.evals++
		s2 := *c.spec
		s2.Calibrate.Gain = s2.Calibrate.Gain || t.gain
		s2.Calibrate.Offset = s2.Calibrate.Offset || t.offset
		br, err := budget.Evaluate(&s2, nm.sd)
		if err != nil || !br.Pass {
			continue
		}
		return &Fix{Kind: kindCalibration, Change: fmt.Sprintf("calibrate the %s once at %g °C (spec: calibration), same parts; the calibration step is not priced", t.text, c.spec.TempRef),
			TotalCost: nm.TotalCost}
	}
	return nil
}

// fixKind is the kind of a single change from its description.
func fixKind(item string) string {
	switch {
	case strings.HasPrefix(item, "amplifier"):
		return "amplifier"
	case strings.HasPrefix(item, "network"):
		return "network"
	}
	return "grade"
}

// partFix is the fix that turns near miss nm into design to: every
// position whose part or value changes, worded in Change (with suffix) and
// listed in Changes, Part the first new part.
func partFix(kind string, nm, to *Design, suffix string) *Fix {
	ch := partChanges(nm, to)
	f := &Fix{Kind: kind, Change: changesText(ch) + suffix, Changes: ch, TotalCost: to.TotalCost, ExtraCost: to.UnitCost - nm.UnitCost}
	for _, c := range ch {
		if c.Part != "" {
			f.Part = c.Part
			break
		}
	}
	return f
}

// partChanges lists the positions whose part or value differs from design
// from to design to, in to's order of positions, then the positions only
// from has.
func partChanges(from, to *Design) []PartChange {
	was := map[string]Part{}
	for _, p := range from.Parts {
		was[p.Position] = p
	}
	var out []PartChange
	for _, p := range to.Parts {
		q, ok := was[p.Position]
		delete(was, p.Position)
		if ok && q.Part == p.Part && q.ValueOhm == p.ValueOhm && q.Strapping == p.Strapping {
			continue
		}
		c := PartChange{Position: p.Position, Kind: p.Kind, Part: p.Part, ValueOhm: p.ValueOhm, Tolerance: p.Tolerance, TCRppm: p.TCRppm}
		if ok {
			c.WasPart, c.WasValueOhm, c.WasTolerance, c.WasTCRppm = q.Part, q.ValueOhm, q.Tolerance, q.TCRppm
		}
		out = append(out, c)
	}
	for _, p := range from.Parts {
		if q, ok := was[p.Position]; ok {
			out = append(out, PartChange{Position: q.Position, Kind: q.Kind, WasPart: q.Part, WasValueOhm: q.ValueOhm, WasTolerance: q.Tolerance, WasTCRppm: q.TCRppm})
		}
	}
	return out
}

// changesText words part changes, one item per group of positions that
// change alike: "R1, R3: AR-TP1-76K8 76.8 kΩ 0.1 % 25 ppm/K instead of
// AR-TN5-162K 162 kΩ 0.5 % 50 ppm/K; U1: KA-OT1 instead of IM-JH36". The
// former grade is left out where it stays the same.
func changesText(ch []PartChange) string {
	side := func(part string, v, tol, tcr float64, kind string, grade bool) string {
		txt := part
		if v > 0 {
			txt += " " + budget.FormatFigure(v, "ohm")
		}
		if grade && kind != string(catalog.KindAmplifier) && (tol > 0 || tcr > 0) {
			txt += fmt.Sprintf(" %.3g %% %.3g ppm/K", 100*tol, tcr)
		}
		return txt
	}
	var order []string
	at := map[string][]string{}
	for _, c := range ch {
		var txt string
		switch {
		case c.WasPart == "":
			txt = side(c.Part, c.ValueOhm, c.Tolerance, c.TCRppm, c.Kind, true) + " added"
		case c.Part == "":
			txt = side(c.WasPart, c.WasValueOhm, c.WasTolerance, c.WasTCRppm, c.Kind, true) + " removed"
		default:
			sameGrade := c.Tolerance == c.WasTolerance && c.TCRppm == c.WasTCRppm
			txt = side(c.Part, c.ValueOhm, c.Tolerance, c.TCRppm, c.Kind, true) + " instead of " +
				side(c.WasPart, c.WasValueOhm, c.WasTolerance, c.WasTCRppm, c.Kind, !sameGrade)
		}
		if _, ok := at[txt]; !ok {
			order = append(order, txt)
		}
		at[txt] = append(at[txt], c.Position)
	}
	items := make([]string, len(order))
	for i, txt := range order {
		items[i] = strings.Join(at[txt], ", ") + ": " + txt
	}
	return strings.Join(items, "; ")
}

// units4 prints a price difference to four figures.
func units4(v float64) string { return fmt.Sprintf("%.4g", v) }

// addNearMisses fills res.NearMisses with the closest failing designs
// cheaper than limit (rank 1's cost; +Inf when nothing passes), nearest
// first by their exact shortfall, each with its fix, and
// res.CheapestFailing with the cheapest failing designs the near misses do
// not already show. rejected are designs the screening passed and the
// exact budget failed; they compete with the others on their shortfall.
// One near miss per resistor configuration, so that they show different
// grades rather than one grade with several amplifiers.
func (s *space) addNearMisses(res *Result, rejected []NearMiss, limit float64, check *nearCheck) error {
	near := append([]NearMiss(nil), rejected...)
	seen := map[int]bool{}
	for _, nm := range rejected {
		if nm.class.cfg >= 0 {
			seen[nm.class.cfg] = true
		}
	}
	confirmed := 0
	for _, f := range s.closeCandidates(limit) {
		if confirmed >= maxNearConfirm {
			break
		}
		if f.cfg >= 0 && seen[f.cfg] {
			continue
		}
		nm, err := s.nearMiss(&f)
		if err != nil {
			return err
		}
		if !check.confirm(&nm) {
			continue
		}
		confirmed++
		if f.cfg >= 0 {
			seen[f.cfg] = true
		}
		near = append(near, nm)
	}
	sort.SliceStable(near, func(i, j int) bool {
		if near[i].Shortfall != near[j].Shortfall {
			return near[i].Shortfall < near[j].Shortfall
		}
		return near[i].TotalCost < near[j].TotalCost
	})
	// Designs that differ only in price list show once, the cheaper.
	byGrades := map[string]bool{}
	near = slices.DeleteFunc(near, func(nm NearMiss) bool {
		k := gradeKey(&nm.Design)
		dup := byGrades[k]
		byGrades[k] = true
		return dup
	})
	near = near[:min(len(near), maxNearMisses)]
	for i := range near {
		if err := s.findFix(&near[i], res, check); err != nil {
			return err
		}
	}
	res.NearMisses = append(res.NearMisses, near...)
	shown := map[string]bool{}
	for i := range near {
		shown[gradeKey(&near[i].Design)] = true
	}
	for _, f := range s.nearCandidates(limit) {
		if len(res.CheapestFailing) >= maxCheapestFailing {
			break
		}
		nm, err := s.nearMiss(&f)
		if err != nil {
			return err
		}
		if shown[gradeKey(&nm.Design)] || !check.confirm(&nm) {
			continue
		}
		shown[gradeKey(&nm.Design)] = true
		res.CheapestFailing = append(res.CheapestFailing, nm)
	}
	return nil
}

// maxCheapestFailing is how many of the cheapest failing designs a result
// lists beside the near misses.
const maxCheapestFailing = 2
