package budget_test

import (
	"fmt"
	"path/filepath"

	"plumb/optimize/budget"
	"plumb/optimize/spec"
)

func examplePath(name string) string { return filepath.Join("..", "..", "data", "examples", name) }

// Evaluate the logger channel example design against its spec.
func ExampleEvaluate() {
	s, err := spec.Load(examplePath("logger-channel.yaml"))
	if err != nil {
		fmt.Println(err)
		return
	}
	d, err := spec.LoadDesign(examplePath("logger-design.yaml"))
	if err != nil {
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
	// gain 0.1999, pass true, binding gain drift
	// gain error: 0.003746  (limit 0.005), dominant R2 tolerance
	// CMRR: 45.28 dB (limit 40), dominant R4 tolerance
}
