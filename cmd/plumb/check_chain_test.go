package main

import (
	"encoding/json"
	"math"
	"os"
	"reflect"
	"strings"
	"testing"

	"plumb/optimize/budget"
	"plumb/optimize/search"
)

// TestCheckChainMatchesSolve: the example two-stage-design holds the chain
// plumb solve ranks first for two-stage on the demo catalog; checking it
// gives exactly the chain's cost, figures and limits solve reported, and
// the chain's gain and gain error follow from the stages' budgets by the
// cascade of gain stages, G = G1 G2 and worst case e = (1 + e1)(1 + e2) - 1
// (any text on amplifier error budgets; common practice).
func TestCheckChainMatchesSolve(t *testing.T) {
	clearPlumbEnv(t)
	f, _, _ := testFactory(t)
	out, errOut, code := runPlumb(t, f, "solve two-stage --format json")
	if code != exitOK {
		t.Fatalf("solve: exit %d: %s", code, errOut)
	}
	var solved search.ChainResult
	if err := json.Unmarshal([]byte(out), &solved); err != nil {
		t.Fatal(err)
	}
	f, _, _ = testFactory(t)
	out, errOut, code = runPlumb(t, f, "check two-stage --design two-stage-design --format json")
	if code != exitOK {
		t.Fatalf("check: exit %d: %s", code, errOut)
	}
	var checked struct {
		Pass   bool               `json:"pass"`
		Chain  search.ChainDesign `json:"chain"`
		Stages []budget.Result    `json:"stage_budgets"`
	}
	if err := json.Unmarshal([]byte(out), &checked); err != nil {
		t.Fatal(err)
	}
	want, got := solved.Designs[0], checked.Chain
	if !checked.Pass {
		t.Error("the check fails the chain solve ranks first")
	}
	if got.TotalCost != want.TotalCost || got.UnitCost != want.UnitCost || got.Currency != want.Currency {
		t.Errorf("cost %s %g (%g per unit), solve's rank 1 %s %g (%g per unit)", got.Currency, got.TotalCost, got.UnitCost, want.Currency, want.TotalCost, want.UnitCost)
	}
	if !reflect.DeepEqual(got.Metrics, want.Metrics) {
		t.Errorf("chain metrics\n%+v\nsolve's rank 1\n%+v", got.Metrics, want.Metrics)
	}
	if !reflect.DeepEqual(got.Limits, want.Limits) || got.Binding != want.Binding {
		t.Errorf("chain limits (binding %s)\n%+v\nsolve's rank 1 (binding %s)\n%+v", got.Binding, got.Limits, want.Binding, want.Limits)
	}
	for i, s := range got.Stages {
		if s.TotalCost != want.Stages[i].TotalCost {
			t.Errorf("stage %d cost %g, solve's %g", i+1, s.TotalCost, want.Stages[i].TotalCost)
		}
	}
	if len(checked.Stages) != 2 {
		t.Fatalf("%d stage budgets", len(checked.Stages))
	}
	m1, m2 := checked.Stages[0].Metrics, checked.Stages[1].Metrics
	if g := m1.Gain * m2.Gain; math.Abs(got.Metrics.Gain-g) > 1e-12*g {
		t.Errorf("chain gain %g, G1 G2 = %g", got.Metrics.Gain, g)
	}
	if e := (1+m1.GainError)*(1+m2.GainError) - 1; math.Abs(got.Metrics.GainError-e) > 1e-12 {
		t.Errorf("chain gain error %g, (1 + e1)(1 + e2) - 1 = %g", got.Metrics.GainError, e)
	}
}

// TestCheckChainRefusals: a chain's spec needs a chain's design and the
// other way round, with stages of the spec's families; a failing chain
// exits 1 after its budget.
func TestCheckChainRefusals(t *testing.T) {
	cases := []struct {
		args, want string
		code       int
	}{
		{"check two-stage --design logger-design", "lists stages but design logger-design has none", exitError},
		{"check logger-channel --design two-stage-design", "lists stages but spec logger-channel has none", exitError},
		{"bom two-stage-design", "the design lists stages, which bom does not take yet", exitError},
	}
	for _, c := range cases {
		clearPlumbEnv(t)
		f, _, _ := testFactory(t)
		_, errOut, code := runPlumb(t, f, c.args)
		if code != c.code || !strings.Contains(errOut, c.want) {
			t.Errorf("plumb %s: exit %d, %q; want exit %d and %q", c.args, code, errOut, c.code, c.want)
		}
	}
}

// TestCheckChainFails: the rank-1 chain against the two-stage spec with
// its total drift limit tightened below the chain's 7.93 LSB prints the
// chain's budget with that limit failing and exits 1.
func TestCheckChainFails(t *testing.T) {
	clearPlumbEnv(t)
	b, _, err := readExample("two-stage")
	if err != nil {
		t.Fatal(err)
	}
	src := strings.Replace(string(b), "total_drift: 8LSB", "total_drift: 7LSB", 1)
	file := t.TempDir() + "/tight.yaml"
	if err := os.WriteFile(file, []byte(src), 0o600); err != nil {
		t.Fatal(err)
	}
	f, _, _ := testFactory(t)
	out, errOut, code := runPlumb(t, f, "check "+file+" --design two-stage-design")
	if code != exitError {
		t.Fatalf("exit %d, want %d: %s", code, exitError, errOut)
	}
	for _, want := range []string{"Budget of chain two-stage-design against two-stage", "FAIL", "stage 1  inamp", "stage 2  difference",
		"FAIL total drift", "ok   total error", "Contributors to total drift:", "Stage 2\n"} {
		if !strings.Contains(out, want) {
			t.Errorf("output lacks %q:\n%s", want, out)
		}
	}
	if !strings.Contains(errOut, "breaks total drift") {
		t.Errorf("stderr %q does not name the failing limit", errOut)
	}
}
