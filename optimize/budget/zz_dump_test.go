package budget

import (
	"encoding/json"
	"os"
	"testing"
)

func TestZZDump(t *testing.T) {
	if os.Getenv("ZS") == "" {
		t.Skip("dump only on request")
	}
	s := loadExample(t, os.Getenv("ZS"))
	if m := os.Getenv("ZM"); m != "" {
		s.Analysis.Method = m
		s.Analysis.Trials = 2000
	}
	res, err := Evaluate(s, loadExampleDesign(t, os.Getenv("ZD")))
	if err != nil {
		t.Fatal(err)
	}
	if res.MonteCarlo != nil {
		res.MonteCarlo.Samples = nil
	}
	b, _ := json.MarshalIndent(res, "", " ")
	t.Log(string(b))
}
