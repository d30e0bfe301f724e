package search

import (
	"context"
	"fmt"
	"math"
	"path/filepath"
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
