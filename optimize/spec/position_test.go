package spec

import (
	"fmt"
	"strings"
	"testing"
)

// TestFieldErrorsCarryPosition is hardening finding 7: a field error named
// the path but not the line. Each now carries the line and column of the
// field (its key), and prints as FILE:LINE:COLUMN.
func TestFieldErrorsCarryPosition(t *testing.T) {
	tests := []struct {
		name      string
		src       string
		field     string
		line, col int
	}{
		{"value without unit", rep("cmrr: 60dB", "cmrr: 60")(base), "limits.cmrr", 8, 10},
		{"unknown field", add("colour: red\n")(base), "colour", 9, 1},
		{"type error", add("analysis:\n  trials: [1, 2]\n")(base), "analysis.trials", 10, 3},
		{"semantic check", rep("gain: 1", "gain: 0")(base), "gain", 4, 1},
		{"nested block", add("build:\n  quantity: 0\n")(base), "build.quantity", 10, 3},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			_, err := Parse([]byte(tc.src), "x.yaml")
			fes := fieldErrors(t, err)
			if len(fes) != 1 {
				t.Fatalf("%d errors: %v", len(fes), err)
			}
			fe := fes[0]
			if fe.Field != tc.field || fe.Line != tc.line || fe.Column != tc.col {
				t.Errorf("%s at %d:%d, want %s at %d:%d (%v)", fe.Field, fe.Line, fe.Column, tc.field, tc.line, tc.col, fe)
			}
			if want := fmt.Sprintf("spec x.yaml:%d:%d: %s: ", tc.line, tc.col, tc.field); !strings.HasPrefix(fe.Error(), want) {
				t.Errorf("%q does not start with %q", fe.Error(), want)
			}
		})
	}
	// A missing field has no place in the file: no line, no column.
	_, err := Parse([]byte(rep("name: t\n", "")(base)), "x.yaml")
	if fe := fieldErrors(t, err)[0]; fe.Line != 0 || !strings.HasPrefix(fe.Error(), "spec x.yaml: name: missing") {
		t.Errorf("missing field: %d:%d %q", fe.Line, fe.Column, fe)
	}
}

// TestSecondDocumentRefused is hardening finding 7: a second YAML document
// in a spec (after ---) was silently ignored.
func TestSecondDocumentRefused(t *testing.T) {
	for _, tc := range []struct{ name, src, want string }{
		{"spec", base + "---\nname: other\n", "spec x.yaml:9:1: a second YAML document"},
		{"spec, empty second document", base + "---\n", "a second YAML document"},
		{"spec, broken second document", base + "---\n: : :\n", "after the first document"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, err := Parse([]byte(tc.src), "x.yaml")
			if err == nil || !strings.Contains(err.Error(), tc.want) {
				t.Errorf("error %v, want %q", err, tc.want)
			}
		})
	}
	if _, err := ParseDesign([]byte("name: d\nfamily: difference\n---\nname: e\n"), "d.yaml"); err == nil || !strings.Contains(err.Error(), "a design file holds one document") {
		t.Errorf("design with two documents: %v", err)
	}
}

// TestManyMistakesLinear is hardening finding 3: a spec with N unknown
// keys took time growing as N² (each error searched every node, and the
// YAML decoder compares a mapping's keys pair by pair). Wide mappings are
// now reported from one walk of the node tree, and a file reports its
// first maxProblems problems and a count of the rest. The time is measured
// in BenchmarkParseUnknownKeys.
func TestManyMistakesLinear(t *testing.T) {
	src := unknownKeys(10000)
	_, err := Parse(src, "x.yaml")
	fes := fieldErrors(t, err)
	if len(fes) != maxProblems+1 {
		t.Fatalf("%d problems listed, want %d and a count", len(fes), maxProblems)
	}
	if last := fes[len(fes)-1]; !strings.Contains(last.Msg, "and 9950 more problems") {
		t.Errorf("last problem %q", last)
	}
	if fes[0].Field != "unknown_0" || fes[0].Line != 9 {
		t.Errorf("first problem %v", fes[0])
	}
	// A mapping of named entries (a design's positions) is bounded too.
	var b strings.Builder
	b.WriteString("name: d\nfamily: difference\npositions:\n")
	for i := range maxMappingKeys + 1 {
		fmt.Fprintf(&b, "  R%d: {value: 1k, tolerance: 1%%, tcr: 100ppm/K}\n", i)
	}
	if _, err := ParseDesign([]byte(b.String()), "d.yaml"); err == nil || !strings.Contains(err.Error(), "positions: has 257 entries") {
		t.Errorf("257 positions: %v", err)
	}
}

// unknownKeys is the base spec with n unknown top-level keys.
func unknownKeys(n int) []byte {
	var b strings.Builder
	b.WriteString(base)
	for i := range n {
		fmt.Fprintf(&b, "unknown_%d: 1\n", i)
	}
	return []byte(b.String())
}

// BenchmarkParseUnknownKeys: the time per key stays flat as the number of
// unknown keys grows 100-fold (it grew with N before).
func BenchmarkParseUnknownKeys(b *testing.B) {
	for _, n := range []int{1000, 10000, 100000} {
		b.Run(fmt.Sprint(n), func(b *testing.B) {
			src := unknownKeys(n)
			b.ReportAllocs()
			for b.Loop() {
				if _, err := Parse(src, "x.yaml"); err == nil {
					b.Fatal("no error")
				}
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N*n), "ns/key")
		})
	}
}
