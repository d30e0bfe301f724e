package search

import (
	"context"
	"errors"
	"fmt"
	"math"
	"sort"
	"strings"

	"plumb/catalog"
	"plumb/optimize/spec"
)

// stage2 is the second stage of a three-op-amp instrumentation amplifier:
// a difference amplifier of gain k2 = R2/R1 with R3 = R1 and R4 = R2,
// either one discrete value of one group at all four positions (unity
// gain) or two element values of a matched network.
type stage2 struct {
	fam     Family
	grp     int   // group (discrete), -1 for a network
	vi      int32 // value index in the group
	net     int   // index into space.nets (network), -1 for discrete
	r1, r2  float64
	g       grades // ratio figures of R2/R1 and R4/R3
	netCost float64
	short   bool
}

// inampStage2Gains lists the second-stage gains the search tries: unity
// (four discrete resistors of one value, or a network of four equal
// elements) and the ratio of every network with two pairs of values,
// kept when the first stage is left a gain G/k2 above 1.
func inampStage2Gains(parts *Parts, p *Problem) []float64 {
	seen := map[float64]bool{1: true}
	out := []float64{1}
	for i := range parts.Networks {
		for _, pr := range networkPairs(&parts.Networks[i]) {
			k2 := pr[1] / pr[0]
			if !seen[k2] && p.Gain/k2 > 1+minFirstStage {
				seen[k2] = true
				out = append(out, k2)
			}
		}
	}
	sort.Float64s(out)
	return out
}

// minFirstStage keeps the first stage's gain 1 + 2Rf/Rg above 1 + 2·1e-3:
// below, Rg would be far above the resistor window.
const minFirstStage = 2e-3

// networkPairs lists the element value pairs (R1 = R3 value, R2 = R4
// value) a four-element network can give a difference amplifier: two
// elements of each value, or four of one.
func networkPairs(n *catalog.Network) [][2]float64 {
	count := map[float64]int{}
	for _, v := range n.Values {
		count[v]++
	}
	var vs []float64
	for v := range count {
		vs = append(vs, v)
	}
	sort.Float64s(vs)
	var out [][2]float64
	for _, a := range vs {
		for _, b := range vs {
			if (a == b && count[a] < 4) || count[a] < 2 || count[b] < 2 {
				continue
			}
			out = append(out, [2]float64{a, b})
		}
	}
	return out
}

// stage2Values lists the values a discrete unity-gain second stage of
// group g may use: every value the ratings allow at R1..R4 that is cheaper
// at its four placements than every smaller value they allow. The
// screening figures grow with the value and the ratings only ease with it
// (the bias currents through R2 and the noise of R1∥R2 in evalInAmp;
// v²/R and U = sqrt(P·R), see ratingOK), so a smaller value that costs no
// more serves at least as well, and a larger catalog can only add values
// that take the place of dearer ones. The list depends on prices, never on
// the middle of the window: a value nearer the middle but dearer is never
// preferred.
//
// Not offered: a value that is dearer on its own line but shares a part
// number with the first stage's Rg or Rf, where the merged line's price
// breaks or one line item fewer could make it the cheaper design. Offering
// those multiplies the configurations by the values of a grade (issue 11).
//
// The loading of the first stage by R1 and R3 is taken as acceptable
// anywhere in the spec's resistor window: the window is the engineer's
// statement of the values the stage may use.
func (s *space) stage2Values(g *group) []int {
	best := math.Inf(1)
	var kept []int
	for i, v := range g.values {
		if !s.ratingOK(g.grade.PowerW, g.grade.MaxVoltageV, v, s.v1) || !s.ratingOK(g.grade.PowerW, g.grade.MaxVoltageV, v, s.v2) {
			continue
		}
		if e := g.at(i, 4).ext; !math.IsNaN(e) && e < best {
			best = e
			kept = append(kept, i)
		}
	}
	return kept
}

// inampConfigs builds the second-stage choices of gain s.k2 and one
// configuration per (Rg group, Rf group, second stage).
func (s *space) inampConfigs(parts *Parts, fams map[Family]bool) {
	p := s.p
	if fams[variant(s.fam(), buildDiscrete)] && s.k2 == 1 {
		for gi, g := range s.groups {
			gr := g.grade
			for _, vi := range s.stage2Values(g) {
				s.st2 = append(s.st2, stage2{fam: variant(s.fam(), buildDiscrete), grp: gi, vi: int32(vi), net: -1, r1: g.values[vi], r2: g.values[vi],
					g: discreteGrades(gr.Tolerance, gr.TCR, gr.LoadLife, gr.Tolerance, gr.TCR, gr.LoadLife, s.dT)})
			}
		}
	}
	if fams[variant(s.fam(), buildNetwork)] {
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
				if b/a != s.k2 || !s.ratingOK(n.PowerW, n.MaxVoltageV, a, s.v1) || !s.ratingOK(n.PowerW, n.MaxVoltageV, b, s.v2) {
					continue
				}
				if !added {
					s.nets = append(s.nets, n)
					added = true
				}
				s.st2 = append(s.st2, stage2{fam: variant(s.fam(), buildNetwork), grp: -1, net: len(s.nets) - 1, r1: a, r2: b,
					g: networkGrades(n.RatioTolerance, n.TCRTracking, s.dT), netCost: ext + s.assembly(1, 1), short: short})
			}
		}
	}
	s.cfgs = make([]config, 0, len(s.groups)*len(s.groups)*len(s.st2))
	for si := range s.st2 {
		st := &s.st2[si]
		for a, ga := range s.groups {
			for b, gb := range s.groups {
				c := config{fam: st.fam, ga: a, gb: b, net: st.net,
					g: discreteGrades(ga.grade.Tolerance, ga.grade.TCR, ga.grade.LoadLife, gb.grade.Tolerance, gb.grade.TCR, gb.grade.LoadLife, s.dT)}
				c.g.s2 = st
				if c.costLB = s.inampLB(ga, gb, st); !math.IsNaN(c.costLB) {
					s.cfgs = append(s.cfgs, c)
				}
			}
		}
	}
}

// inampLB is the least resistor cost of any value option of an in-amp
// configuration: Rg placed once, Rf twice, a discrete second stage (its
// own value) four times, over every way lines could merge into one part
// number (lineElem), plus the network's line. NaN when unpriced.
func (s *space) inampLB(ga, gb *group, st *stage2) float64 {
	if st.grp >= 0 {
		return linesLB(s, []lineElem{{ga, -1, s.perG}, {gb, -1, s.perF}, {s.groups[st.grp], int(st.vi), 4}}, 0)
	}
	return linesLB(s, []lineElem{{ga, -1, s.perG}, {gb, -1, s.perF}}, st.netCost)
}

// lineElem is one position of a lower bound on cost: group g placed n
// times per stage at value index vi (-1: any value of the group).
type lineElem struct {
	g     *group
	vi, n int
}

// fromAt is the least extended price of value i of g bought for p or more
// placements (see extFrom); NaN when none can be bought.
func (g *group) fromAt(i, p int) float64 {
	m := math.NaN()
	for q := p; q <= maxPlace; q++ {
		if e := g.at(i, q).ext; !math.IsNaN(e) && (math.IsNaN(m) || e < m) {
			m = e
		}
	}
	return m
}

// linesLB is the least cost of the positions es, over every way positions
// could merge into one part number (same group, and the same value where
// both name one; a merged line is priced at the sum of its placements),
// plus extra. NaN when unpriced.
func linesLB(s *space, es []lineElem, extra float64) float64 {
	best := math.NaN()
	// label[i] is the line of element i: a restricted growth string, so
	// every partition is visited once.
	label := make([]int, len(es))
	var walk func(i, lines int)
	walk = func(i, lines int) {
		if i == len(es) {
			total, place := 0.0, 0
			for l := 0; l < lines; l++ {
				n, vi := 0, -1
				var g *group
				for j := range es {
					if label[j] == l {
						n += es[j].n
						g = es[j].g
						if es[j].vi >= 0 {
							vi = es[j].vi
						}
					}
				}
				if vi >= 0 {
					total += g.fromAt(vi, n)
				} else {
					total += g.extFrom(n)
				}
				place += n
			}
			if c := total + s.assembly(place, lines) + extra; !math.IsNaN(c) && (math.IsNaN(best) || c < best) {
				best = c
			}
			return
		}
		for l := 0; l <= lines; l++ {
			ok := true
			for j := 0; j < i; j++ {
				if label[j] == l && (es[j].g != es[i].g || (es[j].vi >= 0 && es[i].vi >= 0 && es[j].vi != es[i].vi)) {
					ok = false
				}
			}
			if !ok {
				continue
			}
			label[i] = l
			walk(i+1, max(lines, l+1))
		}
	}
	walk(0, 0)
	return best
}

// evalInAmp computes the screening figures of an instrumentation amplifier
// with first-stage ratio k0 = Rf/Rg (Rf∥Rg = rp, so Rf = rp·(1+k0)),
// first-stage figures g with the second stage g.s2, and op-amp a at all
// three positions (S. Franco, "Design with Operational Amplifiers and
// Analog Integrated Circuits", instrumentation-amplifier section; domain
// notes §2):
//
//	G = G1·k2, G1 = 1 + 2k0, closed loop G1/(1+G1/A) · k2/(1+(1+k2)/A)
//	∂G/G per ∂k/k of the first stage: 2k0/(1+2k0); of the second: 1
//	1/CMRR = (|Acm/Adm| of the second stage)/G1 + (2 + 1/G1)/CMRR_amp
//	  (A1 and A2 see the full common mode at gain G1·k2, A3 a fraction
//	  k2/(1+k2) of it at noise gain 1+k2)
//	offset = Vos·(2·G1·k2 + 1 + k2)
//	  + k2·(2·Ib·|Rf - Rs·G1| + Ios·(Rf + Rs·G1)) + Ios·R2 + Ib·R2·2t
//	noise² = k2²·(2·en²·G1² + 4kT·(4k0·Rf + 2Rf) + 2(in·Rf)² + 2G1²·(4kT·Rs + (in·Rs)²))
//	  + (1+k2)²·(en² + 2·(4kT·R1∥R2 + (in·R1∥R2)²))
//	bandwidth = GBW / max(G1, 1+k2)
func (s *space) evalInAmp(g *grades, k0, rp float64, a *amp, m *metrics) {
	p := s.p
	am := a.a
	st := g.s2
	k2 := s.k2
	g1, ng2 := 1+2*k0, 1+k2
	f := 1.0
	if am.AolVV > 0 {
		f = 1 / ((1 + g1/am.AolVV) * (1 + ng2/am.AolVV))
	}
	s1 := 2 * k0 / (1 + 2*k0)
	rho := g1 * k2 / p.Gain
	sys := rho*f - 1
	if s.rss {
		m.drift = math.Hypot(s1*g.driftRSS, st.g.driftRSS)
	} else {
		m.drift = s1*g.drift + st.g.drift
	}
	dr := m.drift * 1e-6 * s.dT
	// corners is the worst |gain error| with the first-stage ratio at
	// k0·h1 or k0·l1 and the second stage's at k2·h2 or k2·l2.
	corners := func(rho, h1, l1, h2, l2 float64) float64 {
		w := 0.0
		for _, m1 := range [2]float64{h1, l1} {
			for _, m2 := range [2]float64{h2, l2} {
				w = math.Max(w, math.Abs(rho*s.gainMult(k0, m1)*m2-1))
			}
		}
		return w
	}
	life := func(x *grades) float64 { return math.Max(x.srL*x.srL-x.sr*x.sr, 0) }
	switch {
	case p.CalGain:
		m.gainErr = 0
		if s.rss {
			m.totalErr = math.Hypot(math.Sqrt(s1*s1*life(g)+life(&st.g)), dr)
		} else {
			m.totalErr = (1+corners(1, g.hiS, g.loS, st.g.hiS, st.g.loS))*(1+dr) - 1
		}
	case s.rss:
		m.gainErr = math.Abs(sys) + math.Hypot(s1*g.sr, st.g.sr)
		m.totalErr = math.Abs(sys) + math.Sqrt(s1*s1*g.srL*g.srL+st.g.srL*st.g.srL+dr*dr)
	default:
		m.gainErr = corners(rho*f, g.hi, g.lo, st.g.hi, st.g.lo)
		m.totalErr = (1+corners(rho*f, g.hiL, g.loL, st.g.hiL, st.g.loL))*(1+dr) - 1
	}
	cm2 := cmWorst(k2, st.g.hiT, st.g.loT)
	if s.rss {
		cm2 = st.g.cmRSS / (1 + k2)
	}
	m.cmrrDB = toDB(cm2/g1 + a.ainv*(2+1/g1))
	rf, rs := rp*(1+k0), p.SourceOhm
	vg := 2*g1*k2 + 1 + k2
	bias := k2*(2*am.IbA*math.Abs(rf-rs*g1)+am.IosA*(rf+rs*g1)) + am.IosA*st.r2 + am.IbA*st.r2*2*st.g.tmax
	s.offset(m, vg, am.VosV, bias/vg, am.VosDriftVK)
	kt4 := 4 * boltzmann * s.tempK
	en, in := am.NoiseVHz, am.NoiseAHz
	rp2 := st.r1 * st.r2 / (st.r1 + st.r2)
	n1 := 2*en*en*g1*g1 + kt4*(4*k0*rf+2*rf) + 2*in*in*rf*rf + 2*g1*g1*(kt4*rs+in*in*rs*rs)
	n2 := ng2 * ng2 * (en*en + 2*(kt4*rp2+in*in*rp2*rp2))
	m.noise = math.Sqrt(k2*k2*n1 + n2)
	m.gain = g1 * k2 * f
	m.bw = am.GBWHz / math.Max(g1, ng2)
	m.noiseRMS = rmsNoise(m.noise, m.bw)
}

// boundInAmp fills m with optimistic figures for every design of an
// in-amp class over every first-stage ratio k0 in k·[1-w, 1+w]: the
// gain-error spread (H-L)/(H+L) of bound with H and L the products of both
// stages' multipliers, the sensitivity 2k/(1+2k) at its smallest, the CMRR
// at the largest first-stage gain, offset and noise at the smallest. g nil
// means ideal resistors, a nil an ideal amplifier.
func (s *space) boundInAmp(g *grades, a *amp, m *metrics) {
	p := s.p
	k2 := s.k2
	kmin, kmax := s.k*(1-s.w), s.k*(1+s.w)
	g1min, g1max, ng2 := 1+2*kmin, 1+2*kmax, 1+k2
	s1 := 2 * kmin / (1 + 2*kmin)
	var st *stage2
	if g != nil {
		st = g.s2
	}
	spread := func(h1, l1, h2, l2 float64) float64 {
		H, L := (1+s1*(h1-1))*h2, (1+s1*(l1-1))*l2
		return (H - L) / (H + L)
	}
	life := func(x *grades) float64 { return math.Max(x.srL*x.srL-x.sr*x.sr, 0) }
	*m = metrics{}
	inv := 0.0
	if st != nil {
		m.drift = s1*g.drift + st.g.drift
		if s.rss {
			m.drift = math.Hypot(s1*g.driftRSS, st.g.driftRSS)
		}
		dr := m.drift * 1e-6 * s.dT
		switch {
		case p.CalGain && s.rss:
			m.totalErr = math.Hypot(math.Sqrt(s1*s1*life(g)+life(&st.g)), dr)
		case p.CalGain:
			m.totalErr = (1+spread(g.hiS, g.loS, st.g.hiS, st.g.loS))*(1+dr) - 1
		case s.rss:
			m.gainErr = math.Hypot(s1*g.sr, st.g.sr)
			m.totalErr = math.Sqrt(s1*s1*g.srL*g.srL + st.g.srL*st.g.srL + dr*dr)
		default:
			m.gainErr = spread(g.hi, g.lo, st.g.hi, st.g.lo)
			m.totalErr = (1+spread(g.hiL, g.loL, st.g.hiL, st.g.loL))*(1+dr) - 1
		}
		if s.rss {
			inv = st.g.cmRSS / (1 + k2) / g1max
		} else {
			inv = cmWorst(k2, st.g.hiT, st.g.loT) / g1max
		}
	}
	if a != nil {
		am := a.a
		inv += a.ainv * (2 + 1/g1max)
		s.offset(m, 2*g1min*k2+1+k2, am.VosV, 0, am.VosDriftVK)
		m.noise = am.NoiseVHz * math.Sqrt(2*k2*k2*g1min*g1min+ng2*ng2)
		m.noiseRMS = rmsNoise(m.noise, am.GBWHz/math.Max(g1max, ng2))
	}
	m.cmrrDB = toDB(inv * boundSafety)
}

// subDesign is a ranked design of a sub-search with its spec design.
type subDesign struct {
	d  Design
	sd *spec.Design
}

// solveInAmp searches every second-stage gain k2 (unity, and the ratio of
// each network): for each, a sub-search over the first-stage grades and
// values at 1 + 2Rf/Rg = G/k2, the second-stage choices of that gain and
// the op-amps. Each sub-search is exact and confirms its designs with the
// exact budget (a design the budget fails leaves its space and its class
// offers its next), so the designs merged by cost are the exact top N.
func solveInAmp(ctx context.Context, parts *Parts, p Problem, opt Options, verify verifier, exhaustive bool) (*Result, error) {
	if opt.Top <= 0 {
		opt.Top = defaultTop
	}
	res := &Result{Method: string(p.Method), Designs: []Design{}, NearMisses: []NearMiss{}}
	var all, pool []subDesign
	var near []NearMiss
	var inf *Infeasible
	failed := 0
	gains := inampStage2Gains(parts, &p)
	for _, k2 := range gains {
		q := p
		q.k2 = k2
		if verify != nil && opt.ceiling == 0 {
			// A chain's listing (opt.ceiling) widens its stages' screens
			// itself.
			q.loosen(mergedSlack(true, p.Method))
		}
		so, ok := subOptions(opt, verify, &failed, all, 0)
		if !ok {
			continue
		}
		r, err := solve(ctx, parts, q, so, verify, exhaustive)
		if err != nil && !errors.Is(err, ErrInfeasible) {
			return nil, err
		}
		res.Search.add(r.Search)
		res.cut = res.cut || r.cut
		res.verdict.add(&r.verdict)
		if k2 == 1 {
			inf, res.Notes = r.Infeasible, r.Notes
		}
		for j, d := range r.Designs {
			all = append(all, subDesign{d, r.designs[j]})
		}
		pool = append(pool, r.pool...)
		near = append(near, r.NearMisses...)
	}
	if opt.Progress != nil {
		opt.Progress(res.Search.Classes, res.Search.Classes)
	}
	if opt.ceiling > 0 {
		// Every design up to the ceiling, unconfirmed (space.solveBelow).
		if opt.most > 0 && len(all) > opt.most {
			res.cut = true
		}
		sort.SliceStable(all, func(i, j int) bool { return all[i].d.TotalCost < all[j].d.TotalCost })
		for i, c := range all {
			c.d.Rank = i + 1
			res.Designs = append(res.Designs, c.d)
			res.designs = append(res.designs, c.sd)
		}
		if p.hazardous() {
			res.Cautions = append(res.Cautions, hazardCaution)
		}
		return res, nil
	}
	rankMerged(res, all, opt.Top, func(d *Design, above []Design) []string { return mergedReasons(&p, d, above) })
	addNear(res, near, verify, opt.spec)
	if opt.Frontier && !opt.quick && len(res.Designs) > 0 {
		mergedFrontier(res, pool, verify)
	}
	if p.hazardous() {
		res.Cautions = append(res.Cautions, hazardCaution)
	}
	res.Notes = append(res.Notes, fmt.Sprintf("second-stage gains searched: %v; the first stage makes up the rest of the gain", gains))
	if err := res.finish(ctx); err != nil {
		return nil, err
	}
	if len(res.Designs) == 0 {
		res.Infeasible = inf
		if inf == nil {
			res.Infeasible = &Infeasible{Message: ErrInfeasible.Error()}
		}
		res.Infeasible.Message += "; no first stage, second stage and op-amp in the catalog meet every limit together" + res.verdict.infeasibleWhy()
		return res, ErrInfeasible
	}
	return res, nil
}

// subOptions are the options of one sub-search of a merged search run
// with opt: Top designs, each confirmed by verify inside the sub-search,
// which shares failed (the designs the exact budget failed so far) with
// the others. ranked holds the designs the sub-searches before it ranked;
// once they are Top or more, the sub-search budgets no design dearer than
// the Top-th of them, less shift (what the merged design adds to the
// sub-search's cost), and ok is false when that leaves it nothing. A
// chain's listing (opt.ceiling) takes every design up to the ceiling,
// unconfirmed; with the frontier asked for, each sub-search also lists
// the candidates of its frontier.
func subOptions(opt Options, verify verifier, failed *int, ranked []subDesign, shift float64) (Options, bool) {
	so := Options{Top: opt.Top, Combos: opt.Combos, quick: opt.quick, Frontier: opt.Frontier}
	if opt.ceiling > 0 {
		so.Top, so.Frontier, so.ceiling, so.most = opt.Top+verifyExtra(opt.Top), false, opt.ceiling, opt.most
		return so, true
	}
	so.failed = failed
	if verify == nil || len(ranked) < opt.Top {
		return so, true
	}
	costs := make([]float64, len(ranked))
	for i, c := range ranked {
		costs[i] = c.d.TotalCost
	}
	sort.Float64s(costs)
	so.below = costs[opt.Top-1] - shift
	if so.below <= 0 {
		if !opt.Frontier {
			return so, false
		}
		so.below = math.SmallestNonzeroFloat64 // budget nothing, list the frontier's candidates
	}
	return so, true
}

// add sums the work of a sub-search into st.
func (st *Stats) add(o Stats) {
	st.Classes += o.Classes
	st.Visited += o.Visited
	st.BoundPruned += o.BoundPruned
	st.Evaluated += o.Evaluated
}

// addNear appends the sub-searches' near misses cheaper than rank 1, the
// closest first (least shortfall), up to maxNearMisses; with verify, each
// is confirmed by the exact budget first (nearCheck; a design the
// sub-search's budget failed carries its figures already), and its fix
// confirmed, with a calibration tried on the spec s (settleFix).
func addNear(res *Result, near []NearMiss, verify verifier, s *spec.Spec) {
	check := nearCheck{verify: verify, spec: s}
	var kept []NearMiss
	for _, nm := range near {
		if len(kept) >= 2*maxNearMisses || (len(res.Designs) > 0 && nm.TotalCost >= res.Designs[0].TotalCost) {
			continue
		}
		if nm.budget != nil || check.confirm(&nm) {
			kept = append(kept, nm)
		}
	}
	sort.SliceStable(kept, func(i, j int) bool { return kept[i].Shortfall < kept[j].Shortfall })
	kept = kept[:min(len(kept), maxNearMisses)]
	for i := range kept {
		check.settleFix(&kept[i])
	}
	res.NearMisses = append(res.NearMisses, kept...)
	sort.SliceStable(res.NearMisses, func(i, j int) bool { return res.NearMisses[i].Shortfall < res.NearMisses[j].Shortfall })
	res.Notes = append(res.Notes, check.notes()...)
}

// rankMerged ranks the designs of sub-searches by cost, Top of them. Each
// sub-search confirmed its designs with the exact budget (solve), so the
// cheapest of their union are the merged search's; the verdict's notes
// (designs the budget failed, classes cut) are stated once, summed over
// the sub-searches. reasons rebuilds the reasons on the merged ranking.
func rankMerged(res *Result, all []subDesign, top int, reasons func(d *Design, above []Design) []string) {
	sort.SliceStable(all, func(i, j int) bool { return all[i].d.TotalCost < all[j].d.TotalCost })
	for _, c := range all[:min(len(all), top)] {
		c.d.Rank = len(res.Designs) + 1
		c.d.Reasons = reasons(&c.d, res.Designs)
		res.Designs = append(res.Designs, c.d)
		res.designs = append(res.designs, c.sd)
	}
	res.Notes = append(res.Notes, res.verdict.notes()...)
	res.unproven = res.verdict.cut > 0
}

// mergedReasons explains a design on a merged ranking: its limits, the
// binding limit, why it ranks below the design above, and the sub-search's
// own notes (value variants, stock).
func mergedReasons(p *Problem, d *Design, above []Design) []string {
	out := []string{limitSummary(d.Limits)}
	if line, ok := bindingLine(d, nil); ok {
		out = append(out, line)
	}
	s := &space{p: p}
	if len(above) == 0 {
		out = append(out, "cheapest passing design of the search space")
	} else {
		out = append(out, s.rankLine(&above[len(above)-1], d))
	}
	for _, r := range d.Reasons {
		if strings.HasPrefix(r, "binding limit:") && d.budget == nil {
			out[1] = r // the sub-search's line names the dominant term
		}
		if strings.Contains(r, "of values in these grades") || strings.HasPrefix(r, "stock is short") {
			out = append(out, r)
		}
	}
	return out
}
