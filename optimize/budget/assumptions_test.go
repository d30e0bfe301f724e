package budget_test

import (
	"io/fs"
	"math"
	"strings"
	"testing"

	"plumb/catalog"
	"plumb/data"
	"plumb/optimize/assume"
	"plumb/optimize/budget"
	"plumb/optimize/spec"
)

// checkLogger runs the budget of the logger example design against the
// given demo catalog (after edit) and spec (after specEdit).
func checkLogger(t *testing.T, edit func(*catalog.Snapshot), specEdit func(*spec.Spec)) *budget.Result {
	t.Helper()
	snap, err := data.DemoSnapshot()
	if err != nil {
		t.Fatal(err)
	}
	edit(snap)
	find, err := spec.SnapshotLookup(snap)
	if err != nil {
		t.Fatal(err)
	}
	read := func(name string) []byte {
		b, err := fs.ReadFile(data.Examples(), name)
		if err != nil {
			t.Fatal(err)
		}
		return b
	}
	s, err := spec.Parse(read("logger-channel.yaml"), "logger-channel.yaml")
	if err != nil {
		t.Fatal(err)
	}
	specEdit(s)
	d, err := spec.ParseDesign(read("logger-design.yaml"), "logger-design.yaml")
	if err != nil {
		t.Fatal(err)
	}
	if err := d.Resolve(find); err != nil {
		t.Fatal(err)
	}
	res, err := budget.Evaluate(s, d)
	if err != nil {
		t.Fatal(err)
	}
	return res
}

func forgetLoadLife(snap *catalog.Snapshot) {
	for i := range snap.ResistorSeries {
		if snap.ResistorSeries[i].Part == "AR-TP1" {
			snap.ResistorSeries[i].LoadLife = catalog.Unknown()
		}
	}
}

func TestUnknownLoadLifeIsNoBetterThanTheDemos(t *testing.T) {
	keep := func(*spec.Spec) {}
	given := checkLogger(t, func(*catalog.Snapshot) {}, keep)
	unknown := checkLogger(t, forgetLoadLife, keep)
	// The demo's thin-film grade gives 0.1 % load life; the default for a
	// thin-film grade that gives none is the loosest common one, 0.5 %
	// (optimize/assume), so the CMRR cannot come out better.
	if unknown.Metrics.CMRRdB > given.Metrics.CMRRdB {
		t.Errorf("CMRR %.2f dB without a load-life figure, %.2f dB with the demo's: an unknown figure scored better", unknown.Metrics.CMRRdB, given.Metrics.CMRRdB)
	}
	if unknown.Metrics.GainError < given.Metrics.GainError {
		t.Errorf("gain error %g without a load-life figure, %g with the demo's", unknown.Metrics.GainError, given.Metrics.GainError)
	}
	if len(given.Assumptions) != 0 {
		t.Errorf("the demo design rests on assumptions: %+v", given.Assumptions)
	}
	if len(unknown.Assumptions) != 2 {
		t.Fatalf("assumptions %+v, want the load life of the two values of AR-TP1", unknown.Assumptions)
	}
	for _, a := range unknown.Assumptions {
		if a.Figure != "load_life" || !strings.HasPrefix(a.Part, "AR-TP1-") {
			t.Errorf("assumption %+v, want an AR-TP1 value's load_life", a)
		}
	}
	if !strings.Contains(strings.Join(unknown.Notes, "\n"), "load life not given") {
		t.Errorf("notes do not list the assumption: %q", unknown.Notes)
	}
}

func TestStrictAssumptions(t *testing.T) {
	// Limits loose enough that the assumed load life still passes them.
	loose := func(s *spec.Spec) { s.Limits.GainError, s.Limits.CMRRdB = 0.05, 20 }
	strict := func(s *spec.Spec) { loose(s); s.Assumptions = spec.AssumeStrict }
	res := checkLogger(t, forgetLoadLife, strict)
	lenient := checkLogger(t, forgetLoadLife, loose)
	if res.Pass {
		t.Error("strict: a design resting on an assumed load life passes")
	}
	for i, l := range res.Limits {
		rests := len(assume.Touching(res.Assumptions, l.Name)) > 0
		if rests && l.Pass {
			t.Errorf("strict: %s called met on an assumed figure", l.Name)
		}
		if !rests && l.Pass != lenient.Limits[i].Pass {
			t.Errorf("strict: %s does not depend on load life and must stay as computed", l.Name)
		}
	}
	refused := 0
	for i, l := range res.Limits {
		if lenient.Limits[i].Pass && !l.Pass {
			refused++
			if l.Name != budget.LimitCMRR && l.Name != budget.LimitGainError {
				t.Errorf("strict refused %s, which load life does not feed", l.Name)
			}
		}
	}
	if refused == 0 {
		t.Error("strict refused no limit the lenient budget passed on the assumed load life")
	}
	// With every figure known, strict changes nothing.
	all := checkLogger(t, func(*catalog.Snapshot) {}, strict)
	plain := checkLogger(t, func(*catalog.Snapshot) {}, loose)
	if all.Pass != plain.Pass || math.Abs(all.Metrics.CMRRdB-plain.Metrics.CMRRdB) > 0 {
		t.Errorf("strict with known figures: pass %v, plain %v", all.Pass, plain.Pass)
	}
}
