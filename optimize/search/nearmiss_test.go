package search

import (
	"context"
	"errors"
	"fmt"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"plumb/optimize/budget"
	"plumb/optimize/spec"
)

// pessimisticCount reads the count of the note that near-miss candidates
// pass the exact budget (0 without the note).
func pessimisticCount(res *Result) int {
	re := regexp.MustCompile(`^(\d+) near-miss candidate\(s\) fail the screening figures but pass the exact budget`)
	n := 0
	for _, note := range res.Notes {
		if m := re.FindStringSubmatch(note); m != nil {
			k, _ := strconv.Atoi(m[1])
			n += k
		}
	}
	return n
}

// TestNearMissesExactBudget solves every example spec on the demo catalog
// and checks each near miss against the exact budget run here directly:
// the budget fails the listed design, its failures are the budget's, and a
// fix is confirmed by the budget unless the reasons say it still fails.
// It also documents how often the screening is pessimistic, i.e. fails a
// near-miss candidate that the exact budget passes (such candidates are
// counted in a note and not listed).
func TestNearMissesExactBudget(t *testing.T) {
	snap := demoSnapshot(t)
	paths, err := filepath.Glob("../../data/examples/*.yaml")
	if err != nil {
		t.Fatal(err)
	}
	// Pessimistic candidates per example, as measured when the budget
	// check of near misses was added: none. The screening's corners bound
	// the budget's on these specs; a change here is a change of the
	// screening model worth a look, not a failure of the budget.
	wantPessimistic := map[string]int{}
	solved := 0
	for _, path := range paths {
		if strings.HasSuffix(path, "-design.yaml") {
			continue
		}
		s, err := spec.Load(path)
		if err != nil {
			t.Fatalf("%s: %v", path, err)
		}
		name := filepath.Base(path)
		t.Run(name, func(t *testing.T) {
			res, err := Solve(context.Background(), snap, s, Options{})
			if errors.Is(err, ErrProblem) {
				t.Skipf("%s: not searched: %v", name, err)
			}
			if err != nil && !IsInfeasible(err) {
				t.Fatal(err)
			}
			solved++
			fixes, stillFail := 0, 0
			for i, nm := range res.NearMisses {
				if nm.sd == nil {
					t.Fatalf("near miss %d has no spec design", i+1)
				}
				br, err := budget.Evaluate(s, nm.sd)
				if err != nil {
					t.Fatal(err)
				}
				if br.Pass {
					t.Errorf("near miss %d (%s) passes the exact budget", i+1, partList(&nm.Design))
				}
				for _, f := range nm.Fails {
					if !failsIn(br, f.Name) {
						t.Errorf("near miss %d lists %s, which the exact budget passes", i+1, f.Name)
					}
				}
				if nm.Fix == nil || nm.fixSD == nil {
					continue
				}
				fixes++
				fb, err := budget.Evaluate(s, nm.fixSD)
				if err != nil {
					t.Fatal(err)
				}
				said := slicesContainsPrefix(nm.Reasons, "the fix passes the screening figures; the exact budget still fails")
				if said {
					stillFail++
				}
				if fb.Pass == said {
					t.Errorf("near miss %d: fix %q: budget pass %v, reasons %q", i+1, nm.Fix.Change, fb.Pass, nm.Reasons)
				}
			}
			// How often the screening is pessimistic on the examples: a
			// measurement of this search on the demo catalog, logged so that
			// a change in it shows in the test output.
			if got := pessimisticCount(res); got != wantPessimistic[name] {
				t.Errorf("%d pessimistic near-miss candidates, documented %d", got, wantPessimistic[name])
			}
			t.Logf("%s: %d near misses, %d pessimistic candidates dropped, %d fixes of which %d still fail the exact budget",
				name, len(res.NearMisses), pessimisticCount(res), fixes, stillFail)
		})
	}
	if solved == 0 {
		t.Fatal("no example spec solved")
	}
}

func failsIn(br *budget.Result, name string) bool {
	if name == "yield" {
		return br.MonteCarlo != nil && !br.Pass
	}
	for _, l := range br.Limits {
		if l.Name == name {
			return !l.Pass
		}
	}
	return false
}

func slicesContainsPrefix(ss []string, prefix string) bool {
	for _, s := range ss {
		if strings.HasPrefix(s, prefix) {
			return true
		}
	}
	return false
}

// TestNearCheck: a candidate the budget passes is dropped and counted; a
// failing one takes the budget's failures; a fix the budget fails is said
// so; the evaluations stop at maxNearEvals.
func TestNearCheck(t *testing.T) {
	pass := &spec.Design{Name: "pass"}
	fail := &spec.Design{Name: "fail"}
	broken := &spec.Design{Name: "broken"}
	verify := func(sd *spec.Design) (*budget.Result, []Failure, error) {
		if sd == broken {
			return nil, nil, fmt.Errorf("%w: R1 reaches zero", budget.ErrCandidate)
		}
		br := &budget.Result{Pass: sd == pass, Binding: "gain error"}
		if sd == pass {
			return br, nil, nil
		}
		return br, []Failure{{Name: "gain error", Text: "gain error 2 % against 1 %"}}, nil
	}
	tests := []struct {
		name      string
		sd, fix   *spec.Design
		listed    bool
		stillFail bool
	}{
		{"budget passes the candidate", pass, nil, false, false},
		{"budget fails it, fix passes", fail, pass, true, false},
		{"budget fails it and its fix", fail, fail, true, true},
		// One verdict per design: a near miss or fix the exact budget
		// cannot evaluate is not shown with its screening figures.
		{"budget cannot run the candidate", broken, nil, false, false},
		{"budget cannot run the fix", fail, broken, true, false},
	}
	for _, tc := range tests {
		c := nearCheck{verify: verify}
		nm := NearMiss{Design: Design{Reasons: []string{"cheaper than rank 1 but fails 2 limit(s)"}}, sd: tc.sd, fixSD: tc.fix}
		if tc.fix != nil {
			nm.Fix = &Fix{Change: "amplifier X instead of Y"}
		}
		if got := c.confirm(&nm); got != tc.listed {
			t.Errorf("%s: listed %v, want %v", tc.name, got, tc.listed)
			continue
		}
		if !tc.listed {
			if c.pessimistic+c.broken.n != 1 || len(c.notes()) != 1 {
				t.Errorf("%s: pessimistic %d, broken %d, notes %q", tc.name, c.pessimistic, c.broken.n, c.notes())
			}
			if tc.sd == broken && !strings.Contains(c.notes()[0], "R1 reaches zero") {
				t.Errorf("%s: the note does not quote the budget: %q", tc.name, c.notes())
			}
			continue
		}
		if tc.fix == broken && (nm.Fix != nil || !slicesContainsPrefix(nm.Reasons, "the cheapest single change the screening found (amplifier X instead of Y) could not be checked")) {
			t.Errorf("%s: fix %+v kept, reasons %q", tc.name, nm.Fix, nm.Reasons)
		}
		if len(nm.Fails) != 1 || !strings.Contains(nm.Reasons[0], "exact budget fails 1 limit") {
			t.Errorf("%s: fails %+v reasons %q", tc.name, nm.Fails, nm.Reasons)
		}
		if got := slicesContainsPrefix(nm.Reasons, "the fix passes the screening figures; the exact budget still fails gain error"); got != tc.stillFail {
			t.Errorf("%s: still-fails reason %v, want %v: %q", tc.name, got, tc.stillFail, nm.Reasons)
		}
	}
	c := nearCheck{verify: verify}
	for i := 0; i < maxNearEvals+3; i++ {
		nm := NearMiss{sd: fail}
		c.confirm(&nm)
	}
	if c.evals != maxNearEvals {
		t.Errorf("%d budget runs, want at most %d", c.evals, maxNearEvals)
	}
}
