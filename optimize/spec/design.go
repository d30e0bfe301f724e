package spec

import (
	"fmt"
	"os"
	"plumb/optimize/assume"
	"slices"
	"sort"
	"strings"

	"plumb/catalog"
	"plumb/optimize/family"
	"plumb/optimize/strap"
)

// Options are the circuit variants a design chooses (see family.Options).
type Options struct {
	// RefDivider drives the reference of a difference amplifier through a
	// divider Ra/Rb from vrefsrc instead of a stiff source.
	RefDivider bool `json:"ref_divider" yaml:"ref_divider"`
	// Buffer puts a follower after a divider.
	Buffer bool `json:"buffer" yaml:"buffer"`
	// OffsetToInverting feeds the level-shift offset into the inverting
	// input instead of the non-inverting one.
	OffsetToInverting bool `json:"offset_to_inverting" yaml:"offset_to_inverting"`
	// Part is the circuit inside the design's amplifier as its strapping
	// ties it, for a family whose part is strapped (Resolve sets it from
	// AmplifierChoice.Strapping and the part's network).
	Part family.PartCircuit `json:"-" yaml:"-"`
}

// Netlist returns the netlist options the design's choices select (the
// spec's source, reference and load impedances add the others).
func (o Options) Netlist() family.Options {
	return family.Options{RefDivider: o.RefDivider, Buffer: o.Buffer, OffsetToInverting: o.OffsetToInverting, Part: o.Part}
}

// strapped reports whether family name's part makes its gain by a
// strapping of its pins (family.Search.Strappings).
func strapped(name string) bool {
	f := family.Lookup(name)
	return f != nil && f.Search.Strappings
}

// integrated reports whether family name is one catalog part with its
// resistors inside (no positions).
func integrated(name string) bool {
	f := family.Lookup(name)
	return f != nil && f.Integrated()
}

// amplified reports whether a design of family name with options o has an
// amplifier (an unknown family is taken to have one).
func amplified(name string, o Options) bool {
	f := family.Lookup(name)
	return f == nil || f.Amplified(o.Netlist())
}

// Element is one physical resistor with its figures in SI units. For an
// element of a network, Network names it and RatioTolerance and TCRTracking
// hold the matching figures.
type Element struct {
	Part    string  `json:"part,omitempty"`
	Network string  `json:"network,omitempty"`
	Index   int     `json:"element,omitempty"` // 1-based element of Network
	Ohm     float64 `json:"ohm"`
	// Tolerance is a fraction; TCR is per K as a fraction (25e-6 for 25 ppm/K).
	Tolerance         float64 `json:"tolerance"`
	TCR               float64 `json:"tcr_per_k"`
	PowerW            float64 `json:"power_w"`
	MaxVoltageV       float64 `json:"max_voltage_v"`
	ThermalResistance float64 `json:"thermal_resistance_k_per_w,omitempty"`
	LoadLife          float64 `json:"load_life,omitempty"`
	RatioTolerance    float64 `json:"ratio_tolerance,omitempty"`
	TCRTracking       float64 `json:"tcr_tracking_per_k,omitempty"`
	// Resolved is true once the figures are known (inline or from the catalog).
	Resolved bool `json:"-"`
}

// Pair kinds for a position built from two resistors.
const (
	Single   = ""
	Series   = "series"
	Parallel = "parallel"
)

// Position is one resistor position of a circuit (R1, Rf, ...), filled by
// one element or a series or parallel pair.
type Position struct {
	Name     string    `json:"name"`
	Pair     string    `json:"pair,omitempty"`
	Elements []Element `json:"elements"`
}

// Ohm is the position's nominal resistance: the element, the sum of a series
// pair or the parallel combination.
func (p *Position) Ohm() float64 {
	switch {
	case len(p.Elements) == 1:
		return p.Elements[0].Ohm
	case p.Pair == Series:
		return p.Elements[0].Ohm + p.Elements[1].Ohm
	default:
		a, b := p.Elements[0].Ohm, p.Elements[1].Ohm
		return a * b / (a + b)
	}
}

// AmplifierChoice is the design's amplifier: a part number or inline
// figures, and for a matched amplifier the chosen gain or, for a strapped
// one, the strapping (its pin connections, package strap's text form).
type AmplifierChoice struct {
	Part      string            `json:"part,omitempty"`
	Gain      float64           `json:"gain,omitempty"`
	Strapping string            `json:"strapping,omitempty"`
	Amp       catalog.Amplifier `json:"figures"`
	// Resolved is true once the figures are known.
	Resolved bool `json:"-"`
}

// Design is a concrete stage: a family, its options, a part at every
// position and the amplifier.
type Design struct {
	Name      string          `json:"name,omitempty"`
	Family    string          `json:"family"`
	Options   Options         `json:"options"`
	Positions []Position      `json:"positions"` // sorted by name
	Amplifier AmplifierChoice `json:"amplifier"`
	// Reference is the catalog reference the design uses when its spec
	// has the search pick one (nil: the spec's figures).
	Reference  *DesignReference `json:"reference,omitempty"`
	SourceFile string           `json:"-"`
	// Assumptions are the figures of the design's catalog parts that the
	// catalog does not give, taken at their documented defaults when
	// Resolve looked the parts up.
	Assumptions []assume.Assumption `json:"assumptions,omitempty"`
	// Stages are the designs of a chain's stages, first to last (for a
	// spec with stages); the design's own family, positions and amplifier
	// are then empty.
	Stages []*Design `json:"stages,omitempty"`
}

// IsChain reports whether the design lists stages.
func (d *Design) IsChain() bool { return len(d.Stages) > 0 }

// Position returns the named position or nil.
func (d *Design) Position(name string) *Position {
	for i := range d.Positions {
		if d.Positions[i].Name == name {
			return &d.Positions[i]
		}
	}
	return nil
}

// The YAML layout of a design file.
type rawDesign struct {
	Name      string                 `yaml:"name,omitempty"`
	Family    string                 `yaml:"family,omitempty"`
	Options   Options                `yaml:"options,omitempty"`
	Positions map[string]rawPosition `yaml:"positions,omitempty"`
	Amplifier rawAmp                 `yaml:"amplifier,omitempty"`
	Reference *rawDesignRef          `yaml:"reference,omitempty"`
	Stages    []rawDesign            `yaml:"stages,omitempty"`
}

type rawElement struct {
	Part              string `yaml:"part,omitempty"`
	Network           string `yaml:"network,omitempty"`
	Element           int    `yaml:"element,omitempty"`
	Value             string `yaml:"value,omitempty"`
	Tolerance         string `yaml:"tolerance,omitempty"`
	TCR               string `yaml:"tcr,omitempty"`
	Power             string `yaml:"power,omitempty"`
	MaxVoltage        string `yaml:"max_voltage,omitempty"`
	ThermalResistance string `yaml:"thermal_resistance,omitempty"`
	LoadLife          string `yaml:"load_life,omitempty"`
	RatioTolerance    string `yaml:"ratio_tolerance,omitempty"`
	TCRTracking       string `yaml:"tcr_tracking,omitempty"`
}

type rawPosition struct {
	rawElement `yaml:",inline"`
	Series     []rawElement `yaml:"series,omitempty"`
	Parallel   []rawElement `yaml:"parallel,omitempty"`
}

type rawAmp struct {
	Part      string `yaml:"part,omitempty"`
	Type      string `yaml:"type,omitempty"`
	Gain      string `yaml:"gain,omitempty"`
	Strapping string `yaml:"strapping,omitempty"`
	Vos       string `yaml:"vos,omitempty"`
	VosDrift  string `yaml:"vos_drift,omitempty"`
	Ib        string `yaml:"ib,omitempty"`
	Ios       string `yaml:"ios,omitempty"`
	Aol       string `yaml:"aol,omitempty"`
	CMRR      string `yaml:"cmrr,omitempty"`
	GBW       string `yaml:"gbw,omitempty"`
	Noise     string `yaml:"noise,omitempty"`
	CurNoise  string `yaml:"current_noise,omitempty"`
	CMNeg     string `yaml:"cm_neg,omitempty"`
	CMPos     string `yaml:"cm_pos,omitempty"`
	SwingNeg  string `yaml:"swing_neg,omitempty"`
	SwingPos  string `yaml:"swing_pos,omitempty"`
	SupplyMax string `yaml:"supply_max,omitempty"`
	GainError string `yaml:"gain_error,omitempty"`
	GainDrift string `yaml:"gain_drift,omitempty"`
	Internal  string `yaml:"internal_resistance,omitempty"`
	InNeg     string `yaml:"in_neg,omitempty"`
	InPos     string `yaml:"in_pos,omitempty"`
}

// LoadDesign reads a design file.
func LoadDesign(path string) (*Design, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("design %s: %w", path, err)
	}
	return ParseDesign(data, path)
}

// ParseDesign reads a design from YAML; name is the file name used in errors.
func ParseDesign(data []byte, name string) (*Design, error) {
	var r rawDesign
	p, err := decodeStrict(data, &r, "design", name)
	if err != nil {
		return nil, err
	}
	if len(r.Stages) > 0 {
		return parseChainDesign(p, &r, name)
	}
	d := parseStageDesign(p, &r, name)
	if err := p.err(); err != nil {
		return nil, err
	}
	return d, nil
}

// parseChainDesign reads a design that lists stages: each stage is a
// one-stage design (family, options, positions, amplifier, reference)
// under stages[i], its errors located there.
func parseChainDesign(p *problems, r *rawDesign, name string) (*Design, error) {
	for _, f := range []struct {
		name  string
		given bool
	}{{"family", r.Family != ""}, {"options", r.Options != (Options{})}, {"positions", len(r.Positions) > 0},
		{"amplifier", r.Amplifier != (rawAmp{})}, {"reference", r.Reference != nil}} {
		if f.given {
			p.add(f.name, "given together with stages; a chain's design gives it per stage, under stages")
		}
	}
	if len(r.Stages) != ChainStages {
		p.add("stages", "lists %d stages; a chain's design takes %d (one design per stage of the spec, first to last)", len(r.Stages), ChainStages)
	}
	d := &Design{Name: r.Name, SourceFile: name}
	for i := range r.Stages {
		rs := &r.Stages[i]
		if len(rs.Stages) > 0 {
			p.add(fmt.Sprintf("stages[%d].stages", i), "a stage cannot list stages of its own")
			continue
		}
		p.prefix = fmt.Sprintf("stages[%d].", i)
		st := parseStageDesign(p, rs, name)
		p.prefix = ""
		if st.Name == "" {
			st.Name = fmt.Sprintf("%s stage %d", r.Name, i+1)
		}
		d.Stages = append(d.Stages, st)
	}
	if err := p.err(); err != nil {
		return nil, err
	}
	return d, nil
}

// parseStageDesign reads the one-stage design r, adding its problems to p.
func parseStageDesign(p *problems, r *rawDesign, name string) *Design {
	d := &Design{Name: r.Name, Family: r.Family, Options: r.Options, SourceFile: name}
	switch {
	case r.Family == "":
		p.add("family", "missing; name the circuit family, one of %s", strings.Join(KnownFamilies, ", "))
	case !slices.Contains(KnownFamilies, r.Family):
		p.add("family", "%q is not a family; use one of %s", r.Family, strings.Join(KnownFamilies, ", "))
	}
	// Which positions and amplifier a design needs follows from its family;
	// those checks are skipped when the family is wrong.
	famOK := !p.failed("family")
	names := make([]string, 0, len(r.Positions))
	for n := range r.Positions {
		names = append(names, n)
	}
	sort.Strings(names)
	if famOK && len(names) == 0 && !integrated(r.Family) {
		p.add("positions", "missing; give a part for every resistor position of the family")
	}
	if len(names) > 0 && integrated(r.Family) {
		p.add("positions", "a matched amplifier has its resistors inside; remove the positions")
	}
	for _, n := range names {
		d.Positions = append(d.Positions, parsePosition(p, "positions."+n, n, r.Positions[n]))
	}
	switch {
	case r.Amplifier == (rawAmp{}) && famOK && !amplified(r.Family, r.Options):
		d.Amplifier.Resolved = true // a passive stage (an unbuffered divider) has no amplifier
		d.Amplifier.Amp.Part = ""
	case r.Amplifier == (rawAmp{}) && !famOK:
	default:
		d.Amplifier = parseAmp(p, &r.Amplifier, integrated(r.Family) && !strapped(r.Family), famOK)
		if famOK {
			parseStrapping(p, &r.Amplifier, &d.Amplifier, strapped(r.Family))
		}
	}
	d.Reference = parseDesignRef(p, r.Reference)
	return d
}

func parsePosition(p *problems, path, name string, r rawPosition) Position {
	pos := Position{Name: name}
	single := r.rawElement != (rawElement{})
	switch {
	case single && (r.Series != nil || r.Parallel != nil), r.Series != nil && r.Parallel != nil:
		p.add(path, "give one part, a series pair or a parallel pair, not several")
	case r.Series != nil || r.Parallel != nil:
		list, kind := r.Series, Series
		if r.Parallel != nil {
			list, kind = r.Parallel, Parallel
		}
		pos.Pair = kind
		if len(list) != 2 {
			p.add(path+"."+kind, "has %d parts; a pair has exactly two", len(list))
		}
		for i, e := range list {
			pos.Elements = append(pos.Elements, parseElement(p, fmt.Sprintf("%s.%s[%d]", path, kind, i), e))
		}
	case single:
		pos.Elements = []Element{parseElement(p, path, r.rawElement)}
	default:
		p.add(path, "empty; give part, network and element, or value with tolerance and tcr")
	}
	return pos
}

func parseElement(p *problems, path string, r rawElement) Element {
	e := Element{Part: r.Part, Network: r.Network, Index: r.Element}
	inline := r.Value != "" || r.Tolerance != "" || r.TCR != ""
	switch {
	case r.Part != "" && r.Network != "":
		p.add(path, "names both part and network; a position holds one of them")
	case r.Network != "" && r.Element < 1:
		p.add(path+".element", "missing or below 1; give the 1-based element of network %s", r.Network)
	case r.Network == "" && r.Element != 0:
		p.add(path+".element", "given without a network")
	case (r.Part != "" || r.Network != "") && inline:
		p.add(path, "names a catalog part and also inline figures; give one or the other")
	case r.Part == "" && r.Network == "" && !inline:
		p.add(path, "empty; give part, network and element, or value with tolerance and tcr")
	case inline:
		e.Resolved = true
		if r.Value == "" {
			p.add(path+".value", "missing; give the resistance, e.g. 10k")
		} else {
			e.Ohm = field(p, path+".value", r.Value, uOhm)
			if e.Ohm <= 0 && !p.failed(path+".value") {
				p.add(path+".value", "%q must be positive; give the resistance, e.g. 10k", r.Value)
			}
		}
		if r.Tolerance == "" {
			p.add(path+".tolerance", "missing; give the tolerance, e.g. 0.1%%")
		} else {
			e.Tolerance = magnitude(p, path+".tolerance", r.Tolerance, datasheetMax, fractionField(p, path+".tolerance", r.Tolerance))
			if e.Tolerance >= 0.5 && !p.failed(path+".tolerance") {
				p.add(path+".tolerance", "%q is not a usable tolerance; give one below 50 %%, e.g. 0.1%%", r.Tolerance)
			}
		}
		if r.TCR == "" {
			p.add(path+".tcr", "missing; give the temperature coefficient, e.g. 25ppm/K")
		} else {
			e.TCR = magnitude(p, path+".tcr", r.TCR, datasheetMax, tempcoField(p, path+".tcr", r.TCR))
		}
		optMagnitude(p, path+".power", r.Power, rating, uWatt, &e.PowerW)
		optMagnitude(p, path+".max_voltage", r.MaxVoltage, rating, uVolt, &e.MaxVoltageV)
		optMagnitude(p, path+".thermal_resistance", r.ThermalResistance, datasheetMax, uKPerW, &e.ThermalResistance)
		optMagnitude(p, path+".load_life", r.LoadLife, datasheetMax, uFraction, &e.LoadLife)
	}
	if !inline && (r.Power != "" || r.MaxVoltage != "" || r.ThermalResistance != "" || r.LoadLife != "") {
		p.add(path, "rating figures belong to inline parts; a catalog part brings its own")
	}
	if r.RatioTolerance != "" || r.TCRTracking != "" {
		p.add(path, "ratio_tolerance and tcr_tracking belong to a catalog network; name it with network and element")
	}
	return e
}

// parseAmp reads the amplifier; famOK is false when the design's family is
// wrong, and the checks that depend on it are skipped.
func parseAmp(p *problems, r *rawAmp, matched, famOK bool) AmplifierChoice {
	a := AmplifierChoice{Part: r.Part}
	if r.Gain != "" {
		a.Gain = field(p, "amplifier.gain", r.Gain, uGain)
		if !matched && famOK {
			p.add("amplifier.gain", "a chosen gain belongs to a matched amplifier; the resistors set the gain of an op-amp stage")
		}
	} else if matched {
		p.add("amplifier.gain", "missing; a matched amplifier needs the chosen gain, one of its fixed gains")
	}
	inline := *r != (rawAmp{Part: r.Part, Gain: r.Gain, Strapping: r.Strapping})
	switch {
	case r.Part != "" && inline:
		p.add("amplifier", "names part %s and also inline figures; give one or the other", r.Part)
		return a
	case r.Part != "":
		return a
	case !inline:
		p.add("amplifier", "missing; give part or inline figures (vos, ib, aol, gbw, ...)")
		return a
	}
	a.Resolved = true
	m := &a.Amp
	m.Part, m.Type = "inline", catalog.OpAmp
	if matched || r.Type == string(catalog.MatchedAmp) {
		m.Type = catalog.MatchedAmp
	} else if r.Type != "" && r.Type != string(catalog.OpAmp) {
		p.add("amplifier.type", "%q is not an amplifier type; use opamp or matched", r.Type)
	}
	// Input and output limits (cm_*, swing_*, in_*) are signed: negative
	// reaches beyond the rail. The other figures are magnitudes.
	q := func(path, t string, u unit, dst *float64) {
		if t != "" {
			*dst = field(p, "amplifier."+path, t, u)
		}
	}
	mag := func(path, t, what string, u unit, dst *float64) { optMagnitude(p, "amplifier."+path, t, what, u, dst) }
	mag("vos", r.Vos, datasheetMax, uVolt, &m.VosV)
	mag("vos_drift", r.VosDrift, datasheetMax, uVPerK, &m.VosDriftVK)
	mag("ib", r.Ib, datasheetMax, uAmp, &m.IbA)
	mag("ios", r.Ios, datasheetMax, uAmp, &m.IosA)
	q("cmrr", r.CMRR, uDB, &m.CMRRdB)
	mag("gbw", r.GBW, "a gain-bandwidth product", uHertz, &m.GBWHz)
	mag("noise", r.Noise, datasheetMax, uNoise, &m.NoiseVHz)
	mag("current_noise", r.CurNoise, datasheetMax, uCurNoise, &m.NoiseAHz)
	q("cm_neg", r.CMNeg, uVolt, &m.CMNegV)
	q("cm_pos", r.CMPos, uVolt, &m.CMPosV)
	q("swing_neg", r.SwingNeg, uVolt, &m.SwingNegV)
	q("swing_pos", r.SwingPos, uVolt, &m.SwingPosV)
	mag("supply_max", r.SupplyMax, rating, uVolt, &m.SupplyMaxV)
	mag("internal_resistance", r.Internal, aResistance, uOhm, &m.InternalOhm)
	q("in_neg", r.InNeg, uVolt, &m.InNegV)
	q("in_pos", r.InPos, uVolt, &m.InPosV)
	mag("gain_error", r.GainError, datasheetMax, uFraction, &m.GainErrorMax)
	if r.GainDrift != "" {
		m.GainDriftPPM = 1e6 * magnitude(p, "amplifier.gain_drift", r.GainDrift, datasheetMax, tempcoField(p, "amplifier.gain_drift", r.GainDrift))
	}
	q("aol", r.Aol, uAol, &m.AolVV)
	// CMRR and open-loop gain are datasheet minimums, levels above 0 dB; at
	// or below 0 dB (1 V/V) the budget would read no rejection as infinite
	// rejection, or the op-amp would not amplify.
	if r.CMRR != "" && m.CMRRdB <= 0 && !p.failed("amplifier.cmrr") {
		p.add("amplifier.cmrr", "%q must be above 0 dB: CMRR is the datasheet's minimum rejection, a magnitude; write %s", r.CMRR, positiveLevel(r.CMRR, m.CMRRdB, "90dB"))
	}
	if r.Aol != "" && m.AolVV <= 1 && !p.failed("amplifier.aol") {
		p.add("amplifier.aol", "%q must be above 0 dB (1 V/V): the open-loop gain is the datasheet's minimum, a magnitude; write %s", r.Aol, positiveLevel(r.Aol, m.AolVV, "120dB"))
	}
	if r.GBW != "" && m.GBWHz == 0 && !p.failed("amplifier.gbw") {
		p.add("amplifier.gbw", "%q must be positive; give the gain-bandwidth product, e.g. 1MHz", r.GBW)
	}
	if m.Type == catalog.OpAmp && famOK {
		if r.Aol == "" {
			p.add("amplifier.aol", "missing; an op-amp needs its minimum open-loop gain, e.g. 120dB")
		}
		if r.GBW == "" {
			p.add("amplifier.gbw", "missing; give the gain-bandwidth product, e.g. 1MHz")
		}
	}
	if a.Gain != 0 {
		m.Gains = []float64{a.Gain}
	}
	return a
}

// parseStrapping reads the strapping of a family whose part is strapped
// (strapped true): a catalog part and its pin connections, no gain (the
// strapping sets it); other families take no strapping.
func parseStrapping(p *problems, r *rawAmp, a *AmplifierChoice, strapped bool) {
	a.Strapping = strings.Join(strings.Fields(r.Strapping), " ")
	switch {
	case !strapped && r.Strapping != "":
		p.add("amplifier.strapping", "a strapping belongs to a strapped amplifier (family %s); remove it", familyNames(familiesWith(&Spec{Families: KnownFamilies}, func(f *family.Family) bool { return f.Search.Strappings })))
	case !strapped:
	case r.Part == "":
		p.add("amplifier.part", "missing; a strapped amplifier is a catalog part whose matched network the catalog holds")
	case a.Strapping == "":
		p.add("amplifier.strapping", "missing; give the pin connections, e.g. \"IN-=vn IN+=vp FB=out REF=ref\" (plumb catalog show %s lists the part's pins)", r.Part)
	}
}

// positiveLevel suggests how to write a level that must be above 0 dB: the
// text without its minus sign when v is negative, else example.
func positiveLevel(text string, v float64, example string) string {
	if v < 0 {
		return unsigned(text)
	}
	return "e.g. " + example
}

// Lookup finds a part by part number, returning its kind and the part
// (catalog.Resistor, catalog.Network or catalog.Amplifier, by value or
// pointer), or an error wrapping catalog.ErrNotFound.
type Lookup func(part string) (catalog.Kind, any, error)

// Resolve fills every catalog-referenced element and the amplifier from
// lookup. All problems are reported together and nothing is changed unless
// every reference resolves.
func (d *Design) Resolve(lookup Lookup) error {
	if d.IsChain() {
		// Each stage resolves on a copy, so that nothing changes unless
		// every stage resolves.
		stages := make([]*Design, len(d.Stages))
		for i, st := range d.Stages {
			c := *st
			if err := c.Resolve(lookup); err != nil {
				return fmt.Errorf("stage %d: %w", i+1, err)
			}
			stages[i] = &c
		}
		d.Stages = stages
		return nil
	}
	p := &problems{kind: "design", file: d.SourceFile}
	// The one place a design's catalog parts enter: unknown figures get
	// their documented defaults, and the design lists them.
	var assumed []assume.Assumption
	raw := lookup
	lookup = func(part string) (catalog.Kind, any, error) {
		kind, v, err := raw(part)
		if err != nil {
			return kind, v, err
		}
		v, as := assume.Part(v)
		assumed = append(assumed, as...)
		return kind, v, nil
	}
	positions := slices.Clone(d.Positions)
	for i := range positions {
		pos := &positions[i]
		pos.Elements = slices.Clone(pos.Elements)
		for j := range pos.Elements {
			path := "positions." + pos.Name
			if len(pos.Elements) > 1 {
				path = fmt.Sprintf("%s.%s[%d]", path, pos.Pair, j)
			}
			resolveElement(p, path, &pos.Elements[j], lookup)
		}
	}
	amp := d.Amplifier
	if !amp.Resolved && amp.Part != "" {
		kind, v, err := lookup(amp.Part)
		switch {
		case err != nil:
			p.add("amplifier.part", "%s: %v", amp.Part, err)
		case kind != catalog.KindAmplifier:
			p.add("amplifier.part", "%s is a %s, not an amplifier", amp.Part, kind)
		default:
			amp.Amp = deref[catalog.Amplifier](v)
			amp.Resolved = true
		}
	}
	opts := d.Options
	if amp.Resolved && amp.Amp.Type == catalog.MatchedAmp && strapped(d.Family) {
		part, err := strapPart(&amp, family.Lookup(d.Family))
		if err != nil {
			p.add("amplifier.strapping", "%v", err)
		}
		opts.Part = part
	} else if amp.Resolved && amp.Amp.Type == catalog.MatchedAmp && integrated(d.Family) {
		if len(amp.Amp.Gains) > 0 && !slices.Contains(amp.Amp.Gains, amp.Gain) {
			p.add("amplifier.gain", "%g is not one of the gains of %s (%v)", amp.Gain, amp.Part, amp.Amp.Gains)
		}
	} else if amp.Resolved && integrated(d.Family) {
		p.add("amplifier.part", "%s is an op-amp; family %s needs an amplifier with matched resistors inside", amp.Part, d.Family)
	} else if amp.Resolved && amp.Amp.Type == catalog.MatchedAmp {
		p.add("amplifier.part", "%s has matched resistors inside; use family %s for it", amp.Part, familyNames(familiesWith(&Spec{Families: KnownFamilies}, (*family.Family).Integrated)))
	}
	ref, refAssumed := resolveReference(p, d, lookup)
	assumed = append(assumed, refAssumed...)
	if err := p.err(); err != nil {
		return err
	}
	d.Positions, d.Amplifier, d.Reference, d.Options = positions, amp, ref, opts
	set := assume.Set{}
	set.Add(d.Assumptions)
	set.Add(assumed)
	var parts []string
	for part := range set {
		parts = append(parts, part)
	}
	d.Assumptions = set.For(parts...)
	return nil
}

func resolveElement(p *problems, path string, e *Element, lookup Lookup) {
	if e.Resolved {
		return
	}
	ref := e.Part
	if e.Network != "" {
		ref = e.Network
	}
	kind, v, err := lookup(ref)
	if err != nil {
		p.add(path, "%s: %v", ref, err)
		return
	}
	switch kind {
	case catalog.KindResistor:
		if e.Network != "" {
			p.add(path+".network", "%s is a single resistor, not a network; name it with part", ref)
			return
		}
		r := deref[catalog.Resistor](v)
		g := r.ResistorGrade
		*e = Element{Part: r.Part, Ohm: r.ValueOhm, Tolerance: g.Tolerance, TCR: g.TCR * 1e-6, PowerW: g.PowerW,
			MaxVoltageV: g.MaxVoltageV, ThermalResistance: g.ThermalResistance, LoadLife: g.LoadLife, Resolved: true}
	case catalog.KindNetwork:
		n := deref[catalog.Network](v)
		if e.Network == "" {
			p.add(path+".part", "%s is a network; name it with network and element", ref)
			return
		}
		if e.Index > len(n.Values) {
			p.add(path+".element", "%d is beyond the %d elements of network %s", e.Index, len(n.Values), ref)
			return
		}
		*e = Element{Network: n.Part, Index: e.Index, Ohm: n.Values[e.Index-1], Tolerance: n.Tolerance, TCR: n.TCR * 1e-6,
			PowerW: n.PowerW, MaxVoltageV: n.MaxVoltageV, RatioTolerance: n.RatioTolerance, TCRTracking: n.TCRTracking * 1e-6, Resolved: true}
	default:
		p.add(path, "%s is a %s, not a resistor", ref, kind)
	}
}

// deref accepts a T or a *T from a lookup.
func deref[T any](v any) T {
	switch x := v.(type) {
	case T:
		return x
	case *T:
		return *x
	}
	var zero T
	panic(fmt.Sprintf("spec: lookup returned %T, want %T", v, zero))
}

// Unresolved lists the references still waiting for catalog figures.
func (d *Design) Unresolved() []string {
	var out []string
	if d.IsChain() {
		for i, st := range d.Stages {
			for _, u := range st.Unresolved() {
				out = append(out, fmt.Sprintf("stage %d %s", i+1, u))
			}
		}
		return out
	}
	for _, pos := range d.Positions {
		for _, e := range pos.Elements {
			if !e.Resolved {
				out = append(out, pos.Name+": "+e.Part+e.Network)
			}
		}
	}
	if !d.Amplifier.Resolved {
		out = append(out, "amplifier: "+d.Amplifier.Part)
	}
	if d.Reference != nil && !d.Reference.Resolved {
		out = append(out, "reference: "+d.Reference.Part)
	}
	return out
}

// strapPart parses the strapping of amplifier a against its matched
// network and returns the strapped circuit, or an error that says what to
// write.
func strapPart(a *AmplifierChoice, f *family.Family) (family.PartCircuit, error) {
	n := a.Amp.Network
	if n == nil {
		return nil, fmt.Errorf("%s: the catalog holds no matched network for this part, so it cannot be strapped; use it at one of its gains (%v) in another family", a.Part, a.Amp.Gains)
	}
	c, err := strap.Parse(n, a.Strapping)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", a.Part, err)
	}
	st, err := strap.Evaluate(n, c)
	if err != nil {
		return nil, fmt.Errorf("%s: strapping %q: %w", a.Part, a.Strapping, err)
	}
	if diff := st.Kind == strap.Differential; f != nil && diff != (f.Input == family.Differential) {
		other := familyNames(familiesWith(&Spec{Families: KnownFamilies}, func(g *family.Family) bool {
			return g.Search.Strappings && (g.Input == family.Differential) == diff
		}))
		return nil, fmt.Errorf("%s: strapping %q is %s, and family %s takes a %s input; use family %s, or a strapping of that kind", a.Part, a.Strapping, st.Kind, f.Name, inputWord(f.Input), other)
	}
	part, err := st.Part(n)
	if err != nil {
		return nil, fmt.Errorf("%s: strapping %q: %w", a.Part, a.Strapping, err)
	}
	a.Strapping = st.Text
	return part, nil
}

// inputWord names a family's input kind in messages.
func inputWord(in family.Input) string {
	switch in {
	case family.Differential:
		return "differential"
	case family.Current:
		return "current"
	}
	return "single-ended"
}
