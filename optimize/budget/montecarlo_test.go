package budget

import (
	"context"
	"errors"
	"math"
	"math/rand/v2"
	"slices"
	"strings"
	"testing"

	"plumb/optimize/family"
	"plumb/optimize/spec"
)

// TestMonteCarloInsideWorstCase: for metrics monotonic in every parameter
// no Monte Carlo trial may lie beyond the worst-case corners (a property
// of extreme value analysis, ECSS-Q-HB-30-01A, from memory).
func TestMonteCarloInsideWorstCase(t *testing.T) {
	for _, dist := range []string{"uniform", "normal"} {
		t.Run(dist, func(t *testing.T) {
			s := mustSpec(t, diffSpec(2, "monte-carlo"))
			s.Analysis.Distribution, s.Analysis.Trials, s.Analysis.Seed = dist, 5000, 3
			d := mustDesign(t, diffDesign(2, "1%"))
			mc, err := Evaluate(s, d)
			if err != nil {
				t.Fatal(err)
			}
			s.Analysis.Method = spec.WorstCase
			wc, err := Evaluate(s, d)
			if err != nil {
				t.Fatal(err)
			}
			p := mc.MonteCarlo.Percentiles[MetricGainError]
			if m := math.Max(-p.Min, p.Max); m > wc.Metrics.GainError*(1+1e-12) {
				t.Errorf("Monte Carlo gain error %.6g beyond the worst case %.6g", m, wc.Metrics.GainError)
			}
			if c := mc.MonteCarlo.Percentiles[MetricCMRR].Min; c < wc.Metrics.CMRRdB-1e-9 {
				t.Errorf("Monte Carlo CMRR %.6g dB below the worst case %.6g dB", c, wc.Metrics.CMRRdB)
			}
			if len(mc.MonteCarlo.Samples[MetricGainError]) != 5000 {
				t.Errorf("kept %d samples, want 5000", len(mc.MonteCarlo.Samples[MetricGainError]))
			}
		})
	}
}

// TestMonteCarloAgreesWithRSS: for many small independent tolerances the
// Monte Carlo standard deviation of the gain agrees with the RSS figure,
// which is 3 sigma whatever number of sigmas a tolerance stands for, and
// the yield against a limit set at the RSS 2-sigma point is 95.45 % within
// the binomial band (central limit theorem; the normal table's 95.45 % for
// ±2 sigma, from memory). Four 0.1 % parts of a unity-gain difference
// amplifier, each normal truncated at the tolerance (at 3 sigma that
// narrows the spread by about 1.3 %; at 6 sigma by nothing measurable).
func TestMonteCarloAgreesWithRSS(t *testing.T) {
	const trials = 40000
	for _, sigmas := range []float64{3, 6} {
		s := mustSpec(t, diffSpec(1, "rss"))
		s.Analysis.Sigmas = sigmas
		d := mustDesign(t, diffDesign(1, "0.1%"))
		rss, err := Evaluate(s, d)
		if err != nil {
			t.Fatal(err)
		}
		sigma := rss.Metrics.GainError / 3 // nominal error is zero here
		s.Analysis.Method, s.Analysis.Trials, s.Analysis.Distribution = spec.MonteCarlo, trials, spec.Normal
		s.Limits = spec.Limits{GainError: 2 * sigma}
		mc, err := Evaluate(s, d)
		if err != nil {
			t.Fatal(err)
		}
		sd := mc.MonteCarlo.Percentiles[MetricGainError].StdDev
		if math.Abs(sd/sigma-1) > 0.03 {
			t.Errorf("%g sigmas: Monte Carlo sigma %.5g vs RSS sigma %.5g", sigmas, sd, sigma)
		}
		y := mc.MonteCarlo.PerLimitYield[LimitGainError]
		band := 4 * math.Sqrt(0.9545*(1-0.9545)/trials)
		// Truncation at 3 sigma narrows the distribution: allow its shift too.
		if y < 0.9545-band || y > 0.9545+band+0.004 {
			t.Errorf("%g sigmas: yield at the RSS 2-sigma limit %.4f, want 0.9545 ± %.4f", sigmas, y, band)
		}
	}
}

func TestMonteCarloReproducible(t *testing.T) {
	s := mustSpec(t, diffSpec(1, "monte-carlo"))
	s.Analysis.Trials = 500
	d := mustDesign(t, diffDesign(1, "1%"))
	a, err := Evaluate(s, d)
	if err != nil {
		t.Fatal(err)
	}
	b, err := Evaluate(s, d)
	if err != nil {
		t.Fatal(err)
	}
	if a.MonteCarlo.Percentiles[MetricGainError] != b.MonteCarlo.Percentiles[MetricGainError] {
		t.Error("same seed gave different results")
	}
}

// TestNetworkCorrelation: a network's elements share their absolute shift,
// so a difference amplifier on one network has a far better CMRR than on
// discrete parts of the same absolute tolerance; the worst case follows
// (1+G)/(2r) for ratio tolerance r (domain notes §2).
func TestNetworkCorrelation(t *testing.T) {
	s := mustSpec(t, diffSpec(1, "worst-case"))
	e, err := NewEvaluator(s, family.Difference.Name, spec.Options{})
	if err != nil {
		t.Fatal(err)
	}
	amp := idealAmpFigures()
	net := func() Fig {
		return Fig{Label: "NET", Ohm: 10e3, Tolerance: 0.001, Network: 1, RatioTolerance: 0.0002}
	}
	c := &Candidate{Figs: []Fig{net(), net(), net(), net()}, Amp: &amp}
	res, err := e.Evaluate(c)
	if err != nil {
		t.Fatal(err)
	}
	// (1+1)/(2 x 0.0002) = 5000, 74 dB.
	got := math.Pow(10, res.Metrics.CMRRdB/20)
	if math.Abs(got/5000-1) > 0.01 {
		t.Errorf("network CMRR %.5g, want about 5000 ((1+G)/(2r))", got)
	}
}

// TestSelectK checks quickselect against a full sort on seeded random data
// with ties.
func TestSelectK(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 1))
	for n := 1; n < 200; n += 7 {
		v := make([]float64, n)
		for i := range v {
			v[i] = float64(r.IntN(20))
		}
		sorted := slices.Clone(v)
		slices.Sort(sorted)
		for k := 0; k < n; k++ {
			if got := selectK(slices.Clone(v), k); got != sorted[k] {
				t.Fatalf("n %d k %d: %g, want %g", n, k, got, sorted[k])
			}
		}
	}
}

// TestSelectSampled checks the sampled selection against a full sort
// (the definition of the k-th order statistic) on seeded random data:
// continuous values, heavy ties, a sorted and a reversed slice (where an
// evenly spaced sample is least like a random one), at ranks near both
// ends, at and around the median, and where the sample's margin is thin.
func TestSelectSampled(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 1))
	fills := []struct {
		name string
		f    func(i, n int) float64
	}{
		{name: "normal", f: func(int, int) float64 { return r.NormFloat64() }},
		{name: "ties", f: func(int, int) float64 { return float64(r.IntN(5)) }},
		{name: "sorted", f: func(i, _ int) float64 { return float64(i) }},
		{name: "reversed", f: func(i, n int) float64 { return float64(n - i) }},
	}
	for _, fill := range fills {
		for _, n := range []int{sampledMin - 1, sampledMin, 50001, 100000} {
			v := make([]float64, n)
			for i := range v {
				v[i] = fill.f(i, n)
			}
			sorted := slices.Clone(v)
			slices.Sort(sorted)
			for _, k := range []int{0, 1, 135, 400, n / 3, n/2 - 1, n / 2, n/2 + 1, n - 401, n - 136, n - 2, n - 1} {
				if got := selectSampled(slices.Clone(v), k); got != sorted[k] {
					t.Errorf("%s n %d k %d: %g, want %g", fill.name, n, k, got, sorted[k])
				}
			}
		}
	}
}

// TestMonteCarloCalibratedZeroDrift: with gain calibration at 25 C and
// resistors of 0 ppm/K, nothing is left of the gain error but what moves
// with temperature, which is nothing: every trial's error is zero and the
// gain-error limit passes in every trial (calibration removes the initial
// error, domain notes §3; arithmetic). A trial once kept its uncalibrated
// error when no temperature point moved the gain.
func TestMonteCarloCalibratedZeroDrift(t *testing.T) {
	src := strings.Replace(diffSpec(1, "monte-carlo"), "25..25C", "-40..85C", 1) +
		"calibration: {gain: true}\n"
	src = strings.Replace(src, "gain_error: 50%", "gain_error: 0.01%", 1)
	s := mustSpec(t, src)
	s.Analysis.Trials = 2000
	res, err := Evaluate(s, mustDesign(t, diffDesign(1, "1%")))
	if err != nil {
		t.Fatal(err)
	}
	mc := res.MonteCarlo
	pc := mc.Percentiles[MetricGainError]
	if pc.Min != 0 || pc.Max != 0 {
		t.Errorf("calibrated gain error over the trials %g..%g, want exactly 0", pc.Min, pc.Max)
	}
	if y := mc.PerLimitYield[LimitGainError]; y != 1 {
		t.Errorf("gain-error yield %g, want 1", y)
	}
}

// TestMonteCarloResistorCMRR: under Monte Carlo the resistors' own CMRR
// and the initial gain error are figures of their own: with an amplifier
// of 80 dB the total CMRR lies below the resistors' share (1/CMRR_total =
// 1/CMRR_res + 1/CMRR_amp at worst, domain notes §2), and with gain
// calibration the initial error stays the uncalibrated one while the gain
// error drops to the drift's. They were once copies of the total figures.
func TestMonteCarloResistorCMRR(t *testing.T) {
	src := strings.Replace(diffSpec(1, "monte-carlo"), "25..25C", "-40..85C", 1) + "calibration: {gain: true}\n"
	s := mustSpec(t, src)
	s.Analysis.Trials = 4000
	d := strings.Replace(diffDesign(1, "0.01%"), "aol: 1e12,", "aol: 1e12, cmrr: 80dB,", 1)
	res, err := Evaluate(s, mustDesign(t, d))
	if err != nil {
		t.Fatal(err)
	}
	m := res.Metrics
	if !(m.CMRRResistorsdB > m.CMRRdB+1) || m.CMRRdB > 80 {
		t.Errorf("CMRR %.2f dB total, %.2f dB resistors alone: want the resistors above the total, the total at most 80 dB", m.CMRRdB, m.CMRRResistorsdB)
	}
	if !(m.GainErrorInitial > 2*m.GainError) {
		t.Errorf("initial gain error %.4g, calibrated %.4g: want the initial one well above", m.GainErrorInitial, m.GainError)
	}
}

// TestMonteCarloStopsAndReports is hardening finding 2: a long Monte Carlo
// run reports its trials as it goes and stops when its context is done
// (Ctrl-C), and a run beyond spec.MaxTrials is refused before it allocates
// its samples.
func TestMonteCarloStopsAndReports(t *testing.T) {
	s := mustSpec(t, diffSpec(2, "monte-carlo"))
	s.Analysis.Trials = 3*mcCheckEvery + 5
	d := mustDesign(t, diffDesign(2, "1%"))
	var seen []int
	res, err := EvaluateContext(context.Background(), s, d, func(done, total int) {
		if total != s.Analysis.Trials {
			t.Errorf("progress total %d, want %d", total, s.Analysis.Trials)
		}
		seen = append(seen, done)
	})
	if err != nil {
		t.Fatal(err)
	}
	if want := []int{0, mcCheckEvery, 2 * mcCheckEvery, 3 * mcCheckEvery, s.Analysis.Trials}; !slices.Equal(seen, want) {
		t.Errorf("progress %v, want %v", seen, want)
	}
	if res.MonteCarlo.Trials != s.Analysis.Trials {
		t.Errorf("%d trials run", res.MonteCarlo.Trials)
	}

	ctx, cancel := context.WithCancel(context.Background())
	_, err = EvaluateContext(ctx, s, d, func(done, total int) {
		if done >= mcCheckEvery {
			cancel()
		}
	})
	if !errors.Is(err, context.Canceled) || !strings.Contains(err.Error(), "stopped after 8192 of") {
		t.Errorf("cancelled run: %v", err)
	}

	e, c := evaluatorOf(t, s, d)
	if err := e.SetCandidate(c); err != nil {
		t.Fatal(err)
	}
	if _, err := e.MonteCarlo(spec.MaxTrials+1, 1, true); err == nil || !strings.Contains(err.Error(), "1000000") {
		t.Errorf("%d trials: %v", spec.MaxTrials+1, err)
	}
}
