package search

import (
	"context"
	"encoding/json"
	"errors"
	"math"
	"os"
	"strings"
	"testing"

	"plumb/catalog"
	"plumb/optimize/family"
	"plumb/optimize/spec"
)

func loadFixture(t testing.TB, specFile string) (*catalog.Snapshot, *spec.Spec) {
	t.Helper()
	data, err := os.ReadFile("testdata/catalog_small.json")
	if err != nil {
		t.Fatal(err)
	}
	var snap catalog.Snapshot
	if err := json.Unmarshal(data, &snap); err != nil {
		t.Fatal(err)
	}
	s, err := spec.Load("testdata/" + specFile)
	if err != nil {
		t.Fatal(err)
	}
	return &snap, s
}

func within(a, b, rel float64) bool { return math.Abs(a-b) <= rel*math.Abs(b) }

// TestSolveHandWorked checks the search on a small invented catalog whose
// answer was worked by hand (common practice arithmetic with the
// domain-notes equations):
//
//	Only the 0.1 %, 10 ppm/K series meets 21 ppm/K drift: the ratio moves
//	(1 + 10 ppm/K x 65 K)/(1 - 10 ppm/K x 65 K) - 1 over the worst 65 K
//	excursion, 20.013 ppm/K (10 + 10 to first order); the 1 % series breaks
//	the 0.5 % gain error, the 25 ppm/K one the drift.
//	OPQ-1's 5 mV offset x NG 11 = 55 mV breaks 10 mV; OPQ-5 cannot take
//	±15 V. Rank 1: 2 x 200 resistors at 0.06 + 100 OPQ-2 at 0.45 = 69.00.
//	Worst-case gain error, at the low corner (R2, R4 at -0.1 % and
//	-10 ppm/K, R1, R3 at +0.1 % and +10 ppm/K, -40 °C): ratio
//	k = 10 x (0.999/1.001) x (0.99935/1.00065), gain k/(1 + (1+k)/A) with
//	A = 10^6 (Franco ch. 1, from memory): 0.33055 % low. Offset: the
//	noise gain times (200 uV + 1 nA x 1.96 k || 19.6 k + 2 uV/K x 65 K), with
//	the noise gain at the corner that raises it (R2 high, R1 low, -40 °C),
//	1 + 10 x (1.001/0.999) x (1.00065/0.99935) = 11.03306: 3.6606 mV.
//	Every E96 pair from 1 k/10 k up costs the same; the drift, gain-error
//	and CMRR margins are the same for all, and the next-worst margins
//	decide to a step of 1 % of each limit: at 1 k the voltage across R1
//	reaches 2.51x below its rating sqrt(P·R) = 10 V (IEC 60115-1 rated
//	voltage, common practice), and the stress falls as 1/sqrt(R) while the
//	offset (bias current times resistance, a few µV in 3.65 mV) stays in
//	the same step up to 1.96 k/19.6 k: the largest values before the offset
//	reaches the next step take the least stress. Rank 2: network 100 x 1.20 + 45 =
//	165; rank 3: matched amplifier 100 x 3.50 = 350. E96 values from 1 k to
//	100 k: 193 variants.
func TestSolveHandWorked(t *testing.T) {
	snap, s := loadFixture(t, "diff_g10.yaml")
	res, err := Solve(context.Background(), snap, s, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if len(res.Designs) != 3 {
		t.Fatalf("%d designs, want 3: %+v", len(res.Designs), res.Designs)
	}
	tests := []struct {
		name   string
		family Family
		total  float64
	}{
		{"rank 1 discrete", DiscreteDifference, 69},
		{"rank 2 network", NetworkDifference, 165},
		{"rank 3 matched amplifier", MatchedDifference, 350},
	}
	for i, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			d := res.Designs[i]
			if d.Family != string(tc.family) || !within(d.TotalCost, tc.total, 1e-9) || d.Rank != i+1 {
				t.Errorf("rank %d: %s %.4f, want %s %.2f", d.Rank, d.Family, d.TotalCost, tc.family, tc.total)
			}
			if !within(d.UnitCost, tc.total/100, 1e-9) || d.Currency != "EUR" {
				t.Errorf("unit cost %.4f %s, want %.4f EUR", d.UnitCost, d.Currency, tc.total/100)
			}
		})
	}
	d := res.Designs[0]
	want := map[string]string{"R1": "TC10-1K96", "R3": "TC10-1K96", "R2": "TC10-19K6", "R4": "TC10-19K6", "U1": "OPQ-2"}
	for _, p := range d.Parts {
		if want[p.Position] != p.Part {
			t.Errorf("%s is %s, want %s", p.Position, p.Part, want[p.Position])
		}
	}
	// The ranked design carries the exact budget's figures: the gain error
	// is the corner arithmetic above to 1e-6; the drift is the first-order
	// 20.013 ppm/K to 2e-4 (the exact figure adds self-heating and the
	// open-loop term's change with the ratio); the offset to 3e-5 (the
	// exact figure adds the bias current through the corner's imbalance of
	// the input resistances, at most 2 nA x 2 x 0.165 % x 1.78 k x 11 =
	// 0.13 uV of 3.66 mV).
	if !within(d.Metrics.GainError, 0.0033055, 1e-4) || !within(d.Metrics.OutputOffsetV, 11.03306*(200e-6+1e-9*1960*19600/21560+2e-6*65), 3e-5) || !within(d.Metrics.DriftPPMPerK, 20.013, 2e-4) {
		t.Errorf("metrics %+v", d.Metrics)
	}
	// (1+G)/(4t) from the resistors (Franco), t = 0.1 % + 10 ppm/K x 65 K
	// at the worst temperature: 11/(4 x 0.00165) = 1667; with the
	// amplifier's 100 dB: 1/(1/1667 + 1e-5), 64.3 dB.
	if !within(d.Metrics.CMRRdB, -20*math.Log10(4*0.00165/11+1e-5), 3e-3) {
		t.Errorf("CMRR %.2f dB", d.Metrics.CMRRdB)
	}
	if d.Binding != limDrift || d.ValueVariants != 193 {
		t.Errorf("binding %q, variants %d; want %q, 193", d.Binding, d.ValueVariants, limDrift)
	}
	if !strings.Contains(strings.Join(d.Reasons, "\n"), "192 other choices of values in these grades also pass") {
		t.Errorf("reasons lack the fold note: %q", d.Reasons)
	}
	if r := strings.Join(res.Designs[1].Reasons, "\n"); !strings.Contains(r, "costs 0.96 more per stage than rank 1") {
		t.Errorf("rank 2 reasons: %q", r)
	}
	// Near misses: cheaper than 69, failing, the closest first. The
	// closest swaps the 10 ppm/K grade at R2, R4 for a 25 ppm/K one: the
	// drift is then about 10 + 25 = 35 ppm/K against 21 (TCRf + TCRg to
	// first order, domain notes §6), a 1.67x shortfall, fixed by the
	// 10 ppm/K grade back at R2, R4 for 0.04 per stage (0.06 - 0.04 twice).
	if len(res.NearMisses) == 0 {
		t.Fatal("no near misses")
	}
	for i, nm := range res.NearMisses {
		if nm.TotalCost >= 69 || len(nm.Fails) == 0 {
			t.Errorf("near miss %+v is not cheaper and failing", nm.Design)
		}
		if i > 0 && nm.Shortfall < res.NearMisses[i-1].Shortfall {
			t.Errorf("near miss %d (shortfall %.3g) is closer than near miss %d (%.3g)", i+1, nm.Shortfall, i, res.NearMisses[i-1].Shortfall)
		}
		if nm.Fix == nil {
			t.Errorf("near miss %d at %.2f has no fix: %q", i+1, nm.TotalCost, nm.Reasons)
		}
	}
	for _, cf := range res.CheapestFailing {
		if cf.Shortfall < res.NearMisses[0].Shortfall {
			t.Errorf("a cheaper failing design (%s, shortfall %.3g) is closer than the first near miss (%.3g)", partList(&cf.Design), cf.Shortfall, res.NearMisses[0].Shortfall)
		}
	}
	first := res.NearMisses[0]
	if len(first.Fails) != 1 || first.Fails[0].Name != limDrift || !within(first.Shortfall, 35.0/21, 2e-3) {
		t.Errorf("first near miss fails %+v (shortfall %.4g), want the drift at about 35/21", first.Fails, first.Shortfall)
	}
	if f := first.Fix; f == nil || f.Kind != "grade" || !within(f.ExtraCost, 0.04, 1e-9) || !strings.Contains(f.Change, "10 ppm/K instead of") {
		t.Errorf("first near miss fix %+v, want the 10 ppm/K grade for 0.04 more per stage", f)
	}
}

func TestSolveInfeasible(t *testing.T) {
	snap, s := loadFixture(t, "diff_g10.yaml")
	s.Limits.CMRRdB = 120
	s.Limits.GainDrift = 0.1e-6
	res, err := Solve(context.Background(), snap, s, Options{})
	if !errors.Is(err, ErrInfeasible) {
		t.Fatalf("error %v, want ErrInfeasible", err)
	}
	if res == nil || res.Infeasible == nil || len(res.Designs) != 0 {
		t.Fatalf("result %+v", res)
	}
	names := map[string]InfeasibleLimit{}
	for _, l := range res.Infeasible.Limits {
		names[l.Name] = l
	}
	// 120 dB is out of reach of every design: the best is the matched
	// amplifier's datasheet CMRR, 90 dB, set by the amplifier (catalog side).
	cm, ok := names[limCMRR]
	if !ok || !within(cm.Best, 90, 1e-3) || len(cm.SetBy) == 0 || cm.SetBy[0].Side != "catalog" || !strings.Contains(cm.SetBy[0].Name, "CMRR") {
		t.Errorf("CMRR entry %+v", cm)
	}
	// Best drift in the catalog: the matched amplifier's 1 ppm/K; relaxing
	// the drift alone is not enough, the CMRR binds too.
	if dr, ok := names[limDrift]; !ok || !within(dr.Best, 1, 1e-6) || dr.Relax != nil || !strings.Contains(dr.Needed, "other limits bind") {
		t.Errorf("drift entry %+v", dr)
	}
}

func TestSolveHazardCaution(t *testing.T) {
	snap, s := loadFixture(t, "diff_g10.yaml")
	s.CommonMode = spec.Range{Min: -80, Max: 80}
	res, err := Solve(context.Background(), snap, s, Options{})
	if res == nil {
		t.Fatalf("no result: %v", err)
	}
	if len(res.Cautions) == 0 || !strings.Contains(res.Cautions[0], "IEC 61010-1") {
		t.Errorf("cautions %q", res.Cautions)
	}
}

// TestResultContract marshals a result and checks the field names other
// tools read (documented in the README).
func TestResultContract(t *testing.T) {
	snap, s := loadFixture(t, "diff_g10.yaml")
	res, err := Solve(context.Background(), snap, s, Options{})
	if err != nil {
		t.Fatal(err)
	}
	data, err := json.Marshal(res)
	if err != nil {
		t.Fatal(err)
	}
	var top map[string]json.RawMessage
	if err := json.Unmarshal(data, &top); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"designs", "near_misses"} {
		if _, ok := top[k]; !ok {
			t.Errorf("result lacks %q", k)
		}
	}
	var raw struct {
		Designs    []map[string]json.RawMessage `json:"designs"`
		NearMisses []map[string]json.RawMessage `json:"near_misses"`
	}
	if err := json.Unmarshal(data, &raw); err != nil {
		t.Fatal(err)
	}
	designKeys := []string{"rank", "family", "total_cost", "unit_cost", "currency", "parts", "metrics", "limits", "binding", "reasons"}
	check := func(what string, obj map[string]json.RawMessage, keys []string) {
		for _, k := range keys {
			if _, ok := obj[k]; !ok {
				t.Errorf("%s lacks %q", what, k)
			}
		}
	}
	check("design", raw.Designs[0], designKeys)
	check("near miss", raw.NearMisses[0], append(designKeys, "fails", "fix"))
	var parts []map[string]any
	json.Unmarshal(raw.Designs[0]["parts"], &parts)
	check2 := func(p map[string]any, keys ...string) {
		for _, k := range keys {
			if _, ok := p[k]; !ok {
				t.Errorf("part %v lacks %q", p["position"], k)
			}
		}
	}
	for _, p := range parts {
		check2(p, "position", "kind", "part", "quantity", "unit_price")
		if p["kind"] == "resistor" {
			check2(p, "value_ohm", "tolerance", "tcr_ppm")
		}
	}
	json.Unmarshal(raw.Designs[1]["parts"], &parts)
	for _, p := range parts {
		if p["kind"] == "network" {
			check2(p, "value_ohm", "ratio_tolerance", "tcr_tracking_ppm")
		}
	}
	var m map[string]any
	json.Unmarshal(raw.Designs[0]["metrics"], &m)
	check2(m, "gain", "gain_error", "cmrr_db", "drift_ppm_per_k", "output_offset_v")
	var ls []map[string]any
	json.Unmarshal(raw.Designs[0]["limits"], &ls)
	for _, l := range ls {
		check2(l, "name", "value", "limit", "margin", "pass")
	}
}

func TestDesignNForBudget(t *testing.T) {
	snap, s := loadFixture(t, "diff_g10.yaml")
	res, err := Solve(context.Background(), snap, s, Options{})
	if err != nil {
		t.Fatal(err)
	}
	d, err := res.DesignN(1)
	if err != nil {
		t.Fatal(err)
	}
	if d.Family != family.Difference.Name || len(d.Positions) != 4 || d.Position("R2").Ohm() != 19600 || !d.Amplifier.Resolved {
		t.Errorf("design %+v", d)
	}
	if len(d.Unresolved()) != 0 {
		t.Errorf("unresolved %v", d.Unresolved())
	}
	if _, err := res.DesignN(4); !errors.Is(err, ErrProblem) {
		t.Errorf("DesignN(4) error %v", err)
	}
}

// TestSolveDivider: gain 1/8 means Rtop/Rbot = 7 and a gain sensitivity of
// 7/8 to the ratio. The 1 % 100 ppm/K grade drifts 7/8 x 200 = 175 ppm/K
// (fails 50); the 0.1 % 25 ppm/K grade drifts 43.75 ppm/K and passes, so
// rank 1 is two lines of 5000 at 0.04 = 400.00; mixing in the 10 ppm/K grade
// costs 500.00, using it for both 600.00 (common practice arithmetic).
func TestSolveDivider(t *testing.T) {
	snap, s := loadFixture(t, "divider.yaml")
	res, err := Solve(context.Background(), snap, s, Options{})
	if err != nil {
		t.Fatal(err)
	}
	wantCost := []float64{400, 500, 500, 600}
	if len(res.Designs) != len(wantCost) {
		t.Fatalf("%d designs, want %d", len(res.Designs), len(wantCost))
	}
	for i, d := range res.Designs {
		if !within(d.TotalCost, wantCost[i], 1e-9) || d.Family != string(DiscreteDivider) {
			t.Errorf("rank %d: %s %.2f, want divider %.2f", i+1, d.Family, d.TotalCost, wantCost[i])
		}
		if d.Metrics.GainError > 0.01 || d.Metrics.DriftPPMPerK > 50 {
			t.Errorf("rank %d fails: %+v", i+1, d.Metrics)
		}
	}
	d := res.Designs[0]
	var top, bot float64
	for _, p := range d.Parts {
		switch {
		case p.Position == "Rtop" && strings.HasPrefix(p.Part, "TB25-"):
			top = p.ValueOhm
		case p.Position == "Rbot" && strings.HasPrefix(p.Part, "TB25-"):
			bot = p.ValueOhm
		default:
			t.Errorf("unexpected part %+v", p)
		}
	}
	if top+bot < 100e3 || math.Abs(top/bot/7-1) > 0.01 {
		t.Errorf("Rtop %g, Rbot %g: want a ratio of 7 and at least 100 k in all", top, bot)
	}
	// 43.75 ppm/K at exactly 7; the E96 ratio is within 1 % of it.
	if !within(d.Metrics.DriftPPMPerK, 43.75, 2e-3) {
		t.Errorf("drift %g, want about 43.75 ppm/K", d.Metrics.DriftPPMPerK)
	}
}
