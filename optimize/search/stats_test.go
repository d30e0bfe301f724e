package search_test

import (
	"context"
	"io/fs"
	"testing"

	"plumb/data"
	"plumb/optimize/search"
	"plumb/optimize/spec"
)

// TestStatsCountRankedDesigns: a search that ranks a design evaluated at
// least one class, and evaluated no more than it visited. The examples
// here rank a matched or strapped amplifier, whose one design is
// evaluated without a walk over resistor configurations; their results
// once said "0 evaluated" above a ranked design.
func TestStatsCountRankedDesigns(t *testing.T) {
	snap, err := data.DemoSnapshot()
	if err != nil {
		t.Fatal(err)
	}
	for _, name := range []string{"strapped-gain", "strapped-single", "battery-monitor", "logger-channel"} {
		t.Run(name, func(t *testing.T) {
			raw, err := fs.ReadFile(data.Examples(), name+".yaml")
			if err != nil {
				t.Fatal(err)
			}
			s, err := spec.Parse(raw, name+".yaml")
			if err != nil {
				t.Fatal(err)
			}
			res, err := search.Solve(context.Background(), snap, s, search.Options{Top: 3})
			if err != nil {
				t.Fatal(err)
			}
			st := res.Search
			if len(res.Designs) == 0 || st.Evaluated < 1 || st.Evaluated > st.Visited || st.Visited > st.Classes {
				t.Errorf("%d design(s) ranked with stats %+v", len(res.Designs), st)
			}
		})
	}
}
