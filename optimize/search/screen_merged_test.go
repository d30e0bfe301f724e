package search

import (
	"context"
	"math"
	"math/rand/v2"
	"path/filepath"
	"testing"

	"plumb/optimize/budget"
	"plumb/optimize/family"
	"plumb/optimize/spec"
)

// screenNeed is, per screened figure, how far a sub-search's screening
// figure m reads above the limit it would be given were the spec's limit
// set to exactly the exact budget's figure br (the limit less the
// shunt's share, for a current sense): the factor the sub-search's limits
// must be loosened by for the design to pass its screen. Above 1, the
// screen reads worse than the budget.
func screenNeed(p *Problem, sh *shunt, m *metrics, br *budget.Metrics) map[string]float64 {
	s := &spec.Spec{}
	s.Limits = spec.Limits{GainError: br.GainError, GainDrift: br.DriftPPMPerK * 1e-6, CMRRdB: br.CMRRdB, OutputOffsetV: br.OutputOffsetV,
		OffsetDriftVK: br.OffsetDriftVPerK, NoiseDensity: br.NoiseDensity, NoiseRMSV: br.NoiseRMSV}
	q := *p
	q.Limits = Limits{TotalGainError: br.GainError, GainError: br.GainErrorInitial, DriftPPM: br.DriftPPMPerK, CMRRdB: br.CMRRdB,
		OffsetV: br.OutputOffsetV, OffsetDriftVK: br.OffsetDriftVPerK, NoiseDensity: br.NoiseDensity, NoiseRMS: br.NoiseRMSV}
	if p.CalGain {
		q.Limits.GainError = 0
	}
	if sh != nil {
		q, _ = senseProblem(q, sh)
	}
	l := &q.Limits
	out := map[string]float64{}
	ratio := func(name string, v, lim float64) {
		if lim > 0 && !math.IsNaN(v) {
			out[name] = math.Abs(v) / lim
		}
	}
	ratio("gain error at 25 °C", m.gainErr, l.GainError)
	ratio("gain error", m.totalErr, l.TotalGainError)
	ratio("gain drift", m.drift, l.DriftPPM)
	ratio("output offset", m.offset, l.OffsetV)
	ratio("offset drift", m.offDrift, l.OffsetDriftVK)
	ratio("noise density", m.noise, l.NoiseDensity)
	if l.CMRRdB > 0 {
		out["CMRR"] = math.Pow(10, (l.CMRRdB-m.cmrrDB)/20)
	}
	return out
}

// TestMergedScreenWithinSlack holds mergedSlack: on random variations of
// the load-cell (in-amp) and current-sense examples under worst case and
// RSS (calibration, temperature range), designs drawn at random from every
// sub-search's space are run through the exact budget (package budget,
// itself checked against ngspice), and each screening figure must read
// within the slack of the limit it would be given were the spec's limit
// exactly the budget's figure (screenNeed). Then a design the loosened
// screen drops fails the budget too.
func TestMergedScreenWithinSlack(t *testing.T) {
	snap := demoSnapshot(t)
	ctx := context.Background()
	parts := (&Parts{Series: snap.ResistorSeries, Resistors: snap.Resistors, Networks: snap.Networks, Amplifiers: snap.Amplifiers}).forSearch()
	for _, ex := range []string{"load-cell.yaml", "current-sense.yaml"} {
		for _, method := range []string{spec.WorstCase, spec.RSS} {
			t.Run(ex+" "+method, func(t *testing.T) {
				worst := map[string]float64{}
				checked := 0
				for seed := uint64(1); seed <= 2; seed++ {
					r := rand.New(rand.NewPCG(seed, 3))
					s, err := spec.Load(filepath.Join("..", "..", "data", "examples", ex))
					if err != nil {
						t.Fatal(err)
					}
					if s.Reference != nil {
						s.Reference.Tolerance, s.Reference.Drift = 0.001, 20e-6
					}
					s.Analysis.Method = method
					s.Calibrate.Gain = r.IntN(2) == 0
					s.Temp.Min = []float64{-40, -10, 0}[r.IntN(3)]
					p, err := FromSpec(s)
					if err != nil {
						t.Fatal(err)
					}
					if err := p.normalize(); err != nil {
						t.Fatal(err)
					}
					inamp := p.strategy() == family.TwoStage
					sl := mergedSlack(inamp, p.Method)
					allowed := map[string]float64{"gain error at 25 °C": sl.gainErr, "gain error": sl.totalErr, "gain drift": sl.drift,
						"output offset": sl.offset, "offset drift": sl.offDrift, "noise density": sl.noise, "CMRR": sl.cmrr}
					type sub struct {
						q  Problem
						sh *shunt
					}
					var subs []sub
					if inamp {
						for _, k2 := range inampStage2Gains(parts, &p) {
							q := p
							q.k2 = k2
							subs = append(subs, sub{q, nil})
						}
					} else {
						shunts, err := shuntCandidates(ctx, parts, &p)
						if err != nil {
							t.Fatal(err)
						}
						for i := range shunts {
							q, ok := senseProblem(p, &shunts[i])
							if !ok {
								continue
							}
							subs = append(subs, sub{q, &shunts[i]})
						}
					}
					for _, sb := range subs {
						sp, all := allDesigns(t, ctx, parts, sb.q)
						for n := 0; n < 30 && len(all) > 0; n++ {
							b := &all[r.IntN(len(all))]
							d, sd, err := sp.describe(b)
							if err != nil {
								t.Fatal(err)
							}
							if sb.sh != nil {
								d, sd = withShunt(&p, d, sd, sb.sh)
							}
							br, err := budget.Evaluate(s, sd)
							if err != nil {
								continue
							}
							checked++
							for k, v := range screenNeed(&p, sb.sh, &b.m, &br.Metrics) {
								worst[k] = math.Max(worst[k], v)
								if v > allowed[k] {
									t.Errorf("seed %d, %s: the screen reads %s %.4g times the limit the budget's figure would set, beyond the slack %.4g",
										seed, partList(&d), k, v, allowed[k])
								}
							}
						}
					}
				}
				if checked < 50 {
					t.Errorf("only %d designs budgeted", checked)
				}
				t.Logf("%d designs; the screen's largest reading over the exact figure: %v", checked, worst)
			})
		}
	}
}
