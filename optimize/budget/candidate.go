package budget

import (
	"fmt"
	"math"
	"slices"

	"plumb/catalog"
	"plumb/optimize/assume"
	"plumb/optimize/spec"
)

// Fig holds one resistor position's figures in SI units, as the evaluator
// uses them. A series or parallel pair is folded into one Fig by FoldPair.
type Fig struct {
	// Label names the part for the budget ("XR-10K0-B" or "inline").
	Label string  `json:"label"`
	Ohm   float64 `json:"ohm"`
	// Tolerance is a fraction; TCR is the ± tempco box per K (25e-6).
	Tolerance         float64 `json:"tolerance"`
	TCR               float64 `json:"tcr_per_k"`
	PowerW            float64 `json:"power_w"`
	MaxVoltageV       float64 `json:"max_voltage_v"`
	ThermalResistance float64 `json:"thermal_resistance_k_per_w"`
	LoadLife          float64 `json:"load_life"`
	// Network > 0 groups the positions whose elements sit in one network;
	// RatioTolerance and TCRTracking are that network's matching figures.
	Network        int     `json:"network"`
	RatioTolerance float64 `json:"ratio_tolerance"`
	TCRTracking    float64 `json:"tcr_tracking_per_k"`
}

// Candidate is a concrete design in the form the search builds: one Fig per
// position of the evaluator (Evaluator.Positions order) and the amplifier.
type Candidate struct {
	Figs []Fig
	Amp  *catalog.Amplifier
	// MatchedGain is the chosen gain of a matched amplifier.
	MatchedGain float64
}

// FoldPair reduces a series or parallel pair to one equivalent Fig.
//
// Value: R1 + R2 in series, R1 R2/(R1 + R2) in parallel. Tolerance and TCR:
// the larger of the two, because the fractional change of a sum (or of a
// parallel combination) of resistors is a weighted mean of the parts'
// fractional changes (weights R_i/(R1+R2) in series, Req/R_i in parallel,
// summing to one either way), so it never exceeds the largest. Power and
// voltage: the pair is rated where its first element reaches its rating;
// in series element i takes the share R_i/Req of the voltage and power, in
// parallel every element sees the full voltage and the share Req/R_i of
// the power.
func FoldPair(pair string, a, b Fig) Fig {
	f := a
	f.Label = a.Label + "+" + b.Label
	f.Tolerance = math.Max(a.Tolerance, b.Tolerance)
	f.TCR = math.Max(a.TCR, b.TCR)
	f.LoadLife = math.Max(a.LoadLife, b.LoadLife)
	f.ThermalResistance = math.Max(a.ThermalResistance, b.ThermalResistance)
	f.RatioTolerance = math.Max(a.RatioTolerance, b.RatioTolerance)
	f.TCRTracking = math.Max(a.TCRTracking, b.TCRTracking)
	if a.Network != b.Network {
		f.Network = 0 // a pair across networks is matched to neither
	}
	if pair == spec.Series {
		f.Ohm = a.Ohm + b.Ohm
		f.PowerW = minRated(a.PowerW*f.Ohm/a.Ohm, b.PowerW*f.Ohm/b.Ohm, a.PowerW, b.PowerW)
		f.MaxVoltageV = minRated(a.MaxVoltageV*f.Ohm/a.Ohm, b.MaxVoltageV*f.Ohm/b.Ohm, a.MaxVoltageV, b.MaxVoltageV)
	} else {
		f.Ohm = a.Ohm * b.Ohm / (a.Ohm + b.Ohm)
		f.PowerW = minRated(a.PowerW*a.Ohm/f.Ohm, b.PowerW*b.Ohm/f.Ohm, a.PowerW, b.PowerW)
		f.MaxVoltageV = minRated(a.MaxVoltageV, b.MaxVoltageV, a.MaxVoltageV, b.MaxVoltageV)
	}
	return f
}

// minRated is min(x, y), or 0 (unknown) when either rating ra, rb is unknown.
func minRated(x, y, ra, rb float64) float64 {
	if ra == 0 || rb == 0 {
		return 0
	}
	return math.Min(x, y)
}

// FigOf converts a resolved design element to a Fig; network names map to
// group numbers through groups (filled as new networks appear).
func FigOf(e spec.Element, groups map[string]int) Fig {
	f := Fig{Label: e.Part, Ohm: e.Ohm, Tolerance: e.Tolerance, TCR: e.TCR, PowerW: e.PowerW,
		MaxVoltageV: e.MaxVoltageV, ThermalResistance: e.ThermalResistance, LoadLife: e.LoadLife}
	if e.Network != "" {
		g, ok := groups[e.Network]
		if !ok {
			g = len(groups) + 1
			groups[e.Network] = g
		}
		f.Label = fmt.Sprintf("%s#%d", e.Network, e.Index)
		f.Network, f.RatioTolerance, f.TCRTracking = g, e.RatioTolerance, e.TCRTracking
	}
	if f.Label == "" {
		f.Label = "inline"
	}
	return f
}

// StrappedFigs returns the figures of the positions of a strapped design:
// each element of amplifier a's matched network named in positions, as one
// network (Network 1) with the network's absolute tolerance, its ratio
// tolerance and its ratio tracking, so that the budget's network model
// (a common shift, and each element within ± half the ratio tolerance of
// it) is the model package strap propagates. A figure the catalog does not
// give is an error: the strapped budget rests on all three.
func StrappedFigs(a *catalog.Amplifier, positions []string) ([]Fig, error) {
	n := a.Network
	if n == nil {
		return nil, fmt.Errorf("%s has no matched network in the catalog", a.Part)
	}
	for _, f := range []struct {
		v    float64
		what string
	}{{n.Tolerance, "absolute tolerance"}, {n.RatioTolerance, "ratio tolerance"}, {n.RatioDriftPPM, "ratio tracking"}} {
		if math.IsNaN(f.v) || f.v < 0 {
			return nil, fmt.Errorf("%s: the network's %s is not given; add it to the catalog entry", a.Part, f.what)
		}
	}
	figs := make([]Fig, 0, len(positions))
	for _, pos := range positions {
		k := slices.IndexFunc(n.Elements, func(e catalog.MatchedElement) bool { return e.Name == pos })
		if k < 0 {
			return nil, fmt.Errorf("%s: the strapped circuit has position %s, which its network does not list", a.Part, pos)
		}
		track := n.RatioDriftPPM * 1e-6
		// The catalog records no absolute tempco (assume.StrappedTCR).
		strappedTCR, _ := assume.StrappedTCR(a.Part)
		figs = append(figs, Fig{Label: a.Part + " " + pos, Ohm: n.Elements[k].Ohms,
			Tolerance: math.Max(n.Tolerance, n.RatioTolerance/2), TCR: math.Max(strappedTCR, track/2),
			Network: 1, RatioTolerance: n.RatioTolerance, TCRTracking: track})
	}
	return figs, nil
}
