package search

import (
	"context"
	"math"
	"slices"
	"strings"
	"testing"

	"plumb/catalog"
	"plumb/optimize/budget"
	"plumb/optimize/spec"
)

// usd is a one-break price list in USD with unlimited stock.
func usd(p float64) catalog.Offer {
	return catalog.Offer{PriceBreaks: []catalog.PriceBreak{{MinQty: 1, UnitPrice: p, Currency: "USD"}}, Stock: -1}
}

// diagSnapshot is a small invented catalog for the diagnosis tests: a
// thick-film 1 % and a thin-film 0.1 % E96 series, a 0.01 % foil grade and
// two op-amps, a cheap one with 1 mV offset and a precise one.
func diagSnapshot() *catalog.Snapshot {
	return &catalog.Snapshot{
		ResistorSeries: []catalog.ResistorSeries{
			{Part: "DX-TK", ESeries: "E96", MinOhm: 10, MaxOhm: 1e6, ResistorGrade: catalog.ResistorGrade{Technology: "thick-film", Package: "0603", Tolerance: 0.01, TCR: 100, PowerW: 0.1}, Offer: usd(0.002)},
			{Part: "DX-TN", ESeries: "E96", MinOhm: 10, MaxOhm: 1e6, ResistorGrade: catalog.ResistorGrade{Technology: "thin-film", Package: "0603", Tolerance: 0.001, TCR: 25, PowerW: 0.1}, Offer: usd(0.05)},
			{Part: "DX-FL", ESeries: "E96", MinOhm: 10, MaxOhm: 1e6, ResistorGrade: catalog.ResistorGrade{Technology: "foil", Package: "0805", Tolerance: 0.0001, TCR: 2, PowerW: 0.1}, Offer: usd(2.5)},
		},
		Amplifiers: []catalog.Amplifier{
			{Part: "DX-OA1", Type: catalog.OpAmp, Channels: 1, SupplyMinV: 3, SupplyMaxV: 36, CMNegV: 1.5, CMPosV: 1.5, SwingNegV: 1, SwingPosV: 1,
				VosV: 1e-3, VosDriftVK: 5e-6, IbA: 20e-9, IosA: 5e-9, AolVV: 2e5, CMRRdB: 90, GBWHz: 1e6, NoiseVHz: 20e-9, NoiseAHz: 0.5e-12, Offer: usd(0.2)},
			{Part: "DX-OA2", Type: catalog.OpAmp, Channels: 1, SupplyMinV: 3, SupplyMaxV: 36, CMNegV: 1.5, CMPosV: 1.5, SwingNegV: 1, SwingPosV: 1,
				VosV: 25e-6, VosDriftVK: 0.3e-6, IbA: 1e-9, IosA: 0.5e-9, AolVV: 1e6, CMRRdB: 120, GBWHz: 5e6, NoiseVHz: 8e-9, NoiseAHz: 0.2e-12, Offer: usd(1.8)},
		},
	}
}

func mustParseSpec(t *testing.T, yaml string) *spec.Spec {
	t.Helper()
	s, err := spec.Parse([]byte(yaml), "test.yaml")
	if err != nil {
		t.Fatal(err)
	}
	return s
}

// worstExactMargin is the smallest margin of an exact budget's limits.
func worstExactMargin(r *budget.Result) float64 {
	w := math.Inf(1)
	for _, l := range r.Limits {
		w = math.Min(w, l.Margin)
	}
	return w
}

func limitOf(r *budget.Result, name string) budget.Limit {
	for _, l := range r.Limits {
		if l.Name == name {
			return l
		}
	}
	return budget.Limit{}
}

// TestEqualCostVariantsRankByMargin: every value of a grade costs the same,
// so the search must choose among equal-cost variants by margin, not by
// catalog order. An inverting gain of -10 with a ±1 V input puts up to 10 V
// across Rf: at Rf = 2.05 k that is 48.8 mW, 98 % of a 0.1 W part derated to
// half (P = V²/R, IEC 60115-1 derating, common practice); the design the
// search ranks first must have at least the worst margin of that variant
// and less stress.
func TestEqualCostVariantsRankByMargin(t *testing.T) {
	s := mustParseSpec(t, `name: ties
about: equal-cost variants of one grade
family: inverting
gain: -10
input: {single_ended: ±1V}
supply: ±15V
temperature: {range: 0..50C}
limits: {gain_error: 5%, output_offset: 20mV}
impedance: {min: 100, max: 1M}
build: {quantity: 100}
`)
	res, err := Solve(context.Background(), diagSnapshot(), s, Options{Top: 1})
	if err != nil {
		t.Fatal(err)
	}
	d := res.Designs[0]
	first, err := res.ExplainN(1)
	if err != nil {
		t.Fatal(err)
	}
	// The thin variant: the same parts at Rg = 205 ohm, Rf = 2.05 k.
	sd, _ := res.DesignN(1)
	thin := *sd
	thin.Positions = append([]spec.Position(nil), sd.Positions...)
	for i := range thin.Positions {
		p := &thin.Positions[i]
		p.Elements = append([]spec.Element(nil), p.Elements...)
		switch p.Name {
		case "Rg":
			p.Elements[0].Ohm = 205
		case "Rf":
			p.Elements[0].Ohm = 2050
		}
	}
	thinBudget, err := budget.Evaluate(s, &thin)
	if err != nil {
		t.Fatal(err)
	}
	if pw := limitOf(thinBudget, budget.LimitPower).Value; pw < 0.9 {
		t.Fatalf("the 2.05 k variant should sit near its derated power, got %.3g", pw)
	}
	if w, wt := worstExactMargin(first), worstExactMargin(thinBudget); w < wt {
		t.Errorf("rank 1 (%s) has worst margin %.3g, below the equal-cost 2.05 k variant's %.3g", d.Parts[0].Part, w, wt)
	}
	if pw, pt := limitOf(first, budget.LimitPower).Value, limitOf(thinBudget, budget.LimitPower).Value; pw >= pt {
		t.Errorf("rank 1 runs a resistor at %.0f %% of its derated power, the 2.05 k variant at %.0f %%", 100*pw, 100*pt)
	}
}

// TestNearMissesClosestFirst: on a gain-7.5 non-inverting stage with a
// 0.25 % gain-error limit over 0..70 °C, the thick-film grade fails by
// about 10x and the thin-film grade by a little over 1x: the near misses
// must start with the thin-film design (the closest), not the cheapest,
// and every near miss must carry a change that passes (the foil grade, or
// a calibration) or say that none was found.
func TestNearMissesClosestFirst(t *testing.T) {
	s := mustParseSpec(t, `name: closest
about: non-inverting gain 7.5
family: noninverting
gain: 7.5
input: {single_ended: 0..1V}
supply: ±12V
temperature: {range: 0..70C}
limits: {gain_error: 0.25%}
build: {quantity: 100}
`)
	res, err := Solve(context.Background(), diagSnapshot(), s, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if len(res.NearMisses) == 0 {
		t.Fatal("no near misses")
	}
	first := res.NearMisses[0]
	// Thin film: tolerance 2 x 0.1 % x (G-1)/G plus tempcos 2 x 25 ppm/K x
	// 45 K x (G-1)/G (the gain's sensitivity to Rf/Rg, Franco ch. 1, from
	// memory): about 0.37 %, 1.5x the limit.
	thin := (2*0.001 + 2*25e-6*45) * 6.5 / 7.5
	if first.Parts[0].Tolerance != 0.001 || !within(first.Shortfall, thin/0.0025, 0.05) {
		t.Errorf("first near miss %s (shortfall %.3g), want the thin-film design at about %.3g", partList(&first.Design), first.Shortfall, thin/0.0025)
	}
	for i, nm := range res.NearMisses {
		if nm.Shortfall < first.Shortfall {
			t.Errorf("near miss %d is closer (%.3g) than the first (%.3g)", i+1, nm.Shortfall, first.Shortfall)
		}
		if nm.Fix == nil && !slicesContainsPrefix(nm.Reasons, "no change found") {
			t.Errorf("near miss %d has no fix and does not say so: %q", i+1, nm.Reasons)
		}
	}
	for _, cf := range res.CheapestFailing {
		if cf.Shortfall < first.Shortfall {
			t.Errorf("cheaper failing design %s is closer (%.3g) than the first near miss (%.3g)", partList(&cf.Design), cf.Shortfall, first.Shortfall)
		}
	}
	if first.Fix == nil {
		t.Fatalf("the thin-film near miss has no fix: %q", first.Reasons)
	}
	var cal bool
	for _, a := range append([]Fix{*first.Fix}, first.Alternatives...) {
		cal = cal || a.Kind == kindCalibration
	}
	if !cal {
		t.Errorf("gain calibration (the tempco part alone, 2 x 25 ppm/K x 45 K x 6.5/7.5 = 0.195 %%, fits 0.25 %%) is not offered: fix %+v, alternatives %+v", first.Fix, first.Alternatives)
	}
}

// TestNearMissFixedByRankedAmplifier: when rank 1 is a near miss with
// another amplifier, the near miss must name that change (never "no
// change found"), at no more than rank 1's cost.
func TestNearMissFixedByRankedAmplifier(t *testing.T) {
	s := mustParseSpec(t, `name: amp
about: offset set by the amplifier
family: noninverting
gain: 11
input: {single_ended: 0..0.5V}
supply: ±12V
temperature: {range: 0..50C}
limits: {gain_error: 1%, output_offset: 5mV}
build: {quantity: 100}
`)
	// Only the thin-film grade: the one failing class is rank 1's
	// resistors with the cheap amplifier (1 mV x NG 11 = 11 mV of offset).
	snap := diagSnapshot()
	snap.ResistorSeries = snap.ResistorSeries[1:2]
	res, err := Solve(context.Background(), snap, s, Options{})
	if err != nil {
		t.Fatal(err)
	}
	checked := 0
	for i, nm := range res.NearMisses {
		for _, d := range res.Designs {
			if d.Family != nm.Family || len(res.designs) == 0 {
				continue
			}
			sp := &space{}
			if items := sp.differences(&nm.Design, &d); len(items) == 1 && strings.HasPrefix(items[0], "amplifier") {
				checked++
				if nm.Fix == nil || nm.Fix.TotalCost > d.TotalCost+1e-9 {
					t.Errorf("near miss %d is design %d with another amplifier, but its fix is %+v", i+1, d.Rank, nm.Fix)
				}
			}
		}
	}
	if checked == 0 {
		t.Fatalf("no near miss is a ranked design with another amplifier; near misses %d, designs %d", len(res.NearMisses), len(res.Designs))
	}
}

// causeNamed returns the cause of il whose name starts with prefix.
func causeNamed(il InfeasibleLimit, prefix string) (Cause, bool) {
	for _, c := range il.SetBy {
		if strings.HasPrefix(c.Name, prefix) {
			return c, true
		}
	}
	return Cause{}, false
}

func solveInfeasible(t *testing.T, snap *catalog.Snapshot, yaml string) *Result {
	t.Helper()
	res, err := Solve(context.Background(), snap, mustParseSpec(t, yaml), Options{})
	if !IsInfeasible(err) {
		t.Fatalf("error %v, want an infeasible spec", err)
	}
	if res == nil || res.Infeasible == nil {
		t.Fatal("no diagnosis")
	}
	return res
}

// TestDiagnoseSourceImpedance: a gain-10 difference amplifier whose
// resistors must stay within 1 k..20 k: R2 = R4 <= 20 k puts R1 + Rs near
// 2 k, so a 2 k source leaves no room for R1 at all. No design exists even
// with every limit taken away, and the diagnosis says that with no source
// impedance (or a wider window) one does.
func TestDiagnoseSourceImpedance(t *testing.T) {
	res := solveInfeasible(t, diagSnapshot(), `name: src
about: source impedance
family: difference
gain: 10
input: {differential: ±0.5V, common_mode: -1..1V}
supply: ±12V
source_impedance: 2k
temperature: {range: 20..30C}
limits: {gain_error: 0.1%}
impedance: {min: 1k, max: 20k}
build: {quantity: 100}
`)
	hard := strings.Join(res.Infeasible.Hard, "\n")
	if !strings.Contains(hard, "with no source impedance (the spec gives "+budget.FormatFigure(2000, "ohm")+") a design exists") {
		t.Errorf("the diagnosis does not name the source impedance: %q", res.Infeasible.Hard)
	}
	if !strings.Contains(hard, "impedance window widened") {
		t.Errorf("the diagnosis does not offer a wider impedance window: %q", res.Infeasible.Hard)
	}
}

// refLevelShift is a level shift whose reference error takes the offset
// budget (TestDiagnoseReference).
const refLevelShift = `name: ref
about: level shift whose reference error takes the offset budget
family: level-shift
input: {single_ended: ±5V}
output: 0.5..3V
supply: ±12V
reference: {voltage: 2.5V, tolerance: 0.05%, drift: 10ppm/K}
temperature: {range: -40..85C}
limits: {gain_error: 1%, output_offset: 2mV}
build: {quantity: 100}
`

// TestDiagnoseReference: a level shift of ±5 V onto 0.5..3 V (slope 0.25,
// offset b = 1.75 V from a 2.5 V reference) with a 2 mV offset limit over
// -40..85 °C. The reference's 0.05 % tolerance alone moves the offset by
// b·0.05 % = 0.875 mV and its 10 ppm/K drift by b·10 ppm/K·65 K = 1.14 mV
// (the shift is proportional to the reference, domain notes on the level
// shift; hand arithmetic): no catalog part reaches 2 mV, and the diagnosis
// must name both reference figures on the spec's side with those sizes.
func TestDiagnoseReference(t *testing.T) {
	res := solveInfeasible(t, diagSnapshot(), refLevelShift)
	if len(res.Infeasible.Limits) != 1 || res.Infeasible.Limits[0].Name != budget.LimitOutputOffset {
		t.Fatalf("limits %+v, want the output offset alone", res.Infeasible.Limits)
	}
	il := res.Infeasible.Limits[0]
	if il.Best <= 0.002 {
		t.Errorf("best offset %.4g V, want above the 2 mV limit", il.Best)
	}
	b := 1.75
	for _, tc := range []struct {
		prefix string
		want   float64
	}{
		{"reference tolerance", b * 0.0005},
		{"reference drift", b * 10e-6 * 65},
	} {
		c, ok := causeNamed(il, tc.prefix)
		if !ok || c.Side != "spec" || !within(c.Value, tc.want, 0.05) {
			t.Errorf("%s: cause %+v (found %v), want the spec side at about %.4g V", tc.prefix, c, ok, tc.want)
		}
	}
	if il.Relax == nil || il.Relax.To < il.Best*0.999 {
		t.Errorf("relaxation %+v, want one at or above the best %.4g V", il.Relax, il.Best)
	}
}

// TestDiagnoseRails: a non-inverting gain of 5 from 0..1 V on a single
// 5 V supply must swing its output to both rails; the catalog's op-amps
// come no nearer than 1 V, so the diagnosis says the output stops at 4 V
// and V+ must be 5 V + 1 V at least.
func TestDiagnoseRails(t *testing.T) {
	res := solveInfeasible(t, diagSnapshot(), `name: rails
about: output range against the rails
family: noninverting
gain: 5
input: {single_ended: 0..1V}
supply: 0..5V
temperature: {range: 0..50C}
limits: {gain_error: 1%}
build: {quantity: 100}
`)
	hard := strings.Join(res.Infeasible.Hard, "\n")
	for _, want := range []string{
		"the output must reach " + budget.FormatFigure(5, "V"),
		"stops at " + budget.FormatFigure(4, "V"),
		"raise V+ to at least " + budget.FormatFigure(6, "V")[:1], // 6 V and the worst-case gain's few mV (TestRelaxationVerifiedRails)
	} {
		if !strings.Contains(hard, want) {
			t.Errorf("the diagnosis lacks %q: %q", want, res.Infeasible.Hard)
		}
	}
}

// conflictSpec sets two limits each met alone, never together
// (TestDiagnoseConflict).
const conflictSpec = `name: conf
about: input impedance against noise
family: inverting
gain: -10
input: {single_ended: ±1V}
supply: ±12V
temperature: {range: 0..50C}
limits: {input_impedance: 50k, noise_density: 200nV/rtHz}
build: {quantity: 100}
`

// TestDiagnoseConflict: an inverting gain of -10 must show at least 50 k
// to its source (Rg >= 50 k, so Rf >= 500 k) and stay under 200 nV/√Hz at
// the output; Rf's thermal noise alone at 500 k is sqrt(4kT·500k) = 91
// nV/√Hz, times the noise gain the resistors' share exceeds the limit (at
// 50 k, 11·sqrt(4kT·45k) = 300 nV/√Hz, Johnson noise, common practice).
// Each limit is met alone; the pair is named, with the design closest to
// both, and each limit's smallest relaxation.
func TestDiagnoseConflict(t *testing.T) {
	res := solveInfeasible(t, diagSnapshot(), conflictSpec)
	inf := res.Infeasible
	if len(inf.Limits) != 0 || len(inf.Conflicts) != 1 {
		t.Fatalf("limits %+v conflicts %+v, want one conflict", inf.Limits, inf.Conflicts)
	}
	c := inf.Conflicts[0]
	if !slices.Equal(c.Limits, []string{budget.LimitNoiseDensity, budget.LimitInputImpedance}) || c.Closest == nil {
		t.Fatalf("conflict %+v", c)
	}
	for _, nm := range res.NearMisses {
		if nm.Shortfall < c.Closest.Shortfall*(1-1e-9) {
			t.Errorf("near miss %s (%.4g) is closer than the conflict's closest design (%.4g)", partList(&nm.Design), nm.Shortfall, c.Closest.Shortfall)
		}
	}
	if len(inf.Relaxations) != 2 {
		t.Fatalf("relaxations %+v, want one per limit", inf.Relaxations)
	}
	for _, r := range inf.Relaxations {
		if r.Limit == budget.LimitNoiseDensity && !(r.To > 200e-9) || r.Limit == budget.LimitInputImpedance && !(r.To < 50e3) {
			t.Errorf("relaxation %+v does not relax", r)
		}
	}
	if !strings.Contains(inf.Message, "noise density and input impedance together") {
		t.Errorf("message %q", inf.Message)
	}
}

// TestFrontier: the cost-versus-margin frontier holds designs that pass,
// ordered by cost, none of which another matches in margin on every limit
// at no more cost (Pareto dominance, the definition of the frontier); it
// starts at rank 1, the cheapest design, and each costlier entry buys more
// margin on some limit than every cheaper one.
func TestFrontier(t *testing.T) {
	snap, s := loadFixture(t, "diff_g10.yaml")
	res, err := Solve(context.Background(), snap, s, Options{Frontier: true})
	if err != nil {
		t.Fatal(err)
	}
	checkFrontier(t, res)
	// Without the option there is no frontier.
	res2, err := Solve(context.Background(), snap, s, Options{})
	if err != nil || res2.Frontier != nil {
		t.Errorf("frontier without the option: %v, %v", res2.Frontier, err)
	}
}

// checkFrontier checks res.Frontier: several designs that pass, ordered by
// cost, starting at rank 1's cost, none of which another matches in margin
// on every limit at no more cost (Pareto dominance, the definition of the
// frontier).
func checkFrontier(t *testing.T, res *Result) {
	t.Helper()
	f := res.Frontier
	if len(f) < 2 {
		t.Fatalf("frontier of %d design(s), want several", len(f))
	}
	if f[0].TotalCost != res.Designs[0].TotalCost {
		t.Errorf("frontier starts at %.4g, rank 1 costs %.4g", f[0].TotalCost, res.Designs[0].TotalCost)
	}
	for i := range f {
		for _, l := range f[i].Limits {
			if !l.Pass {
				t.Errorf("frontier design %d fails %s", i+1, l.Name)
			}
		}
		if i > 0 && f[i].TotalCost < f[i-1].TotalCost {
			t.Errorf("frontier not ordered by cost: %.4g after %.4g", f[i].TotalCost, f[i-1].TotalCost)
		}
		for j := range f {
			if i == j || f[j].TotalCost > f[i].TotalCost {
				continue
			}
			better := f[j].TotalCost < f[i].TotalCost
			all := true
			for _, li := range f[i].Limits {
				lj, ok := findLimit(f[j].Limits, li.Name)
				all = all && ok && lj.Margin >= li.Margin
				better = better || (ok && lj.Margin > li.Margin)
			}
			if all && better {
				t.Errorf("frontier design %d (%.4g) is dominated by design %d (%.4g)", i+1, f[i].TotalCost, j+1, f[j].TotalCost)
			}
		}
	}
}

// TestMergedSearchesFrontier: the in-amp (one sub-search per second-stage
// gain) and the current sense (one per shunt) draw their frontier from
// every sub-search, as the other families do from theirs.
func TestMergedSearchesFrontier(t *testing.T) {
	snap := demoSnapshot(t)
	for _, name := range []string{"current-sense", "load-cell"} {
		t.Run(name, func(t *testing.T) {
			s, err := spec.Load("../../data/examples/" + name + ".yaml")
			if err != nil {
				t.Fatal(err)
			}
			res, err := Solve(context.Background(), snap, s, Options{Top: 2, Frontier: true})
			if err != nil {
				t.Fatal(err)
			}
			checkFrontier(t, res)
		})
	}
}

// TestMergedSearchesCalibrate: the load-cell in-amp without its gain
// calibration, with a loose drift limit and at 15..35 °C fails the 0.1 %
// gain error by its resistors' tolerance alone (over the example's
// -10..40 °C the near misses cheaper than rank 1 use 25 ppm/K resistors
// whose drift alone breaks it); a one-time gain calibration removes the
// initial error (domain notes, calibration), so its near misses must be
// offered one, as near misses of the other families are. The calibration
// is checked here with the exact budget of the near miss under the spec
// with gain calibration.
func TestMergedSearchesCalibrate(t *testing.T) {
	snap := demoSnapshot(t)
	s, err := spec.Load("../../data/examples/load-cell.yaml")
	if err != nil {
		t.Fatal(err)
	}
	s.Calibrate.Gain = false
	s.Limits.GainDrift = 100e-6
	s.Temp.Min, s.Temp.Max = 15, 35
	res, err := Solve(context.Background(), snap, s, Options{})
	if err != nil {
		t.Fatal(err)
	}
	found := 0
	for i := range res.NearMisses {
		nm := &res.NearMisses[i]
		fixes := append([]Fix(nil), nm.Alternatives...)
		if nm.Fix != nil {
			fixes = append(fixes, *nm.Fix)
		}
		for _, f := range fixes {
			if f.Kind != kindCalibration {
				continue
			}
			found++
			cal := *s
			cal.Calibrate.Gain = true
			br, err := budget.Evaluate(&cal, nm.sd)
			if err != nil || !br.Pass {
				t.Errorf("near miss %d: %q, but the budget with gain calibration does not pass (%v)", i+1, f.Change, err)
			}
		}
		if nm.Fix != nil && strings.Contains(nm.Fix.Change, "(design ") {
			t.Errorf("near miss %d: %q names a sub-search's rank", i+1, nm.Fix.Change)
		}
	}
	if found == 0 {
		t.Errorf("no near miss of the in-amp is offered a gain calibration")
	}
}
