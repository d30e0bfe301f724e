package search

import (
	"cmp"
	"context"
	"fmt"
	"math"
	"slices"
	"sort"

	"plumb/catalog"
	"plumb/optimize/cost"
	"plumb/optimize/family"
)

// space is the prepared search space of one problem: resistor groups,
// amplifiers that pass the hard limits, and resistor configurations (a
// grade group per position, or a network) with their value options.
type space struct {
	p *Problem
	// fm, rm and st cache the circuit's family, its ratio model and its
	// strategy (see fam).
	fm               *family.Family
	rm               *family.Ratio
	st               family.Strategy
	rss              bool
	k, w             float64 // target ratio Rf/Rg and quantization window
	dT               float64
	tempK            float64 // hottest ambient, K (resistor noise)
	vG, vF           float64 // largest voltage across an Rg and an Rf position
	perG, perF       int     // placements per stage of one Rg and one Rf value (2 or 1)
	series, parallel bool    // two values at a feedback position
	groups           []*group
	amps             []amp // op-amps
	matched          []amp
	cfgs             []config
	why              hardReason
	nets             []*catalog.Network
	// gainFrom is, per configuration and open-loop gain, the first option
	// that meets the gain and drift limits (see evalClass).
	gainFrom map[aolKey]int32
	// excluded holds the designs the exact budget failed or could not
	// run (see solve): no screening passes them any more, so a class
	// offers its next design instead.
	excluded map[optKey]bool
	// Instrumentation amplifier: the second-stage gain of this sub-search,
	// its choices and the largest voltages across R1/R3 and R2/R4.
	k2     float64
	st2    []stage2
	v1, v2 float64
}

// config is a resistor configuration: the grade groups at the Rg and Rf
// positions (discrete) or one network with the element values used.
type config struct {
	fam    Family
	ga, gb int // groups at Rg and Rf (discrete)
	net    int // index into space.nets (network)
	na, nb float64
	g      grades
	fbv    int32   // level shift: the value index of Rg = Rf in group gb
	costLB float64 // cheapest completion: the least resistor cost of any option
	opts   []option
	built  bool
}

// option is one choice of values in a configuration, with its exact
// resistor cost for the build (parts and assembly).
type option struct {
	k0, rp      float64
	rg, rf, rf2 int32   // value indexes in the groups; rf2 = -1 without a combination
	par         bool    // rf and rf2 in parallel (else in series)
	far         bool    // rf is not one of the two values either side of the target
	seq         int32   // generation order, the last sort key
	off         float64 // a sort key before seq (see sortOptions)
	cost        float64
	short       bool
}

func newSpace(ctx context.Context, parts *Parts, p *Problem, combos bool) (*space, error) {
	s := &space{p: p, rss: p.Method != WorstCase, k: p.ratio(), w: p.window(), dT: p.deltaT(), tempK: p.TMax + 273.15, series: combos || p.SeriesPairs, parallel: combos || p.ParallelPairs, perG: 1, perF: 1}
	if r := s.model(); r != nil {
		s.perG, s.perF = r.PerRg, r.PerRf
	}
	if s.strategy() == family.TwoStage {
		s.k2 = p.stage2Gain()
	}
	fams := map[Family]bool{}
	for _, f := range p.families() {
		fams[f] = true
	}
	if len(fams) == 0 {
		return nil, fmt.Errorf("%w: no family in %v can build a %s stage", ErrProblem, p.Families, p.Circuit)
	}
	s.ratingVoltages()
	var err error
	// Discrete resistors: the discrete build, and every build of a
	// two-stage circuit (its first stage is discrete).
	disc := fams[variant(s.fam(), buildDiscrete)] || (s.strategy() == family.TwoStage && fams[variant(s.fam(), buildNetwork)])
	if disc {
		if s.groups, err = buildGroups(ctx, parts, p); err != nil {
			return nil, err
		}
	}
	s.amps, s.matched, s.why = buildAmps(parts, p, fams)
	if err := s.checkCurrency(parts); err != nil {
		return nil, err
	}
	famDisc := variant(s.fam(), buildDiscrete)
	switch s.strategy() {
	case family.TwoStage:
		s.inampConfigs(parts, fams)
		return s, nil
	case family.ShiftNetwork:
		s.levelShiftConfigs()
		return s, nil
	}
	if disc {
		s.cfgs = make([]config, 0, len(s.groups)*len(s.groups)+4*len(parts.Networks))
		for a, ga := range s.groups {
			for b, gb := range s.groups {
				// The class's figures take the largest dilution any of
				// its values gets (see dilution), so that the bound they
				// feed stays optimistic; evalOpt uses each option's own.
				dg, df := s.classDilution(ga, gb)
				c := config{fam: famDisc, ga: a, gb: b, net: -1, g: s.discreteFor(ga, gb, dg, df)}
				if c.costLB = s.discreteLB(ga, gb, a == b); !math.IsNaN(c.costLB) {
					s.cfgs = append(s.cfgs, c)
				}
			}
		}
	}
	if fams[variant(s.fam(), buildNetwork)] {
		s.networkConfigs(parts)
	}
	return s, nil
}

// checkCurrency refuses a catalog whose usable parts are priced in more
// than one currency when the build names none.
func (s *space) checkCurrency(parts *Parts) error {
	if s.p.Build.Currency != "" {
		return nil
	}
	first, firstPart := "", ""
	// The resistors agree among themselves (buildGroups checked); one
	// picked part stands for them.
	for _, g := range s.groups {
		for i := range g.buy {
			if pk := &g.buy[i]; pk.part != nil {
				first, firstPart = currencyOf(&pk.part.offer), pk.part.part
				break
			}
		}
		if first != "" {
			break
		}
	}
	see := func(part string, o *catalog.Offer) error {
		for _, b := range o.PriceBreaks {
			if first == "" {
				first, firstPart = b.Currency, part
			} else if b.Currency != first {
				return fmt.Errorf("%w: %s is priced in %q and %s in %q; set the build currency or keep one currency in the catalog", cost.ErrMixedCurrency, firstPart, first, part, b.Currency)
			}
		}
		return nil
	}
	for _, lst := range [][]amp{s.amps, s.matched} {
		for i := range lst {
			if err := see(lst[i].a.Part, &lst[i].a.Offer); err != nil {
				return err
			}
		}
	}
	for i := range parts.Networks {
		if err := see(parts.Networks[i].Part, &parts.Networks[i].Offer); err != nil {
			return err
		}
	}
	return nil
}

// ratingVoltages finds the largest voltage across the Rg and Rf positions
// over the corners of the input and common-mode ranges, at the target ratio.
func (s *space) ratingVoltages() {
	p, k := s.p, s.k
	if s.model() == nil {
		return // a level shift rates its network itself
	}
	for _, vcm := range []float64{p.CMMin, p.CMMax} {
		for _, vd := range []float64{p.InMin, p.InMax} {
			vg, vf := s.model().Voltages(k, vd, vcm, p.Ref)
			if s2 := s.model().Stage2; s2 != nil {
				// The second stage sees the first stage's outputs.
				v1, v2 := s2.Voltages(k, p.stage2Gain(), vd, vcm, p.Ref, p.Gain*vd+p.Ref)
				s.v1, s.v2 = math.Max(s.v1, v1), math.Max(s.v2, v2)
			}
			s.vG, s.vF = math.Max(s.vG, vg), math.Max(s.vF, vf)
		}
	}
}

// ratingSlack keeps a part that sits exactly on its rating out: the exact
// budget, computing the same ratio another way, may land a rounding step
// above it.
const ratingSlack = 1 - 1e-9

// ratingOK checks a resistor of value r against voltage v: dissipation
// v²/r within the derated power, and v within the rated voltage
// U = sqrt(P·R), capped by the limiting element voltage (IEC 60115-1, from
// memory). Unknown ratings (0) are not checked.
func (s *space) ratingOK(powerW, maxV, r, v float64) bool {
	if powerW > 0 {
		if v*v/r > s.p.Derating*powerW*ratingSlack {
			return false
		}
		u := math.Sqrt(powerW * r)
		if maxV > 0 {
			u = math.Min(u, maxV)
		}
		return v <= u*ratingSlack
	}
	return maxV == 0 || v <= maxV*ratingSlack
}

// zinOK checks the input impedance the source sees with values rg and rf
// (family.Ratio.Zin).
func (s *space) zinOK(rg, rf float64) bool {
	return s.model().Zin(rg, rf) >= s.p.ZinMinOhm
}

// assembly is the placement and line-item cost of a resistor set.
func (s *space) assembly(placements, lines int) float64 {
	b := &s.p.Build
	return float64(placements*b.Quantity)*b.PerPlacement + float64(lines)*b.PerLineItem
}

// discreteLB is the least resistor cost any value option of (ga, gb) can
// have: one line per position, or one shared line when both positions use
// one group. Extra combination parts only add to it; NaN if unpriced.
func (s *space) discreteLB(ga, gb *group, same bool) float64 {
	ng, nf := s.perG, s.perF
	lb := ga.extFrom(ng) + gb.extFrom(nf) + s.assembly(ng+nf, 2)
	if same {
		lb = math.Min(lb, ga.extFrom(ng+nf)+s.assembly(ng+nf, 1))
	}
	return lb
}

// extFrom is the least extended price of a line placed p or more times per
// stage: with exact quantities a larger line can be cheaper (it reaches a
// price break), so a lower bound must look at every larger count.
func (g *group) extFrom(p int) float64 {
	m := math.NaN()
	for q := p; q <= maxPlace; q++ {
		if e := g.lb[q]; !math.IsNaN(e) && (math.IsNaN(m) || e < m) {
			m = e
		}
	}
	return m
}

// networkConfigs adds one configuration per network and pair of element
// values (two elements of each for the difference amplifier) whose ratio is
// within the window of the target.
func (s *space) networkConfigs(parts *Parts) {
	p := s.p
	for i := range parts.Networks {
		n := &parts.Networks[i]
		if p.Build.Currency != "" && !offerIn(&n.Offer, p.Build.Currency) {
			continue
		}
		ext, _, short, err := p.Build.LineCost(&n.Offer, 1)
		if err != nil {
			continue
		}
		added := false
		for _, pr := range networkPairs(n) {
			a, b := pr[0], pr[1]
			k0, rp := s.effective(a, b)
			if math.Abs(k0/s.k-1) > s.w || !s.zinOK(a, b) ||
				!s.ratingOK(n.PowerW, n.MaxVoltageV, a, s.vG) || !s.ratingOK(n.PowerW, n.MaxVoltageV, b, s.vF) {
				continue
			}
			if !added {
				s.nets = append(s.nets, n)
				added = true
			}
			c := config{fam: variant(s.fam(), buildNetwork), ga: -1, gb: -1, net: len(s.nets) - 1, na: a, nb: b,
				g: networkGrades(n.RatioTolerance, n.TCRTracking, s.dT)}
			c.costLB = ext + s.assembly(1, 1)
			c.opts = []option{{k0: k0, rp: rp, rg: -1, rf: -1, rf2: -1, cost: c.costLB, short: short}}
			c.built = true
			s.cfgs = append(s.cfgs, c)
		}
	}
}

// options returns the value options of a configuration, building them on
// first use. For each Rg value of group ga, Rf is the value of gb just
// below or above k·Rg; with combinations, also the series pair x + y of gb
// values (x the largest value below the target, y the nearest to the rest)
// when it is nearer the target than either single value. Options outside
// the window, the impedance limit or the resistor ratings are dropped
// before any error is computed.
func (s *space) options(c *config) []option {
	if c.built {
		return c.opts
	}
	c.built = true
	if s.strategy() == family.ShiftNetwork {
		s.levelShiftOptions(c)
		// Among equal costs, R1 nearest the middle of the resistor window
		// first: the input network neither loads the source and the
		// reference heavily nor adds much bias-current error.
		gi, mid := s.groups[c.ga], math.Sqrt(s.p.RMinOhm*s.p.RMaxOhm)
		off := func(o *option) float64 { return math.Abs(math.Log(gi.values[o.rg] / mid)) }
		sortOptions(c.opts, off)
		c.raiseLB()
		return c.opts
	}
	ga, gb := s.groups[c.ga], s.groups[c.gb]
	if c.opts == nil {
		// About two options per Rg value (the values either side of the
		// target): room for them up front.
		c.opts = make([]option, 0, 2*len(ga.values))
	}
	for i, rg := range ga.values {
		if !s.ratingOK(ga.grade.PowerW, ga.grade.MaxVoltageV, rg, s.vG) {
			continue
		}
		target := s.target(rg)
		j := sort.SearchFloat64s(gb.values, target)
		bestErr := math.Inf(1)
		// The two values either side of the target first, then every
		// farther value inside the window: values are priced part by part,
		// so a farther value can be the cheaper one.
		try := func(jj int, far bool) bool {
			rf := gb.values[jj]
			e := s.quant(rg, rf)
			bestErr = math.Min(bestErr, e)
			if e > s.w {
				return false
			}
			if s.zinOK(rg, rf) && s.ratingOK(gb.grade.PowerW, gb.grade.MaxVoltageV, rf, s.vF) {
				if n := len(c.opts); s.addOption(c, ga, gb, i, jj, -1, rg, rf) {
					c.opts[n].far = far
				}
			}
			return true
		}
		for _, jj := range [2]int{j - 1, j} {
			if jj >= 0 && jj < len(gb.values) {
				try(jj, false)
			}
		}
		for jj := j - 2; jj >= 0 && try(jj, true); jj-- {
		}
		for jj := j + 1; jj < len(gb.values) && try(jj, true); jj++ {
		}
		if bestErr == 0 {
			continue
		}
		if s.series && j > 0 {
			// x the largest value below the target, and each smaller one
			// down to half the target that is cheaper than every value
			// between it and the target; y nearest the rest.
			s.cheaper(gb, j-1, -1, func(x float64) bool { return x >= target/2 }, func(jx int) {
				s.pairOptions(c, ga, gb, i, jx, rg, target-gb.values[jx], bestErr, false)
			})
		}
		if s.parallel && j < len(gb.values) {
			// x the smallest value above the target (and each larger,
			// cheaper one up to twice the target), y with x∥y = target.
			s.cheaper(gb, j, 1, func(x float64) bool { return x <= 2*target }, func(jx int) {
				x := gb.values[jx]
				s.pairOptions(c, ga, gb, i, jx, rg, x*target/(x-target), bestErr, true)
			})
		}
	}
	sortOptions(c.opts, nil)
	c.raiseLB()
	return c.opts
}

// raiseLB lifts the configuration's cost lower bound to its cheapest
// option (no option: it can build nothing), once the options are known.
func (c *config) raiseLB() {
	if len(c.opts) == 0 {
		c.costLB = math.Inf(1)
	} else if c.opts[0].cost > c.costLB {
		c.costLB = c.opts[0].cost
	}
}

// sortOptions orders options by cost, then the two values either side of
// the target before farther ones, then by off (nil: none), then in the
// order they were made: a stable sort without its cost on long lists.
func sortOptions(opts []option, off func(*option) float64) {
	for i := range opts {
		opts[i].seq = int32(i)
		if off != nil {
			opts[i].off = off(&opts[i])
		}
	}
	slices.SortFunc(opts, func(a, b option) int {
		if a.cost != b.cost {
			return cmp.Compare(a.cost, b.cost)
		}
		if a.far != b.far {
			return boolOrder(a.far, b.far)
		}
		if a.off != b.off {
			return cmp.Compare(a.off, b.off)
		}
		return cmp.Compare(a.seq, b.seq)
	})
}

// boolOrder orders false before true.
func boolOrder(a, b bool) int {
	if a == b {
		return 0
	}
	if a {
		return 1
	}
	return -1
}

// cheaper calls f with index from of group g and with each index beyond
// it in direction dir (while in(value) holds) whose value is cheaper at the
// feedback placements than every value passed: values are priced part by
// part, so a value farther from the ideal can be the cheaper choice.
func (s *space) cheaper(g *group, from, dir int, in func(float64) bool, f func(int)) {
	best := math.Inf(1)
	for j := from; j >= 0 && j < len(g.values) && in(g.values[j]); j += dir {
		e := g.at(j, s.perF).ext
		if j == from || e < best {
			f(j)
		}
		if e < best {
			best = e
		}
	}
}

// pairOptions adds the options with gb value x (index jx) and the gb
// values just below and above want, in series or in parallel, when the pair
// is nearer the target than the best single value; farther values of y
// are added where cheaper than every value nearer want.
func (s *space) pairOptions(c *config, ga, gb *group, i, jx int, rg, want, bestErr float64, par bool) {
	x := gb.values[jx]
	m := sort.SearchFloat64s(gb.values, want)
	pair := func(y float64) (rf, vx, vy float64) {
		if par {
			return x * y / (x + y), s.vF, s.vF
		}
		return x + y, s.vF * x / (x + y), s.vF * y / (x + y)
	}
	inside := func(mm int) bool {
		rf, _, _ := pair(gb.values[mm])
		e := s.quant(rg, rf)
		return e < bestErr && e <= s.w
	}
	try := func(mm int) bool {
		y := gb.values[mm]
		rf, vx, vy := pair(y)
		if !inside(mm) {
			return false
		}
		if !s.zinOK(rg, rf) || !s.ratingOK(gb.grade.PowerW, gb.grade.MaxVoltageV, x, vx) ||
			!s.ratingOK(gb.grade.PowerW, gb.grade.MaxVoltageV, y, vy) {
			return true
		}
		if n := len(c.opts); s.addOption(c, ga, gb, i, jx, mm, rg, rf) && par {
			c.opts[n].par = true
		}
		return true
	}
	for _, mm := range [2]int{m - 1, m} {
		if mm >= 0 && mm < len(gb.values) {
			try(mm)
		}
	}
	for _, dir := range [2]int{-1, 1} {
		start := m - 2
		if dir > 0 {
			start = m + 1
		}
		best := math.Inf(1)
		for _, mm := range [2]int{m - 1, m} {
			if mm >= 0 && mm < len(gb.values) {
				best = math.Min(best, gb.at(mm, s.perF).ext)
			}
		}
		for mm := start; mm >= 0 && mm < len(gb.values) && inside(mm); mm += dir {
			if e := gb.at(mm, s.perF).ext; e < best {
				best = e
				try(mm)
			}
		}
	}
}

// effective returns the ratio k0 and the resistance rp the amplifier's
// inverting input sees for values rg and rf, with the source resistance in
// series with the input resistors (difference, inverting: Rg + Rs; divider:
// Rtop + Rs) and a divider's load in parallel with Rbot.
func (s *space) effective(rg, rf float64) (k0, rp float64) {
	p, r := s.p, s.model()
	switch {
	case r.SourceInRg:
		rg += p.SourceOhm
	case r.SourceInRf:
		rf += p.SourceOhm
	}
	if r.LoadAcrossRg && p.LoadOhm > 0 {
		rg = rg * p.LoadOhm / (rg + p.LoadOhm)
	}
	return rf / rg, rg * rf / (rg + rf)
}

// dilution returns the factors by which the spec's source and load shrink
// the relative shifts of Rg and Rf in the effective ratio: a resistor R in
// series with the source Rs moves R + Rs by R/(R+Rs) of its own shift
// (difference, inverting: Rg; divider: Rtop = Rf), and Rbot in parallel
// with a load RL moves Rbot∥RL by RL/(Rbot+RL) of its shift (first order,
// from memory). Both factors fall with the Rg + Rs or Rbot∥RL the search
// can pick: the smallest Rg (difference, inverting) or Rf (divider) and the
// largest Rbot give the largest dilution, the optimistic figures a bound
// needs. Without a source or load both are 1.
func (s *space) dilution(rg, rf float64) (dg, df float64) {
	p, r := s.p, s.model()
	dg, df = 1, 1
	if r.SourceInRg && p.SourceOhm > 0 && rg > 0 {
		dg = rg / (rg + p.SourceOhm)
	}
	if r.SourceInRf && p.SourceOhm > 0 && rf > 0 {
		df = rf / (rf + p.SourceOhm)
	}
	if r.LoadAcrossRg && p.LoadOhm > 0 && rg > 0 {
		dg = p.LoadOhm / (rg + p.LoadOhm)
	}
	return dg, df
}

// classDilution returns the smallest dilution factors of any option of a
// class with Rg from ga and Rf from gb: the smallest Rg, the largest Rbot,
// the smallest Rtop (half of it where two in parallel may be taken).
func (s *space) classDilution(ga, gb *group) (dg, df float64) {
	if len(ga.values) == 0 || len(gb.values) == 0 {
		return 1, 1
	}
	rg, rf := ga.values[0], gb.values[0]
	if s.parallel {
		rf /= 2
	}
	if s.model().LoadAcrossRg {
		// The largest Rg dilutes most under the load.
		rg = ga.values[len(ga.values)-1]
	}
	return s.dilution(rg, rf)
}

// discreteFor returns the ratio figures of grades ga (Rg) and gb (Rf) with
// their tolerance, tempco and load life scaled by the dilutions dg and df.
func (s *space) discreteFor(ga, gb *group, dg, df float64) grades {
	a, b := &ga.grade, &gb.grade
	return discreteGrades(dg*a.Tolerance, dg*a.TCR, dg*a.LoadLife, df*b.Tolerance, df*b.TCR, df*b.LoadLife, s.dT)
}

// optGrades returns the ratio figures of option o of configuration c: the
// class's own for a network, else the grades diluted by the option's own
// values (see dilution), written to buf (so that the search's inner loop
// allocates nothing).
func (s *space) optGrades(c *config, o *option, buf *grades) *grades {
	if c.net >= 0 || c.ga < 0 || c.gb < 0 || (s.p.SourceOhm <= 0 && s.p.LoadOhm <= 0) || o.rg < 0 || o.rf < 0 {
		return &c.g
	}
	ga, gb := s.groups[c.ga], s.groups[c.gb]
	rf := gb.values[o.rf]
	if o.rf2 >= 0 {
		if o.par {
			r2 := gb.values[o.rf2]
			rf = rf * r2 / (rf + r2)
		} else {
			rf += gb.values[o.rf2]
		}
	}
	dg, df := s.dilution(ga.values[o.rg], rf)
	if dg == 1 && df == 1 {
		return &c.g
	}
	*buf = s.discreteFor(ga, gb, dg, df)
	return buf
}

// target is the Rf (divider: Rtop) value that gives the target ratio with
// Rg = rg, the inverse of effective.
func (s *space) target(rg float64) float64 {
	p, r := s.p, s.model()
	if r.LoadAcrossRg && p.LoadOhm > 0 {
		rg = rg * p.LoadOhm / (rg + p.LoadOhm)
	}
	switch {
	case r.SourceInRg:
		return s.k * (rg + p.SourceOhm)
	case r.SourceInRf:
		return math.Max(s.k*rg-p.SourceOhm, 0)
	}
	return s.k * rg
}

// fam returns the circuit's family, looked up once per space.
func (s *space) fam() *family.Family {
	if s.fm == nil {
		s.fm = s.p.family()
		s.rm, s.st = s.fm.Search.Ratio, s.fm.Search.Strategy
	}
	return s.fm
}

// model is the screening model of the circuit's ratio (nil for a level
// shift).
func (s *space) model() *family.Ratio {
	if s.fm == nil {
		s.fam()
	}
	return s.rm
}

// strategy is the shape of the circuit's search space.
func (s *space) strategy() family.Strategy {
	if s.fm == nil {
		s.fam()
	}
	return s.st
}

// pairNetwork reports whether configuration c puts a ratio pair on a
// matched network (a two-stage circuit's network configurations carry
// discrete first stages).
func (s *space) pairNetwork(c *config) bool { return c.net >= 0 && s.strategy() == family.RatioPair }

// quant is the ratio quantization |k0/k - 1| of values rg and rf.
func (s *space) quant(rg, rf float64) float64 {
	k0, _ := s.effective(rg, rf)
	return math.Abs(k0/s.k - 1)
}

// resetOptions forgets the value options of the discrete configurations
// (benchmarks measure a fresh search with it).
func (s *space) resetOptions() {
	s.gainFrom = nil
	for i := range s.cfgs {
		if !s.pairNetwork(&s.cfgs[i]) {
			s.cfgs[i].opts, s.cfgs[i].built = s.cfgs[i].opts[:0], false
		}
	}
}

// addOption prices a value choice, merging positions that use one part
// number into one line, and appends it unless stock excludes it.
func (s *space) addOption(c *config, ga, gb *group, i, j, j2 int, rg, rf float64) bool {
	var lines [5]line
	lines[0], lines[1] = line{ga, i, s.perG}, line{gb, j, s.perF}
	n := 2
	if j2 >= 0 {
		lines[n] = line{gb, j2, s.perF}
		n++
	}
	st := c.g.s2
	if st != nil && st.grp >= 0 {
		lines[n] = line{s.groups[st.grp], int(st.vi), 4}
		n++
	}
	k0, rp := s.effective(rg, rf)
	o := option{k0: k0, rp: rp, rg: int32(i), rf: int32(j), rf2: int32(j2)}
	if !s.priceLines(&o, lines[:n]) {
		return false
	}
	if st != nil && st.grp < 0 {
		o.cost += st.netCost
		o.short = o.short || st.short
	}
	c.opts = append(c.opts, o)
	return true
}

// line is one value of one group placed place times per stage.
type line struct {
	g     *group
	idx   int
	place int
}

// priceLines sets o's cost and stock flag from its lines, merging lines of
// one part number (same group and value) into one; false when stock
// excludes it or it cannot be priced.
func (s *space) priceLines(o *option, in []line) bool {
	var lines [6]line
	n := 0
	for _, ln := range in {
		k := 0
		for k < n && (lines[k].g != ln.g || lines[k].idx != ln.idx) {
			k++
		}
		if k < n {
			lines[k].place += ln.place
			continue
		}
		lines[n] = ln
		n++
	}
	place := 0
	for k := 0; k < n; k++ {
		ln := lines[k]
		if ln.place > maxPlace {
			return false
		}
		pk := ln.g.at(ln.idx, ln.place)
		if math.IsNaN(pk.ext) {
			// No part of the value can be bought so (stock).
			return false
		}
		o.cost += pk.ext
		o.short = o.short || pk.short
		place += ln.place
	}
	o.cost += s.assembly(place, n)
	return true
}
