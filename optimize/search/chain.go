package search

import (
	"container/heap"
	"context"
	"errors"
	"fmt"
	"math"
	"slices"
	"sort"

	"plumb/catalog"
	"plumb/optimize/budget"
	"plumb/optimize/cost"
	"plumb/optimize/spec"
)

// ChainResult is the outcome of a chain's search (spec.Spec.Stages): the
// ranked chains, cheapest first. Its JSON field names are a contract
// documented in the README.
type ChainResult struct {
	Designs []ChainDesign `json:"designs"`
	// NearMisses are the closest failing chains the search judged (cheaper
	// than rank 1 when a chain passes), the closest first, each with the
	// cheapest change of one stage's design that makes it pass.
	NearMisses []ChainNearMiss `json:"near_misses,omitempty"`
	// Infeasible says why no chain passes (empty when one does).
	Infeasible string     `json:"infeasible,omitempty"`
	Method     string     `json:"method"`
	Notes      []string   `json:"notes,omitempty"`
	Cautions   []string   `json:"cautions,omitempty"`
	Search     ChainStats `json:"search"`
}

// ChainStats count the work of a chain's search.
type ChainStats struct {
	// Candidates are the designs of each stage the search listed (each
	// value choice of each class the stage's screening passes, up to the
	// last cost ceiling).
	Candidates []int `json:"stage_candidates"`
	// Evaluated counts the pairs whose chain budget was computed, and
	// BoundPruned the listed stage designs ruled out before pairing (their
	// chain with the other stage's best figures fails; see prune).
	Evaluated   int `json:"evaluated"`
	BoundPruned int `json:"bound_pruned"`
	// Shared counts the judged pairs whose stages share a part number,
	// priced together (cost.StagesBOM), and ShortStock those of them left
	// out because the joint quantity is short of stock under build.stock
	// exclude.
	Shared     int `json:"shared_pairs"`
	ShortStock int `json:"short_stock_pairs,omitempty"`
}

// ChainDesign is one ranked chain: its stages with their parts and own
// figures, and the chain's figures and limits at its output.
type ChainDesign struct {
	Rank      int          `json:"rank"`
	TotalCost float64      `json:"total_cost"` // the whole build, summed over the stages
	UnitCost  float64      `json:"unit_cost"`
	Currency  string       `json:"currency"`
	Stages    []ChainStage `json:"stages"`
	// Metrics are the chain's figures at its output (package budget,
	// Cascade).
	Metrics budget.Metrics  `json:"metrics"`
	Limits  []Limit         `json:"limits"`
	Binding string          `json:"binding"`
	Channel *budget.Channel `json:"channel,omitempty"`
	// ShortStock lists the part numbers with too little stock for the
	// chain's build (build.stock flag), counted over both stages.
	ShortStock []string `json:"short_stock,omitempty"`

	budget *budget.ChainBudget
	// designs are the stages' designs, first to last, and stageBudgets
	// their exact budgets under the stages' problems.
	designs      []*spec.Design
	stageBudgets []*budget.Result
}

// ChainNearMiss is a failing chain: the limits it breaks, how far
// (Shortfall, as a design's near miss), and Fix, the cheapest chain that
// keeps one stage's design and changes the other's (Kind "stage"; its
// positions are written STAGE:POSITION), or nil when no listed design of
// either stage passes with the other.
type ChainNearMiss struct {
	ChainDesign
	Fails     []Failure `json:"fails"`
	Shortfall float64   `json:"shortfall"`
	Fix       *Fix      `json:"fix"`

	cs []candidate
}

// maxChainNearFix bounds the chains one near miss's fix search judges per
// stage.
const maxChainNearFix = 5000

// ChainStage is one stage of a ranked chain.
type ChainStage struct {
	Stage     int     `json:"stage"`
	Family    string  `json:"family"`
	Gain      float64 `json:"gain"`
	TotalCost float64 `json:"total_cost"`
	UnitCost  float64 `json:"unit_cost"`
	Parts     []Part  `json:"parts"`
	Metrics   Metrics `json:"metrics"`
	// CommonModeErrorV is the stage's output error from the common mode
	// its inputs see (for a later stage, the earlier stage's output).
	CommonModeErrorV float64 `json:"common_mode_error_v"`
}

// Budget returns the chain's budget (nil for a chain not evaluated).
func (d *ChainDesign) Budget() *budget.ChainBudget { return d.budget }

// Designs returns the chain's stage designs, first to last (nil for a
// chain given by hand).
func (d *ChainDesign) Designs() []*spec.Design { return d.designs }

// StageBudgets returns the exact budgets of the chain's stages under the
// stages' problems (spec.Spec.StageProblem), first to last.
func (d *ChainDesign) StageBudgets() []*budget.Result { return d.stageBudgets }

// SolveChain finds the lowest-cost chains in snap that meet the chain's
// limits (Solve for each stage; see solveChain).
func SolveChain(ctx context.Context, snap *catalog.Snapshot, s *spec.Spec, opt Options) (*ChainResult, error) {
	find, err := spec.SnapshotLookup(snap)
	if err != nil {
		return nil, fmt.Errorf("search: %w", err)
	}
	return solveChain(ctx, s, opt, func(ctx context.Context, sub *spec.Spec, o Options) (*Result, error) {
		return Solve(ctx, snap, sub, o)
	}, find)
}

// SolveChainCatalog is SolveChain reading the catalog file (SolveCatalog
// for each stage).
func SolveChainCatalog(ctx context.Context, st *catalog.Store, s *spec.Spec, opt Options) (*ChainResult, error) {
	return solveChain(ctx, s, opt, func(ctx context.Context, sub *spec.Spec, o Options) (*Result, error) {
		return SolveCatalog(ctx, st, sub, o)
	}, func(part string) (catalog.Kind, any, error) { return st.Find(ctx, part) })
}

// chainPricer prices a chain's stages together (cost.StagesBOM), finding
// parts with find in the build's currency as the stages' searches price
// them (converterFor), each part looked up once.
type chainPricer struct {
	build cost.Build
	find  spec.Lookup
}

func newChainPricer(s *spec.Spec, opt Options, find spec.Lookup) (*chainPricer, error) {
	b, err := cost.BuildOf(s.Build)
	if err != nil {
		return nil, fmt.Errorf("%w: %w", ErrProblem, err)
	}
	conv := converterFor(s, opt)
	type found struct {
		kind catalog.Kind
		v    any
		err  error
	}
	memo := map[string]found{}
	return &chainPricer{build: b, find: func(part string) (catalog.Kind, any, error) {
		if f, ok := memo[part]; ok {
			return f.kind, f.v, f.err
		}
		kind, v, err := find(part)
		if err == nil && conv != nil {
			var ok bool
			if v, ok = conv.Part(v); !ok {
				err = fmt.Errorf("%w: %s has a price in a currency with no rate to %s", cost.ErrMixedCurrency, part, conv.To)
			}
		}
		memo[part] = found{kind, v, err}
		return kind, v, err
	}}, nil
}

// stageSolver searches one stage's spec (Solve or SolveCatalog).
type stageSolver func(context.Context, *spec.Spec, Options) (*Result, error)

// candidate is one stage design the combination draws on: the design, its
// spec form and its exact budget under the stage's problem (nil until a
// pair needs it).
type candidate struct {
	d  *Design
	sd *spec.Design
	br *budget.Result
	// key names the design (designKey); uses are its part numbers as the
	// chain's BOM prices them (cost.StageUses), lo the least it can add to
	// a chain's cost (cost.Build.SharedFloor against the other stage's
	// part numbers; see chainWalk.floors).
	key  string
	uses []cost.Use
	lo   float64
	// floor bounds the exact budget's figures from the screening's
	// (floorOf); nil for a design not listed by a chain's search.
	floor *budget.Result
}

// Bounds on a chain's search: the designs one stage may list, the exact
// stage budgets and the pairs it may walk. Where one is reached the search
// stops and says up to which chain cost its ranking is exact.
const (
	maxChainStageDesigns = 20000
	maxChainBudgets      = 4000
	maxChainPairs        = 2000000
)

// chainGrowth is the factor by which the chain cost ceiling rises between
// rounds of the search (see solveChain).
const chainGrowth = 1.2

// solveChain finds the cheapest chains meeting the chain's limits, exactly
// over every pair of stage designs the stages' screening passes under
// spec.StageLimits (each value option of each design class, not only a
// class's cheapest): every passing chain's stages meet those limits (the
// cascade equations never fall below a stage's own share) and their own
// hard limits, so no passing chain is left out.
//
// The search runs in rounds of a cost ceiling T on the chain. Stage 1's
// designs up to T - c2 and stage 2's up to T - c1 (c1, c2 the cheapest
// passing design of each stage) are all the stage designs of a chain of
// cost at most T. Their pairs are walked in nondecreasing order of the
// summed cost (a heap over the two cost-sorted lists), those of a
// previous round skipped; each pair not already ruled out (a stage design
// whose exact budget fails its own limits pairs with nothing) is judged by
// the chain's budget (budget.Cascade of the stages' exact budgets). The
// walk stops when Top chains pass and the next pair costs more than the
// last of them: every cheaper pair has been judged, so the ranking is
// exact. Otherwise T rises by chainGrowth until both stages' lists are
// complete. Where a bound on the work (maxChainStageDesigns,
// maxChainBudgets, maxChainPairs) stops it first, the notes say up to
// which chain cost the ranking is exact.
//
// The cost of a chain is its stages priced together (cost.StagesBOM): a
// part number both stages use is one line, bought at the joint quantity
// (its price break, minimum order and stock over the sum, one line item).
// Sharing can only lower a chain's cost below the sum of its stages'
// (buy-up makes a line's price nondecreasing in the pieces needed), so the
// pairs are walked in order of the sum of their stages' floors
// (cost.Build.SharedFloor: what a stage adds at least, its lines of part
// numbers the other stage's list holds at their lowest unit price and no
// line item), a lower bound on the chain's cost; where no part number is
// shared the floors are the stages' costs and the order is theirs.
func solveChain(ctx context.Context, s *spec.Spec, opt Options, solveStage stageSolver, find spec.Lookup) (*ChainResult, error) {
	if err := opt.check(); err != nil {
		return nil, err
	}
	if !s.IsChain() {
		return nil, fmt.Errorf("%w: spec %s lists no stages", ErrProblem, s.Name)
	}
	top := opt.Top
	if top == 0 {
		top = defaultTop
	}
	res := &ChainResult{Method: s.Analysis.Method}
	pr, err := newChainPricer(s, opt, find)
	if err != nil {
		return nil, err
	}
	stages, err := chainStages(ctx, s, opt, solveStage, pr, res)
	if err != nil {
		return res, err
	}
	w := chainWalk{s: s, stages: stages, top: top, st: &res.Search, pricer: pr, judged: map[[2]string]bool{}}
	if err := w.run(ctx); err != nil {
		return nil, err
	}
	for _, st := range stages {
		res.Search.Candidates = append(res.Search.Candidates, len(st.list))
		res.Search.BoundPruned += len(st.list) - len(liveIndexes(st))
	}
	ranked := w.ranked
	for i := range ranked {
		ranked[i].Rank = i + 1
	}
	res.Designs = ranked
	if res.NearMisses, err = w.nearMisses(ctx); err != nil {
		return nil, err
	}
	res.Notes = append(res.Notes, ChainCostNote)
	cur := ""
	if l := stages[0].list; len(l) > 0 {
		cur = l[0].d.Currency + " "
	}
	switch {
	case w.stopped != "":
		res.Notes = append(res.Notes, fmt.Sprintf("the chain search stopped at %s: the ranking is exact for chains up to %s%.6g the build; a chain above that cost was not judged", w.stopped, cur, w.exactTo))
	case math.IsInf(w.exactTo, 1):
		res.Notes = append(res.Notes, "exact: every pair of stage designs (each value choice of each class the stages' screening passes) was judged by the chain's budget or ruled out by a bound")
	default:
		res.Notes = append(res.Notes, fmt.Sprintf("exact: every pair of stage designs (each value choice of each class the stages' screening passes) up to %s%.6g the build was judged by the chain's budget or ruled out by a bound", cur, w.exactTo))
	}
	if len(ranked) > 0 {
		res.Notes = append(res.Notes, ranked[0].budget.Notes...)
		return res, nil
	}
	res.Infeasible = "no pair of the stages' designs meets the chain's limits"
	if w.stopped != "" {
		res.Infeasible = fmt.Sprintf("no pair of the stages' designs up to %s%.6g the build meets the chain's limits", cur, w.exactTo)
	}
	if closest := w.closest; closest != nil {
		res.Infeasible += fmt.Sprintf("; the closest (stages %s and %s) is bound by %s", closest.Stages[0].Family, closest.Stages[1].Family, closest.Binding)
		for _, l := range closest.Limits {
			if !l.Pass {
				res.Infeasible += fmt.Sprintf(", fails %s (%s against %s)", l.Name, budget.FormatFigure(l.Value, l.Unit), budget.FormatFigure(l.Limit, l.Unit))
			}
		}
	}
	return res, fmt.Errorf("%w: %s", ErrInfeasible, res.Infeasible)
}

// stageDesigns are the designs of one stage of a chain that its screening
// passes up to a cost ceiling, cheapest first, with the exact budgets
// computed so far (kept across ceilings).
type stageDesigns struct {
	// sub is the stage's problem (its exact budgets are taken under it),
	// screen the widened one its designs are listed under (screened).
	sub      *spec.Spec
	screen   *spec.Spec
	solve    stageSolver
	opt      Options
	ceiling  float64
	complete bool
	// all is every design the stage's screening passes, cheapest first,
	// when there are at most maxChainStageDesigns (probe); list is then
	// its prefix up to the ceiling.
	all  []candidate
	list []candidate
	// live marks the designs of list that may pass a chain with a design
	// of the other stage's list (chainWalk.prune).
	live     []bool
	budgets  map[string]*budget.Result
	nBudgets *int
	// slack is the screening's allowance (screenSlack) of the method.
	slack float64
	// pricer lists each design's part numbers for the chain's BOM.
	pricer *chainPricer
}

// upTo lists the stage's passing designs up to cost c (a search with
// Options.ceiling), unless the list already reaches c or is complete.
func (st *stageDesigns) upTo(ctx context.Context, c float64) error {
	if st.all != nil {
		n := sort.Search(len(st.all), func(k int) bool { return st.all[k].d.TotalCost > c*(1+ceilingSlack) })
		st.list, st.ceiling, st.complete = st.all[:n], c, n == len(st.all)
		return nil
	}
	if st.complete || (st.list != nil && c <= st.ceiling) {
		return nil
	}
	list, cut, err := st.designs(ctx, c, 0)
	if err != nil {
		return err
	}
	st.list, st.ceiling, st.complete = list, c, !cut
	return nil
}

// probe lists every design of the stage when there are at most
// maxChainStageDesigns (one search instead of one per ceiling).
func (st *stageDesigns) probe(ctx context.Context) error {
	all, cut, err := st.designs(ctx, math.Inf(1), maxChainStageDesigns)
	if err != nil || cut {
		return err
	}
	st.all = all
	return nil
}

// designs lists the designs the stage's screening passes up to cost c,
// cheapest first, and whether one may cost more (or, with most > 0, the
// list stopped at most designs).
func (st *stageDesigns) designs(ctx context.Context, c float64, most int) ([]candidate, bool, error) {
	o := st.opt
	o.ceiling, o.most = c, most
	r, err := st.solve(ctx, st.screen, o)
	if err != nil {
		return nil, false, fmt.Errorf("%s: %w", st.sub.Name, err)
	}
	list := make([]candidate, len(r.Designs))
	for j := range r.Designs {
		d := &r.Designs[j]
		key := designKey(d)
		uses, err := cost.StageUses(r.designs[j], st.pricer.find, "")
		if err != nil {
			return nil, false, fmt.Errorf("%s design %s: %w", st.sub.Name, partsText(d), err)
		}
		list[j] = candidate{d: d, sd: r.designs[j], br: st.budgets[key], floor: floorOf(&d.Metrics, st.slack), key: key, uses: uses, lo: d.TotalCost}
	}
	slices.SortStableFunc(list, func(a, b candidate) int { return cmpCost(a.d.TotalCost, b.d.TotalCost) })
	return list, r.cut, nil
}

// budget returns the exact budget of design k of the list under the
// stage's problem, computing it once.
func (st *stageDesigns) budget(ctx context.Context, k int) (*budget.Result, error) {
	c := &st.list[k]
	if c.br != nil {
		return c.br, nil
	}
	br, err := budget.EvaluateContext(ctx, st.sub, c.sd, nil)
	if err != nil {
		return nil, fmt.Errorf("%s design %s: %w", st.sub.Name, partsText(c.d), err)
	}
	adopt(c.d, br)
	c.br = br
	st.budgets[c.key] = br
	*st.nBudgets++
	return br, nil
}

// designKey names a stage design by its family and parts.
func designKey(d *Design) string { return fmt.Sprintf("%s|%v", d.Family, d.Parts) }

func cmpCost(a, b float64) int {
	switch {
	case a < b:
		return -1
	case a > b:
		return 1
	}
	return 0
}

// screenSlack widens a stage's share of the chain's limits for the
// screening that lists the stage's designs (screened), per analysis
// method. The search's screening figures approximate the exact budget and
// may lie above it: over the generated chains of the oracle test, every
// design of each stage within its hard limits, the screening figure was at
// most 1.15 times the budget's under worst case (a difference stage's
// offset; gain error 1.07, noise 1.13) and 2.26 times under RSS (offsets
// add their terms linearly in the screening; CMRR up to 6.4 dB low). A
// design is listed when its screening figures pass the widened limits,
// then judged by its exact budget under the stage's own limits
// (spec.StageLimits) and by the chain's budget, so the slack costs work,
// never a wrong pass; TestChainSearchMatchesOracle checks that it loses
// no passing chain.
var screenSlack = map[string]float64{spec.WorstCase: 1.25, spec.RSS: 3}

// screened is stage problem sub with its limits widened by screenSlack
// (a factor on each maximum, its inverse on each minimum, 20·log10 of it
// off the CMRR).
func screened(sub *spec.Spec) *spec.Spec {
	k := slackOf(sub)
	out := *sub
	l := &out.Limits
	for _, v := range []*float64{&l.GainError, &l.GainDrift, &l.OutputOffsetV, &l.OffsetDriftVK, &l.NoiseRMSV, &l.NoiseDensity} {
		*v *= k
	}
	l.BandwidthHz /= k
	l.InputImpedance /= k
	if l.CMRRdB != 0 {
		l.CMRRdB -= 20 * math.Log10(k)
	}
	return &out
}

// slackOf is the screening's allowance under the method of s.
func slackOf(s *spec.Spec) float64 {
	if k, ok := screenSlack[s.Analysis.Method]; ok {
		return k
	}
	return screenSlack[spec.RSS] // Monte Carlo specs are screened with RSS figures
}

// floorOf is an optimistic stand-in for the exact budget of a design with
// screening figures m, on the premise screened rests on (no screening
// figure is more than slack times the budget's, nor its CMRR more than
// 20·log10(slack) dB below): each error figure divided by slack, the CMRR
// raised by that many dB, the bandwidth multiplied by slack, the figures
// the screening does not give at their best (no common-mode error, no
// stress, unlimited headroom and input impedance). A chain through a design
// whose floor fails with the other stage's best floors fails with every
// design of that stage (budget.BestOf).
func floorOf(m *Metrics, slack float64) *budget.Result {
	return &budget.Result{Pass: true, Metrics: budget.Metrics{Gain: m.Gain, GainTarget: m.Gain,
		GainError: m.GainError / slack, CMRRdB: m.CMRRdB + 20*math.Log10(slack), CMRRResistorsdB: math.Inf(1),
		DriftPPMPerK: m.DriftPPMPerK / slack, OutputOffsetV: m.OutputOffsetV / slack, OffsetDriftVPerK: m.OffsetDriftVPerK / slack,
		NoiseDensity: m.NoiseDensity / slack, NoiseRMSV: m.NoiseRMSV / slack, BandwidthHz: m.BandwidthHz * slack,
		InputImpedanceOhm: math.Inf(1), HeadroomV: math.Inf(1)}}
}

// chainStages searches each stage of s alone: first under its share of
// the chain's limits (spec.StageProblem), for its cautions and to say why
// when the stage alone is infeasible (then, unless the widened screening
// finds a design, the error wraps ErrInfeasible), then under the widened
// screening (screened), whose cheapest design starts the stage's list.
func chainStages(ctx context.Context, s *spec.Spec, opt Options, solveStage stageSolver, pr *chainPricer, res *ChainResult) ([]*stageDesigns, error) {
	out := make([]*stageDesigns, len(s.Stages))
	n := 0
	for i := range s.Stages {
		sub := s.StageProblem(i)
		o := opt
		o.Top, o.Frontier = 1, false
		r, err := solveStage(ctx, sub, o)
		if err != nil && !errors.Is(err, ErrInfeasible) {
			return nil, fmt.Errorf("stage %d: %w", i+1, err)
		}
		wide := screened(sub)
		if err != nil {
			rw, werr := solveStage(ctx, wide, Options{Top: 1, Combos: opt.Combos, Rates: opt.Rates, quick: true})
			if werr != nil {
				why := ""
				if r != nil && r.Infeasible != nil {
					why = ": " + r.Infeasible.Message
				}
				res.Infeasible = fmt.Sprintf("stage %d alone has no design meeting what the chain's limits ask of it%s", i+1, why)
				return nil, fmt.Errorf("%w: %s", ErrInfeasible, res.Infeasible)
			}
			r = rw
		}
		for _, c := range r.Cautions {
			if !slices.Contains(res.Cautions, c) {
				res.Cautions = append(res.Cautions, c)
			}
		}
		o.Progress = nil
		st := &stageDesigns{sub: sub, screen: wide, solve: solveStage, opt: o, budgets: map[string]*budget.Result{}, nBudgets: &n, slack: slackOf(sub), pricer: pr}
		if err := st.probe(ctx); err != nil {
			return nil, err
		}
		if err := st.upTo(ctx, r.Designs[0].TotalCost); err != nil {
			return nil, err
		}
		out[i] = st
	}
	return out, nil
}

// chainWalk is the state of a chain's search (see solveChain).
type chainWalk struct {
	s      *spec.Spec
	stages []*stageDesigns
	top    int
	st     *ChainStats
	pricer *chainPricer

	ranked  []ChainDesign
	closest *ChainDesign
	// failing are the closest failing chains judged (near misses).
	failing []ChainNearMiss
	// judged marks the pairs (by their designs' keys) already judged.
	judged map[[2]string]bool
	// exactTo is the chain cost up to which every pair was judged;
	// stopped names the bound on the work that ended the search early.
	exactTo float64
	stopped string
}

// run walks the rounds of rising cost ceilings. A chain of cost at most t
// has its stage designs within t less the other stage's least floor
// (leastFloor): its cost is at least the sum of the two floors, and a
// stage's floor is at most its own cost.
func (w *chainWalk) run(ctx context.Context) error {
	a, b := w.stages[0], w.stages[1]
	if len(a.list) == 0 || len(b.list) == 0 {
		return nil
	}
	minA, err := w.leastFloor(0)
	if err != nil {
		return err
	}
	minB, err := w.leastFloor(1)
	if err != nil {
		return err
	}
	t := a.ceiling + b.ceiling
	for {
		if err := a.upTo(ctx, t-minB); err != nil {
			return err
		}
		if err := b.upTo(ctx, t-minA); err != nil {
			return err
		}
		if len(a.list) > maxChainStageDesigns || len(b.list) > maxChainStageDesigns {
			w.stopped = fmt.Sprintf("%d designs of one stage", maxChainStageDesigns)
			return nil
		}
		if err := w.floors(); err != nil {
			return err
		}
		if err := w.prune(ctx); err != nil || w.stopped != "" {
			return err
		}
		done, err := w.pairs(ctx, t)
		if err != nil || done || w.stopped != "" {
			return err
		}
		w.exactTo = t
		if a.complete && b.complete {
			w.exactTo = math.Inf(1)
			return nil
		}
		t *= chainGrowth
	}
}

// partNumbers is the set of part numbers the designs cs use.
func partNumbers(cs []candidate) map[string]bool {
	out := map[string]bool{}
	for _, c := range cs {
		for _, u := range c.uses {
			out[u.Part] = true
		}
	}
	return out
}

// floors sets each listed design's floor (candidate.lo) against the part
// numbers of the other stage's list: the pairs walked are of the two
// lists, so no other part number can be shared.
func (w *chainWalk) floors() error {
	for k, st := range w.stages {
		other := partNumbers(w.stages[1-k].list)
		for i := range st.list {
			c := &st.list[i]
			lo, err := w.pricer.build.SharedFloor(c.uses, func(p string) bool { return other[p] })
			if err != nil {
				return fmt.Errorf("%s design %s: %w", st.sub.Name, partsText(c.d), err)
			}
			c.lo = min(lo, c.d.TotalCost)
		}
	}
	return nil
}

// leastFloor is a lower bound on the floor of every design of stage k
// against any design of the other stage: the least floor over the
// stage's designs when probe listed them all (against the other stage's
// part numbers when it listed those all too, else against every part
// number), else 0.
func (w *chainWalk) leastFloor(k int) (float64, error) {
	st, other := w.stages[k], w.stages[1-k]
	if st.all == nil {
		return 0, nil
	}
	shared := func(string) bool { return true }
	if other.all != nil {
		parts := partNumbers(other.all)
		shared = func(p string) bool { return parts[p] }
	}
	least := math.Inf(1)
	for i := range st.all {
		lo, err := w.pricer.build.SharedFloor(st.all[i].uses, shared)
		if err != nil {
			return 0, fmt.Errorf("%s design %s: %w", st.sub.Name, partsText(st.all[i].d), err)
		}
		least = min(least, lo, st.all[i].d.TotalCost)
	}
	return least, nil
}

// pairs judges the pairs of the stages' lists whose floors sum to at most
// t, by that sum (a lower bound on the chain's cost), skipping those
// judged before, and reports whether the ranking is final (Top chains
// pass and no unjudged pair can cost less than the last of them).
func (w *chainWalk) pairs(ctx context.Context, t float64) (bool, error) {
	a, b := w.stages[0], w.stages[1]
	// Only live designs pair (prune), in order of their floors.
	ia, ib := liveIndexes(a), liveIndexes(b)
	if len(ia) == 0 || len(ib) == 0 {
		return false, nil
	}
	byFloor := func(st *stageDesigns) func(i, j int) int {
		return func(i, j int) int { return cmpCost(st.list[i].lo, st.list[j].lo) }
	}
	slices.SortStableFunc(ia, byFloor(a))
	slices.SortStableFunc(ib, byFloor(b))
	cost := func(i, j int32) float64 { return a.list[ia[i]].lo + b.list[ib[j]].lo }
	h := pairHeap{{cost(0, 0), 0, 0, false}}
	walked := 0
	for h.Len() > 0 {
		pr := heap.Pop(&h).(pair)
		if pr.lb > t {
			return false, nil
		}
		if len(w.ranked) >= w.top && pr.lb >= w.ranked[w.top-1].TotalCost {
			w.exactTo = pr.lb
			return true, nil
		}
		if int(pr.j)+1 < len(ib) {
			heap.Push(&h, pair{cost(pr.i, pr.j+1), pr.i, pr.j + 1, false})
		}
		if pr.j == 0 && int(pr.i)+1 < len(ia) {
			heap.Push(&h, pair{cost(pr.i+1, 0), pr.i + 1, 0, false})
		}
		i, j := ia[pr.i], ib[pr.j]
		key := [2]string{a.list[i].key, b.list[j].key}
		if w.judged[key] {
			continue
		}
		walked++
		if walked%1024 == 0 {
			if err := ctx.Err(); err != nil {
				return false, err
			}
		}
		if w.st.Evaluated >= maxChainPairs {
			w.exactTo = pr.lb
			w.stopped = fmt.Sprintf("%d pairs", maxChainPairs)
			return false, nil
		}
		w.judged[key] = true
		if err := w.judge(ctx, i, j); err != nil {
			return false, err
		}
	}
	return false, nil
}

// liveIndexes lists the indexes of the live designs of st's list.
func liveIndexes(st *stageDesigns) []int {
	var out []int
	for i, ok := range st.live {
		if ok {
			out = append(out, i)
		}
	}
	return out
}

// prune marks live the designs of both stages' lists that may still pass
// a chain with a design of the other list, in two passes of the same
// test: a design whose chain with the other list's best figures
// (budget.BestOf, a bound on every chain of it with that list) fails
// pairs with nothing of that list. The first pass takes every design's
// screening floor (floorOf), and costs no budget; the designs left get
// their exact budgets, a design whose budget fails its stage's own limits
// pairs with nothing, and the second pass takes the exact figures. Where
// the budgets would pass maxChainBudgets the search stops, exact up to the
// last ceiling.
func (w *chainWalk) prune(ctx context.Context) error {
	// First on the screening's floors (floorOf), which need no budget.
	floors := make([]*budget.Result, 2)
	for k, st := range w.stages {
		fs := make([]*budget.Result, len(st.list))
		for i := range st.list {
			fs[i] = st.list[i].floor
		}
		floors[k] = budget.BestOf(fs)
	}
	for k, st := range w.stages {
		st.live = make([]bool, len(st.list))
		for i := range st.list {
			ok, err := w.mayPass(k, st.list[i].floor, floors[1-k])
			if err != nil {
				return err
			}
			st.live[i] = ok
		}
	}
	n := 0
	for _, st := range w.stages {
		for i := range st.list {
			if st.live[i] && st.list[i].br == nil {
				n++
			}
		}
	}
	if *w.stages[0].nBudgets+n > maxChainBudgets {
		w.stopped = fmt.Sprintf("%d stage designs with their exact budgets", maxChainBudgets)
		return nil
	}
	// Then on the exact budgets of the designs left.
	best := make([]*budget.Result, 2)
	for k, st := range w.stages {
		var pass []*budget.Result
		for i := range st.list {
			if !st.live[i] {
				continue
			}
			br, err := st.budget(ctx, i)
			if err != nil {
				return err
			}
			st.live[i] = br.Pass
			if br.Pass {
				pass = append(pass, br)
			}
		}
		best[k] = budget.BestOf(pass)
	}
	for k, st := range w.stages {
		for i := range st.list {
			if !st.live[i] {
				continue
			}
			ok, err := w.mayPass(k, st.list[i].br, best[1-k])
			if err != nil {
				return err
			}
			st.live[i] = ok
		}
	}
	return nil
}

// mayPass reports whether the chain of stage k's budget br with other,
// the other stage's, passes (false when other is nil: no design).
func (w *chainWalk) mayPass(k int, br, other *budget.Result) (bool, error) {
	if other == nil {
		return false, nil
	}
	pair := []*budget.Result{br, other}
	if k == 1 {
		pair = []*budget.Result{other, br}
	}
	cb, err := budget.Cascade(w.s, pair)
	if err != nil {
		return false, err
	}
	return cb.Pass, nil
}

// judge runs the chain's budget on stage designs i and j, ranking the
// chain when it passes and keeping the closest failing one.
func (w *chainWalk) judge(ctx context.Context, i, j int) error {
	a, b := w.stages[0], w.stages[1]
	w.st.Evaluated++
	cs := []candidate{a.list[i], b.list[j]}
	cd, err := w.chainOf(cs)
	if err != nil || cd == nil {
		return err
	}
	if !cd.budget.Pass {
		if w.closest == nil || bindingMargin(cd) > bindingMargin(w.closest) {
			w.closest = cd
		}
		w.keepFailing(cd, cs)
		return nil
	}
	at := sort.Search(len(w.ranked), func(k int) bool { return chainBefore(cd, &w.ranked[k]) })
	w.ranked = slices.Insert(w.ranked, at, *cd)
	if len(w.ranked) > w.top {
		w.ranked = w.ranked[:w.top]
	}
	return nil
}

// chainOf is the chain of stage designs cs with its budget, priced
// together where they share a part number; nil when the joint quantity is
// short of stock under build.stock exclude.
func (w *chainWalk) chainOf(cs []candidate) (*ChainDesign, error) {
	cd, err := chainDesign(w.s, cs)
	if err != nil {
		return nil, err
	}
	if shared(cs) {
		w.st.Shared++
		err := w.pricer.together(cd, cs)
		if errors.Is(err, cost.ErrShortStock) {
			w.st.ShortStock++
			return nil, nil
		}
		if err != nil {
			return nil, err
		}
	}
	return cd, nil
}

// maxChainFailing is how many of the closest failing chains the walk
// keeps for the near misses.
const maxChainFailing = 32

// keepFailing keeps failing chain cd of stage designs cs among the
// closest (by shortfall) when no passing chain is ranked yet or it costs
// less than the cheapest one.
func (w *chainWalk) keepFailing(cd *ChainDesign, cs []candidate) {
	if len(w.ranked) > 0 && cd.TotalCost >= w.ranked[0].TotalCost {
		return
	}
	nm := ChainNearMiss{ChainDesign: *cd, Fails: limitFailures(cd.budget.Limits), Shortfall: exactShortfall(cd.Limits), cs: cs}
	// A stage that fails its own limits (its share of the chain's, its
	// hard limits) adds its failures and its shortfall.
	for k, c := range cs {
		if c.br.Pass {
			continue
		}
		for _, f := range limitFailures(c.br.Limits) {
			f.Name, f.Text = fmt.Sprintf("stage %d %s", k+1, f.Name), fmt.Sprintf("stage %d: %s", k+1, f.Text)
			nm.Fails = append(nm.Fails, f)
		}
		nm.Shortfall = math.Min(nm.Shortfall*exactShortfall(c.d.Limits), budget.MaxMargin)
	}
	if len(nm.Fails) == 0 {
		return
	}
	at := sort.Search(len(w.failing), func(k int) bool { return w.failing[k].Shortfall > nm.Shortfall })
	if at >= maxChainFailing {
		return
	}
	w.failing = slices.Insert(w.failing, at, nm)
	if len(w.failing) > maxChainFailing {
		w.failing = w.failing[:maxChainFailing]
	}
}

// maxChainNearPairs bounds the pairs judged for near misses beyond the
// walk's (morePairs).
const maxChainNearPairs = 2000

// morePairs judges, for the near misses, pairs the walk did not: those of
// stage designs with exact budgets (a design the walk ruled out by a
// bound has one when its screening floor passed; its budget may fail the
// stage's own limits) whose summed cost is below rank 1's, cheapest
// first, up to maxChainNearPairs. The walk judges only pairs that may
// pass, so a failing chain cheaper than rank 1 is often one of these.
func (w *chainWalk) morePairs(ctx context.Context) error {
	lim := math.Inf(1)
	if len(w.ranked) > 0 {
		lim = w.ranked[0].TotalCost
	}
	own := func(st *stageDesigns) []int {
		var out []int
		for i := range st.list {
			if st.list[i].br != nil {
				out = append(out, i)
			}
		}
		return out
	}
	a, b := w.stages[0], w.stages[1]
	ia, ib := own(a), own(b)
	n := 0
	for _, i := range ia {
		for _, j := range ib {
			if a.list[i].d.TotalCost+b.list[j].d.TotalCost >= lim {
				break
			}
			key := [2]string{a.list[i].key, b.list[j].key}
			if w.judged[key] {
				continue
			}
			if n++; n > maxChainNearPairs {
				return nil
			}
			if n%256 == 0 {
				if err := ctx.Err(); err != nil {
					return err
				}
			}
			w.judged[key] = true
			cs := []candidate{a.list[i], b.list[j]}
			cd, err := w.chainOf(cs)
			if err != nil {
				return err
			}
			if cd != nil && !cd.budget.Pass {
				w.keepFailing(cd, cs)
			}
		}
	}
	return nil
}

// nearMisses are the closest failing chains kept (keepFailing) cheaper
// than rank 1, at most maxNearMisses, each with its fix (chainFix).
func (w *chainWalk) nearMisses(ctx context.Context) ([]ChainNearMiss, error) {
	if err := w.morePairs(ctx); err != nil {
		return nil, err
	}
	var out []ChainNearMiss
	for _, nm := range w.failing {
		if len(w.ranked) > 0 && nm.TotalCost >= w.ranked[0].TotalCost {
			continue
		}
		// Value variants of one chain (same cost, same failures) show once.
		if slices.ContainsFunc(out, func(o ChainNearMiss) bool {
			return o.TotalCost == nm.TotalCost && failText(o.Fails) == failText(nm.Fails) && o.Stages[0].Family == nm.Stages[0].Family && o.Stages[1].Family == nm.Stages[1].Family
		}) {
			continue
		}
		if len(out) == maxNearMisses {
			break
		}
		if err := w.chainFix(ctx, &nm); err != nil {
			return nil, err
		}
		out = append(out, nm)
	}
	return out, nil
}

// chainFix finds the cheapest passing chain that keeps one stage's design
// of near miss nm and takes another listed design of the other stage: the
// designs that may pass with it (live; see prune) in order of cost, up to
// the first whose own cost reaches the best chain found (a chain costs at
// least either stage alone, since a line's price never falls as the
// pieces it buys grow) or maxChainNearFix chains per stage.
func (w *chainWalk) chainFix(ctx context.Context, nm *ChainNearMiss) error {
	var best *ChainDesign
	stage := 0
	for k, st := range w.stages {
		tried := 0
		for _, i := range liveIndexes(st) {
			c := st.list[i]
			if c.key == nm.cs[k].key {
				continue
			}
			if (best != nil && c.d.TotalCost >= best.TotalCost) || tried == maxChainNearFix {
				break
			}
			tried++
			if tried%256 == 0 {
				if err := ctx.Err(); err != nil {
					return err
				}
			}
			cs := slices.Clone(nm.cs)
			cs[k] = c
			cd, err := w.chainOf(cs)
			if err != nil {
				return err
			}
			if cd != nil && cd.budget.Pass && (best == nil || chainBefore(cd, best)) {
				best, stage = cd, k
			}
		}
	}
	if best == nil {
		return nil
	}
	from, to := stageDesign(&nm.Stages[stage]), stageDesign(&best.Stages[stage])
	nm.Fix = partFix("stage", from, to, "")
	nm.Fix.TotalCost, nm.Fix.ExtraCost = best.TotalCost, best.UnitCost-nm.UnitCost
	return nil
}

// stageDesign is a chain stage as a design whose positions are written
// STAGE:POSITION, as a chain's purchasing list writes them.
func stageDesign(st *ChainStage) *Design {
	d := &Design{Family: st.Family, TotalCost: st.TotalCost, UnitCost: st.UnitCost}
	for _, p := range st.Parts {
		p.Position = fmt.Sprintf("%d:%s", st.Stage, p.Position)
		d.Parts = append(d.Parts, p)
	}
	return d
}

// shared reports whether two of the stage designs cs use one part number.
func shared(cs []candidate) bool {
	seen := map[string]int{}
	for k, c := range cs {
		for _, u := range c.uses {
			if at, ok := seen[u.Part]; ok && at != k {
				return true
			}
			seen[u.Part] = k
		}
	}
	return false
}

// together prices chain cd of the stage designs cs as one build
// (cost.StagesBOM): the chain's and each stage's costs (a shared line
// split by pieces), each part's pieces bought and unit price, and the
// part numbers short of stock. Under build.stock exclude a part short for
// the joint quantity fails with cost.ErrShortStock.
func (p *chainPricer) together(cd *ChainDesign, cs []candidate) error {
	sds := make([]*spec.Design, len(cs))
	for i, c := range cs {
		sds[i] = c.sd
	}
	bm, err := cost.StagesBOM(sds, p.find, p.build)
	if err != nil {
		return fmt.Errorf("chain of %s: %w", partsText(cs[0].d), err)
	}
	// The chain's cost is the sum of its stages' shares, as CheckChain
	// sums a checked chain's.
	cd.TotalCost, cd.Currency = 0, bm.Currency
	lines := map[string]cost.BOMLine{}
	cd.ShortStock = nil
	for _, ln := range bm.Lines {
		lines[ln.Part] = ln
		if ln.Short {
			cd.ShortStock = append(cd.ShortStock, ln.Part)
		}
	}
	for i := range cd.Stages {
		st := &cd.Stages[i]
		st.TotalCost, st.UnitCost = bm.StageTotals[i], bm.StageTotals[i]/float64(p.build.Quantity)
		cd.TotalCost += st.TotalCost
		st.Parts = slices.Clone(st.Parts)
		for k := range st.Parts {
			if ln, ok := lines[st.Parts[k].Part]; ok {
				st.Parts[k].Bought, st.Parts[k].UnitPrice = ln.Bought, ln.UnitPrice
			}
		}
	}
	cd.UnitCost = cd.TotalCost / float64(p.build.Quantity)
	return nil
}

// chainBefore reports whether chain a ranks before chain b: the cheaper
// first; of two equal costs the one with the larger margins, compared as
// tieKey's material tier compares a stage's (each limit's margin in steps
// of tieStepFrac on a log scale, the sorted lists compared worst first),
// then by the stages' parts, so the order of equal chains does not depend
// on the order the search judged them in.
func chainBefore(a, b *ChainDesign) bool {
	if a.TotalCost != b.TotalCost {
		return a.TotalCost < b.TotalCost
	}
	ma, mb := chainMargins(a), chainMargins(b)
	for i := range min(len(ma), len(mb)) {
		if ma[i] != mb[i] {
			return ma[i] > mb[i]
		}
	}
	return chainKey(a) < chainKey(b)
}

// chainMargins are the chain's limit margins rounded to steps of
// tieStepFrac on a log scale, ascending.
func chainMargins(d *ChainDesign) []float64 {
	out := make([]float64, len(d.Limits))
	for i, l := range d.Limits {
		out[i] = math.Floor(math.Log(max(l.Margin, 1e-300)) / math.Log1p(tieStepFrac))
	}
	slices.Sort(out)
	return out
}

// chainKey names a chain by its stages' families and parts.
func chainKey(d *ChainDesign) string {
	k := ""
	for _, st := range d.Stages {
		k += fmt.Sprintf("%s|%v;", st.Family, st.Parts)
	}
	return k
}

// bindingMargin is the least margin of a chain's limits.
func bindingMargin(d *ChainDesign) float64 {
	m := budget.MaxMargin
	for _, l := range d.Limits {
		m = min(m, l.Margin)
	}
	return m
}

// chainDesign builds the chain of the stage candidates cs with its budget.
func chainDesign(s *spec.Spec, cs []candidate) (*ChainDesign, error) {
	brs := make([]*budget.Result, len(cs))
	cd := &ChainDesign{}
	for i, c := range cs {
		brs[i] = c.br
		cd.designs = append(cd.designs, c.sd)
		cd.stageBudgets = append(cd.stageBudgets, c.br)
		for _, p := range c.d.ShortStock {
			if !slices.Contains(cd.ShortStock, p) {
				cd.ShortStock = append(cd.ShortStock, p)
			}
		}
		cd.TotalCost += c.d.TotalCost
		cd.UnitCost += c.d.UnitCost
		cd.Currency = c.d.Currency
		cd.Stages = append(cd.Stages, ChainStage{Stage: i + 1, Family: c.d.Family, Gain: s.Stages[i].Gain, TotalCost: c.d.TotalCost,
			UnitCost: c.d.UnitCost, Parts: c.d.Parts, Metrics: c.d.Metrics, CommonModeErrorV: c.br.Metrics.CommonModeErrorV})
	}
	cb, err := budget.Cascade(s, brs)
	if err != nil {
		return nil, err
	}
	cd.budget, cd.Metrics, cd.Binding, cd.Channel = cb, cb.Metrics, cb.Binding, cb.Channel
	for _, l := range cb.Limits {
		cd.Limits = append(cd.Limits, Limit{Name: l.Name, Value: l.Value, Limit: l.Limit, Margin: l.Margin, Pass: l.Pass, Unit: l.Unit, MarginText: l.MarginText})
	}
	return cd, nil
}

// CheckedStage is one stage of a chain design given by hand: its family,
// its build cost (package cost's BOM of the stage), its parts and its
// exact budget under the stage's spec (spec.Spec.StageProblem).
type CheckedStage struct {
	Family    string
	TotalCost float64
	UnitCost  float64
	Currency  string
	Parts     []Part
	Budget    *budget.Result
}

// CheckChain judges a chain design given by hand exactly as the search
// judges a pair of candidates (chainDesign): the stages' budgets combined
// by budget.Cascade against the chain's limits, the costs summed. The
// result has rank 0.
func CheckChain(s *spec.Spec, stages []CheckedStage) (*ChainDesign, error) {
	if len(stages) != len(s.Stages) {
		return nil, fmt.Errorf("%w: spec %s has %d stages, the design %d", ErrProblem, s.Name, len(s.Stages), len(stages))
	}
	cs := make([]candidate, len(stages))
	for i, st := range stages {
		if st.Budget == nil {
			return nil, fmt.Errorf("%w: stage %d has no budget", ErrProblem, i+1)
		}
		cs[i] = candidate{d: &Design{Family: st.Family, TotalCost: st.TotalCost, UnitCost: st.UnitCost, Currency: st.Currency,
			Parts: st.Parts, Metrics: metricsOf(st.Budget.Metrics)}, br: st.Budget}
	}
	return chainDesign(s, cs)
}

// ChainCostNote says how a chain is priced (the search's and a checked
// chain's note).
const ChainCostNote = "chain cost: the stages priced together, a part number both stages use bought once at their joint quantity (price break, minimum order, stock) with one line item"
