package cost

import (
	"errors"
	"fmt"
	"math/rand/v2"
	"strings"
	"testing"

	"plumb/catalog"
	"plumb/optimize/spec"
)

// TestStagesBOMShared prices a two-stage chain whose stages use one part
// number (op-amp PL-1: three in the first stage's in-amp, one in the
// second stage) as one build. Common practice BOM arithmetic worked on
// paper from the fixture catalog, 30 chains, one line item 1.00 per part
// number:
//
//	PL-1 together: 4 x 30 = 120 pieces at the 100 break, 1.50: 180.00.
//	  Apart: stage 1 needs 90 (90 x 2.00 = 180.00, buy-up to 100 x 1.50 =
//	  150.00) and stage 2 needs 30 (30 x 2.00 = 60.00): 210.00 and two
//	  line items.
//	OR-1K00 (Rg): 30 x 0.08 = 2.40; OR-4K99 (Rf): 30 x 0.10 = 3.00.
//	Together: parts 185.40, three line items: 188.40. Apart: stage 1
//	  151.00, stage 2 60 + 2.40 + 3.00 + 3 = 68.40, 219.40 in all.
//	Split: PL-1's 181.00 with its line item is 3:1 by pieces, 135.75 and
//	  45.25; stage 2 adds 7.40: 52.65.
func TestStagesBOMShared(t *testing.T) {
	find := fixtureLookup(t)
	first := "family: inamp\npositions:\n"
	for _, p := range []string{"Rf1", "Rg", "Rf2", "R1", "R2", "R3", "R4"} {
		first += "  " + p + ": {value: 10k, tolerance: 0.1%, tcr: 25ppm/K}\n"
	}
	first += "amplifier: {part: PL-1}\n"
	second := "family: noninverting\npositions:\n  Rg: {part: OR-1K00}\n  Rf: {part: OR-4K99}\namplifier: {part: PL-1}\n"
	ds := []*spec.Design{design(t, first), design(t, second)}
	b := Build{Quantity: 30, PerLineItem: 1}
	bm, err := StagesBOM(ds, find, b)
	if err != nil {
		t.Fatal(err)
	}
	if !near(bm.Total, 188.40) || !near(bm.Parts, 185.40) || !near(bm.Assembly, 3) {
		t.Errorf("total %.4f (parts %.4f, assembly %.4f), want 188.40 (185.40, 3.00)", bm.Total, bm.Parts, bm.Assembly)
	}
	var apart float64
	for _, d := range ds {
		one, err := DesignBOM(d, find, b)
		if err != nil {
			t.Fatal(err)
		}
		apart += one.Total
	}
	if !near(apart, 219.40) {
		t.Errorf("stages priced apart %.4f, want 219.40", apart)
	}
	if len(bm.StageTotals) != 2 || !near(bm.StageTotals[0], 135.75) || !near(bm.StageTotals[1], 52.65) {
		t.Errorf("stage totals %v, want [135.75 52.65]", bm.StageTotals)
	}
	var amp *BOMLine
	for i := range bm.Lines {
		if bm.Lines[i].Part == "PL-1" {
			amp = &bm.Lines[i]
		}
	}
	if amp == nil || amp.PerStage != 4 || amp.Bought != 120 || !near(amp.UnitPrice, 1.5) || amp.BreakQty != 100 ||
		strings.Join(amp.Positions, " ") != "1:U1 1:U2 1:U3 2:U1" {
		t.Errorf("PL-1 line %+v, want 4 per chain at 1:U1 1:U2 1:U3 2:U1, 120 bought at 1.50 from the 100 break", amp)
	}
	if len(bm.Lines) != 3 {
		t.Errorf("%d lines, want 3 (one per part number)", len(bm.Lines))
	}
}

// TestStagesBOMJointStock: OR-100K has 50 in stock; each stage alone buys
// 30, together 60, so the joint build is short: flagged under StockFlag,
// refused under StockExclude, while each stage alone passes.
func TestStagesBOMJointStock(t *testing.T) {
	find := fixtureLookup(t)
	stage := "family: noninverting\npositions:\n  Rg: {part: OR-1K00}\n  Rf: {part: OR-100K}\namplifier: {part: PL-1}\n"
	ds := []*spec.Design{design(t, stage), design(t, stage)}
	for _, d := range ds {
		if _, err := DesignBOM(d, find, Build{Quantity: 30, Stock: StockExclude}); err != nil {
			t.Fatalf("one stage alone: %v", err)
		}
	}
	bm, err := StagesBOM(ds, find, Build{Quantity: 30})
	if err != nil {
		t.Fatal(err)
	}
	short := false
	for _, ln := range bm.Lines {
		if ln.Part == "OR-100K" {
			short = ln.Short && ln.Bought == 60
		}
	}
	if !short {
		t.Errorf("OR-100K not flagged short at 60 bought: %+v", bm.Lines)
	}
	if _, err := StagesBOM(ds, find, Build{Quantity: 30, Stock: StockExclude}); !errors.Is(err, ErrShortStock) {
		t.Errorf("stock exclude: %v, want ErrShortStock", err)
	}
}

// TestSharedFloorBound: on seeded random price lists and two stages' uses
// with part numbers in common, Price of both together is at least the sum
// of their floors (SharedFloor against each other's part numbers), and a
// floor never exceeds its stage's own Price. This is the bound the chain
// search orders its pairs by.
func TestSharedFloorBound(t *testing.T) {
	r := rand.New(rand.NewPCG(7, 16))
	for n := 0; n < 2000; n++ {
		offers := make([]*catalog.Offer, 6)
		for i := range offers {
			o := &catalog.Offer{Stock: -1, MinOrder: []int{0, 0, 10, 250}[r.IntN(4)]}
			p := 0.01 + r.Float64()
			for q := []int{1, 10}[r.IntN(2)]; q <= 10000; q *= 1 + r.IntN(20) {
				o.PriceBreaks = append(o.PriceBreaks, catalog.PriceBreak{MinQty: q, UnitPrice: p, Currency: "EUR"})
				p *= 0.5 + 0.6*r.Float64() // not always falling: real lists are not tidy
			}
			offers[i] = o
		}
		b := Build{Quantity: 1 + r.IntN(500), Attrition: []float64{0, 0.02, 0.1}[r.IntN(3)],
			PerPlacement: []float64{0, 0.01}[r.IntN(2)], PerLineItem: []float64{0, 0.5, 3}[r.IntN(3)]}
		stage := func(name string) []Use {
			var us []Use
			for i, o := range offers {
				if r.IntN(2) == 0 {
					us = append(us, Use{Part: fmt.Sprint("P", i), Offer: o, Stage: name, Placements: 1 + r.IntN(4)})
				}
			}
			return us
		}
		a, c := stage("1"), stage("2")
		if len(a) == 0 || len(c) == 0 {
			continue
		}
		in := func(us []Use) func(string) bool {
			return func(p string) bool {
				for _, u := range us {
					if u.Part == p {
						return true
					}
				}
				return false
			}
		}
		fa, err := b.SharedFloor(a, in(c))
		if err != nil {
			t.Fatal(err)
		}
		fc, err := b.SharedFloor(c, in(a))
		if err != nil {
			t.Fatal(err)
		}
		joint, err := Price(b, append(append([]Use{}, a...), c...))
		if err != nil {
			t.Fatal(err)
		}
		pa, _ := Price(b, a)
		pc, _ := Price(b, c)
		if joint.Total < fa+fc-1e-9 {
			t.Fatalf("case %d: together %.6f below the floors %.6f + %.6f", n, joint.Total, fa, fc)
		}
		if fa > pa.Total+1e-9 || fc > pc.Total+1e-9 {
			t.Fatalf("case %d: floors %.6f, %.6f above the stages' own prices %.6f, %.6f", n, fa, fc, pa.Total, pc.Total)
		}
	}
}
