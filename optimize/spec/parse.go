package spec

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"

	"plumb/catalog"
	"plumb/optimize/family"
)

// The YAML layout of a spec file. Every quantity is read as text so that
// its unit can be checked; see data/examples/README.md for the layout.
type rawSpec struct {
	Name            string      `yaml:"name"`
	About           string      `yaml:"about"`
	Family          string      `yaml:"family"`
	Families        []string    `yaml:"families"`
	Gain            string      `yaml:"gain"`
	Input           rawInput    `yaml:"input"`
	Output          string      `yaml:"output"`
	Supply          string      `yaml:"supply"`
	Reference       *rawRef     `yaml:"reference"`
	SourceImpedance string      `yaml:"source_impedance"`
	Load            rawLoad     `yaml:"load"`
	Temperature     rawTemp     `yaml:"temperature"`
	Limits          rawLimits   `yaml:"limits"`
	Analysis        rawAnalysis `yaml:"analysis"`
	Calibration     rawCal      `yaml:"calibration"`
	Impedance       rawWindow   `yaml:"impedance"`
	Build           rawBuild    `yaml:"build"`
	Combos          []string    `yaml:"combos"`
	Derating        string      `yaml:"derating"`
	Assumptions     string      `yaml:"assumptions"`
	ADC             *rawADC     `yaml:"adc"`
	Stages          []rawStage  `yaml:"stages"`
}

type rawInput struct {
	Differential string `yaml:"differential"`
	SingleEnded  string `yaml:"single_ended"`
	Current      string `yaml:"current"`
	CommonMode   string `yaml:"common_mode"`
}

type rawRef struct {
	Part      string `yaml:"part"`
	Voltage   string `yaml:"voltage"`
	Tolerance string `yaml:"tolerance"`
	Drift     string `yaml:"drift"`
	Impedance string `yaml:"impedance"`
}

type rawLoad struct {
	Resistance string `yaml:"resistance"`
	Leakage    string `yaml:"leakage"`
}

type rawTemp struct {
	Range     string `yaml:"range"`
	Reference string `yaml:"reference"`
}

type rawLimits struct {
	GainError      string `yaml:"gain_error"`
	CMRR           string `yaml:"cmrr"`
	GainDrift      string `yaml:"gain_drift"`
	OutputOffset   string `yaml:"output_offset"`
	OffsetDrift    string `yaml:"offset_drift"`
	NoiseRMS       string `yaml:"noise_rms"`
	NoiseDensity   string `yaml:"noise_density"`
	Bandwidth      string `yaml:"bandwidth"`
	InputImpedance string `yaml:"input_impedance"`
	TotalError     string `yaml:"total_error"`
	TotalDrift     string `yaml:"total_drift"`
}

type rawAnalysis struct {
	Method       string `yaml:"method"`
	Trials       string `yaml:"trials"`
	Seed         string `yaml:"seed"`
	Distribution string `yaml:"distribution"`
	Sigmas       string `yaml:"sigmas"`
	Yield        string `yaml:"yield"`
}

type rawCal struct {
	Gain   bool `yaml:"gain"`
	Offset bool `yaml:"offset"`
}

type rawWindow struct {
	Min string `yaml:"min"`
	Max string `yaml:"max"`
}

type rawBuild struct {
	Quantity      string `yaml:"quantity"`
	Attrition     string `yaml:"attrition"`
	PlacementCost string `yaml:"placement_cost"`
	LineItemCost  string `yaml:"line_item_cost"`
	Currency      string `yaml:"currency"`
	Stock         string `yaml:"stock"`
}

// Defaults applied when a spec leaves a field out.
const (
	DefaultTempRef  = 25.0  // °C, domain notes §3
	DefaultDerating = 0.5   // of rated power, domain notes §5
	DefaultSigmas   = 3.0   // a tolerance is 3 sigma, domain notes §4
	DefaultTrials   = 10000 // Monte Carlo trials
	DefaultSeed     = 1
)

// Bounds on the numbers of a spec that size work or memory. Each is far
// beyond what a design review needs and keeps one command's time and
// memory within what a workstation gives it; a spec past one is refused
// with the bound in the message.
const (
	// MinTrials and MaxTrials bound analysis.trials. Each trial keeps its
	// seven figures (56 bytes) for the exact order statistics and the
	// report's histograms, so a run holds at most about 56 MB of samples
	// and takes about a second per design (BenchmarkMonteCarlo100k: 0.7
	// µs a trial for a difference amplifier). At a million trials the p99.865 point rests on 1350
	// trials beyond it, a rank known to about ±3 %; more trials change no
	// verdict a review reads.
	MinTrials = 100
	MaxTrials = 1_000_000
	// MaxQuantity bounds build.quantity: ten million stages is beyond any
	// one build a selection aid prices, and keeps every piece count (per
	// stage placements x quantity x attrition) exact.
	MaxQuantity = 10_000_000
)

// Parse reads a spec from YAML. name is the file name used in errors. Every
// problem found is reported, each naming the file and the field path.
func Parse(data []byte, name string) (*Spec, error) {
	var r rawSpec
	p, err := decodeStrict(data, &r, "spec", name)
	if err != nil {
		return nil, err
	}
	s := &Spec{SourceFile: name, Name: strings.TrimSpace(r.Name), About: strings.TrimSpace(r.About)}
	if s.Name == "" {
		p.add("name", "missing; give the spec a short name")
	}
	if s.About == "" {
		p.add("about", "missing; say in one line what the spec is for")
	} else if strings.Contains(s.About, "\n") {
		p.add("about", "must be one line")
	}
	if s.Stages = parseStages(p, &r); s.Stages != nil {
		// The spec stands for its first stage while its input is read.
		r.Families, r.Gain = s.Stages[0].Families, fmt.Sprint(s.Stages[0].Gain)
	}
	switch {
	case len(r.Stages) == 0:
		parseFamilies(p, &r, s)
	case s.Stages != nil:
		s.Families = s.Stages[0].Families
	default:
		r.Gain = "1" // the stages' errors are recorded; no second one about the gain
	}
	parseSignal(p, &r, s)
	parseEnvironment(p, &r, s)
	parseLimits(p, &r.Limits, &s.Limits)
	parseADC(p, &r, s)
	parseAnalysis(p, &r, s)
	parseBuild(p, &r, s)
	switch {
	case len(p.errs) > 0:
	case s.IsChain():
		checkStages(p, s)
		s.Gain = 1
		for _, st := range s.Stages {
			s.Gain *= st.Gain
		}
	default:
		checkConsistency(p, s)
	}
	if err := p.err(); err != nil {
		return nil, err
	}
	return s, nil
}

func parseFamilies(p *problems, r *rawSpec, s *Spec) {
	switch {
	case r.Family != "" && len(r.Families) > 0:
		p.add("family", "given together with families; use one of them")
		return
	case r.Family != "":
		s.Families = []string{strings.TrimSpace(r.Family)}
	case len(r.Families) > len(KnownFamilies):
		p.add("families", "lists %d entries; there are %d families, each listed at most once", len(r.Families), len(KnownFamilies))
		return
	case len(r.Families) > 0:
		s.Families = r.Families
	default:
		p.add("family", "missing; name one of %s, or list several under families", strings.Join(KnownFamilies, ", "))
		return
	}
	for i, f := range s.Families {
		field := "family"
		if len(r.Families) > 0 {
			field = fmt.Sprintf("families[%d]", i)
		}
		if !slices.Contains(KnownFamilies, f) {
			p.add(field, "%q is not a family; use one of %s", f, strings.Join(KnownFamilies, ", "))
		} else if slices.Index(s.Families, f) != i {
			p.add(field, "%q is listed twice", f)
		}
	}
}

// CurrentInput reports whether the spec's input is a current (gain in
// V/A).
func (s *Spec) CurrentInput() bool { return len(familiesWith(s, currentInput)) > 0 }

// familiesWith returns the spec's families for which has is true.
func familiesWith(s *Spec, has func(*family.Family) bool) []*family.Family {
	var out []*family.Family
	for _, name := range s.Families {
		if f := family.Lookup(name); f != nil && has(f) {
			out = append(out, f)
		}
	}
	return out
}

// refShift reports whether a family shifts its output by the reference.
func refShift(f *family.Family) bool { return f.Reference == family.RefShift }

// currentInput reports whether a family takes a current.
func currentInput(f *family.Family) bool { return f.Input == family.Current }

// outputRange reports whether a family's spec gives an output range.
func outputRange(f *family.Family) bool { return f.OutputRange }

// familyNames lists the families' names as "a", "a or b", "a, b or c".
func familyNames(fs []*family.Family) string {
	names := make([]string, len(fs))
	for i, f := range fs {
		names[i] = f.Name
	}
	if len(names) < 2 {
		return strings.Join(names, "")
	}
	return strings.Join(names[:len(names)-1], ", ") + " or " + names[len(names)-1]
}

func parseSignal(p *problems, r *rawSpec, s *Spec) {
	in := r.Input
	given := 0
	for _, v := range []string{in.Differential, in.SingleEnded, in.Current} {
		if v != "" {
			given++
		}
	}
	if given > 1 {
		p.add("input", "give one of differential, single_ended or current, not several")
	}
	// Checks of the input, gain and output against the family are skipped
	// when the family itself is wrong: they would only repeat that error.
	famOK := !p.failed("family", "families")
	current := familiesWith(s, currentInput)
	cs := len(current) > 0
	inField := ""
	switch {
	case in.Current != "":
		inField = "input.current"
		if famOK && (!cs || len(s.Families) > 1) {
			p.add(inField, "a current input needs family %s alone", familyNames(familiesWith(&Spec{Families: KnownFamilies}, currentInput)))
		}
		s.Input = rangeField(p, inField, in.Current, uAmp)
	case in.Differential != "":
		inField = "input.differential"
		s.Differential = true
		s.Input = rangeField(p, inField, in.Differential, uVolt)
	case in.SingleEnded != "":
		inField = "input.single_ended"
		s.Input = rangeField(p, inField, in.SingleEnded, uVolt)
	default:
		p.add("input", "missing; give differential, single_ended or current with its range, e.g. ±10V")
	}
	if cs && in.Current == "" && given == 1 {
		p.add("input", "family %s takes input.current (the shunt current), e.g. 0..5A", familyNames(current))
	}
	if famOK && (in.Differential != "" || in.SingleEnded != "") {
		for _, name := range s.Families {
			f := family.Lookup(name)
			if f == nil || f.Input == family.Current {
				continue
			}
			if diff := f.Input == family.Differential; diff != s.Differential {
				want := "single_ended"
				if diff {
					want = "differential"
				}
				p.add("input", "family %s takes input.%s", f.Name, want)
			}
		}
	}
	if in.CommonMode != "" {
		s.CommonMode = rangeField(p, "input.common_mode", in.CommonMode, uVolt)
	}
	if given == 1 && !p.failed(inField) && s.Input.Min == s.Input.Max {
		p.add(inField, "range is a single value; give the span the stage must handle, e.g. -10..10V")
	}

	shifts := familiesWith(s, outputRange)
	ls := len(shifts) > 0
	if ls && len(s.Families) > 1 {
		p.add("families", "%s derives its gain from the ranges; list it alone", familyNames(shifts))
	}
	if r.Output != "" {
		if famOK && !ls {
			p.add("output", "only a level-shift spec gives an output range; others give gain")
		}
		s.Output = rangeField(p, "output", r.Output, uVolt)
	}
	switch {
	case ls && r.Gain != "":
		p.add("gain", "a %s gain follows from input and output; remove gain or the output range", familyNames(shifts))
	case ls && r.Output == "":
		p.add("output", "missing; a %s spec maps the input range onto an output range, e.g. 0..2.5V", familyNames(shifts))
	case ls:
		if s.Input.Span() > 0 && !p.failed("output") {
			s.Gain = s.Output.Span() / s.Input.Span()
			s.Offset = s.Output.Min - s.Gain*s.Input.Min
		}
	case r.Gain == "":
		if famOK {
			p.add("gain", "missing; give the target gain, e.g. 10 or -2")
		}
	case !famOK:
		// Without a family the unit of the gain is open: V/V, or V/A for
		// current sense.
		g, err := parseQuantity(r.Gain, uGain)
		if err != nil {
			if g, err = parseQuantity(r.Gain, uTransR); err != nil {
				p.add("gain", "%v", err)
			}
		}
		s.Gain = g
	default:
		u := uGain
		if cs {
			u = uTransR
		}
		s.Gain = field(p, "gain", r.Gain, u)
		if s.Gain == 0 && !p.failed("gain") {
			p.add("gain", "is zero; a stage needs a non-zero gain")
		}
	}
	for _, name := range s.Families {
		if f := family.Lookup(name); f != nil && s.Gain != 0 {
			if msg := f.GainProblem(s.Gain); msg != "" {
				p.add("gain", "%g does not suit family %s: %s", s.Gain, f.Name, msg)
			}
		}
	}
}

func parseEnvironment(p *problems, r *rawSpec, s *Spec) {
	if r.Supply == "" {
		p.add("supply", "missing; give the rails, e.g. ±15V or 0..5V")
	} else {
		s.Supply = rangeField(p, "supply", r.Supply, uVolt)
		switch {
		case p.failed("supply"):
		case s.Supply.Min == s.Supply.Max && s.Supply.Max > 0:
			s.Supply.Min = 0 // "5V" is a single supply against ground
		case s.Supply.Min == s.Supply.Max:
			p.add("supply", "%q gives no supply span; write e.g. ±15V or 0..5V", r.Supply)
		case s.Supply.Min > 0 || s.Supply.Max < 0:
			p.add("supply", "%q does not include ground (0 V) between its rails; write e.g. 0..5V or ±15V", r.Supply)
		}
	}
	if ref := r.Reference; ref != nil {
		s.Reference = &Reference{}
		if ref.Voltage == "" {
			p.add("reference.voltage", "missing; give the reference voltage, e.g. 2.5V")
		} else {
			s.Reference.V = field(p, "reference.voltage", ref.Voltage, uVolt)
		}
		if ref.Tolerance != "" {
			s.Reference.Tolerance = magnitude(p, "reference.tolerance", ref.Tolerance, datasheetMax, fractionField(p, "reference.tolerance", ref.Tolerance))
		}
		if ref.Drift != "" {
			s.Reference.Drift = magnitude(p, "reference.drift", ref.Drift, datasheetMax, tempcoField(p, "reference.drift", ref.Drift))
		}
		if ref.Impedance != "" {
			s.Reference.SourceOhm = magnitude(p, "reference.impedance", ref.Impedance, aResistance, field(p, "reference.impedance", ref.Impedance, uOhm))
		}
		parseRefPart(p, ref, s.Reference)
	} else if shifts := familiesWith(s, refShift); len(shifts) > 0 {
		p.add("reference", "missing; family %s takes its offset from a reference: give reference.voltage (and its tolerance and drift)", familyNames(shifts))
	}
	if r.SourceImpedance != "" {
		s.SourceOhm = magnitude(p, "source_impedance", r.SourceImpedance, aResistance, field(p, "source_impedance", r.SourceImpedance, uOhm))
	}
	if r.Load.Resistance != "" {
		s.LoadOhm = field(p, "load.resistance", r.Load.Resistance, uOhm)
		if s.LoadOhm <= 0 && !p.failed("load.resistance") {
			p.add("load.resistance", "must be positive; leave it out for an unloaded output")
		}
	}
	if r.Load.Leakage != "" {
		s.LeakageA = field(p, "load.leakage", r.Load.Leakage, uAmp)
	}
	s.TempRef = DefaultTempRef
	if r.Temperature.Reference != "" {
		s.TempRef = field(p, "temperature.reference", r.Temperature.Reference, uCelsius)
	}
	if r.Temperature.Range == "" {
		p.add("temperature.range", "missing; give the operating range, e.g. -40..85C")
	} else {
		s.Temp = rangeField(p, "temperature.range", r.Temperature.Range, uCelsius)
		switch {
		case p.failed("temperature.range"):
		case s.Temp.Min < -273.15:
			p.add("temperature.range", "%q goes below absolute zero (-273.15 C)", r.Temperature.Range)
		case singleValue(r.Temperature.Range, uCelsius):
			// "25C" alone is likely a slip: it would give a 0 K excursion
			// and hide every drift. Two equal ends ("25..25C") are written
			// on purpose, to evaluate at one temperature only.
			p.add("temperature.range", "%q is a single temperature; a range needs two ends, e.g. -40..85C", r.Temperature.Range)
		}
		if !p.failed("temperature.range", "temperature.reference") && (s.TempRef < s.Temp.Min || s.TempRef > s.Temp.Max) {
			p.add("temperature.reference", "%g C lies outside the range %g..%g C; give a reference inside the operating range, usually 25C", s.TempRef, s.Temp.Min, s.Temp.Max)
		}
	}
	if r.Impedance.Min != "" {
		s.Impedance.Min = field(p, "impedance.min", r.Impedance.Min, uOhm)
	}
	if r.Impedance.Max != "" {
		s.Impedance.Max = field(p, "impedance.max", r.Impedance.Max, uOhm)
	}
	if !p.failed("impedance") && (s.Impedance.Min < 0 || (s.Impedance.Max > 0 && s.Impedance.Min > s.Impedance.Max)) {
		p.add("impedance", "min %g ohm is above max %g ohm (or negative)", s.Impedance.Min, s.Impedance.Max)
	}
	s.Derating = DefaultDerating
	if r.Derating != "" {
		s.Derating = fractionField(p, "derating", r.Derating)
		if !p.failed("derating") && (s.Derating <= 0 || s.Derating > 1) {
			p.add("derating", "%q must lie between 0 %% and 100 %% of rated power", r.Derating)
		}
	}
	switch s.Assumptions = strings.TrimSpace(r.Assumptions); s.Assumptions {
	case "":
		s.Assumptions = AssumeDefaults
	case AssumeDefaults, AssumeStrict:
	default:
		p.add("assumptions", "%q is not a choice; use defaults (unknown catalog figures are taken at their documented defaults) or strict (no limit is met on an unknown figure)", r.Assumptions)
	}
	if len(r.Combos) > 2 {
		p.add("combos", "lists %d entries; give series, parallel or both, each once", len(r.Combos))
	} else {
		for i, c := range r.Combos {
			if c != Series && c != Parallel {
				p.add(fmt.Sprintf("combos[%d]", i), "%q is not a combination; use series or parallel", c)
			} else if i > 0 && r.Combos[0] == c {
				p.add(fmt.Sprintf("combos[%d]", i), "%q is listed twice", c)
			}
		}
	}
	s.Combos = r.Combos
}

func parseLimits(p *problems, r *rawLimits, l *Limits) {
	given := false
	opt := func(path, text string, parse func(string) float64) float64 {
		if text == "" {
			return 0
		}
		given = true
		n := len(p.errs)
		v := parse(text)
		if len(p.errs) == n && v <= 0 {
			p.add(path, "%q must be positive; leave the limit out to have none", text)
		}
		return v
	}
	q := func(path string, u unit) func(string) float64 {
		return func(t string) float64 { return field(p, path, t, u) }
	}
	l.GainError = opt("limits.gain_error", r.GainError, func(t string) float64 { return fractionField(p, "limits.gain_error", t) })
	l.CMRRdB = opt("limits.cmrr", r.CMRR, q("limits.cmrr", uDB))
	l.GainDrift = opt("limits.gain_drift", r.GainDrift, func(t string) float64 { return tempcoField(p, "limits.gain_drift", t) })
	l.OutputOffsetV = opt("limits.output_offset", r.OutputOffset, q("limits.output_offset", uVolt))
	l.OffsetDriftVK = opt("limits.offset_drift", r.OffsetDrift, q("limits.offset_drift", uVPerK))
	l.NoiseRMSV = opt("limits.noise_rms", r.NoiseRMS, q("limits.noise_rms", uVolt))
	l.NoiseDensity = opt("limits.noise_density", r.NoiseDensity, q("limits.noise_density", uNoise))
	l.BandwidthHz = opt("limits.bandwidth", r.Bandwidth, q("limits.bandwidth", uHertz))
	l.InputImpedance = opt("limits.input_impedance", r.InputImpedance, q("limits.input_impedance", uOhm))
	if !given && r.TotalError == "" && r.TotalDrift == "" {
		p.add("limits", "none given; a spec needs at least one limit, e.g. gain_error: 0.1%%")
	}
}

func parseAnalysis(p *problems, r *rawSpec, s *Spec) {
	a := &s.Analysis
	a.Method = WorstCase
	if r.Analysis.Method != "" {
		a.Method = r.Analysis.Method
	}
	if a.Method != WorstCase && a.Method != RSS && a.Method != MonteCarlo {
		p.add("analysis.method", "%q is not a method; use worst-case, rss or monte-carlo", a.Method)
	}
	a.Trials, a.Seed, a.Distribution, a.Sigmas = DefaultTrials, DefaultSeed, Normal, DefaultSigmas
	if r.Analysis.Trials != "" {
		a.Trials = count(p, "analysis.trials", r.Analysis.Trials, MinTrials, MaxTrials, "trials")
	}
	if r.Analysis.Seed != "" {
		n, err := strconv.ParseUint(r.Analysis.Seed, 10, 64)
		if err != nil {
			p.add("analysis.seed", "%q must be a non-negative whole number", r.Analysis.Seed)
		}
		a.Seed = n
	}
	if r.Analysis.Distribution != "" {
		a.Distribution = r.Analysis.Distribution
		if a.Distribution != Uniform && a.Distribution != Normal {
			p.add("analysis.distribution", "%q is not a distribution; use uniform or normal", a.Distribution)
		}
	}
	if r.Analysis.Sigmas != "" {
		a.Sigmas = field(p, "analysis.sigmas", r.Analysis.Sigmas, uPlain)
		if !p.failed("analysis.sigmas") && (a.Sigmas < 1 || a.Sigmas > 6) {
			p.add("analysis.sigmas", "%q must lie between 1 and 6 (a tolerance stands for this many standard deviations)", r.Analysis.Sigmas)
		}
	}
	if r.Analysis.Yield != "" {
		a.Yield = fractionField(p, "analysis.yield", r.Analysis.Yield)
		if !p.failed("analysis.yield") && (a.Yield <= 0 || a.Yield >= 1) {
			p.add("analysis.yield", "%q must lie between 0%% and 100%%, e.g. 99%%", r.Analysis.Yield)
		}
		if a.Method != MonteCarlo && !p.failed("analysis.method") {
			p.add("analysis.yield", "a yield target needs method monte-carlo")
		}
	}
	s.Calibrate = Calibration(r.Calibration)
	if s.Calibrate.Gain && r.Limits.GainError == "" && r.Limits.GainDrift == "" {
		p.add("calibration.gain", "set, but limits give neither gain_error nor gain_drift, so it changes nothing; add a gain limit or remove it")
	}
	if s.Calibrate.Offset && r.Limits.OutputOffset == "" && r.Limits.OffsetDrift == "" {
		p.add("calibration.offset", "set, but limits give neither output_offset nor offset_drift; add an offset limit or remove it")
	}
}

func parseBuild(p *problems, r *rawSpec, s *Spec) {
	b := &s.Build
	b.Quantity, b.Stock, b.Currency = 1, "flag", strings.TrimSpace(r.Build.Currency)
	if r.Build.Quantity != "" {
		b.Quantity = count(p, "build.quantity", r.Build.Quantity, 1, MaxQuantity, "stages")
	}
	if r.Build.Attrition != "" {
		b.Attrition = fractionField(p, "build.attrition", r.Build.Attrition)
		if !p.failed("build.attrition") && (b.Attrition < 0 || b.Attrition >= 1) {
			p.add("build.attrition", "%q must lie between 0%% and 100%%", r.Build.Attrition)
		}
	}
	money := func(path, t string) float64 {
		if t == "" {
			return 0
		}
		v, err := strconv.ParseFloat(strings.TrimSpace(t), 64)
		if err != nil || v < 0 || math.IsInf(v, 0) {
			p.add(path, "%q must be a non-negative amount in the build currency, e.g. 0.02", t)
		}
		return v
	}
	b.PlacementCost = money("build.placement_cost", r.Build.PlacementCost)
	b.LineItemCost = money("build.line_item_cost", r.Build.LineItemCost)
	if b.Currency != "" && !catalog.IsCurrencyCode(b.Currency) {
		p.add("build.currency", "%q is not an ISO 4217 currency code; write the three capital letters, such as EUR, USD or GBP", b.Currency)
	}
	if r.Build.Stock != "" {
		b.Stock = r.Build.Stock
		if b.Stock != "exclude" && b.Stock != "flag" {
			p.add("build.stock", "%q is not a stock policy; use exclude or flag", b.Stock)
		}
	}
}

// checkConsistency finds contradictions between fields that each parsed.
func checkConsistency(p *problems, s *Spec) {
	if s.Differential || len(familiesWith(s, currentInput)) > 0 {
		// Each input pin of a differential stage sees Vcm ± Vdiff/2.
	} else if s.CommonMode != (Range{}) {
		p.add("input.common_mode", "given for a single-ended stage; common mode belongs to differential and current-sense inputs")
	}
	out := s.OutputSwing()
	if out.Max > s.Supply.Max || out.Min < s.Supply.Min {
		p.add("supply", "the output must reach %.4g..%.4g V (gain %g over the input range) but the rails are %g..%g V; widen the supply or lower the gain",
			out.Min, out.Max, s.Gain, s.Supply.Min, s.Supply.Max)
	}
	if at := familiesWith(s, func(f *family.Family) bool { return f.InputAtPin }); len(at) > 0 && (s.Input.Max > s.Supply.Max || s.Input.Min < s.Supply.Min) {
		p.add("input.single_ended", "%g..%g V reaches beyond the rails %g..%g V, and the input pin of family %s's amplifier sees it directly",
			s.Input.Min, s.Input.Max, s.Supply.Min, s.Supply.Max, familyNames(at))
	}
	if s.Reference != nil {
		referred := familiesWith(&Spec{Families: KnownFamilies}, func(f *family.Family) bool { return f.Reference != family.RefNone })
		for _, f := range familiesWith(s, func(f *family.Family) bool { return f.Reference == family.RefNone }) {
			p.add("reference", "given, but family %s has no reference input here; use %s for a referred output", f.Name, familyNames(referred))
		}
	}
	if s.Reference != nil && (s.Reference.V > s.Supply.Max || s.Reference.V < s.Supply.Min) {
		p.add("reference.voltage", "%g V lies outside the rails %g..%g V", s.Reference.V, s.Supply.Min, s.Supply.Max)
	}
	checkADC(p, s)
}

// OutputSwing is the ideal output range: gain times the input range plus the
// offset (level-shift) or the reference voltage (other stages with a
// reference).
func (s *Spec) OutputSwing() Range {
	off := s.Offset
	if s.Reference != nil && len(familiesWith(s, refShift)) == 0 {
		off = s.Reference.V
	}
	a, b := s.Gain*s.Input.Min+off, s.Gain*s.Input.Max+off
	return Range{Min: math.Min(a, b), Max: math.Max(a, b)}
}

// count reads a whole number from lo to hi (what names what it counts),
// recording a problem under path when it is not one.
func count(p *problems, path, text string, lo, hi int, what string) int {
	n, err := strconv.Atoi(strings.TrimSpace(text))
	switch {
	case err != nil && errors.Is(err, strconv.ErrRange) && !strings.HasPrefix(strings.TrimSpace(text), "-"), err == nil && n > hi:
		p.add(path, "%q is more than %d %s, the most plumb runs; give at most %d", text, hi, what, hi)
	case err != nil:
		p.add(path, "%q must be a whole number of %s, from %d to %d", text, what, lo, hi)
	case n < lo:
		p.add(path, "%q is fewer than %d %s; give at least %d", text, lo, what, lo)
	default:
		return n
	}
	return lo
}

// field reads one quantity, recording a problem under path on failure.
func field(p *problems, path, text string, u unit) float64 {
	v, err := parseQuantity(text, u)
	if err != nil {
		p.add(path, "%v", err)
	}
	return v
}

func rangeField(p *problems, path, text string, u unit) Range {
	lo, hi, err := parseRange(text, u)
	if err != nil {
		p.add(path, "%v", err)
	}
	return Range{Min: lo, Max: hi}
}

func fractionField(p *problems, path, text string) float64 {
	v, err := parseFraction(text)
	if err != nil {
		p.add(path, "%v", err)
	}
	return v
}

func tempcoField(p *problems, path, text string) float64 {
	v, err := parsePPMPerK(text)
	if err != nil {
		p.add(path, "%v", err)
	}
	return v
}

// What a figure that must not be negative is, for the message.
const (
	datasheetMax = "a datasheet maximum"
	rating       = "a rating"
	aResistance  = "a resistance"
)

// magnitude returns v, the figure read from text at path, refusing it if it
// is negative. Datasheet maximums, ratings and resistances are magnitudes:
// a sign would cancel terms of an error budget that should add.
func magnitude(p *problems, path, text, what string, v float64) float64 {
	if v < 0 && !p.failed(path) {
		p.add(path, "%q must not be negative: %s is a magnitude; write %s", text, what, unsigned(text))
	}
	return v
}

// optMagnitude reads an optional figure that must not be negative into
// dst; an empty text leaves dst as it is.
func optMagnitude(p *problems, path, text, what string, u unit, dst *float64) {
	if text != "" {
		*dst = magnitude(p, path, text, what, field(p, path, text, u))
	}
}

// unsigned is text without its leading minus sign.
func unsigned(text string) string {
	return strings.TrimLeft(strings.TrimSpace(text), "-\u2212 ")
}
