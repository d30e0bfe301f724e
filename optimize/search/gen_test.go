package search

import (
	"fmt"
	"math/rand/v2"

	"plumb/catalog"
	"plumb/optimize/cost"
)

// Invented catalog generator for tests and benchmarks: fictional makers,
// part numbers and prices.

var genTech = []struct {
	tech      string
	tol, tcr  float64
	basePrice float64
}{
	{"thick-film", 0.05, 200, 0.002}, {"thick-film", 0.01, 100, 0.004}, {"thin-film", 0.001, 25, 0.05},
	{"thin-film", 0.0005, 10, 0.12}, {"metal-film", 0.0025, 15, 0.08}, {"foil", 0.0001, 2, 1.8},
	{"thin-film", 0.002, 50, 0.03}, {"thick-film", 0.005, 50, 0.01},
}

var genSeries = []string{"E12", "E24", "E48", "E96", "E192"}

func genOffer(r *rand.Rand, base float64, cur string) catalog.Offer {
	o := catalog.Offer{Stock: -1}
	q := 1
	p := base * (0.7 + 0.6*r.Float64())
	for range 1 + r.IntN(3) {
		o.PriceBreaks = append(o.PriceBreaks, catalog.PriceBreak{MinQty: q, UnitPrice: roundCent(p), Currency: cur})
		q *= []int{10, 25, 100}[r.IntN(3)]
		p *= 0.5 + 0.4*r.Float64()
	}
	if r.IntN(6) == 0 {
		o.MinOrder = []int{10, 50, 100}[r.IntN(3)]
	}
	if r.IntN(5) == 0 {
		o.Stock = r.IntN(5000)
	}
	return o
}

func roundCent(p float64) float64 {
	if p < 0.01 {
		return float64(int(p*1e5+0.5)) / 1e5
	}
	return float64(int(p*1e4+0.5)) / 1e4
}

func genGrade(r *rand.Rand) (catalog.ResistorGrade, float64) {
	t := genTech[r.IntN(len(genTech))]
	pk := []string{"0402", "0603", "0805", "1206"}[r.IntN(4)]
	pw := map[string]float64{"0402": 0.063, "0603": 0.1, "0805": 0.125, "1206": 0.25}[pk]
	life := []float64{0, 0, 0.0005, 0.002}[r.IntN(4)]
	return catalog.ResistorGrade{Technology: t.tech, Package: pk, Tolerance: t.tol, TCR: t.tcr, PowerW: pw, MaxVoltageV: 50 + 150*pw, LoadLife: life}, t.basePrice
}

// genParts makes an invented catalog: nSeries resistor series, nRes
// individual resistors spread over nGrades grade/price groups, nNet
// networks and nAmp amplifiers.
func genParts(r *rand.Rand, nSeries, nRes, nGrades, nNet, nAmp int) *Parts {
	ps := &Parts{}
	for i := range nSeries {
		g, base := genGrade(r)
		ps.Series = append(ps.Series, catalog.ResistorSeries{
			Part: fmt.Sprintf("QX%03d", i), Maker: "Quillon Passives", Line: fmt.Sprintf("QL%d", i),
			ESeries: genSeries[r.IntN(len(genSeries))], MinOhm: 10, MaxOhm: 1e6,
			ResistorGrade: g, Offer: genOffer(r, base, "EUR"),
		})
	}
	type gp struct {
		g catalog.ResistorGrade
		o catalog.Offer
	}
	var gps []gp
	for range nGrades {
		g, base := genGrade(r)
		gps = append(gps, gp{g, genOffer(r, base, "EUR")})
	}
	e96 := []float64{1.00, 1.02, 1.05, 1.07, 1.10, 1.13, 1.15, 1.18, 1.21, 1.24, 1.27, 1.30, 1.33, 1.37, 1.40, 1.43, 1.47, 1.50, 1.54, 1.58, 1.62, 1.65, 1.69, 1.74, 1.78, 1.82, 1.87, 1.91, 1.96, 2.00, 2.05, 2.10, 2.15, 2.21, 2.26, 2.32, 2.37, 2.43, 2.49, 2.55, 2.61, 2.67, 2.74, 2.80, 2.87, 2.94, 3.01, 3.09, 3.16, 3.24, 3.32, 3.40, 3.48, 3.57, 3.65, 3.74, 3.83, 3.92, 4.02, 4.12, 4.22, 4.32, 4.42, 4.53, 4.64, 4.75, 4.87, 4.99, 5.11, 5.23, 5.36, 5.49, 5.62, 5.76, 5.90, 6.04, 6.19, 6.34, 6.49, 6.65, 6.81, 6.98, 7.15, 7.32, 7.50, 7.68, 7.87, 8.06, 8.25, 8.45, 8.66, 8.87, 9.09, 9.31, 9.53, 9.76}
	for i := range nRes {
		if len(gps) == 0 {
			break
		}
		g := gps[r.IntN(len(gps))]
		v := e96[r.IntN(len(e96))] * []float64{100, 1e3, 1e4, 1e5}[r.IntN(4)]
		o := g.o
		if r.IntN(4) == 0 {
			o.Stock = r.IntN(3000)
		}
		ps.Resistors = append(ps.Resistors, catalog.Resistor{
			Part: fmt.Sprintf("VR-%06d", i), Maker: "Vellmark Components", ValueOhm: v, ResistorGrade: g.g, Offer: o,
		})
	}
	for i := range nNet {
		a := []float64{1e3, 2e3, 5e3, 10e3, 20e3}[r.IntN(5)]
		k := []float64{1, 2, 5, 10}[r.IntN(4)]
		rt := []float64{0.0001, 0.0005, 0.001, 0.0025}[r.IntN(4)]
		ps.Networks = append(ps.Networks, catalog.Network{
			Part: fmt.Sprintf("NW-%04d", i), Maker: "Tessaly Matched", Values: []float64{a, a * k, a, a * k},
			Technology: "thin-film", Package: "SOT-23-6", Tolerance: 0.001, RatioTolerance: rt,
			TCR: 25, TCRTracking: []float64{1, 2, 5}[r.IntN(3)], PowerW: 0.1, MaxVoltageV: 100,
			Offer: genOffer(r, 0.6+rt*-1000*0.2+r.Float64(), "EUR"),
		})
	}
	for i := range nAmp {
		matched := r.IntN(8) == 0
		a := catalog.Amplifier{
			Part: fmt.Sprintf("OA-%05d", i), Maker: "Corvane Analog", Type: catalog.OpAmp, Channels: 1, Package: "SOT-23-5",
			SupplyMinV: []float64{1.8, 2.7, 4.5}[r.IntN(3)], SupplyMaxV: []float64{5.5, 16, 36}[r.IntN(3)],
			CMNegV: []float64{-0.1, 0, 1.5}[r.IntN(3)], CMPosV: []float64{-0.1, 0, 1.5}[r.IntN(3)],
			SwingNegV: []float64{0.02, 0.1, 1.2}[r.IntN(3)], SwingPosV: []float64{0.02, 0.1, 1.2}[r.IntN(3)],
			VosV: []float64{10e-6, 100e-6, 1e-3, 5e-3}[r.IntN(4)], VosDriftVK: []float64{0.05e-6, 0.5e-6, 3e-6, 10e-6}[r.IntN(4)],
			IbA: []float64{1e-12, 1e-9, 100e-9}[r.IntN(3)], IosA: []float64{1e-12, 1e-10, 10e-9}[r.IntN(3)],
			AolVV: []float64{1e4, 1e5, 1e6}[r.IntN(3)], CMRRdB: []float64{70, 90, 110, 130}[r.IntN(4)],
			GBWHz: []float64{100e3, 1e6, 10e6}[r.IntN(3)],
		}
		base := 0.1 + 2*r.Float64()
		if matched {
			a.Part = fmt.Sprintf("DA-%05d", i)
			a.Type = catalog.MatchedAmp
			a.Gains = []float64{[]float64{1, 2, 10}[r.IntN(3)]}
			a.GainErrorMax = []float64{0.0002, 0.0005, 0.001}[r.IntN(3)]
			a.GainDriftPPM = []float64{1, 2, 5}[r.IntN(3)]
			a.InNegV, a.InPosV = []float64{-20, 0, 1}[r.IntN(3)], []float64{-20, 0, 1}[r.IntN(3)]
			a.InternalOhm = 20e3
			base += 1.5
		}
		a.Offer = genOffer(r, base, "EUR")
		ps.Amplifiers = append(ps.Amplifiers, a)
	}
	return ps
}

// genProblem makes a random difference, non-inverting or inverting
// requirement with limits loose enough that some designs pass.
func genProblem(r *rand.Rand) Problem {
	p := Problem{
		Circuit:   []Circuit{Difference, Difference, NonInverting, Inverting, Divider}[r.IntN(5)],
		Gain:      []float64{1, 2, 5, 10, 20}[r.IntN(5)],
		SupplyNeg: []float64{0, -5, -15}[r.IntN(3)], SupplyPos: []float64{5, 15}[r.IntN(2)],
		TMin: -40, TMax: 85, TRef: 25,
		Method: []Method{WorstCase, RSS}[r.IntN(2)],
		Build:  cost.Build{Quantity: []int{1, 10, 100, 1000}[r.IntN(4)], Attrition: []float64{0, 0.02}[r.IntN(2)], PerPlacement: []float64{0, 0.005}[r.IntN(2)], PerLineItem: []float64{0, 0.5}[r.IntN(2)], Stock: []cost.StockPolicy{cost.StockFlag, cost.StockExclude}[r.IntN(2)]},
	}
	if p.Circuit == NonInverting && p.Gain == 1 {
		p.Gain = 2
	}
	if p.Circuit == Divider {
		p.Gain = 1 / (1 + p.Gain)
		p.LeakageA = []float64{0, 1e-7, 1e-5}[r.IntN(3)]
	}
	span := p.SupplyPos - p.SupplyNeg
	mid := (p.SupplyPos + p.SupplyNeg) / 2
	p.Ref = mid
	p.InMin, p.InMax = -0.1*span/(2*p.Gain), 0.1*span/(2*p.Gain)
	switch p.Circuit {
	case Difference:
		p.CMMin, p.CMMax = mid-0.1*span, mid+0.1*span
	case Divider:
		p.Ref = 0
		p.InMin, p.InMax = 0, 0.9*p.SupplyPos/p.Gain
	default:
		p.InMin, p.InMax = mid+p.InMin, mid+p.InMax
	}
	p.Limits = Limits{
		GainError: []float64{0, 0.002, 0.01, 0.03}[r.IntN(4)],
		DriftPPM:  []float64{0, 10, 50, 300}[r.IntN(4)],
		CMRRdB:    []float64{0, 40, 60, 80}[r.IntN(4)],
		OffsetV:   []float64{0, 0.001, 0.01, 0.1}[r.IntN(4)],
	}
	if r.IntN(3) == 0 {
		p.Limits.TotalGainError = []float64{0.002, 0.01}[r.IntN(2)]
	}
	if r.IntN(4) == 0 {
		p.Limits.OffsetDriftVK = []float64{1e-5, 1e-4}[r.IntN(2)]
	}
	if r.IntN(4) == 0 {
		p.Limits.NoiseDensity = []float64{100e-9, 1e-6}[r.IntN(2)]
	}
	if r.IntN(5) == 0 {
		p.Limits.NoiseRMS = []float64{50e-6, 500e-6}[r.IntN(2)]
	}
	if r.IntN(4) == 0 {
		p.ZinMinOhm = []float64{1e3, 20e3}[r.IntN(2)]
	}
	if r.IntN(4) == 0 {
		p.BandwidthHz = []float64{1e3, 50e3}[r.IntN(2)]
	}
	if r.IntN(3) == 0 {
		p.RMinOhm, p.RMaxOhm = 1e3, 200e3
	}
	if r.IntN(3) == 0 {
		p.SourceOhm = []float64{50, 1e3}[r.IntN(2)]
	}
	if p.Circuit == Divider && r.IntN(2) == 0 {
		p.LoadOhm = []float64{1e6, 100e3}[r.IntN(2)]
	}
	p.CalGain = r.IntN(5) == 0
	p.CalOffset = r.IntN(5) == 0
	return p
}
