package report_test

import (
	"context"
	"fmt"
	"io"
	"os"
	"time"

	"plumb/catalog"
	"plumb/optimize/report"
	"plumb/optimize/spec"
)

// Build searches the catalog for the cheapest designs of a spec and
// writes the report as one self-contained HTML file.
func ExampleBuild() {
	s, err := spec.Load("testdata/channel.yaml")
	if err != nil {
		fmt.Println(err)
		return
	}
	f, err := os.Open("testdata/catalog.json")
	if err != nil {
		fmt.Println(err)
		return
	}
	defer f.Close()
	snap, err := catalog.ReadSnapshotJSON(f)
	if err != nil {
		fmt.Println(err)
		return
	}
	r, err := report.Build(context.Background(), report.Input{Spec: s, Snapshot: snap, Top: 2, Trials: 500,
		Now: func() time.Time { return time.Date(2026, 3, 14, 9, 26, 0, 0, time.UTC) }})
	if err != nil {
		fmt.Println(err)
		return
	}
	if err := r.WriteHTML(io.Discard); err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(r.Title)
	for _, d := range r.Designs {
		fmt.Printf("design %d: %s per stage, binding %s, %d budget charts\n", d.Rank, d.UnitCost, d.Binding, len(d.Budgets))
	}
	// Output:
	// Design report: fixture-channel
	// design 1: 0.8092 EUR per stage, binding CMRR, 4 budget charts
	// design 2: 0.8092 EUR per stage, binding CMRR, 4 budget charts
}
