package search

import (
	"errors"
	"fmt"
	"math"
	"strings"

	"plumb/optimize/budget"
	"plumb/optimize/cost"
	"plumb/optimize/family"
)

// Sentinel errors.
var (
	// ErrInfeasible is returned (with a Result that explains why) when no
	// design in the catalog meets the spec.
	ErrInfeasible = errors.New("search: no design in the catalog meets the spec")
	// ErrProblem is returned for a requirement the search cannot work on.
	ErrProblem = errors.New("search: invalid requirement")
	// ErrCatalogLacks is returned when the spec asks the catalog for a part
	// of a kind it does not hold at all (a reference of the spec's voltage
	// for reference.part auto): like ErrInfeasible, the catalog cannot meet
	// the spec, but there is no search result to explain it.
	ErrCatalogLacks = errors.New("search: the catalog lacks a part the spec needs")
	// ErrNoSpec is returned by ExplainN for a result of SolveProblem, which
	// has no spec to run the budget against.
	ErrNoSpec = errors.New("search: the result has no spec; use Solve to explain a design")
)

// Family is a way of building the stage: a circuit family's name and how
// it is built, "-discrete" (discrete resistors), "-network" (a matched
// network from the catalog) or, for the circuit an integrated family is
// walked in, "-" and that family's name (as "difference-matched"). See
// variant.
type Family string

// Builds of a circuit besides an integrated family's part.
const (
	buildDiscrete = "discrete"
	buildNetwork  = "network"
)

// variant is the Family label of circuit f built as build.
func variant(f *family.Family, build string) Family { return Family(f.Name + "-" + build) }

// partLabel is the Family label of integrated family g's part in circuit
// c: g's own name where g is walked as a circuit of its own (Search.As
// nil), else the variant of c.
func partLabel(c, g *family.Family) Family {
	if g == c {
		return Family(g.Name)
	}
	return variant(c, g.Name)
}

// standalone reports whether f is an integrated family walked as a circuit
// of its own.
func standalone(f *family.Family) bool {
	return f != nil && f.Search.Strategy == family.Part && f.Search.As == nil
}

// Circuit names the stage topology of a Problem: a family of package
// family's registry that is searched as a circuit (not a Part family,
// which is walked in the circuit of its Search.As).
type Circuit string

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
	// Inverts: the spec's gain is negative. Only a circuit whose parts make
	// either sign (a standalone integrated family) reads it; the others'
	// sign follows from the circuit.
	Inverts bool
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
	// RefOhm is the reference source's own resistance, ohm (0: none).
	RefOhm float64
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
	// ResOffsetV is the output offset the resistors may add that the
	// channel's total error leaves room for (0: no such limit); unlike
	// Limits.OffsetV it holds with a shared reference too.
	ResOffsetV float64
	Build      cost.Build
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
	// screen, when set, are the limits the screening prunes with in place
	// of Limits: Limits loosened by the slack of a screen that may read
	// above the exact budget (see loosen).
	screen *Limits
	// fam caches the registry entry of Circuit (see family).
	fam *family.Family
}

// family returns the registry entry of the problem's circuit (nil for an
// unknown name).
func (p *Problem) family() *family.Family {
	if p.fam == nil || p.fam.Name != string(p.Circuit) {
		p.fam = family.Lookup(string(p.Circuit))
	}
	return p.fam
}

// strategy is the shape of the circuit's search space.
func (p *Problem) strategy() family.Strategy { return p.family().Search.Strategy }

// circuits lists the names of the families the search takes as a circuit.
func circuits() string {
	var names []string
	for _, f := range family.All() {
		if f.Search.Strategy != family.Part || standalone(f) {
			names = append(names, fmt.Sprintf("%q", f.Name))
		}
	}
	return strings.Join(names[:len(names)-1], ", ") + " or " + names[len(names)-1]
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
	f := p.family()
	switch {
	case f == nil || (f.Search.Strategy == family.Part && !standalone(f)):
		return fmt.Errorf("%w: circuit %q: use %s", ErrProblem, p.Circuit, circuits())
	case !(p.Gain > 0) || math.IsInf(p.Gain, 0):
		return fmt.Errorf("%w: gain %g: give a positive gain magnitude", ErrProblem, p.Gain)
	case f.Search.Ratio != nil && !(f.Search.Ratio.Of(p.Gain) > 0):
		return fmt.Errorf("%w: gain %g: family %s needs a resistor ratio above zero for it: %s", ErrProblem, p.Gain, f.Name, f.GainProblem(p.Gain))
	case !(p.SupplyPos > p.SupplyNeg):
		return fmt.Errorf("%w: supply %g V to %g V: the positive rail must be above the negative", ErrProblem, p.SupplyNeg, p.SupplyPos)
	case p.TMax < p.TMin:
		return fmt.Errorf("%w: temperature range %g to %g °C is reversed", ErrProblem, p.TMin, p.TMax)
	case p.RMinOhm <= 0 || p.RMaxOhm < p.RMinOhm:
		return fmt.Errorf("%w: resistor window %g to %g ohm is empty", ErrProblem, p.RMinOhm, p.RMaxOhm)
	case p.Method != WorstCase && p.Method != RSS && p.Method != MonteCarlo:
		return fmt.Errorf("%w: method %q: use %q, %q or %q", ErrProblem, p.Method, WorstCase, RSS, MonteCarlo)
	}
	if f.Search.Strategy == family.ShiftNetwork {
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

// ratio is the resistor ratio Rf/Rg that gives the target gain (see
// family.Ratio.Of; a level shift's is its noise gain less one).
func (p *Problem) ratio() float64 {
	f := p.family()
	switch {
	case f.Search.Strategy == family.ShiftNetwork:
		return p.lsNG() - 1
	case f.Search.Ratio != nil:
		return f.Search.Ratio.Of(p.Gain / p.stage2Gain())
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

// builds returns every Family label of the circuit: discrete, on a
// network where the family allows one, and the part of each integrated
// family walked in it.
func (p *Problem) builds() []Family {
	f := p.family()
	if standalone(f) {
		return []Family{partLabel(f, f)}
	}
	all := []Family{variant(f, buildDiscrete)}
	if f.Search.Networks {
		all = append(all, variant(f, buildNetwork))
	}
	all = append(all, p.partBuilds()...)
	return all
}

// partBuilds returns the labels of the integrated families walked in the
// circuit.
func (p *Problem) partBuilds() []Family {
	var out []Family
	for _, g := range p.partFamilies() {
		out = append(out, partLabel(p.family(), g))
	}
	return out
}

// partFamilies returns the integrated families walked in the circuit.
func (p *Problem) partFamilies() []*family.Family {
	var out []*family.Family
	for _, g := range family.All() {
		if g.Search.Strategy == family.Part && (g.Search.As == p.family() || (standalone(g) && g == p.family())) {
			out = append(out, g)
		}
	}
	return out
}

// families returns the allowed families of the circuit.
func (p *Problem) families() []Family {
	all := p.builds()
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
	l := p.screenLimits()
	if !p.CalGain && l.GainError > 0 && l.GainError < w {
		w = l.GainError
	}
	if !p.CalGain && l.TotalGainError > 0 && l.TotalGainError < w {
		w = l.TotalGainError
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
