package search

import (
	"context"
	"math"
	"strings"
	"testing"

	"plumb/optimize/budget"
	"plumb/optimize/spec"
)

// TestScreeningAgreesWithBudget ranks the fixtures on the screening
// figures alone (SolveProblem, no confirmation) and runs the exact budget
// (package budget, a nodal solve of every corner) on each design: the
// budget must pass them too, and the screening figures must be close to the
// exact ones and not optimistic beyond rounding.
func TestScreeningAgreesWithBudget(t *testing.T) {
	for _, file := range []string{"diff_g10.yaml", "divider.yaml"} {
		t.Run(file, func(t *testing.T) {
			snap, s := loadFixture(t, file)
			p, err := FromSpec(s)
			if err != nil {
				t.Fatal(err)
			}
			parts := &Parts{Series: snap.ResistorSeries, Resistors: snap.Resistors, Networks: snap.Networks, Amplifiers: snap.Amplifiers}
			res, err := SolveProblem(context.Background(), parts, p, Options{})
			if err != nil {
				t.Fatal(err)
			}
			res.spec = s
			for i, d := range res.Designs {
				br, err := res.ExplainN(i + 1)
				if err != nil {
					t.Fatalf("rank %d: %v", i+1, err)
				}
				for _, l := range br.Limits {
					if !l.Pass {
						t.Errorf("rank %d (%s): the budget fails %s: %g against %g", i+1, d.Family, l.Name, l.Value, l.Limit)
					}
				}
				m := br.Metrics
				t.Logf("rank %d %s: gain error %.5g vs %.5g, drift %.4g vs %.4g, CMRR %.4g vs %.4g, offset %.4g vs %.4g",
					i+1, d.Family, d.Metrics.GainError, m.GainError, d.Metrics.DriftPPMPerK, m.DriftPPMPerK,
					d.Metrics.CMRRdB, m.CMRRdB, d.Metrics.OutputOffsetV, m.OutputOffsetV)
				if d.Metrics.GainError < m.GainError*(1-2e-3) || d.Metrics.GainError > m.GainError*1.05+1e-6 {
					t.Errorf("rank %d: gain error %.5g, budget %.5g", i+1, d.Metrics.GainError, m.GainError)
				}
				if math.Abs(d.Metrics.DriftPPMPerK-m.DriftPPMPerK) > 5e-3*m.DriftPPMPerK {
					t.Errorf("rank %d: drift %.6g, budget %.6g", i+1, d.Metrics.DriftPPMPerK, m.DriftPPMPerK)
				}
				if p.Circuit == Difference && math.Abs(d.Metrics.CMRRdB-m.CMRRdB) > 0.1 {
					t.Errorf("rank %d: CMRR %.4g dB, budget %.4g dB", i+1, d.Metrics.CMRRdB, m.CMRRdB)
				}
			}
		})
	}
	if _, err := (&Result{designs: nil}).ExplainN(1); err == nil {
		t.Error("ExplainN on an empty result did not fail")
	}
}

// TestBudgetHasTheLastWord sets the drift limit between the screening
// figure of the rank-1 discrete design (exact ratio drift, 20.013 ppm/K)
// and the exact budget's (which also moves the amplifier's terms, 20.016
// ppm/K when this was written): the screening passes the design, the
// budget rejects it, and it must show up as a near miss instead of rank 1.
func TestBudgetHasTheLastWord(t *testing.T) {
	snap, s := loadFixture(t, "diff_g10.yaml")
	res, err := Solve(context.Background(), snap, s, Options{})
	if err != nil {
		t.Fatal(err)
	}
	br, err := res.ExplainN(1)
	if err != nil {
		t.Fatal(err)
	}
	// Ranked designs carry the budget's figures; the screening figure of
	// the same design comes from the search without the budget.
	p, err := FromSpec(s)
	if err != nil {
		t.Fatal(err)
	}
	parts := &Parts{Series: snap.ResistorSeries, Resistors: snap.Resistors, Networks: snap.Networks, Amplifiers: snap.Amplifiers}
	scr, err := SolveProblem(context.Background(), parts, p, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if res.Designs[0].Metrics != metricsOf(br.Metrics) {
		t.Errorf("rank 1 reports %+v, its budget says %+v", res.Designs[0].Metrics, br.Metrics)
	}
	screen, exact := scr.Designs[0].Metrics.DriftPPMPerK, br.Metrics.DriftPPMPerK
	if exact <= screen {
		t.Skipf("the budget's drift %.6g is not above the screening figure %.6g: no limit between them to test with", exact, screen)
	}
	s.Limits.GainDrift = (screen + exact) / 2 * 1e-6
	res, err = Solve(context.Background(), snap, s, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if res.Designs[0].Family != string(NetworkDifference) {
		t.Fatalf("rank 1 is %s, want the network (the discrete pair fails the exact budget)", res.Designs[0].Family)
	}
	nm := res.NearMisses[0]
	if nm.Family != string(DiscreteDifference) || len(nm.Fails) != 1 || nm.Fails[0].Name != budget.LimitGainDrift ||
		!strings.Contains(nm.Reasons[0], "exact budget") {
		t.Errorf("first near miss %s %+v %q", nm.Family, nm.Fails, nm.Reasons)
	}
}

// TestFixListsEveryChange: a near miss's fix says exactly what changes.
// Applying its Changes to the near miss's parts gives the fix design's
// parts, position by position (part and value); its words name every
// changed position with its new part, and Part is the first new part. The
// logger example once offered "R1, R3: 0.1 % instead of 0.5 % (design 1)"
// while design 1 also had other values at every position, and named in
// JSON a part of design 1 at a value the words did not mention.
func TestFixListsEveryChange(t *testing.T) {
	snap := demoSnapshot(t)
	s, err := spec.Load("../../data/examples/logger-channel.yaml")
	if err != nil {
		t.Fatal(err)
	}
	res, err := Solve(context.Background(), snap, s, Options{})
	if err != nil {
		t.Fatal(err)
	}
	checked := 0
	for i, nm := range res.NearMisses {
		f := nm.Fix
		if f == nil || f.Kind == kindCalibration {
			continue
		}
		if nm.fixSD == nil {
			t.Fatalf("near miss %d: fix %q without its design", i+1, f.Change)
		}
		checked++
		got := map[string]PartChange{}
		for _, p := range nm.Parts {
			got[p.Position] = PartChange{Part: p.Part, ValueOhm: p.ValueOhm}
		}
		for _, c := range f.Changes {
			if w := got[c.Position]; w.Part != c.WasPart || w.ValueOhm != c.WasValueOhm {
				t.Errorf("near miss %d: change %+v, but the near miss has %s %g there", i+1, c, w.Part, w.ValueOhm)
			}
			if c.Part == "" {
				delete(got, c.Position)
			} else {
				got[c.Position] = PartChange{Part: c.Part, ValueOhm: c.ValueOhm}
				if !strings.Contains(f.Change, c.Part) || !strings.Contains(f.Change, c.Position) {
					t.Errorf("near miss %d: %q does not name %s at %s", i+1, f.Change, c.Part, c.Position)
				}
			}
		}
		want := specParts(nm.fixSD)
		if len(got) != len(want) {
			t.Errorf("near miss %d: %d positions after the changes, the fix design has %d", i+1, len(got), len(want))
		}
		for pos, w := range want {
			if g := got[pos]; g.Part != w.Part || g.ValueOhm != w.ValueOhm {
				t.Errorf("near miss %d, %s: the changes give %s %g, the fix design has %s %g (%q)", i+1, pos, g.Part, g.ValueOhm, w.Part, w.ValueOhm, f.Change)
			}
		}
		if len(f.Changes) == 0 || f.Part != f.Changes[0].Part {
			t.Errorf("near miss %d: part %q, changes %+v", i+1, f.Part, f.Changes)
		}
	}
	if checked == 0 {
		t.Fatal("no part fix among the near misses of the logger example")
	}
}

// specParts flattens a spec design to its parts by position as Design
// names them (a pair's elements as POS.a, POS.b; the amplifier as U1).
func specParts(sd *spec.Design) map[string]PartChange {
	out := map[string]PartChange{}
	for _, p := range sd.Positions {
		for i, e := range p.Elements {
			name := p.Name
			if len(p.Elements) > 1 {
				name += "." + string(rune('a'+i))
			}
			part := e.Part
			if e.Network != "" {
				part = e.Network
			}
			out[name] = PartChange{Part: part, ValueOhm: e.Ohm}
		}
	}
	if sd.Amplifier.Part != "" {
		out["U1"] = PartChange{Part: sd.Amplifier.Part}
	}
	return out
}
