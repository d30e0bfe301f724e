package budget

import (
	"bufio"
	"bytes"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"plumb/optimize/circuit"
	"plumb/optimize/family"
	"plumb/optimize/spec"
)

// TestCornerAgainstNgspice hands the worst common-mode corner of a
// unity-gain difference amplifier with 1 % resistors, as the evaluator
// builds it, to ngspice (an independent circuit simulator) and compares
// the common-mode output with the evaluator's solved common-mode gain.
func TestCornerAgainstNgspice(t *testing.T) {
	path := ngspicePath(t)
	s := mustSpec(t, diffSpec(1, "worst-case"))
	e, err := NewEvaluator(s, family.Difference.Name, spec.Options{})
	if err != nil {
		t.Fatal(err)
	}
	amp := idealAmpFigures()
	amp.AolVV = 1e6 // ngspice rounds badly at larger VCVS gains
	f := Fig{Label: "t", Ohm: 10e3, Tolerance: 0.01}
	if err := e.SetCandidate(&Candidate{Figs: []Fig{f, f, f, f}, Amp: &amp}); err != nil {
		t.Fatal(err)
	}
	// R1 low, R2 high, R3 high, R4 low: the ratios move 2 % apart.
	for k, sign := range []float64{-1, 1, 1, -1} {
		e.x[e.devParam(k)] = sign
	}
	var p point
	if err := e.eval(e.x, s.TempRef, false, &p); err != nil {
		t.Fatal(err)
	}
	clear(e.x)
	e.quiet()
	e.driveCM(10)
	got := ngspiceOut(t, path, e.net)
	want := 10 * p.acm
	if math.Abs(got-want) > 1e-6*math.Abs(want) {
		t.Errorf("ngspice V(out) = %.9g at 10 V common mode, evaluator %.9g", got, want)
	}
	// About 200 mV (domain notes §6, common practice).
	if math.Abs(math.Abs(want)-0.2) > 0.01 {
		t.Errorf("worst-corner common-mode error %.4g V, want about 0.2 V", want)
	}
}

// ngspicePath finds ngspice, or skips the test with a plain message (fails
// it when PLUMB_REQUIRE_TOOLS is set, as in CI).
func ngspicePath(t *testing.T) string {
	t.Helper()
	path, err := exec.LookPath("ngspice")
	if err != nil {
		if os.Getenv("PLUMB_REQUIRE_TOOLS") != "" {
			t.Fatal("ngspice not found and PLUMB_REQUIRE_TOOLS is set")
		}
		t.Skip("ngspice not installed; skipping the cross-check")
	}
	return path
}

// ngspiceOut writes net as a deck (circuit.WriteSPICE), runs its DC
// operating point in ngspice and returns V(out) (NaN when it is missing).
func ngspiceOut(t *testing.T, path string, net *circuit.Netlist) float64 {
	t.Helper()
	var deck bytes.Buffer
	if err := net.WriteSPICE(&deck); err != nil {
		t.Fatal(err)
	}
	file := filepath.Join(t.TempDir(), "deck.cir")
	if err := os.WriteFile(file, deck.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	out, err := exec.Command(path, "-b", file).CombinedOutput()
	if err != nil {
		t.Fatalf("ngspice: %v\n%s", err, out)
	}
	got := math.NaN()
	sc := bufio.NewScanner(bytes.NewReader(out))
	for sc.Scan() {
		if name, val, ok := strings.Cut(sc.Text(), " = "); ok && strings.TrimSpace(name) == "out" {
			got, _ = strconv.ParseFloat(strings.TrimSpace(val), 64)
		}
	}
	if math.IsNaN(got) {
		t.Fatalf("ngspice printed no V(out):\n%s", out)
	}
	return got
}
