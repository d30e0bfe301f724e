package search

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"path/filepath"
	"plumb/catalog"
	"plumb/optimize/budget"
	"sort"
	"testing"

	"plumb/optimize/spec"
)

// TestChannelScreenKeepsPassingDesigns: the channel's screening (the
// stage's allowance and the combined screen, budget.ChannelScreen) prunes
// only designs the exact budget fails. For the adc-channel example under
// several total-error limits and methods, the exhaustive oracle without
// the screening lists its cheapest designs; the cheapest of them that the
// exact budget passes must be no cheaper than the search's rank 1 with the
// screening, and the search must not call the spec infeasible.
func TestChannelScreenKeepsPassingDesigns(t *testing.T) {
	snap := demoSnapshot(t)
	parts := (&Parts{Series: snap.ResistorSeries, Resistors: snap.Resistors, Networks: snap.Networks, Amplifiers: snap.Amplifiers}).forSearch()
	ctx := context.Background()
	base, err := spec.Load(filepath.Join("..", "..", "data", "examples", "adc-channel.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	checked := 0
	for _, c := range []struct {
		method string
		lsb    float64
	}{{spec.WorstCase, 32}, {spec.RSS, 20}, {spec.RSS, 32}, {spec.RSS, 48}} {
		method, lsb := c.method, c.lsb
		t.Run(fmt.Sprintf("%s %g LSB", method, lsb), func(t *testing.T) {
			s := *base
			// The demo catalog's TP-R41B, as the reference's figures.
			s.Reference = &spec.Reference{V: 4.096, Tolerance: 0.0005, Drift: 5e-6}
			s.Analysis.Method = method
			s.Limits.TotalError = lsb / 4096
			s.Limits.TotalDrift = 2 * s.Limits.TotalDrift
			p, err := FromSpec(&s)
			if err != nil {
				t.Fatal(err)
			}
			if p.Channel == nil {
				t.Fatal("no channel screen for a spec with channel limits")
			}
			open := p
			open.Channel, open.Limits = nil, Limits{}
			oracle, err := Exhaustive(ctx, parts, open, Options{Top: 40})
			if err != nil {
				t.Fatal(err)
			}
			verify := budgetVerifier(ctx, &s, nil)
			cheapest := math.Inf(1)
			for i := range oracle.Designs {
				sd, err := oracle.DesignN(i + 1)
				if err != nil {
					t.Fatal(err)
				}
				if _, fails, err := verify(sd); err == nil && len(fails) == 0 {
					cheapest = math.Min(cheapest, oracle.Designs[i].TotalCost)
				}
			}
			if math.IsInf(cheapest, 1) {
				t.Logf("no passing design among the oracle's %d", len(oracle.Designs))
				return
			}
			checked++
			got, err := solveOn(ctx, parts, p, &s, Options{Top: 3})
			if err != nil {
				t.Fatalf("%v, while the exact budget passes a design of %.2f", err, cheapest)
			}
			if c := got.Designs[0].TotalCost; c > cheapest+1e-9 {
				t.Errorf("rank 1 costs %.2f, the exact budget passes one of %.2f", c, cheapest)
			}
		})
	}
	if checked < 3 {
		t.Errorf("only %d cases had a passing design among the oracle's; the test checks too little", checked)
	}
}

// channelSpec is the adc-channel example with the reference given by
// figures (the demo catalog's TP-R41B), for the property tests below.
func channelSpec(t *testing.T) *spec.Spec {
	t.Helper()
	s, err := spec.Load(filepath.Join("..", "..", "data", "examples", "adc-channel.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	s.Reference = &spec.Reference{V: 4.096, Tolerance: 0.0005, Drift: 5e-6}
	return s
}

// allDesigns lists every design of the search space of p (every value
// option of every configuration with every op-amp, and every matched
// amplifier), with its screening metrics, no limit applied.
func allDesigns(t *testing.T, ctx context.Context, parts *Parts, p Problem) (*space, []classBest) {
	t.Helper()
	p.Channel, p.Limits = nil, Limits{}
	if err := p.normalize(); err != nil {
		t.Fatal(err)
	}
	sp, err := newSpace(ctx, parts, &p, false)
	if err != nil {
		t.Fatal(err)
	}
	var out []classBest
	for mi := range sp.matched {
		out = append(out, sp.evalMatchedClass(mi))
	}
	for ci := range sp.cfgs {
		c := &sp.cfgs[ci]
		opts := sp.options(c)
		for ai := range sp.amps {
			for oi := range opts {
				b := classBest{cfg: ci, amp: ai, opt: oi, cost: opts[oi].cost + sp.amps[ai].cost}
				sp.evalOpt(c, &opts[oi], &sp.amps[ai], &b.m)
				out = append(out, b)
			}
		}
	}
	return sp, out
}

// TestChannelScreenBelowExact: the channel's screening, with its slack,
// reads every design's total error and total drift at or below the exact
// budget's (package budget, itself checked against ngspice), so it never
// prunes a design the budget passes. Designs are drawn at random from
// every design of the adc-channel example's space, under worst case and
// RSS, among those within twice the limits on the screening figures (the
// ones a search decides on).
func TestChannelScreenBelowExact(t *testing.T) {
	snap := demoSnapshot(t)
	parts := (&Parts{Series: snap.ResistorSeries, Resistors: snap.Resistors, Networks: snap.Networks, Amplifiers: snap.Amplifiers}).forSearch()
	ctx := context.Background()
	for _, method := range []string{spec.WorstCase, spec.RSS} {
		t.Run(method, func(t *testing.T) {
			s := channelSpec(t)
			s.Analysis.Method = method
			p, err := FromSpec(s)
			if err != nil {
				t.Fatal(err)
			}
			sp, all := allDesigns(t, ctx, parts, p)
			verify := budgetVerifier(ctx, s, nil)
			r := rand.New(rand.NewPCG(5, 5))
			worstE, worstD := math.Inf(1), math.Inf(1)
			checked := sampleBudgeted(t, sp, all, verify, r, 8, func(b *classBest) bool {
				m := &b.m
				se, sdr := p.Channel.Totals(m.totalErr, m.offset, m.drift, m.offDrift, m.noiseRMS)
				return se <= 2*s.Limits.TotalError || sdr <= 2*s.Limits.TotalDrift
			}, func(b *classBest, d *Design, br *budget.Result) {
				m := &b.m
				se, sdr := p.Channel.Totals(m.totalErr, m.offset, m.drift, m.offDrift, m.noiseRMS)
				worstE = math.Min(worstE, br.Metrics.TotalErrorFS/se)
				worstD = math.Min(worstD, br.Metrics.TotalDriftFS/sdr)
				if se > br.Metrics.TotalErrorFS*(1+1e-12) || sdr > br.Metrics.TotalDriftFS*(1+1e-12) {
					t.Errorf("screen reads total error %.4f LSB, drift %.4f LSB; the exact budget %.4f LSB, %.4f LSB (%s)",
						se*4096, sdr*4096, br.Metrics.TotalErrorLSB, br.Metrics.TotalDriftLSB, partList(d))
				}
			})
			if checked < 8 {
				t.Fatalf("only %d designs checked", checked)
			}
			t.Logf("%d designs: exact/screen at least %.4f (total error), %.4f (total drift)", checked, worstE, worstD)
		})
	}
}

// maxOracleEvals bounds the exact budgets the oracle of
// TestChannelNeverFalselyInfeasible runs per spec.
const maxOracleEvals = 10

// TestChannelNeverFalselyInfeasible is the property behind "infeasible
// means none exists" for the channel's limits: on random variations of
// the adc-channel example (a random part of the demo catalog's resistor
// series and op-amps, the reference's and the ADC's figures, the method),
// a design is drawn and the total_error and total_drift limits set to
// exactly its figures in the exact budget, so that it passes with no
// margin at all. The search with Top 1 must then rank a design no dearer
// than it, and no design cheaper than its rank 1 may pass the exact
// budget (the oracle: every design of the space cheaper than rank 1 that
// reads within twice the limits on the screening figures, each run
// through the exact budget).
func TestChannelNeverFalselyInfeasible(t *testing.T) {
	snap := demoSnapshot(t)
	ctx := context.Background()
	checked := 0
	for seed := uint64(1); seed <= 10; seed++ {
		r := rand.New(rand.NewPCG(seed, 16))
		s := channelSpec(t)
		s.Analysis.Method = []string{spec.WorstCase, spec.RSS}[r.IntN(2)]
		s.Reference.Tolerance = []float64{0.0002, 0.0005, 0.001}[r.IntN(3)]
		s.Reference.Drift = []float64{3e-6, 5e-6, 10e-6}[r.IntN(3)]
		s.ADC.Bits = []int{12, 14}[r.IntN(2)]
		lsb := 1 / s.ADC.Codes()
		s.ADC.GainError = spec.ADCFigure{V: float64(1+r.IntN(4)) * lsb, Given: true}
		s.ADC.INL = spec.ADCFigure{V: float64(1+r.IntN(2)) * lsb, Given: true}
		s.Impedance = spec.Range{Min: 2e3, Max: 40e3}
		var series []catalog.ResistorSeries
		for _, x := range snap.ResistorSeries {
			if r.IntN(2) == 0 {
				series = append(series, x)
			}
		}
		var amps []catalog.Amplifier
		for _, a := range snap.Amplifiers {
			if r.IntN(3) == 0 {
				amps = append(amps, a)
			}
		}
		parts := (&Parts{Series: series, Amplifiers: amps}).forSearch()
		// A design to pin the limits on: one of the cheaper designs the
		// search finds with open channel limits.
		s.Limits.TotalError, s.Limits.TotalDrift = 1, 1
		p, err := FromSpec(s)
		if err != nil {
			t.Fatal(err)
		}
		open, err := solveOn(ctx, parts, p, s, Options{Top: 6})
		if err != nil || len(open.Designs) == 0 {
			t.Logf("seed %d: no design with open channel limits: %v", seed, err)
			continue
		}
		pick := r.IntN(len(open.Designs))
		sdPick, err := open.DesignN(pick + 1)
		if err != nil {
			t.Fatal(err)
		}
		br, err := budget.Evaluate(s, sdPick)
		if err != nil {
			t.Fatal(err)
		}
		s.Limits.TotalError, s.Limits.TotalDrift = br.Metrics.TotalErrorFS, br.Metrics.TotalDriftFS
		s.Limits.TotalErrorInLSB, s.Limits.TotalDriftInLSB = true, true
		pinned := open.Designs[pick].TotalCost
		if b2, err := budget.Evaluate(s, sdPick); err != nil || !b2.Pass {
			t.Fatalf("seed %d: the design the limits were pinned on fails them: %v", seed, err)
		}
		p, err = FromSpec(s)
		if err != nil {
			t.Fatal(err)
		}
		got, err := solveOn(ctx, parts, p, s, Options{Top: 1})
		if err != nil {
			t.Errorf("seed %d (%s, %d bits): %v, while a design of %.2f reaches total error %.4f LSB and drift %.4f LSB, exactly the limits",
				seed, s.Analysis.Method, s.ADC.Bits, err, pinned, br.Metrics.TotalErrorLSB, br.Metrics.TotalDriftLSB)
			if got != nil {
				t.Logf("notes %q", got.Notes)
			}
			continue
		}
		best := got.Designs[0].TotalCost
		if best > pinned+1e-9 {
			t.Errorf("seed %d: rank 1 costs %.2f, a design of %.2f passes the exact budget", seed, best, pinned)
		}
		// The oracle: the cheaper designs of the space in cost order, each
		// budgeted, up to the first the exact budget passes.
		sp, all := allDesigns(t, ctx, parts, p)
		verify := budgetVerifier(ctx, s, nil)
		var cheaper []*classBest
		for i := range all {
			b := &all[i]
			m := &b.m
			if se, sdr := p.Channel.Totals(m.totalErr, m.offset, m.drift, m.offDrift, m.noiseRMS); b.cost < best-1e-9 && se <= 2*s.Limits.TotalError && sdr <= 2*s.Limits.TotalDrift {
				cheaper = append(cheaper, b)
			}
		}
		sort.SliceStable(cheaper, func(i, j int) bool { return cheaper[i].cost < cheaper[j].cost })
		evals := 0
		for _, b := range cheaper {
			if evals >= maxOracleEvals {
				t.Logf("seed %d: the oracle stopped after %d budgets", seed, evals)
				break
			}
			d, sd, err := sp.describe(b)
			if err != nil {
				t.Fatal(err)
			}
			evals++
			if _, fails, err := verify(sd); err == nil && len(fails) == 0 {
				t.Errorf("seed %d: %s costs %.2f and passes the exact budget, below rank 1 at %.2f", seed, partList(&d), d.TotalCost, best)
				break
			}
		}
		checked++
		t.Logf("seed %d (%s, %d bits, %d series, %d op-amps): limits %.4f LSB / %.4f LSB pinned on a design of %.2f; rank 1 %.2f; %d cheaper designs budgeted",
			seed, s.Analysis.Method, s.ADC.Bits, len(series), len(amps), br.Metrics.TotalErrorLSB, br.Metrics.TotalDriftLSB, pinned, best, evals)
	}
	if checked < 4 {
		t.Errorf("only %d random specs checked", checked)
	}
}

// TestScreenHeadroomAboveExact: the screen of the output headroom a
// design's errors leave (space.movedHeadroom) reads at or above the exact
// budget's amplifier headroom (package budget: the nominal circuit's least
// pin headroom, and the output's less its worst gain error over the
// largest input and its worst offset), so a design it prunes fails the
// budget too. Designs are drawn at random from the whole space of example
// specs with an op-amp, under worst case and RSS, among those whose screen
// reads within 0.2 V of the rails (the ones it decides on).
func TestScreenHeadroomAboveExact(t *testing.T) {
	snap := demoSnapshot(t)
	parts := (&Parts{Series: snap.ResistorSeries, Resistors: snap.Resistors, Networks: snap.Networks, Amplifiers: snap.Amplifiers}).forSearch()
	ctx := context.Background()
	for _, c := range []struct {
		ex, method string
		vpos       float64 // the positive rail, 0: the spec's
	}{
		{"adc-channel", spec.WorstCase, 0},
		{"adc-channel", spec.RSS, 0},
		{"level-shift", spec.WorstCase, 0},
		// The difference amplifier's 4 V output end near the rail.
		{"logger-channel", spec.WorstCase, 4.6},
		{"logger-channel", spec.RSS, 4.6},
	} {
		ex, method := c.ex, c.method
		{
			t.Run(ex+"/"+method, func(t *testing.T) {
				s, err := spec.Load(filepath.Join("..", "..", "data", "examples", ex+".yaml"))
				if err != nil {
					t.Fatal(err)
				}
				if s.Reference != nil && s.Reference.Part != "" {
					s.Reference = &spec.Reference{V: s.Reference.V, Tolerance: 0.0005, Drift: 5e-6}
				}
				s.Analysis.Method = method
				if c.vpos != 0 {
					s.Supply.Max = c.vpos
				}
				p, err := FromSpec(s)
				if err != nil {
					t.Fatal(err)
				}
				sp, all := allDesigns(t, ctx, parts, p)
				verify := budgetVerifier(ctx, s, nil)
				r := rand.New(rand.NewPCG(7, 7))
				pruned := 0
				checked := sampleBudgeted(t, sp, all, verify, r, 6, func(b *classBest) bool {
					return b.cfg >= 0 && sp.amps[b.amp].a.Type == catalog.OpAmp && math.Abs(sp.movedHeadroom(&sp.amps[b.amp], &b.m)) <= 0.2
				}, func(b *classBest, d *Design, br *budget.Result) {
					screen, exact := sp.movedHeadroom(&sp.amps[b.amp], &b.m), br.Metrics.HeadroomV
					if b.m.lowHead {
						pruned++
					}
					if screen < exact-1e-9 {
						t.Errorf("screened headroom %.4g V, the exact budget's %.4g V (%s); screen gain error %.4g offset %.4g, exact %.4g %.4g",
							screen, exact, partList(d), b.m.totalErr, b.m.offset, br.Metrics.GainError, br.Metrics.OutputOffsetV)
					}
				})
				if checked < 3 {
					t.Fatalf("only %d designs checked", checked)
				}
				t.Logf("%d designs near the rails checked, %d of them pruned by the screen", checked, pruned)
			})
		}
	}
}

// sampleBudgeted draws designs of all at random until want of those keep
// accepts have been through the exact budget verify, calling check on each
// with its design and budget, and returns how many were checked.
func sampleBudgeted(t *testing.T, sp *space, all []classBest, verify verifier, r *rand.Rand, want int,
	keep func(b *classBest) bool, check func(b *classBest, d *Design, br *budget.Result)) int {
	t.Helper()
	checked := 0
	for tries := 0; tries < 200000 && checked < want; tries++ {
		b := &all[r.IntN(len(all))]
		if !keep(b) {
			continue
		}
		d, sd, err := sp.describe(b)
		if err != nil {
			t.Fatal(err)
		}
		br, _, err := verify(sd)
		if err != nil {
			continue
		}
		checked++
		check(b, &d, br)
	}
	return checked
}
