package main

import (
	"os"
	"strings"
	"testing"

	"plumb/optimize/search"
)

// TestWriteChainDesignLayout: a chain prints its cost as a stage's is
// printed (amount then currency, per chain and for the build), each
// stage's positions grouped per part with a colon ("U1, U2, U3: KA-PB7",
// not "U1, U2, U3 KA-PB7"), and its limits in columns that stay in line
// whatever the length of a limit's name.
func TestWriteChainDesignLayout(t *testing.T) {
	d := &search.ChainDesign{Rank: 1, TotalCost: 10015, UnitCost: 20.03, Currency: "USD", Binding: "total drift",
		Stages: []search.ChainStage{{Stage: 1, Family: "inamp", Gain: 100, UnitCost: 6.74, Parts: []search.Part{
			{Position: "Rg", Kind: "resistor", Part: "AR-TU02-1K02", Tolerance: 0.0002, TCRppm: 5},
			{Position: "U1", Kind: "amplifier", Part: "KA-PB7"}, {Position: "U2", Kind: "amplifier", Part: "KA-PB7"},
			{Position: "U3", Kind: "amplifier", Part: "KA-PB7"}}}},
		Limits: []search.Limit{
			{Name: "gain error", Value: 0.003299, Limit: 0.005, Pass: true, MarginText: "1.52x inside the limit"},
			{Name: "amplifier headroom", Value: 0.1886, Limit: 0, Unit: "V", Pass: true, MarginText: "+0.189 V"},
			{Name: "CMRR", Value: 95.4, Limit: 80, Unit: "dB", Pass: false, MarginText: "+15.4 dB"},
		}}
	ios, _, out, _ := TestIO()
	writeChainDesign(out, ios, chainCostLine(d), d)
	text := out.String()
	for _, tc := range []struct{ name, want string }{
		{"cost as a stage's", "20.03 USD per chain (all stages), 10015.00 USD for the build; binding: total drift"},
		{"stage cost", "stage 1  inamp, gain 100, parts 6.74 USD per chain"},
		{"positions grouped per part", "Rg: AR-TU02-1K02 (0.02 % 5 ppm/K); U1, U2, U3: KA-PB7"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			if !strings.Contains(text, tc.want) {
				t.Errorf("output lacks %q:\n%s", tc.want, text)
			}
		})
	}
	t.Run("limit columns in line", func(t *testing.T) {
		col := -1
		for _, line := range strings.Split(text, "\n") {
			if !strings.HasPrefix(line, "    ok ") && !strings.HasPrefix(line, "    FAIL") {
				continue
			}
			at := strings.Index(line, "  limit ")
			if at < 0 || (col >= 0 && at != col) {
				t.Errorf("\"limit\" at column %d, want %d:\n%s", at, col, text)
			}
			col = at
		}
		if col < 0 {
			t.Errorf("no limit rows:\n%s", text)
		}
	})
}

// TestCheckChainUnknownPartOneHint: a chain design naming a part the
// catalog does not hold fails with the part's own hint once (how to look
// for it), not a second one appended to the error.
func TestCheckChainUnknownPartOneHint(t *testing.T) {
	clearPlumbEnv(t)
	b, _, err := readExample("two-stage-design")
	if err != nil {
		t.Fatal(err)
	}
	file := t.TempDir() + "/unknown.yaml"
	if err := os.WriteFile(file, []byte(strings.Replace(string(b), "IM-ZD1", "QQ-NOTHING", 1)), 0o600); err != nil {
		t.Fatal(err)
	}
	f, _, _ := testFactory(t)
	_, errOut, code := runPlumb(t, f, "check two-stage --design "+file)
	if code != exitError || !strings.Contains(errOut, "QQ-NOTHING") {
		t.Fatalf("exit %d, %q; want exit %d naming the part", code, errOut, exitError)
	}
	if n := strings.Count(errOut, "plumb catalog list"); n != 1 {
		t.Errorf("the hint appears %d times, want once:\n%s", n, errOut)
	}
}
