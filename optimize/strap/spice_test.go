package strap

import (
	"math"
	"os"
	"os/exec"
	"strconv"
	"strings"
	"testing"

	"plumb/catalog"
	"plumb/optimize/circuit"
)

// spiceGain is the op-amp's open-loop gain in the decks: ngspice has no
// ideal amplifier and rounds badly at much larger VCVS gains (see
// circuit.SPICEInfGain); the figures it is compared with are ideal, so the
// comparison allows the closed-loop error NG/A (Franco ch. 1, from memory).
const spiceGain = 1e6

// TestAgainstNgspice hands every enumerated strapping of the test networks
// to ngspice (an independent circuit simulator), driven from vp, vn and
// ref in turn, and compares its output with the strapping's transfers and
// the current each source delivers with its input impedance.
func TestAgainstNgspice(t *testing.T) {
	path, err := exec.LookPath("ngspice")
	if err != nil {
		if os.Getenv("PLUMB_REQUIRE_TOOLS") != "" {
			t.Fatal("ngspice not found and PLUMB_REQUIRE_TOOLS is set")
		}
		t.Skip("ngspice not installed; skipping the cross-check")
	}
	checked := 0
	for _, n := range []*catalog.MatchedNetwork{classicNet(10e3, 0.001), ratioNet(20e3, 10e3), ratioNet(49.9e3, 12.4e3), splitNet()} {
		all, err := Enumerate(n)
		if err != nil {
			t.Fatal(err)
		}
		m, err := prepare(n)
		if err != nil {
			t.Fatal(err)
		}
		deck := &circuit.Netlist{Family: circuitFamily, Nodes: []string{"0"}}
		type probe struct {
			s        *Strapping
			drive    Terminal
			out, src string // SPICE names of the output node and the driven source
		}
		var probes []probe
		for i := range all {
			s := &all[i]
			var r resolved
			m.resolve(s.Connections, &r)
			st := newStage(m)
			if v := st.check(m, &r); v != usable {
				t.Fatalf("%s: %v", s.Text, st.reason(v, &r))
			}
			for drive := InPlus; drive < Output; drive++ {
				k := st.src[drive]
				if k < 0 {
					continue
				}
				c := st.net.Clone()
				c.OpAmps[0].Gain = spiceGain
				c.Sources[k].V = 1
				prefix := "c" + strconv.Itoa(len(probes)) + "_"
				base := len(deck.Nodes)
				for _, name := range c.Nodes[1:] {
					deck.Nodes = append(deck.Nodes, prefix+name)
				}
				at := func(x int) int {
					if x == 0 {
						return 0
					}
					return base + x - 1
				}
				for _, e := range c.Resistors {
					deck.Resistors = append(deck.Resistors, circuit.Resistor{Name: prefix + e.Name, A: at(e.A), B: at(e.B), Ohm: e.Ohm})
				}
				for _, v := range c.Sources {
					deck.Sources = append(deck.Sources, circuit.Source{Name: "v" + prefix + v.Name, Node: at(v.Node), V: v.V})
				}
				for _, a := range c.OpAmps {
					deck.OpAmps = append(deck.OpAmps, circuit.OpAmp{Name: prefix + a.Name, Plus: at(a.Plus), Minus: at(a.Minus), Out: at(a.Out), Gain: a.Gain})
				}
				probes = append(probes, probe{s: s, drive: drive, out: strings.ToLower(prefix + "out"), src: strings.ToLower("v" + prefix + c.Sources[k].Name)})
			}
		}
		got, err := circuit.RunNgspice(path, t.TempDir(), deck)
		if err != nil {
			t.Fatal(err)
		}
		for _, p := range probes {
			s := p.s
			want := map[Terminal]float64{InPlus: s.GainPlus, InMinus: s.GainMinus, Ref: s.GainRef}[p.drive]
			zin := map[Terminal]float64{InPlus: s.InputPlusOhm, InMinus: s.InputMinusOhm, Ref: s.RefOhm}[p.drive]
			tol := 3*s.NoiseGain/spiceGain + 1e-9
			vout, ok := got[p.out]
			if !ok {
				t.Fatalf("ngspice printed no %s", p.out)
			}
			if math.Abs(vout-want) > tol*math.Max(1, math.Abs(want)) {
				t.Errorf("%s driven from %s: ngspice V(out) = %.9g, transfer %.9g", s.Text, p.drive, vout, want)
			}
			// SPICE's branch current flows into the source's + node; the
			// current the source delivers is its negative.
			// The finite gain moves the nodes by about NG/A volts, so the
			// current by that over the smallest element.
			i := -got[p.src+"#branch"]
			wantI := 1 / zin
			if math.Abs(i-wantI) > tol*(math.Abs(wantI)+1/minOhm(n)) {
				t.Errorf("%s driven from %s: ngspice draws %.9g A, input impedance %.9g ohm gives %.9g A", s.Text, p.drive, i, zin, wantI)
			}
			checked++
		}
	}
	t.Logf("%d strapped circuits and drives checked against ngspice", checked)
}

// minOhm returns the smallest element of n.
func minOhm(n *catalog.MatchedNetwork) float64 {
	r := math.Inf(1)
	for _, e := range n.Elements {
		r = math.Min(r, e.Ohms)
	}
	return r
}
