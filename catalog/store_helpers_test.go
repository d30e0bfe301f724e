package catalog

import (
	"fmt"
	"time"
)

// testTime is the fixed import time of the test batches.
var testTime = time.Date(2026, 11, 3, 9, 30, 0, 0, time.UTC)

func breaks(p1 float64) []PriceBreak {
	return []PriceBreak{
		{MinQty: 1, UnitPrice: p1, Currency: "USD"},
		{MinQty: 10, UnitPrice: p1 * 0.8, Currency: "USD"},
		{MinQty: 100, UnitPrice: p1 * 0.5, Currency: "USD"},
	}
}

// sampleBatch has one part of every kind with every field set.
func sampleBatch() *Snapshot {
	return &Snapshot{
		ResistorSeries: []ResistorSeries{{
			Part: "TS-TF01", Maker: "Testmaker Passives", Line: "TF precision", ESeries: "E96",
			MinOhm: 100, MaxOhm: 100e3,
			ResistorGrade: ResistorGrade{Technology: "thin-film", Package: "0603", Tolerance: 0.001, TCR: 25,
				PowerW: 0.1, MaxVoltageV: 75, ThermalResistance: 400, LoadLife: 0.0005},
			Offer:      Offer{PriceBreaks: breaks(0.12), MinOrder: 10, Stock: 4000},
			Provenance: Provenance{Source: "sample series", ImportedAt: testTime},
		}},
		Resistors: []Resistor{{
			Part: "TS-SH10", Maker: "Testmaker Passives", Line: "shunts", ValueOhm: 0.01, SeriesPart: "",
			ResistorGrade: ResistorGrade{Technology: "metal-strip", Package: "2512", Tolerance: 0.01, TCR: 50,
				PowerW: 1, MaxVoltageV: 0, ThermalResistance: 60, LoadLife: 0.002},
			Offer:      Offer{PriceBreaks: breaks(0.9), MinOrder: 1, Stock: -1},
			Provenance: Provenance{Source: "sample resistor", ImportedAt: testTime},
		}},
		Networks: []Network{{
			Part: "TS-NW4", Maker: "Testmaker Passives", Values: []float64{1e3, 10e3, 1e3, 10e3},
			Technology: "thin-film", Package: "SOT-23-6", Tolerance: 0.001, RatioTolerance: 0.0005,
			TCR: 25, TCRTracking: 2, PowerW: 0.1, MaxVoltageV: 50,
			Offer:      Offer{PriceBreaks: breaks(2.5), MinOrder: 0, Stock: 12},
			Provenance: Provenance{Source: "sample network", ImportedAt: testTime},
		}},
		Amplifiers: []Amplifier{{
			Part: "TS-OA1", Maker: "Testmaker Analog", Type: OpAmp, Channels: 2, Package: "SOIC-8",
			SupplyMinV: 2.7, SupplyMaxV: 36, CMNegV: 0.1, CMPosV: 1.5, SwingNegV: 0.05, SwingPosV: 0.1,
			VosV: 25e-6, VosDriftVK: 0.3e-6, IbA: 1e-9, IosA: 0.5e-9, AolVV: 1e6, CMRRdB: 120,
			GBWHz: 10e6, SlewVs: 5e6, NoiseVHz: 8e-9, NoiseAHz: 0.3e-12, IqA: 1.2e-3,
			TypicalOnly: []string{"noise_a_per_rthz", "vos_drift_v_per_k"}, RailToRail: RailOut,
			// The matched-only figures do not apply to an op-amp: unknown.
			GainErrorMax: Unknown(), GainDriftPPM: Unknown(), InNegV: Unknown(), InPosV: Unknown(), InternalOhm: Unknown(),
			Offer:      Offer{PriceBreaks: breaks(1.8), MinOrder: 5, Stock: 250},
			Provenance: Provenance{Source: "sample amplifier", ImportedAt: testTime},
		}, {
			Part: "TS-DA1", Maker: "Testmaker Analog", Type: MatchedAmp, Channels: 1, Package: "MSOP-8",
			SupplyMinV: 2.7, SupplyMaxV: 36, CMNegV: 0.1, CMPosV: -0.2, SwingNegV: 0.05, SwingPosV: 0.05,
			VosV: 100e-6, VosDriftVK: 1e-6, IbA: 0, IosA: 0, AolVV: 1e5, CMRRdB: 86,
			GBWHz: 1e6, SlewVs: 1e6, NoiseVHz: 40e-9, NoiseAHz: 0, IqA: 0.5e-3,
			Gains: []float64{1, 2, 5, 10}, GainErrorMax: 0.0002, GainDriftPPM: 1, InNegV: -20, InPosV: -20,
			InternalOhm: 40e3,
			Network: &MatchedNetwork{
				Elements: []MatchedElement{{"R1", 40e3, "IN-", "INV"}, {"R2", 40e3, "INV", "OUT"},
					{"R3", 40e3, "IN+", "NI"}, {"R4", 40e3, "NI", "REF"}},
				Pins: []string{"IN-", "IN+", "REF", "OUT"}, OpAmpInv: "INV", OpAmpNonInv: "NI", OpAmpOut: "OUT",
				Tolerance: 0.002, RatioTolerance: 0.0002, RatioDriftPPM: 1,
			},
			Offer:      Offer{PriceBreaks: breaks(3.2), Stock: 0},
			Provenance: Provenance{Source: "sample matched", ImportedAt: testTime},
		}},
		References: []Reference{{
			Part: "TS-REF25", Maker: "Testmaker Analog", Topology: RefSeries, Package: "SOT-23-3",
			OutputV: 2.5, Tolerance: 0.0005, DriftPPM: 3, TempMinC: -40, TempMaxC: 125,
			NoisePPV: 1.5e-6, NoiseVHz: 60e-9, SupplyMinV: 2.7, SupplyMaxV: 18, DropoutV: 0.2,
			LoadSourceA: 10e-3, LoadSinkA: 5e-3, OutputOhm: 0.05, LongTermPPM: 25, IqA: 0.9e-3,
			Offer:      Offer{PriceBreaks: breaks(2.1), MinOrder: 3, Stock: 900},
			Provenance: Provenance{Source: "sample reference", ImportedAt: testTime},
		}},
	}
}

// bigBatch returns n resistors with distinct part numbers and values.
func bigBatch(n int, prefix string) *Snapshot {
	rs := make([]Resistor, n)
	for i := range rs {
		rs[i] = Resistor{
			Part: fmt.Sprintf("%s-%06d", prefix, i), Maker: "Bulkmaker", ValueOhm: 10 + float64(i),
			ResistorGrade: ResistorGrade{Technology: "thick-film", Package: "0603", Tolerance: 0.01, TCR: 100, PowerW: 0.1, MaxVoltageV: 75},
			Offer: Offer{PriceBreaks: []PriceBreak{
				{MinQty: 1, UnitPrice: 0.1, Currency: "USD"}, {MinQty: 10, UnitPrice: 0.05, Currency: "USD"},
				{MinQty: 100, UnitPrice: 0.02, Currency: "USD"}, {MinQty: 1000, UnitPrice: 0.005, Currency: "USD"},
				{MinQty: 5000, UnitPrice: 0.002, Currency: "USD"}}, Stock: 1000 + i},
		}
	}
	return &Snapshot{Resistors: rs}
}
