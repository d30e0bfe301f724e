package search

import (
	"context"
	"errors"
	"fmt"
	"slices"
	"sort"

	"plumb/catalog"
	"plumb/optimize/budget"
	"plumb/optimize/spec"
)

// ChainResult is the outcome of a chain's search (spec.Spec.Stages): the
// ranked chains, cheapest first. Its JSON field names are a contract
// documented in the README.
type ChainResult struct {
	Designs []ChainDesign `json:"designs"`
	// Infeasible says why no chain passes (empty when one does).
	Infeasible string     `json:"infeasible,omitempty"`
	Method     string     `json:"method"`
	Notes      []string   `json:"notes,omitempty"`
	Cautions   []string   `json:"cautions,omitempty"`
	Search     ChainStats `json:"search"`
}

// ChainStats count the work of a chain's search.
type ChainStats struct {
	// Candidates are the designs of each stage the combination draws on.
	Candidates []int `json:"stage_candidates"`
	// Evaluated counts the pairs whose chain budget was computed, and
	// BoundPruned those skipped because their summed cost could not beat
	// the ranked chains.
	Evaluated   int `json:"evaluated"`
	BoundPruned int `json:"bound_pruned"`
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

	budget *budget.ChainBudget
}

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

// SolveChain finds the lowest-cost chains in snap that meet the chain's
// limits (Solve for each stage; see solveChain).
func SolveChain(ctx context.Context, snap *catalog.Snapshot, s *spec.Spec, opt Options) (*ChainResult, error) {
	return solveChain(ctx, s, opt, func(ctx context.Context, sub *spec.Spec, o Options) (*Result, error) {
		return Solve(ctx, snap, sub, o)
	})
}

// SolveChainCatalog is SolveChain reading the catalog file (SolveCatalog
// for each stage).
func SolveChainCatalog(ctx context.Context, st *catalog.Store, s *spec.Spec, opt Options) (*ChainResult, error) {
	return solveChain(ctx, s, opt, func(ctx context.Context, sub *spec.Spec, o Options) (*Result, error) {
		return SolveCatalog(ctx, st, sub, o)
	})
}

// candidate is one stage design the combination draws on.
type candidate struct {
	d  *Design
	br *budget.Result
}

// solveChain searches each stage alone under the limits the chain's imply
// for it (spec.StageLimits: every passing chain's stages meet them), keeps
// each stage's MaxTop cheapest passing designs with their exact budgets,
// and combines them by branch and bound on the summed cost: the pairs are
// walked in order of the first stage's cost, then the second's, and a
// pair is skipped once its summed cost reaches the costliest of the Top
// chains ranked so far (no costlier pair can enter). Every pair not so
// skipped is judged by the chain's budget (budget.Cascade). The result is
// exact over the candidate lists, and the lists are not every design: a
// stage's search ranks design classes (a family build, grades, an
// amplifier) by their cheapest passing values, so a costlier value choice
// of a class that would suit the chain better is not a candidate, and a
// list that holds MaxTop designs may have been cut (the notes say so). The cost of a chain is the sum of
// its stages' build costs: where two stages share a part number, the
// real build buys it at the joint quantity (a price break, one line item
// less), so the sum is an upper bound on the chain's cost.
func solveChain(ctx context.Context, s *spec.Spec, opt Options, solveStage func(context.Context, *spec.Spec, Options) (*Result, error)) (*ChainResult, error) {
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
	lists, err := stageLists(ctx, s, opt, solveStage, res)
	if err != nil {
		return res, err
	}
	ranked, closest, err := combineChains(ctx, s, lists, top, &res.Search)
	if err != nil {
		return nil, err
	}
	for i := range ranked {
		ranked[i].Rank = i + 1
	}
	res.Designs = ranked
	res.Notes = append(res.Notes, "chain cost: the sum of the stages' build costs (an upper bound where stages share a part number, which a real build buys at the joint quantity)")
	if len(ranked) > 0 {
		res.Notes = append(res.Notes, ranked[0].budget.Notes...)
		return res, nil
	}
	res.Infeasible = "no pair of the stages' candidate designs meets the chain's limits"
	if closest != nil {
		res.Infeasible += fmt.Sprintf("; the closest (stages %s and %s) is bound by %s", closest.Stages[0].Family, closest.Stages[1].Family, closest.Binding)
		for _, l := range closest.Limits {
			if !l.Pass {
				res.Infeasible += fmt.Sprintf(", fails %s (%s against %s)", l.Name, budget.FormatFigure(l.Value, l.Unit), budget.FormatFigure(l.Limit, l.Unit))
			}
		}
	}
	return res, fmt.Errorf("%w: %s", ErrInfeasible, res.Infeasible)
}

// stageLists searches each stage of s alone under spec.StageLimits and
// returns its passing designs with their exact budgets, cheapest first;
// res gets the counts, notes and cautions, and the reason when a stage
// alone is infeasible (then the error wraps ErrInfeasible).
func stageLists(ctx context.Context, s *spec.Spec, opt Options, solveStage func(context.Context, *spec.Spec, Options) (*Result, error), res *ChainResult) ([][]candidate, error) {
	lists := make([][]candidate, len(s.Stages))
	for i := range s.Stages {
		sub := s.StageProblem(i)
		o := opt
		o.Top, o.Frontier = MaxTop, false
		r, err := solveStage(ctx, sub, o)
		if errors.Is(err, ErrInfeasible) {
			why := ""
			if r != nil && r.Infeasible != nil {
				why = ": " + r.Infeasible.Message
			}
			res.Infeasible = fmt.Sprintf("stage %d alone has no design meeting what the chain's limits ask of it%s", i+1, why)
			return nil, fmt.Errorf("%w: %s", ErrInfeasible, res.Infeasible)
		}
		if err != nil {
			return nil, fmt.Errorf("stage %d: %w", i+1, err)
		}
		for j := range r.Designs {
			d := &r.Designs[j]
			br := d.budget
			if br == nil {
				if br, err = budget.EvaluateContext(ctx, sub, r.designs[j], nil); err != nil {
					return nil, fmt.Errorf("stage %d design %d: %w", i+1, j+1, err)
				}
			}
			lists[i] = append(lists[i], candidate{d, br})
		}
		sort.SliceStable(lists[i], func(a, b int) bool { return lists[i][a].d.TotalCost < lists[i][b].d.TotalCost })
		res.Search.Candidates = append(res.Search.Candidates, len(lists[i]))
		if len(r.Designs) >= MaxTop {
			res.Notes = append(res.Notes, fmt.Sprintf("stage %d: the combination draws on its %d cheapest designs meeting the chain's share of the limits; a chain through a costlier stage %d design is not considered", i+1, MaxTop, i+1))
		}
		for _, c := range r.Cautions {
			if !slices.Contains(res.Cautions, c) {
				res.Cautions = append(res.Cautions, c)
			}
		}
	}
	return lists, nil
}

// combineChains ranks the top cheapest passing chains of one candidate
// from each of the two lists (each sorted by cost), by branch and bound on
// the summed cost (see solveChain), and returns the closest failing chain
// it judged (nil: none), counting its work in st.
func combineChains(ctx context.Context, s *spec.Spec, lists [][]candidate, top int, st *ChainStats) (ranked []ChainDesign, closest *ChainDesign, err error) {
	a, b := lists[0], lists[1]
	for _, ca := range a {
		if len(ranked) == top && len(b) > 0 && ca.d.TotalCost+b[0].d.TotalCost >= ranked[top-1].TotalCost {
			st.BoundPruned += len(b)
			continue
		}
		for j, cb := range b {
			if err := ctx.Err(); err != nil {
				return nil, nil, err
			}
			cost := ca.d.TotalCost + cb.d.TotalCost
			if len(ranked) == top && cost >= ranked[top-1].TotalCost {
				st.BoundPruned += len(b) - j
				break
			}
			st.Evaluated++
			cd, err := chainDesign(s, []candidate{ca, cb})
			if err != nil {
				return nil, nil, err
			}
			if !cd.budget.Pass {
				if closest == nil || bindingMargin(cd) > bindingMargin(closest) {
					closest = cd
				}
				continue
			}
			at := sort.Search(len(ranked), func(k int) bool { return ranked[k].TotalCost > cost })
			ranked = slices.Insert(ranked, at, *cd)
			if len(ranked) > top {
				ranked = ranked[:top]
			}
		}
	}
	return ranked, closest, nil
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
