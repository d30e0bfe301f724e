package catalog

import (
	"bytes"
	"context"
	"errors"
	"math"
	"strings"
	"testing"
)

// classicDifference is the four-element difference amplifier: gain R2/R1
// from IN+ - IN- to OUT - REF when R4/R3 = R2/R1 (any op-amp textbook's
// difference amplifier; common practice).
const classicDifference = "R1 10k IN-~INV; R2 10k INV~OUT; R3 10k IN+~NI; R4 10k NI~REF; amp INV NI OUT; pins IN- IN+ REF OUT"

func TestMatchedTextRoundTrip(t *testing.T) {
	n, err := ParseMatchedNetwork(classicDifference)
	if err != nil {
		t.Fatal(err)
	}
	if len(n.Elements) != 4 || n.Elements[1] != (MatchedElement{"R2", 10e3, "INV", "OUT"}) ||
		n.OpAmpInv != "INV" || n.OpAmpNonInv != "NI" || n.OpAmpOut != "OUT" || len(n.Pins) != 4 {
		t.Fatalf("parsed %+v", n)
	}
	if Known(n.Tolerance) || Known(n.RatioTolerance) || Known(n.RatioDriftPPM) {
		t.Errorf("the text gives no tolerance, so they are unknown: %+v", n)
	}
	again, err := ParseMatchedNetwork(FormatMatchedNetwork(n))
	if err != nil || !SameFigures(again, n) {
		t.Errorf("format %q read back as %+v (%v)", FormatMatchedNetwork(n), again, err)
	}
	// Spaces, case of the keywords, other units and order of clauses do not matter.
	loose, err := ParseMatchedNetwork(" PINS IN- IN+ REF OUT ;R1 10 kΩ IN-~INV;R2 1e4 INV~OUT; R3 10k IN+~NI; R4 10000 NI~REF; Amp INV NI OUT;")
	if err != nil || !SameFigures(loose, n) {
		t.Errorf("loose form read as %+v (%v)", loose, err)
	}
}

func TestMatchedTextErrors(t *testing.T) {
	tests := []struct{ text, words string }{
		{"R1 10k IN~INV; R2 10k INV OUT; amp INV NI OUT; pins IN OUT", `clause 2 "R2 10k INV OUT"`},
		{"R1 ten IN~INV; amp INV NI OUT; pins IN", `clause 1 "R1 ten IN~INV": value "ten"`},
		{"R1 10k IN~; amp INV NI OUT; pins IN", "A~B"},
		{"R1 10k IN~INV; amp INV NI; pins IN", "amp INV NONINV OUT"},
		{"R1 10k IN~INV; amp INV NI OUT", "no pins clause"},
		{"R1 10k IN~INV; pins IN", "no amp clause"},
		{"amp INV NI OUT; pins IN", "no element"},
		{"R1 10k IN~INV; amp A B C; amp A B C; pins IN", "second amp"},
	}
	for _, tc := range tests {
		_, err := ParseMatchedNetwork(tc.text)
		if !errors.Is(err, ErrNetworkText) || !strings.Contains(err.Error(), tc.words) {
			t.Errorf("%q: error %v, want one saying %q", tc.text, err, tc.words)
		}
	}
}

func TestMatchedValidate(t *testing.T) {
	tests := []struct {
		name  string
		edit  func(n *MatchedNetwork)
		words string
	}{
		{"zero element", func(n *MatchedNetwork) { n.Elements[0].Ohms = 0 }, "element R1: value 0 ohm"},
		{"NaN element", func(n *MatchedNetwork) { n.Elements[2].Ohms = math.NaN() }, "element R3"},
		{"unnamed node", func(n *MatchedNetwork) { n.Elements[1].B = "" }, "both nodes"},
		{"self loop", func(n *MatchedNetwork) { n.Elements[1].B = "INV" }, "to itself"},
		{"duplicate name", func(n *MatchedNetwork) { n.Elements[1].Name = "R1" }, "R1 appears twice"},
		{"op-amp node off the network", func(n *MatchedNetwork) { n.OpAmpNonInv = "X" }, "network.opamp_noninv: node X"},
		{"op-amp node empty", func(n *MatchedNetwork) { n.OpAmpOut = "" }, "network.opamp_out: is empty"},
		{"output unreachable", func(n *MatchedNetwork) { n.Elements[1].B = "SENSE"; n.Pins[3] = "SENSE" }, "network.opamp_out: node OUT joins no element and is no pin"},
		{"pin off the network", func(n *MatchedNetwork) { n.Pins = append(n.Pins, "SENSE") }, "pin \"SENSE\" is not a node"},
		{"pin twice", func(n *MatchedNetwork) { n.Pins = append(n.Pins, "OUT") }, "pin OUT is listed twice"},
		{"no pins", func(n *MatchedNetwork) { n.Pins = nil }, "network.pins"},
		{"tolerance in percent", func(n *MatchedNetwork) { n.RatioTolerance = 5 }, "network.ratio_tolerance"},
		{"negative tracking", func(n *MatchedNetwork) { n.RatioDriftPPM = -1 }, "network.ratio_drift_ppm"},
		{"one element", func(n *MatchedNetwork) { n.Elements = n.Elements[:1] }, "at least two"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			b := sampleBatch()
			tc.edit(b.Amplifiers[1].Network)
			err := b.Validate()
			if !errors.Is(err, ErrInvalid) || !strings.Contains(err.Error(), tc.words) || !strings.Contains(err.Error(), "TS-DA1") {
				t.Errorf("error %v, want ErrInvalid naming TS-DA1 and saying %q", err, tc.words)
			}
		})
	}
	b := sampleBatch()
	b.Amplifiers[0].Network = b.Amplifiers[1].Network
	if err := b.Validate(); err == nil || !strings.Contains(err.Error(), "only an amplifier of type") {
		t.Errorf("an op-amp with a network: %v", err)
	}
	// A sense pin: the feedback element ends on SENSE, the output is a pin
	// of its own, joined to SENSE by the strap.
	b = sampleBatch()
	b.Amplifiers[1].Network.Elements[1].B = "SENSE"
	b.Amplifiers[1].Network.Pins = append(b.Amplifiers[1].Network.Pins, "SENSE")
	if err := b.Validate(); err != nil {
		t.Errorf("a sense-pin network: %v", err)
	}
	b = sampleBatch()
	n := b.Amplifiers[1].Network
	n.Tolerance, n.RatioTolerance, n.RatioDriftPPM = Unknown(), Unknown(), Unknown()
	if err := b.Validate(); err != nil {
		t.Errorf("unknown tolerances are allowed: %v", err)
	}
}

func TestMatchedStoreAndJSON(t *testing.T) {
	ctx := context.Background()
	b := sampleBatch()
	n := b.Amplifiers[1].Network
	n.Tolerance = Unknown() // unknown stays unknown through the store and JSON
	s := memStore(t)
	mustUpsert(t, s, b, UpsertOptions{Now: testTime})
	_, v, err := s.Find(ctx, "TS-DA1")
	if err != nil {
		t.Fatal(err)
	}
	got := v.(*Amplifier).Network
	if got == nil || !SameFigures(got, n) {
		t.Fatalf("stored network %+v, want %+v", got, n)
	}
	if _, v, _ := s.Find(ctx, "TS-OA1"); v.(*Amplifier).Network != nil {
		t.Errorf("op-amp got a network")
	}
	var buf bytes.Buffer
	if err := s.WriteJSON(ctx, &buf); err != nil {
		t.Fatal(err)
	}
	// The network's unknown tolerance is left out, not written as 0.
	if !strings.Contains(strings.Join(strings.Fields(buf.String()), ""), `"opamp_out":"OUT","ratio_tolerance":0.0002`) {
		t.Errorf("network JSON does not leave the unknown tolerance out:\n%s", buf.String())
	}
	back, err := ReadSnapshotJSON(&buf)
	if err != nil {
		t.Fatal(err)
	}
	var da *Amplifier
	for i := range back.Amplifiers {
		if back.Amplifiers[i].Part == "TS-DA1" {
			da = &back.Amplifiers[i]
		}
	}
	if da == nil || !SameFigures(da.Network, n) {
		t.Errorf("JSON round trip gave %+v, want %+v", da, n)
	}
	// A changed element is a spec change, and the catalog keeps its own.
	c := sampleBatch()
	c.Amplifiers[1].Network.Tolerance = Unknown()
	c.Amplifiers[1].Network.Elements[1].Ohms = 20e3
	res := mustUpsert(t, s, &Snapshot{Amplifiers: c.Amplifiers[1:]}, UpsertOptions{Now: testTime})
	if len(res) != 1 || res[0].Outcome != SpecChanged || len(res[0].Changes) != 1 || !strings.Contains(res[0].Changes[0], "R2 20000 INV~OUT") {
		t.Errorf("results %+v, want a spec change naming the network", res)
	}
	var csv bytes.Buffer
	if err := s.WriteCSV(ctx, &csv, KindAmplifier); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(csv.String(), "R1 40000 IN-~INV; R2 40000 INV~OUT") || !strings.Contains(csv.String(), ",network,network_tolerance,") {
		t.Errorf("CSV export lacks the network:\n%s", csv.String())
	}
}

// FuzzMatchedText reads a network's text form, and for a network that
// holds together writes it and reads it again: the same network.
func FuzzMatchedText(f *testing.F) {
	f.Add(classicDifference)
	f.Add("R1 10 kΩ A~B; R2 4.99e3 B~C; amp B A C; pins A C")
	f.Add("amp; pins; ~; R1 1 ~")
	f.Fuzz(func(t *testing.T, s string) {
		n, err := ParseMatchedNetwork(s)
		if err != nil {
			if !errors.Is(err, ErrNetworkText) {
				t.Fatalf("%q: error %v does not wrap ErrNetworkText", s, err)
			}
			return
		}
		if n.Check() != nil {
			return
		}
		text := FormatMatchedNetwork(n)
		again, err := ParseMatchedNetwork(text)
		if err != nil || !SameFigures(again, n) {
			t.Fatalf("%q -> %q -> %+v (%v), want %+v", s, text, again, err, n)
		}
	})
}

func BenchmarkParseMatchedNetwork(b *testing.B) {
	b.ReportAllocs()
	for b.Loop() {
		if _, err := ParseMatchedNetwork(classicDifference); err != nil {
			b.Fatal(err)
		}
	}
}
