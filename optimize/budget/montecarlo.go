package budget

import (
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
)

var mcMetrics = [5]string{MetricGainError, MetricCMRR, MetricDrift, MetricOffset, MetricOffsetDrift}

// draw returns one parameter value in [-1, 1]: uniform, or normal with
// standard deviation 1/sigmas truncated at ±1 (the tolerance), drawn by
// rejection.
func draw(r *rand.Rand, normal bool, sigmas float64) float64 {
	if !normal {
		return 2*r.Float64() - 1
	}
	for {
		if z := r.NormFloat64() / sigmas; z >= -1 && z <= 1 {
			return z
		}
	}
}

// MonteCarlo runs trials seeded trials on the loaded candidate: every
// parameter (each discrete resistor's tolerance and tempco; each
// network's common shift once per network plus each element's ratio and
// tracking scatter; the reference; every amplifier term) is drawn from the
// spec's distribution and every varying metric solved exactly over the
// temperature points. samples keeps each trial's metrics. The inner loop
// does not allocate.
func (e *Evaluator) MonteCarlo(trials int, seed uint64, samples bool) (*MCSummary, error) {
	s := e.s
	sum := &MCSummary{Trials: trials, Seed: seed, Distribution: s.Analysis.Distribution, YieldTarget: s.Analysis.Yield,
		PerLimitYield: map[string]float64{}, Percentiles: map[string]Percentiles{}}
	var nominal Score
	var m Metrics
	var pn point
	if err := e.eval(e.x, s.TempRef, false, &pn); err != nil {
		return nil, err
	}
	if err := e.fillMetrics(&agg{cmrr: 1, cmrrRes: 1}, &pn, &m); err != nil {
		return nil, err
	}
	e.judge(&m, &nominal)
	buf := make([]float64, len(mcMetrics)*trials)
	var cols [5][]float64
	for i := range cols {
		cols[i] = buf[i*trials : (i+1)*trials]
	}
	r := rand.New(rand.NewPCG(seed, seed))
	normal := s.Analysis.Distribution != spec.Uniform
	var pass [NumLimits]int
	allPass := 0
	var a agg
	var sc Score
	for t := 0; t < trials; t++ {
		for j := range e.x {
			e.x[j] = draw(r, normal, s.Analysis.Sigmas)
		}
		if err := e.metricsAt(e.x, true, &a); err != nil {
			clear(e.x)
			return nil, err
		}
		cols[0][t], cols[1][t], cols[2][t], cols[3][t], cols[4][t] = a.gainSigned, 20*math.Log10(a.cmrr), a.drift*1e6, a.offset, a.offsetDrift
		m.GainError, m.GainErrorInitial, m.DriftPPMPerK = a.gainErr, a.gainErrInit, a.drift*1e6
		m.OutputOffsetV, m.OffsetDriftVPerK = a.offset, a.offsetDrift
		if e.differential {
			m.CMRRdB, m.CMRRResistorsdB = 20*math.Log10(a.cmrr), 20*math.Log10(a.cmrrRes)
		}
		sc = nominal
		e.judgeVarying(&m, &sc)
		ok := true
		for i := 0; i < NumLimits; i++ {
			if sc.Checked[i] {
				if sc.Pass[i] {
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
	sum.Yield = float64(allPass) / float64(trials)
	for i := 0; i < NumLimits; i++ {
		if nominal.Checked[i] {
			sum.PerLimitYield[LimitNames[i]] = float64(pass[i]) / float64(trials)
		}
	}
	for i, name := range mcMetrics {
		if name == MetricCMRR && !e.differential {
			continue
		}
		sum.Percentiles[name] = percentiles(cols[i])
		if samples {
			if sum.Samples == nil {
				sum.Samples = map[string][]float64{}
			}
			sum.Samples[name] = cols[i]
		}
	}
	return sum, nil
}

// judgeVarying re-checks only the limits that vary between trials, keeping
// the nominal verdicts of the others in out.
func (e *Evaluator) judgeVarying(m *Metrics, out *Score) {
	var v Score
	v.Binding = -1
	e.judge(m, &v)
	for _, i := range [5]int{IGainError, ICMRR, IGainDrift, IOutputOffset, IOffsetDrift} {
		out.Checked[i], out.Pass[i], out.Margin[i] = v.Checked[i], v.Pass[i], v.Margin[i]
	}
}

// percentiles sorts a copy of v and returns its p0.135, p50 and p99.865
// points (the ±3 sigma points of a normal distribution, nearest rank),
// mean, standard deviation, minimum and maximum.
func percentiles(v []float64) Percentiles {
	s := slices.Clone(v)
	slices.Sort(s)
	at := func(p float64) float64 {
		i := int(math.Round(p * float64(len(s)-1)))
		return s[i]
	}
	var mean, m2 float64
	for i, x := range s {
		d := x - mean
		mean += d / float64(i+1)
		m2 += d * (x - mean)
	}
	sd := 0.0
	if len(s) > 1 {
		sd = math.Sqrt(m2 / float64(len(s)-1))
	}
	return Percentiles{P0135: at(0.00135), P50: at(0.5), P99865: at(0.99865), Mean: mean, StdDev: sd, Min: s[0], Max: s[len(s)-1]}
}
