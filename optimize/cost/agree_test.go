package cost_test

import (
	"context"
	"io/fs"
	"math"
	"testing"

	"plumb/data"
	"plumb/optimize/cost"
	"plumb/optimize/search"
	"plumb/optimize/spec"
)

// TestDesignBOMAgreesWithSearch prices the designs the search ranks for the
// example specs on the demo catalog and checks that the purchasing list
// comes to the build total the search ranked them by. The two count pieces
// independently (the search from its own model of each family, DesignBOM
// from the design it returns), so this checks each against the other.
func TestDesignBOMAgreesWithSearch(t *testing.T) {
	snap, err := data.DemoSnapshot()
	if err != nil {
		t.Fatal(err)
	}
	find, err := spec.SnapshotLookup(snap)
	if err != nil {
		t.Fatal(err)
	}
	tests := []struct{ name, file string }{
		{"discrete and network difference", "logger-channel.yaml"},
		{"three-op-amp in-amp", "load-cell.yaml"},
		{"current sense", "current-sense.yaml"},
		{"attenuator", "attenuator.yaml"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			raw, err := fs.ReadFile(data.Examples(), tc.file)
			if err != nil {
				t.Fatal(err)
			}
			s, err := spec.Parse(raw, tc.file)
			if err != nil {
				t.Fatal(err)
			}
			build, err := cost.BuildOf(s.Build)
			if err != nil {
				t.Fatal(err)
			}
			res, err := search.Solve(context.Background(), snap, s, search.Options{Top: 3})
			if err != nil {
				t.Fatal(err)
			}
			if len(res.Designs) == 0 {
				t.Fatal("the search found no design")
			}
			for i, sr := range res.Designs {
				d, err := res.DesignN(i + 1)
				if err != nil {
					t.Fatal(err)
				}
				b, err := cost.DesignBOM(d, find, build)
				if err != nil {
					t.Fatalf("design %d (%s): %v", i+1, sr.Family, err)
				}
				if math.Abs(b.Total-sr.TotalCost) > 1e-9*math.Max(1, sr.TotalCost) || b.Currency != sr.Currency {
					t.Errorf("design %d (%s): purchasing list %.6f %s, search %.6f %s", i+1, sr.Family, b.Total, b.Currency, sr.TotalCost, sr.Currency)
				}
			}
		})
	}
}
