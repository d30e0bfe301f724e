package budget_test

import (
	"fmt"
	"os"
	"path/filepath"

	"plumb/catalog"
	"plumb/optimize/budget"
	"plumb/optimize/spec"
)

func examplePath(name string) string { return filepath.Join("..", "..", "data", name) }

// Evaluate the logger channel example design, its parts looked up in the
// demo catalog, against its spec.
func ExampleEvaluate() {
	f, err := os.Open(examplePath("demo.json"))
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
	lookup, err := spec.SnapshotLookup(snap)
	if err != nil {
		fmt.Println(err)
		return
	}
	s, err := spec.Load(examplePath("examples/logger-channel.yaml"))
	if err != nil {
		fmt.Println(err)
		return
	}
	d, err := spec.LoadDesign(examplePath("examples/logger-design.yaml"))
	if err != nil {
		fmt.Println(err)
		return
	}
	if err := d.Resolve(lookup); err != nil {
		fmt.Println(err)
		return
	}
	res, err := budget.Evaluate(s, d)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("gain %.4f, pass %v, binding %s\n", res.Metrics.Gain, res.Pass, res.Binding)
	for _, l := range res.Limits[:2] {
		fmt.Printf("%s: %.4g %s (limit %.4g), dominant %s\n", l.Name, l.Value, l.Unit, l.Limit, l.Contributors[0].Name)
	}
	// Output:
	// gain 0.1999, pass true, binding CMRR
	// gain error: 0.005756  (limit 0.01), dominant R2 tolerance
	// CMRR: 41.1 dB (limit 40), dominant R4 tolerance
}
