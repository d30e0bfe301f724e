package spec

import (
	"strings"
	"testing"
)

// chainDesign is a two-stage design with inline parts.
const chainDesign = `name: chain
stages:
  - family: difference
    positions:
      R1: {value: 10k, tolerance: 0.1%, tcr: 25ppm/K}
      R2: {value: 100k, tolerance: 0.1%, tcr: 25ppm/K}
      R3: {value: 10k, tolerance: 0.1%, tcr: 25ppm/K}
      R4: {value: 100k, tolerance: 0.1%, tcr: 25ppm/K}
    amplifier: {part: TEST-AMP}
  - family: noninverting
    positions:
      Rf: {part: TEST-R-10K}
      Rg: {part: TEST-R-10K}
    amplifier: {part: TEST-AMP}
`

func TestParseChainDesign(t *testing.T) {
	d, err := ParseDesign([]byte(chainDesign), "c.yaml")
	if err != nil {
		t.Fatal(err)
	}
	if !d.IsChain() || len(d.Stages) != 2 || d.Stages[0].Family != "difference" || d.Stages[1].Family != "noninverting" {
		t.Fatalf("stages %+v", d.Stages)
	}
	if got := d.Stages[0].Position("R2").Ohm(); got != 100e3 {
		t.Errorf("stage 1 R2 = %g, want 100k", got)
	}
	if got := d.Unresolved(); strings.Join(got, "; ") != "stage 1 amplifier: TEST-AMP; stage 2 Rf: TEST-R-10K; stage 2 Rg: TEST-R-10K; stage 2 amplifier: TEST-AMP" {
		t.Errorf("unresolved %q", got)
	}
}

// A stage's problem is reported at stages[i].FIELD with its line and
// column, as a one-stage design's is at FIELD.
func TestChainDesignFieldErrors(t *testing.T) {
	cases := []struct {
		name, edit, with string
		field, advice    string
		line, column     int
	}{
		{"bad tolerance of stage 1", "R2: {value: 100k, tolerance: 0.1%", "R2: {value: 100k, tolerance: -0.1%", "stages[0].positions.R2.tolerance", "must not be negative", 6, 25},
		{"bad family of stage 2", "family: noninverting", "family: non-inverting", "stages[1].family", `"non-inverting" is not a family`, 10, 5},
		{"unknown field of stage 2", "Rg: {part: TEST-R-10K}", "Rg: {part: TEST-R-10K, colour: red}", "stages[1].positions.Rg.colour", "is not a known field", 13, 0},
		{"family beside stages", "name: chain\n", "name: chain\nfamily: difference\n", "family", "given together with stages", 2, 1},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			src := strings.Replace(chainDesign, c.edit, c.with, 1)
			if src == chainDesign {
				t.Fatal("edit not applied")
			}
			_, err := ParseDesign([]byte(src), "c.yaml")
			if c.field == "" {
				if err == nil {
					t.Fatal("no error")
				}
				return
			}
			checkOneFieldError(t, err, "c.yaml", c.field, c.advice)
			fe := fieldErrors(t, err)[0]
			if fe.Line != c.line || (c.column > 0 && fe.Column != c.column) {
				t.Errorf("%s at %d:%d, want %d:%d", fe.Field, fe.Line, fe.Column, c.line, c.column)
			}
		})
	}
	_, err := ParseDesign([]byte(chainDesign[:strings.Index(chainDesign, "  - family: noninverting")]), "c.yaml")
	checkOneFieldError(t, err, "c.yaml", "stages", "lists 1 stages; a chain's design takes 2")
}
