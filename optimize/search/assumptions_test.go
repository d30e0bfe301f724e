package search_test

import (
	"context"
	"io/fs"
	"strings"
	"testing"

	"plumb/catalog"
	"plumb/data"
	"plumb/optimize/search"
	"plumb/optimize/spec"
)

func TestSolveListsAssumptions(t *testing.T) {
	snap, err := data.DemoSnapshot()
	if err != nil {
		t.Fatal(err)
	}
	// Every amplifier's offset drift unknown: every design rests on it.
	for i := range snap.Amplifiers {
		snap.Amplifiers[i].VosDriftVK = catalog.Unknown()
	}
	raw, err := fs.ReadFile(data.Examples(), "logger-channel.yaml")
	if err != nil {
		t.Fatal(err)
	}
	for _, mode := range []string{spec.AssumeDefaults, spec.AssumeStrict} {
		t.Run(mode, func(t *testing.T) {
			s, err := spec.Parse(raw, "logger-channel.yaml")
			if err != nil {
				t.Fatal(err)
			}
			s.Assumptions = mode
			res, err := search.Solve(context.Background(), snap, s, search.Options{Top: 10})
			if mode == spec.AssumeStrict {
				// The output-offset limit depends on the drift of every
				// amplifier: none may be used.
				if err == nil && len(res.Designs) > 0 {
					t.Fatalf("strict: %d designs rest on an unknown offset drift", len(res.Designs))
				}
				if err == nil && !strings.Contains(strings.Join(res.Notes, "\n"), "left out") {
					t.Errorf("strict: notes do not say which parts were left out: %q", res.Notes)
				}
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			uses := 0
			for _, d := range append(append([]search.Design(nil), res.Designs...), nearDesigns(res)...) {
				uses++
				found := false
				for _, a := range d.Assumptions {
					found = found || a.Figure == "vos_drift_v_per_k"
				}
				if !found {
					t.Errorf("design %d lists assumptions %+v, want its amplifier's offset drift", d.Rank, d.Assumptions)
				}
			}
			if uses == 0 {
				t.Fatal("no design")
			}
			if notes := strings.Join(res.Notes, "\n"); !strings.Contains(notes, "offset drift not given") {
				t.Errorf("notes do not list the assumption: %s", notes)
			}
		})
	}
}

func nearDesigns(r *search.Result) []search.Design {
	var out []search.Design
	for _, n := range r.NearMisses {
		out = append(out, n.Design)
	}
	return out
}
