package search

import (
	"errors"
	"fmt"
	"math"
	"plumb/optimize/budget"

	"plumb/optimize/cost"
)

// Sentinel errors.
var (
	// ErrInfeasible is returned (with a Result that explains why) when no
	// design in the catalog meets the spec.
	ErrInfeasible = errors.New("search: no design in the catalog meets the spec")
	// ErrProblem is returned for a requirement the search cannot work on.
	ErrProblem = errors.New("search: invalid requirement")
	// ErrNoSpec is returned by ExplainN for a result of SolveProblem, which
	// has no spec to run the budget against.
	ErrNoSpec = errors.New("search: the result has no spec; use Solve to explain a design")
)

// Family is a way of building the stage.
type Family string

// Families the search knows.
const (
	// DiscreteDifference is a difference amplifier from an op-amp and four
	// discrete resistors (R1 = R3 = Rg, R2 = R4 = Rf).
	DiscreteDifference Family = "difference-discrete"
	// NetworkDifference is a difference amplifier from an op-amp and a
	// matched four-element network.
	NetworkDifference Family = "difference-network"
	// MatchedDifference is an amplifier with matched resistors inside.
	MatchedDifference Family = "difference-matched"
	// DiscreteNonInverting is a non-inverting amplifier, G = 1 + Rf/Rg.
	DiscreteNonInverting Family = "noninverting-discrete"
	// DiscreteInverting is an inverting amplifier, G = -Rf/Rg.
	DiscreteInverting Family = "inverting-discrete"
	// DiscreteDivider is an unbuffered divider, G = Rbot/(Rtop + Rbot).
	DiscreteDivider Family = "divider-discrete"
	// DiscreteInAmp is a three-op-amp instrumentation amplifier whose
	// second stage is four discrete resistors of one value (unity gain).
	DiscreteInAmp Family = "inamp-discrete"
	// DiscreteLevelShift is a level shift Vout = m·Vin + b with Rg = Rf:
	// for b > 0 the reference summed into the non-inverting node (R1, R2,
	// R3), for b < 0 fed to the inverting node through R2 with the input
	// divided by R1, R3.
	DiscreteLevelShift Family = "level-shift-discrete"
	// NetworkInAmp is a three-op-amp instrumentation amplifier whose second
	// stage is a matched four-element network.
	NetworkInAmp Family = "inamp-network"
)

// Circuit names the stage topology of a Problem.
type Circuit string

// Circuits.
const (
	Difference   Circuit = "difference"
	NonInverting Circuit = "noninverting"
	Inverting    Circuit = "inverting"
	Divider      Circuit = "divider"
	// CurrentSense is a shunt Rs read by a difference amplifier: Gain is in
	// V/A, InMin and InMax are currents and CMMin, CMMax the shunt's low
	// side.
	CurrentSense Circuit = "current-sense"
	// InAmp is the three-op-amp instrumentation amplifier: a first stage of
	// gain 1 + 2Rf/Rg (Rf1 = Rf2 = Rf) on the difference and unity on the
	// common mode, then a difference amplifier of gain R2/R1.
	InAmp Circuit = "inamp"
	// LevelShift maps the input onto Gain·Vin + Shift with the offset
	// taken from the reference Ref.
	LevelShift Circuit = "level-shift"
)

// Method is the analysis method the limits are judged under.
type Method string

// Methods.
const (
	WorstCase  Method = "worst-case"
	RSS        Method = "rss"
	MonteCarlo Method = "monte-carlo"
)

// Limits are the error limits of a stage; a zero field is no limit.
type Limits struct {
	// GainError is the largest |gain error| at 25 °C, fraction.
	GainError float64
	// TotalGainError is the largest |gain error| over the temperature
	// range, fraction.
	TotalGainError float64
	// DriftPPM is the largest gain drift, ppm/K.
	DriftPPM float64
	// CMRRdB is the smallest common-mode rejection ratio, dB.
	CMRRdB float64
	// OffsetV is the largest output offset over temperature, V.
	OffsetV float64
	// OffsetDriftVK is the largest output offset drift, V/K.
	OffsetDriftVK float64
	// NoiseDensity is the largest output noise density, V/√Hz.
	NoiseDensity float64
	// NoiseRMS is the largest output noise over the closed-loop noise
	// bandwidth, V.
	NoiseRMS float64
}

// Problem is the requirement the search works on: what the stage must do,
// its environment and limits, and how it is built. The spec's adapter fills
// it; tests build it directly.
type Problem struct {
	Circuit  Circuit
	Families []Family // allowed families; empty means every family of the circuit
	// Gain is the target gain magnitude, V/V.
	Gain float64
	// SupplyNeg and SupplyPos are the rails, V.
	SupplyNeg, SupplyPos float64
	// InMin and InMax bound the (differential) input signal, V.
	InMin, InMax float64
	// CMMin and CMMax bound the input common-mode voltage (difference
	// circuit), V.
	CMMin, CMMax float64
	// Ref is the reference voltage at the bottom of R4 (difference) or Rg, V.
	Ref float64
	// TMin and TMax are the ambient range, °C.
	TMin, TMax float64
	// TRef is the reference (calibration) temperature, °C, usually 25.
	TRef float64
	// BandwidthHz is the smallest closed-loop bandwidth (GBW/NG).
	BandwidthHz float64
	// ZinMinOhm is the smallest input impedance.
	ZinMinOhm float64
	// LeakageA is the current the load draws from a divider's output, A.
	LeakageA float64
	// SourceOhm is the source resistance in series with each input, ohm.
	SourceOhm float64
	// LoadOhm loads a divider's output (0: none), ohm.
	LoadOhm float64
	// RMinOhm and RMaxOhm bound every resistor value (default 1 kΩ to
	// 1 MΩ, as the spec layout documents: below, dissipation and loading;
	// above, bias-current error and noise).
	RMinOhm, RMaxOhm float64
	// Derating is the usable fraction of a resistor's rated power (default
	// 0.5, common practice for film resistors).
	Derating float64
	Method   Method
	// CalGain and CalOffset remove the initial gain or offset error from
	// the budget (a one-time calibration at TRef); drift and CMRR remain.
	CalGain, CalOffset bool
	Limits             Limits
	// Channel screens the channel's limits at the ADC from the stage's
	// figures (nil: the spec has none); see budget.ChannelScreen.
	Channel *budget.ChannelScreen
	Build   cost.Build
	// SeriesPairs and ParallelPairs allow two values in series or in
	// parallel at a feedback position (Options.Combos allows both).
	SeriesPairs, ParallelPairs bool

	// Shift is a level shift's output at zero input, V; RefTol and
	// RefDrift are its reference's tolerance (fraction) and drift
	// (fraction per K).
	Shift, RefTol, RefDrift float64

	// k2 is the second-stage gain R2/R1 of an instrumentation amplifier
	// (set per sub-search; 0 outside one).
	k2 float64
}

// Defaults for a zero Problem field.
const (
	defaultRMin     = 1e3
	defaultRMax     = 1e6
	defaultDerating = 0.5
	// quantWindow is the largest ratio quantization |k/k0 - 1| a value pair
	// may have when no gain-error limit is set.
	quantWindow = 0.05
	maxPlace    = 10 // most placements of one part number per stage (in-amp: 1 + 2 + 2 + 4)
)

func (p *Problem) normalize() error {
	if p.RMinOhm == 0 {
		p.RMinOhm = defaultRMin
	}
	if p.RMaxOhm == 0 {
		p.RMaxOhm = defaultRMax
	}
	if p.Derating == 0 {
		p.Derating = defaultDerating
	}
	if p.Method == "" {
		p.Method = WorstCase
	}
	switch {
	case p.Circuit != Difference && p.Circuit != NonInverting && p.Circuit != Inverting && p.Circuit != Divider && p.Circuit != CurrentSense && p.Circuit != InAmp && p.Circuit != LevelShift:
		return fmt.Errorf("%w: circuit %q: use %q, %q, %q, %q, %q, %q or %q", ErrProblem, p.Circuit, Difference, NonInverting, Inverting, Divider, CurrentSense, InAmp, LevelShift)
	case !(p.Gain > 0) || math.IsInf(p.Gain, 0):
		return fmt.Errorf("%w: gain %g: give a positive gain magnitude", ErrProblem, p.Gain)
	case p.Circuit == NonInverting && p.Gain <= 1:
		return fmt.Errorf("%w: gain %g: a non-inverting stage with resistors needs gain above 1", ErrProblem, p.Gain)
	case p.Circuit == InAmp && p.Gain <= 1:
		return fmt.Errorf("%w: gain %g: a three-op-amp instrumentation amplifier needs gain above 1", ErrProblem, p.Gain)
	case p.Circuit == Divider && p.Gain >= 1:
		return fmt.Errorf("%w: gain %g: a divider attenuates; give a gain below 1", ErrProblem, p.Gain)
	case !(p.SupplyPos > p.SupplyNeg):
		return fmt.Errorf("%w: supply %g V to %g V: the positive rail must be above the negative", ErrProblem, p.SupplyNeg, p.SupplyPos)
	case p.TMax < p.TMin:
		return fmt.Errorf("%w: temperature range %g to %g °C is reversed", ErrProblem, p.TMin, p.TMax)
	case p.RMinOhm <= 0 || p.RMaxOhm < p.RMinOhm:
		return fmt.Errorf("%w: resistor window %g to %g ohm is empty", ErrProblem, p.RMinOhm, p.RMaxOhm)
	case p.Method != WorstCase && p.Method != RSS && p.Method != MonteCarlo:
		return fmt.Errorf("%w: method %q: use %q, %q or %q", ErrProblem, p.Method, WorstCase, RSS, MonteCarlo)
	}
	if p.Circuit == LevelShift {
		if err := p.lsCheck(); err != nil {
			return err
		}
	}
	if p.Build.Quantity == 0 {
		p.Build.Quantity = 1
	}
	if err := p.Build.Validate(); err != nil {
		return fmt.Errorf("%w: %w", ErrProblem, err)
	}
	return nil
}

// ratio is the resistor ratio Rf/Rg that gives the target gain (for the
// divider Rtop/Rbot = (1-G)/G).
func (p *Problem) ratio() float64 {
	switch p.Circuit {
	case NonInverting:
		return p.Gain - 1
	case Divider:
		return (1 - p.Gain) / p.Gain
	case LevelShift:
		return p.lsNG() - 1
	case InAmp:
		// 1 + 2Rf/Rg = G/k2.
		return (p.Gain/p.stage2Gain() - 1) / 2
	}
	return p.Gain
}

// stage2Gain is the second-stage gain of an instrumentation amplifier
// (unity unless a sub-search set it).
func (p *Problem) stage2Gain() float64 {
	if p.k2 > 0 {
		return p.k2
	}
	return 1
}

// deltaT is the worst excursion from the reference temperature:
// max(|Tmax-Tref|, |Tmin-Tref|) (domain notes §3).
func (p *Problem) deltaT() float64 {
	return math.Max(math.Abs(p.TMax-p.TRef), math.Abs(p.TMin-p.TRef))
}

// families returns the allowed families of the circuit.
func (p *Problem) families() []Family {
	var all []Family
	switch p.Circuit {
	case Difference:
		all = []Family{DiscreteDifference, NetworkDifference, MatchedDifference}
	case NonInverting:
		all = []Family{DiscreteNonInverting}
	case Inverting:
		all = []Family{DiscreteInverting}
	case Divider:
		all = []Family{DiscreteDivider}
	case InAmp:
		all = []Family{DiscreteInAmp, NetworkInAmp}
	case LevelShift:
		all = []Family{DiscreteLevelShift}
	}
	if len(p.Families) == 0 {
		return all
	}
	var out []Family
	for _, f := range all {
		for _, g := range p.Families {
			if f == g {
				out = append(out, f)
			}
		}
	}
	return out
}

// window is the largest ratio quantization a value pair may have.
func (p *Problem) window() float64 {
	w := quantWindow
	if !p.CalGain && p.Limits.GainError > 0 && p.Limits.GainError < w {
		w = p.Limits.GainError
	}
	if !p.CalGain && p.Limits.TotalGainError > 0 && p.Limits.TotalGainError < w {
		w = p.Limits.TotalGainError
	}
	return w
}

// hazardous reports voltages that safety standards treat as hazardous
// (above 60 V DC, IEC 61010-1 / IEC 62368-1, from memory).
func (p *Problem) hazardous() bool {
	for _, v := range []float64{p.SupplyNeg, p.SupplyPos, p.InMin, p.InMax, p.CMMin, p.CMMax, p.SupplyPos - p.SupplyNeg} {
		if math.Abs(v) > 60 {
			return true
		}
	}
	return false
}
