package search

import (
	"context"
	"fmt"
	"slices"
)

// below returns every design of the space that passes the screening and
// costs at most ceiling: each passing value option of each class, not
// only a class's cheapest (a chain may need a costlier value choice of a
// class, whose nominal ratio or margin suits the other stage better),
// cheapest first. complete is true when no passing design of the space
// costs more than ceiling.
//
// With exhaustive every class and option is walked. Otherwise the walk is
// branchAndBound's: configurations, op-amps and pairs whose error bound
// fails are skipped (pass(bound) false proves that no option of the class
// passes), and the walk stops at the first pair whose cost lower bound is
// above ceiling (the pairs come in nondecreasing order of a valid bound).
// Within a class the options are sorted by cost, so the first above
// ceiling ends it.
//
// With most > 0 the walk stops once the list holds more than most designs
// (complete false).
func (s *space) below(ctx context.Context, ceiling float64, most int, exhaustive bool) ([]classBest, bool, stats, error) {
	st := stats{classes: s.classCount()}
	// A design's cost as described (Design.TotalCost) and as the walk sums
	// it may differ in the last bits: keep what the rounding may put on
	// either side.
	ceiling *= 1 + ceilingSlack
	var out []classBest
	complete := true
	for mi := range s.matched {
		st.visited++
		st.evaluated++ // a matched amplifier's one design
		b := s.evalMatchedClass(mi)
		switch {
		case !b.pass:
		case b.cost > ceiling:
			complete = false
		default:
			out = append(out, b)
		}
	}
	var m metrics
	class := func(ci, ai int) {
		st.evaluated++
		c, a := &s.cfgs[ci], &s.amps[ai]
		opts := s.options(c)
		for i := range opts {
			o := &opts[i]
			if o.cost+a.cost > ceiling {
				complete = false
				return
			}
			s.evalOpt(c, o, a, &m)
			if s.pass(&m) {
				out = append(out, classBest{id: s.classID(ci, ai), cfg: ci, amp: ai, opt: i, cost: o.cost + a.cost, m: m, pass: true, key: s.tie(c, o, a, &m)})
			}
		}
	}
	full := func() bool {
		if most > 0 && len(out) > most {
			complete = false
			return true
		}
		return false
	}
	var err error
	if exhaustive {
		for ci := range s.cfgs {
			if err = ctx.Err(); err != nil || full() {
				break
			}
			for ai := range s.amps {
				st.visited++
				class(ci, ai)
			}
		}
	} else {
		cfgs := s.sortedConfigs(func(ci int) bool { s.bound(&s.cfgs[ci].g, nil, &m); return s.pass(&m) })
		amps := s.sortedAmps(func(ai int) bool { s.bound(nil, &s.amps[ai], &m); return s.pass(&m) })
		s.walkPairs(cfgs, amps, func(ci, ai int, lb float64) bool {
			if full() {
				return true
			}
			if lb > ceiling {
				complete = false
				return true
			}
			st.visited++
			if st.visited%4096 == 0 {
				if err = ctx.Err(); err != nil {
					return true
				}
			}
			s.bound(&s.cfgs[ci].g, &s.amps[ai], &m)
			if !s.pass(&m) {
				st.boundPruned++
				return false
			}
			class(ci, ai)
			return false
		})
	}
	if err != nil {
		return nil, false, st, err
	}
	slices.SortStableFunc(out, func(a, b classBest) int {
		switch {
		case a.less(&b):
			return -1
		case b.less(&a):
			return 1
		}
		return a.opt - b.opt
	})
	return out, complete, st, nil
}

// solveBelow is solve with Options.ceiling: every design the screening
// passes up to that cost (below), each described with its parts and
// costs, cheapest first and unconfirmed (the caller runs the exact budget
// of those it needs), with Result.cut set when a passing design may cost
// more. No near misses, frontier or folding: a chain's search draws on the
// list as it is.
func (s *space) solveBelow(ctx context.Context, opt Options, exhaustive bool) (*Result, error) {
	list, complete, st, err := s.below(ctx, opt.ceiling, opt.most, exhaustive)
	if err != nil {
		return nil, fmt.Errorf("search: %w", err)
	}
	res := &Result{Method: string(s.p.Method), Designs: make([]Design, 0, len(list)), NearMisses: []NearMiss{}, cut: !complete,
		Search: Stats{Classes: st.classes, Visited: st.visited, BoundPruned: st.boundPruned, Evaluated: st.evaluated}}
	if s.p.hazardous() {
		res.Cautions = append(res.Cautions, hazardCaution)
	}
	for i := range list {
		d, sd, err := s.describe(&list[i])
		if err != nil {
			return nil, err
		}
		d.Rank = i + 1
		res.Designs = append(res.Designs, d)
		res.designs = append(res.designs, sd)
	}
	return res, nil
}

// ceilingSlack is the relative rounding allowance of a cost ceiling.
const ceilingSlack = 1e-9
