package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"plumb/catalog"
	"plumb/optimize/family"
)

// strappedSnapshot is an invented catalog (no real part) of one amplifier
// whose front page lists gain 1 and whose split-element network strapped
// with both inputs of each side in parallel makes gain 2.
func strappedSnapshot() *catalog.Snapshot {
	return &catalog.Snapshot{Amplifiers: []catalog.Amplifier{{
		Part: "ZX-SPL8", Maker: "Vantorel Analog", Type: catalog.MatchedAmp, Channels: 1, Package: "SOIC-8",
		SupplyMinV: 4, SupplyMaxV: 36, CMNegV: 1.5, CMPosV: 1.5, SwingNegV: 1, SwingPosV: 1,
		VosV: 100e-6, VosDriftVK: 1e-6, IbA: 10e-9, IosA: 1e-9, AolVV: 1e6, CMRRdB: 100, GBWHz: 1e6, SlewVs: 1e6,
		NoiseVHz: 20e-9, NoiseAHz: 0.1e-12, IqA: 1e-3, Gains: []float64{1}, GainErrorMax: 0.0005, GainDriftPPM: 2,
		InNegV: 1.5, InPosV: 1.5, InternalOhm: 20e3,
		Network: &catalog.MatchedNetwork{
			Elements: []catalog.MatchedElement{
				{Name: "R1", Ohms: 20e3, A: "INA-", B: "inv"}, {Name: "R2", Ohms: 20e3, A: "INB-", B: "inv"},
				{Name: "R3", Ohms: 20e3, A: "inv", B: "OUT"}, {Name: "R4", Ohms: 20e3, A: "INA+", B: "NI"},
				{Name: "R5", Ohms: 20e3, A: "INB+", B: "NI"}, {Name: "R6", Ohms: 20e3, A: "NI", B: "REF"},
			},
			Pins:     []string{"INA-", "INB-", "OUT", "INA+", "INB+", "REF", "NI"},
			OpAmpInv: "inv", OpAmpNonInv: "NI", OpAmpOut: "OUT",
			Tolerance: 0.0025, RatioTolerance: 0.0005, RatioDriftPPM: 3,
		},
		Offer: catalog.Offer{Stock: 1000, PriceBreaks: []catalog.PriceBreak{{MinQty: 1, UnitPrice: 2.5, Currency: "USD"}}},
	}}}
}

// TestStrappedFromTheCommandLine solves a gain its part's front page does
// not list from a catalog holding the part's network, and checks the
// strapping the solve names as a design file: the JSON part carries
// strapping, the table prints it, and check evaluates the design.
func TestStrappedFromTheCommandLine(t *testing.T) {
	var fam string
	for _, f := range family.All() {
		if f.Search.Strappings && f.Input == family.Differential {
			fam = f.Name
		}
	}
	dir := t.TempDir()
	specFile := filepath.Join(dir, "gain2.yaml")
	src := "# Gain 2 from a part whose front page lists gain 1.\nname: gain2\nabout: gain 2 by strapping\nfamilies: [" + fam + "]\ngain: 2\n" +
		"input: {differential: ±2V, common_mode: -5..5V}\nsupply: ±15V\ntemperature: {range: 0..50C}\n" +
		"limits: {gain_error: 0.2%, cmrr: 60dB, output_offset: 2mV}\n"
	if err := os.WriteFile(specFile, []byte(src), 0o644); err != nil {
		t.Fatal(err)
	}
	f := fixtureFactory(t)
	useSnapshotCatalog(f, "strapped", func() (*catalog.Snapshot, error) { return strappedSnapshot(), nil })
	out, errOut, code := runPlumb(t, f, "solve "+specFile+" --format json")
	if code != 0 {
		t.Fatalf("solve exit %d: %s", code, errOut)
	}
	var res struct {
		Designs []struct {
			Family string `json:"family"`
			Parts  []struct {
				Part      string `json:"part"`
				Strapping string `json:"strapping"`
			} `json:"parts"`
			Metrics struct {
				Gain float64 `json:"gain"`
			} `json:"metrics"`
		} `json:"designs"`
	}
	if err := json.Unmarshal([]byte(out), &res); err != nil {
		t.Fatal(err)
	}
	if len(res.Designs) == 0 || len(res.Designs[0].Parts) != 1 {
		t.Fatalf("designs: %s", out)
	}
	// Several strappings make gain 2 at one price (the plus side's elements
	// may take the input or the reference in either order); the tie rules
	// pick one, and the design file checks that one.
	p := res.Designs[0].Parts[0]
	want := p.Strapping
	if p.Part != "ZX-SPL8" || want == "" || res.Designs[0].Metrics.Gain < 1.99 || res.Designs[0].Metrics.Gain > 2.01 {
		t.Fatalf("rank 1 part %s strapped %q, gain %g: %s", p.Part, want, res.Designs[0].Metrics.Gain, out)
	}
	f = fixtureFactory(t)
	useSnapshotCatalog(f, "strapped", func() (*catalog.Snapshot, error) { return strappedSnapshot(), nil })
	out, errOut, code = runPlumb(t, f, "solve "+specFile+" --explain 1")
	if code != 0 || !strings.Contains(out, "U1 ZX-SPL8 strapped: "+want) {
		t.Errorf("explain (exit %d, %s) does not show the strapping:\n%s", code, errOut, out)
	}
	design := filepath.Join(dir, "gain2-design.yaml")
	if err := os.WriteFile(design, []byte("family: "+fam+"\namplifier: {part: ZX-SPL8, strapping: \""+want+"\"}\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	f = fixtureFactory(t)
	useSnapshotCatalog(f, "strapped", func() (*catalog.Snapshot, error) { return strappedSnapshot(), nil })
	out, errOut, code = runPlumb(t, f, "check "+specFile+" --design "+design)
	if code != 0 || !strings.Contains(out, "strapped "+want) {
		t.Errorf("check (exit %d, %s):\n%s", code, errOut, out)
	}
}
