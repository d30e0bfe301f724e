package search

import (
	"container/heap"
	"context"
	"sort"
)

// classBest is the cheapest passing design of one design class: a
// configuration and an op-amp (cfg >= 0), or a matched amplifier (cfg < 0).
type classBest struct {
	id       uint64 // total order among classes of equal cost
	cfg, amp int
	opt      int // option index in the configuration
	cost     float64
	m        metrics
	pass     bool
}

// less orders designs by cost, then by class id.
func (a *classBest) less(b *classBest) bool {
	if a.cost != b.cost {
		return a.cost < b.cost
	}
	return a.id < b.id
}

func (s *space) classID(cfg, amp int) uint64 {
	if cfg < 0 {
		return uint64(len(s.cfgs))*uint64(len(s.amps)+1) + uint64(amp)
	}
	return uint64(cfg)*uint64(len(s.amps)+1) + uint64(amp)
}

// evalClass finds the cheapest passing option of configuration ci with
// op-amp ai. Options are sorted by cost, so the first that passes is it.
func (s *space) evalClass(ci, ai int) (classBest, bool) {
	c := &s.cfgs[ci]
	a := &s.amps[ai]
	var m metrics
	for i, o := range s.options(c) {
		s.eval(&c.g, o.k0, o.rp, a, &m)
		if s.pass(&m) {
			return classBest{id: s.classID(ci, ai), cfg: ci, amp: ai, opt: i, cost: o.cost + a.cost, m: m, pass: true}, true
		}
	}
	return classBest{}, false
}

// cheapestClass returns the cheapest option of a class whether it passes
// or not (for near misses).
func (s *space) cheapestClass(ci, ai int) (classBest, bool) {
	c := &s.cfgs[ci]
	opts := s.options(c)
	if len(opts) == 0 {
		return classBest{}, false
	}
	a := &s.amps[ai]
	b := classBest{id: s.classID(ci, ai), cfg: ci, amp: ai, opt: 0, cost: opts[0].cost + a.cost}
	s.eval(&c.g, opts[0].k0, opts[0].rp, a, &b.m)
	b.pass = s.pass(&b.m)
	return b, true
}

func (s *space) evalMatchedClass(mi int) classBest {
	a := &s.matched[mi]
	b := classBest{id: s.classID(-1, mi), cfg: -1, amp: mi, opt: -1, cost: a.cost}
	s.evalMatched(a, &b.m)
	b.pass = s.pass(&b.m)
	return b
}

// variants counts the passing value options of a class.
func (s *space) variants(b *classBest) int {
	if b.cfg < 0 {
		return 1
	}
	c := &s.cfgs[b.cfg]
	var m metrics
	n := 0
	for _, o := range s.options(c) {
		s.eval(&c.g, o.k0, o.rp, &s.amps[b.amp], &m)
		if s.pass(&m) {
			n++
		}
	}
	return n
}

// topN keeps the n best classes in order.
type topN struct {
	n    int
	list []classBest
}

func (t *topN) add(b classBest) {
	i := sort.Search(len(t.list), func(i int) bool { return b.less(&t.list[i]) })
	if i >= t.n {
		return
	}
	t.list = append(t.list, classBest{})
	copy(t.list[i+1:], t.list[i:])
	t.list[i] = b
	if len(t.list) > t.n {
		t.list = t.list[:t.n]
	}
}

// full reports whether n classes are held; then threshold is the n-th cost.
func (t *topN) full() bool         { return len(t.list) >= t.n }
func (t *topN) threshold() float64 { return t.list[len(t.list)-1].cost }

// Exhaustive evaluates every value option of every class of the search
// space and returns the n best passing classes: the oracle the
// branch-and-bound search is tested against.
func (s *space) exhaustive(ctx context.Context, n int) ([]classBest, error) {
	t := topN{n: n}
	for mi := range s.matched {
		if b := s.evalMatchedClass(mi); b.pass {
			t.add(b)
		}
	}
	var m metrics
	for ci := range s.cfgs {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		c := &s.cfgs[ci]
		opts := s.options(c)
		for ai := range s.amps {
			a := &s.amps[ai]
			best := -1
			for i := range opts {
				s.eval(&c.g, opts[i].k0, opts[i].rp, a, &m)
				if s.pass(&m) && (best < 0 || opts[i].cost < opts[best].cost) {
					best = i
				}
			}
			if best >= 0 {
				b := classBest{id: s.classID(ci, ai), cfg: ci, amp: ai, opt: best, cost: opts[best].cost + a.cost, pass: true}
				s.eval(&c.g, opts[best].k0, opts[best].rp, a, &b.m)
				t.add(b)
			}
		}
	}
	return t.list, nil
}

// pairHeap orders (configuration, op-amp) pairs by their cost lower bound.
type pair struct {
	lb   float64
	i, j int32 // ranks in the sorted configuration and op-amp lists
}

type pairHeap []pair

func (h pairHeap) Len() int { return len(h) }
func (h pairHeap) Less(a, b int) bool {
	if h[a].lb != h[b].lb {
		return h[a].lb < h[b].lb
	}
	if h[a].i != h[b].i {
		return h[a].i < h[b].i
	}
	return h[a].j < h[b].j
}
func (h pairHeap) Swap(a, b int) { h[a], h[b] = h[b], h[a] }
func (h *pairHeap) Push(x any)   { *h = append(*h, x.(pair)) }
func (h *pairHeap) Pop() any {
	old := *h
	x := old[len(old)-1]
	*h = old[:len(old)-1]
	return x
}

// stats counts the work of one search.
type stats struct {
	classes, visited, boundPruned, evaluated int
	failed                                   []classBest // cheapest failing classes seen, for near misses
}

// maxFailedKept bounds the failing classes kept for near misses.
const maxFailedKept = 8

// branchAndBound returns the same n best classes as exhaustive. It keeps
// only configurations and op-amps whose error bound can pass on its own,
// walks (configuration, op-amp) pairs in order of the sum of their cost
// lower bounds (a heap over the two sorted lists), skips a pair whose joint
// error bound fails, and stops when the next lower bound is above the n-th
// best cost found.
func (s *space) branchAndBound(ctx context.Context, n int, progress func(done, total int)) ([]classBest, stats, error) {
	st := stats{classes: len(s.cfgs)*len(s.amps) + len(s.matched)}
	t := topN{n: n}
	for mi := range s.matched {
		b := s.evalMatchedClass(mi)
		st.visited++
		if b.pass {
			t.add(b)
		} else {
			st.keepFailed(b)
		}
	}
	var m metrics
	var cfgs, amps []int32
	for ci := range s.cfgs {
		s.bound(&s.cfgs[ci].g, nil, &m)
		if s.pass(&m) {
			cfgs = append(cfgs, int32(ci))
		}
	}
	for ai := range s.amps {
		s.bound(nil, &s.amps[ai], &m)
		if s.pass(&m) {
			amps = append(amps, int32(ai))
		}
	}
	sort.SliceStable(cfgs, func(a, b int) bool { return s.cfgs[cfgs[a]].costLB < s.cfgs[cfgs[b]].costLB })
	// s.amps is already sorted by cost.
	if len(cfgs) == 0 || len(amps) == 0 {
		return t.list, st, nil
	}
	lb := func(i, j int32) float64 { return s.cfgs[cfgs[i]].costLB + s.amps[amps[j]].cost }
	h := pairHeap{{lb(0, 0), 0, 0}}
	for h.Len() > 0 {
		pr := heap.Pop(&h).(pair)
		if t.full() && pr.lb > t.threshold() {
			break
		}
		if int(pr.j)+1 < len(amps) {
			heap.Push(&h, pair{lb(pr.i, pr.j+1), pr.i, pr.j + 1})
		}
		if pr.j == 0 && int(pr.i)+1 < len(cfgs) {
			heap.Push(&h, pair{lb(pr.i+1, 0), pr.i + 1, 0})
		}
		st.visited++
		if st.visited%4096 == 0 {
			if err := ctx.Err(); err != nil {
				return nil, st, err
			}
			if progress != nil {
				progress(st.visited, st.classes)
			}
		}
		ci, ai := int(cfgs[pr.i]), int(amps[pr.j])
		s.bound(&s.cfgs[ci].g, &s.amps[ai], &m)
		if !s.pass(&m) {
			st.boundPruned++
			if len(st.failed) < maxFailedKept {
				if b, ok := s.cheapestClass(ci, ai); ok {
					st.keepFailed(b)
				}
			}
			continue
		}
		st.evaluated++
		if b, ok := s.evalClass(ci, ai); ok {
			t.add(b)
		} else if len(st.failed) < maxFailedKept {
			if b, ok := s.cheapestClass(ci, ai); ok {
				st.keepFailed(b)
			}
		}
	}
	return t.list, st, nil
}

func (st *stats) keepFailed(b classBest) {
	if len(st.failed) < maxFailedKept {
		st.failed = append(st.failed, b)
	}
}
