package budget

import (
	"fmt"
	"math"
	"math/rand/v2"
	"slices"

	"plumb/optimize/spec"
)

// Metric names used for Monte Carlo samples and percentiles.
const (
	MetricGainError   = "gain_error"      // signed fraction
	MetricCMRR        = "cmrr_db"         // dB
	MetricDrift       = "drift_ppm_per_k" // ppm/K
	MetricOffset      = "output_offset_v" // |V|
	MetricOffsetDrift = "offset_drift_v_per_k"
	// MetricGainErrorInitial is the signed gain error at the reference
	// temperature as built, before any calibration.
	MetricGainErrorInitial = "gain_error_initial"
	MetricCMRRResistors    = "cmrr_resistors_db" // dB, the resistors' share alone
)

var mcMetrics = [7]string{MetricGainError, MetricCMRR, MetricDrift, MetricOffset, MetricOffsetDrift, MetricGainErrorInitial, MetricCMRRResistors}

// drawAll fills x with parameter values in [-1, 1]: uniform, or normal
// with standard deviation 1/sigmas truncated at ±1 (the tolerance), drawn
// by rejection. One call per trial keeps the distribution's branch out of
// the per-parameter loop; the draws are the same, in the same order.
func drawAll(r *rand.Rand, x []float64, normal bool, sigmas float64) {
	if !normal {
		for j := range x {
			x[j] = 2*r.Float64() - 1
		}
		return
	}
	for j := range x {
		z := r.NormFloat64() / sigmas
		for z < -1 || z > 1 {
			z = r.NormFloat64() / sigmas
		}
		x[j] = z
	}
}

// MonteCarlo runs trials seeded trials on the loaded candidate: every
// parameter (each discrete resistor's tolerance and tempco; each
// network's common shift once per network plus each element's ratio and
// tracking scatter; the reference; every amplifier term) is drawn from the
// spec's distribution and every varying metric solved exactly over the
// temperature points. samples keeps each trial's metrics in new slices;
// without it the sample columns live in a buffer the evaluator reuses, so a
// repeated run allocates only its summary. The inner loop does not
// allocate.
func (e *Evaluator) MonteCarlo(trials int, seed uint64, samples bool) (*MCSummary, error) {
	s := e.s
	if trials < 1 || trials > spec.MaxTrials {
		return nil, fmt.Errorf("budget: %d Monte Carlo trials: run from 1 to %d", trials, spec.MaxTrials)
	}
	sum := &MCSummary{Trials: trials, Seed: seed, Distribution: s.Analysis.Distribution, YieldTarget: s.Analysis.Yield,
		PerLimitYield: map[string]float64{}, Percentiles: map[string]Percentiles{}}
	var nominal Score
	var m Metrics
	var pn point
	if err := e.eval(e.x, s.TempRef, false, &pn); err != nil {
		return nil, err
	}
	// The nominal parts, without errors: the trials add their own.
	if err := e.fillMetrics(&agg{cmrr: capLin, cmrrRes: capLin}, &pn, &m); err != nil {
		return nil, err
	}
	e.judge(&m, &nominal)
	// Each trial's output moves by its own errors (see outputHeadroom).
	headroom := nominal.Checked[IHeadroom] && !math.IsInf(e.headOut, 1)
	// Columns returned as samples belong to the caller; otherwise the
	// evaluator keeps one buffer for every run.
	var buf []float64
	if n := len(mcMetrics) * trials; samples || cap(e.mcBuf) < n {
		buf = make([]float64, n)
		if !samples {
			e.mcBuf = buf
		}
	} else {
		buf = e.mcBuf[:n]
	}
	var cols [len(mcMetrics)][]float64
	for i := range cols {
		cols[i] = buf[i*trials : (i+1)*trials]
	}
	r := rand.New(rand.NewPCG(seed, seed))
	normal := s.Analysis.Distribution != spec.Uniform
	var pass [NumLimits]int
	allPass := 0
	var a agg
	for t := 0; t < trials; t++ {
		if t%mcCheckEvery == 0 {
			if err := e.watch(t, trials); err != nil {
				clear(e.x)
				return nil, err
			}
		}
		drawAll(r, e.x, normal, s.Analysis.Sigmas)
		if err := e.metricsAt(e.x, true, &a); err != nil {
			clear(e.x)
			return nil, err
		}
		cmrrDB := 20 * math.Log10(a.cmrr)
		cols[0][t], cols[1][t], cols[2][t], cols[3][t], cols[4][t] = a.gainSigned, cmrrDB, a.drift*1e6, a.offset, a.offsetDrift
		cols[5][t], cols[6][t] = a.gainInitSigned, 20*math.Log10(a.cmrrRes)
		verdicts := e.trialPass(&a, cmrrDB, &nominal)
		if headroom {
			verdicts[IHeadroom] = verdicts[IHeadroom] && e.headOut-e.outputMove(&pn, math.Abs(a.gainSigned), a.offset, a.cmrr) >= 0
		}
		ok := true
		for i, passed := range verdicts {
			if nominal.Checked[i] {
				if passed {
					pass[i]++
				} else {
					ok = false
				}
			}
		}
		if ok {
			allPass++
		}
	}
	clear(e.x)
	if e.progress != nil {
		e.progress(trials, trials)
	}
	sum.Yield = float64(allPass) / float64(trials)
	for i := 0; i < NumLimits; i++ {
		if nominal.Checked[i] {
			sum.PerLimitYield[LimitNames[i]] = float64(pass[i]) / float64(trials)
		}
	}
	for i, name := range mcMetrics {
		if (name == MetricCMRR || name == MetricCMRRResistors) && !e.differential {
			continue
		}
		if samples {
			sum.Percentiles[name] = percentiles(cols[i], false)
			if sum.Samples == nil {
				sum.Samples = map[string][]float64{}
			}
			sum.Samples[name] = cols[i]
		} else {
			sum.Percentiles[name] = percentiles(cols[i], true)
		}
	}
	return sum, nil
}

// mcCheckEvery is how many trials run between looks at the context and
// progress reports: a few milliseconds of work.
const mcCheckEvery = 4096

// watch reports trial done of total and returns the context's error once
// the run is to stop.
func (e *Evaluator) watch(done, total int) error {
	if e.ctx != nil {
		if err := e.ctx.Err(); err != nil {
			return fmt.Errorf("budget: Monte Carlo stopped after %d of %d trials: %w", done, total, err)
		}
	}
	if e.progress != nil {
		e.progress(done, total)
	}
	return nil
}

// trialPass checks one trial's varying metrics against their limits and
// keeps the nominal verdicts of the others (noise, bandwidth, headroom,
// ratings do not vary between trials); cmrrDB is the trial's CMRR in dB.
func (e *Evaluator) trialPass(a *agg, cmrrDB float64, nominal *Score) [NumLimits]bool {
	p := nominal.Pass
	l := &e.s.Limits
	p[IGainError] = a.gainErr <= l.GainError
	p[ICMRR] = cmrrDB >= l.CMRRdB
	p[IGainDrift] = a.drift <= l.GainDrift
	p[IOutputOffset] = a.offset <= l.OutputOffsetV
	p[IOffsetDrift] = a.offsetDrift <= l.OffsetDriftVK
	return p
}

// percentiles returns the p0.135, p50 and p99.865 points of v (the ±3
// sigma points of a normal distribution, nearest rank), its mean, standard
// deviation (Welford's update), minimum and maximum. The order statistics
// come from selectSampled, not a full sort: on v itself when inPlace (its
// order is then lost), else on a copy.
func percentiles(v []float64, inPlace bool) Percentiles {
	s := v
	if !inPlace {
		s = slices.Clone(v)
	}
	rank := func(p float64) int { return int(math.Round(p * float64(len(s)-1))) }
	var mean, m2 float64
	lo, hi := math.Inf(1), math.Inf(-1)
	for i, x := range v {
		d := x - mean
		mean += d / float64(i+1)
		m2 += d * (x - mean)
		lo, hi = min(lo, x), max(hi, x) // the builtins are math.Min and math.Max, inline
	}
	var pc Percentiles
	if len(s) > 0 {
		pc.P0135, pc.P50, pc.P99865 = selectSampled(s, rank(0.00135)), selectSampled(s, rank(0.5)), selectSampled(s, rank(0.99865))
	}
	sd := 0.0
	if len(v) > 1 {
		sd = math.Sqrt(m2 / float64(len(v)-1))
	}
	pc.Mean, pc.StdDev, pc.Min, pc.Max = mean, sd, lo, hi
	return pc
}

// sampleSize is the number of evenly spaced elements selectSampled sorts
// to choose its bounds; slices shorter than sampledMin elements go straight
// to selectK.
const (
	sampleSize = 512
	sampledMin = 8 * sampleSize
)

// selectSampled returns the k-th smallest element of s, as selectK does, in
// about one pass: two bounds taken from a sorted, evenly spaced sample, at
// the sample rank expected for k less and plus a margin (three standard
// deviations of the binomial count, plus 4; an open end past the sample),
// bracket rank k; one pass counts the elements below the lower bound and
// gathers those between the bounds, and quickselect finishes among those
// few (the sampling idea of Floyd and Rivest's SELECT, from memory). Near
// either end the pass's comparisons nearly always go the same way. When the
// bounds miss rank k it falls back to selectK on all of s, so the value is
// exact either way. The order of s is lost.
func selectSampled(s []float64, k int) float64 {
	n := len(s)
	if n < sampledMin {
		return selectK(s, k)
	}
	q := float64(k) / float64(n)
	expect := q * sampleSize
	margin := 3*math.Sqrt(sampleSize*q*(1-q)) + 4
	var smp [sampleSize]float64
	step := n / sampleSize
	for i := range smp {
		smp[i] = s[i*step]
	}
	slices.Sort(smp[:])
	lo, hi := math.Inf(-1), math.Inf(1)
	if i := int(math.Floor(expect - margin)); i >= 0 {
		lo = smp[i]
	}
	if i := int(math.Ceil(expect + margin)); i < sampleSize {
		hi = smp[i]
	}
	below, c := 0, 0
	for i, x := range s {
		if x < lo {
			below++
		} else if x <= hi {
			s[i], s[c] = s[c], x
			c++
		}
	}
	// s[:c] holds every element in [lo, hi] and below more are smaller, so
	// rank k is among s[:c] when below <= k < below+c.
	if below <= k && k < below+c {
		return selectK(s[:c], k-below)
	}
	return selectK(s, k)
}

// selectK reorders s so that s[k] is the k-th smallest and returns it
// (Hoare's quickselect with a median-of-three pivot).
func selectK(s []float64, k int) float64 {
	lo, hi := 0, len(s)-1
	for lo < hi {
		mid := lo + (hi-lo)/2
		if s[mid] < s[lo] {
			s[mid], s[lo] = s[lo], s[mid]
		}
		if s[hi] < s[lo] {
			s[hi], s[lo] = s[lo], s[hi]
		}
		if s[hi] < s[mid] {
			s[hi], s[mid] = s[mid], s[hi]
		}
		pivot := s[mid]
		i, j := lo, hi
		for i <= j {
			for s[i] < pivot {
				i++
			}
			for s[j] > pivot {
				j--
			}
			if i <= j {
				s[i], s[j] = s[j], s[i]
				i++
				j--
			}
		}
		switch {
		case k <= j:
			hi = j
		case k >= i:
			lo = i
		default:
			return s[k]
		}
	}
	return s[k]
}
