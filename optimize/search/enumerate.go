package search

import (
	"cmp"
	"container/heap"
	"context"
	"slices"
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
	key      tieKey // orders equal costs: margin first, then stress
}

// less orders designs by cost, then among equal costs by the larger worst
// margin and the lower resistor stress (tieKey), then by class id.
func (a *classBest) less(b *classBest) bool {
	if a.cost != b.cost {
		return a.cost < b.cost
	}
	if a.key != b.key {
		return a.key.better(b.key)
	}
	return a.id < b.id
}

// optKey names one design of the space: a configuration, an op-amp and
// a value option (cfg -1: the matched amplifier amp, opt -1).
type optKey struct{ cfg, amp, opt int32 }

func optKeyOf(b *classBest) optKey { return optKey{int32(b.cfg), int32(b.amp), int32(b.opt)} }

// wholeClass as the option of an optKey excludes every design of the
// class.
const wholeClass = -2

// exclude takes design k out of the space: no screening passes it.
func (s *space) exclude(k optKey) {
	if s.excluded == nil {
		s.excluded = map[optKey]bool{}
	}
	s.excluded[k] = true
}

// isExcluded reports whether a design is out of the space (exclude).
func (s *space) isExcluded(cfg, amp, opt int) bool {
	return s.excluded != nil && s.excluded[optKey{int32(cfg), int32(amp), int32(opt)}]
}

func (s *space) classID(cfg, amp int) uint64 {
	if cfg < 0 {
		return uint64(len(s.cfgs))*uint64(len(s.amps)+1) + uint64(amp)
	}
	return uint64(cfg)*uint64(len(s.amps)+1) + uint64(amp)
}

// evalClass finds the cheapest passing option of configuration ci with
// op-amp ai. Options are sorted by cost, so the first that passes is the
// cheapest; the passing options of that same cost are then compared by
// their tie key (the worst margin first, then resistor stress).
//
// The gain errors and the drift of an option depend on the amplifier only
// through its open-loop gain, so the first option that meets those limits
// is remembered per configuration and open-loop gain (s.gainFrom): with any
// other amplifier of that gain the options before it fail too, and a
// configuration none of whose options meets them is not evaluated again.
func (s *space) evalClass(ci, ai int) (classBest, bool) {
	if s.isExcluded(ci, ai, wholeClass) {
		return classBest{}, false
	}
	c := &s.cfgs[ci]
	a := &s.amps[ai]
	var m metrics
	best := classBest{opt: -1}
	opts := s.options(c)
	key := aolKey{int32(ci), a.a.AolVV}
	from, known := s.gainFrom[key]
	if !known {
		from = int32(len(opts))
	}
	start := 0
	if known {
		start = int(from)
	}
	for i := start; i < len(opts); i++ {
		o := &opts[i]
		if best.opt >= 0 && o.cost != opts[best.opt].cost {
			break
		}
		s.evalOpt(c, o, a, &m)
		if !known && int32(i) < from && s.passGain(&m) {
			from = int32(i)
		}
		if !s.pass(&m) || s.isExcluded(ci, ai, i) {
			continue
		}
		if k := s.tie(c, o, a, &m); best.opt < 0 || k.better(best.key) {
			best = classBest{id: s.classID(ci, ai), cfg: ci, amp: ai, opt: i, cost: o.cost + a.cost, m: m, pass: true, key: k}
		}
	}
	if !known {
		if s.gainFrom == nil {
			s.gainFrom = map[aolKey]int32{}
		}
		s.gainFrom[key] = from
	}
	return best, best.opt >= 0
}

// aolKey is a configuration and an open-loop gain (see evalClass).
type aolKey struct {
	cfg int32
	aol float64
}

// passGain reports whether m meets the limits that depend on the
// amplifier only through its open-loop gain: the gain errors and drift.
func (s *space) passGain(m *metrics) bool {
	l := s.p.screenLimits()
	return withinMax(m.gainErr, l.GainError) && withinMax(m.totalErr, l.TotalGainError) && withinMax(m.drift, l.DriftPPM)
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
	s.evalOpt(c, &opts[0], a, &b.m)
	b.pass = s.pass(&b.m)
	b.key = s.tie(c, &opts[0], a, &b.m)
	return b, true
}

func (s *space) evalMatchedClass(mi int) classBest {
	a := &s.matched[mi]
	b := classBest{id: s.classID(-1, mi), cfg: -1, amp: mi, opt: -1, cost: a.cost}
	s.evalMatched(a, &b.m)
	b.pass = s.pass(&b.m) && !s.isExcluded(-1, mi, -1)
	b.key = s.tie(nil, nil, a, &b.m)
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
		s.evalOpt(c, &o, &s.amps[b.amp], &m)
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
			if s.isExcluded(ci, ai, wholeClass) {
				continue
			}
			best := -1
			var bestKey tieKey
			for i := range opts {
				s.evalOpt(c, &opts[i], a, &m)
				if !s.pass(&m) || s.isExcluded(ci, ai, i) {
					continue
				}
				k := s.tie(c, &opts[i], a, &m)
				if best < 0 || opts[i].cost < opts[best].cost || (opts[i].cost == opts[best].cost && k.better(bestKey)) {
					best, bestKey = i, k
				}
			}
			if best >= 0 {
				b := classBest{id: s.classID(ci, ai), cfg: ci, amp: ai, opt: best, cost: opts[best].cost + a.cost, pass: true, key: bestKey}
				s.evalOpt(c, &opts[best], a, &b.m)
				t.add(b)
			}
		}
	}
	return t.list, nil
}

// pairHeap orders (configuration, op-amp) pairs by their cost lower bound.
type pair struct {
	lb    float64
	i, j  int32 // ranks in the sorted configuration and op-amp lists
	again bool  // pushed back with a raised bound (its successors are in)
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
}

// walkPairs visits (configuration, op-amp) pairs in nondecreasing order of
// costLB(configuration) + cost(op-amp), given both index lists sorted by
// those costs, until visit returns true. A heap holds the frontier: after
// (i, j) come (i, j+1) and, from the first column, (i+1, 0), so every pair
// is visited once.
//
// A configuration's costLB rises to its cheapest option's cost once its
// options are built (options), which only tightens the bound: a pair
// popped with a bound below its configuration's present one goes back
// into the heap with the present bound (its successors already pushed),
// so the pairs still come out in nondecreasing order of a valid bound and
// the walk stops sooner.
func (s *space) walkPairs(cfgs, amps []int32, visit func(ci, ai int, lb float64) (stop bool)) {
	if len(cfgs) == 0 || len(amps) == 0 {
		return
	}
	lb := func(i, j int32) float64 { return s.cfgs[cfgs[i]].costLB + s.amps[amps[j]].cost }
	h := pairHeap{{lb(0, 0), 0, 0, false}}
	for h.Len() > 0 {
		pr := heap.Pop(&h).(pair)
		if !pr.again {
			if int(pr.j)+1 < len(amps) {
				heap.Push(&h, pair{lb(pr.i, pr.j+1), pr.i, pr.j + 1, false})
			}
			if pr.j == 0 && int(pr.i)+1 < len(cfgs) {
				heap.Push(&h, pair{lb(pr.i+1, 0), pr.i + 1, 0, false})
			}
		}
		if now := lb(pr.i, pr.j); now > pr.lb {
			heap.Push(&h, pair{now, pr.i, pr.j, true})
			continue
		}
		if visit(int(cfgs[pr.i]), int(amps[pr.j]), pr.lb) {
			return
		}
	}
}

// sortedConfigs returns the indexes of the configurations that keep(ci)
// accepts, sorted by their present cost lower bound (then by index).
func (s *space) sortedConfigs(keep func(ci int) bool) []int32 {
	var out []int32
	for ci := range s.cfgs {
		if keep(ci) {
			out = append(out, int32(ci))
		}
	}
	slices.SortFunc(out, func(a, b int32) int {
		if x, y := s.cfgs[a].costLB, s.cfgs[b].costLB; x != y {
			return cmp.Compare(x, y)
		}
		return cmp.Compare(a, b)
	})
	return out
}

// sortedAmps returns the indexes of the op-amps keep(ai) accepts; s.amps is
// sorted by cost already.
func (s *space) sortedAmps(keep func(ai int) bool) []int32 {
	var out []int32
	for ai := range s.amps {
		if keep(ai) {
			out = append(out, int32(ai))
		}
	}
	return out
}

// branchAndBound returns the same n best classes as exhaustive. It keeps
// only configurations and op-amps whose error bound can pass on its own,
// walks (configuration, op-amp) pairs in order of the sum of their cost
// lower bounds, skips a pair whose joint error bound fails, and stops when
// the next lower bound is above the n-th best cost found.
func (s *space) branchAndBound(ctx context.Context, n int, progress func(done, total int)) ([]classBest, stats, error) {
	st := stats{classes: s.classCount()}
	t := topN{n: n}
	for mi := range s.matched {
		st.visited++
		st.evaluated++ // a matched amplifier's one design
		if b := s.evalMatchedClass(mi); b.pass {
			t.add(b)
		}
	}
	var m metrics
	cfgs := s.sortedConfigs(func(ci int) bool { s.bound(&s.cfgs[ci].g, nil, &m); return s.pass(&m) })
	amps := s.sortedAmps(func(ai int) bool { s.bound(nil, &s.amps[ai], &m); return s.pass(&m) })
	var err error
	s.walkPairs(cfgs, amps, func(ci, ai int, lb float64) bool {
		if t.full() && lb > t.threshold() {
			return true
		}
		st.visited++
		if st.visited%4096 == 0 {
			if err = ctx.Err(); err != nil {
				return true
			}
			if progress != nil {
				progress(st.visited, st.classes)
			}
		}
		s.bound(&s.cfgs[ci].g, &s.amps[ai], &m)
		if !s.pass(&m) {
			st.boundPruned++
			return false
		}
		st.evaluated++
		if b, ok := s.evalClass(ci, ai); ok {
			t.add(b)
		}
		return false
	})
	return t.list, st, err
}

// nearCandidates returns the cheapest failing classes below cost limit:
// matched amplifiers and (configuration, op-amp) pairs in cost order, at
// most maxNearLook pairs looked at.
func (s *space) nearCandidates(limit float64) []classBest {
	var out []classBest
	for mi := range s.matched {
		if b := s.evalMatchedClass(mi); !b.pass && b.cost < limit {
			out = append(out, b)
		}
	}
	all := func(int) bool { return true }
	looked := 0
	s.walkPairs(s.sortedConfigs(all), s.sortedAmps(all), func(ci, ai int, lb float64) bool {
		looked++
		if lb >= limit || looked > maxNearLook {
			return true
		}
		if b, ok := s.cheapestClass(ci, ai); ok && !b.pass && b.cost < limit {
			out = append(out, b)
		}
		return false
	})
	sort.SliceStable(out, func(i, j int) bool { return out[i].less(&out[j]) })
	return out
}

// maxNearLook bounds the classes looked at for near misses.
const maxNearLook = 256
