package search

import (
	"fmt"
	"math"
	"sort"
	"strings"

	"plumb/catalog"
	"plumb/optimize/assume"
	"plumb/optimize/budget"
	"plumb/optimize/cost"
	"plumb/optimize/family"
	"plumb/optimize/spec"
)

// Options tune a search. The zero value is usable: five designs, no value
// combinations, no progress reports.
type Options struct {
	// Top is the number of ranked designs (default 5).
	Top int
	// Combos allows two values of the Rf grade in series or in parallel at
	// each feedback position of a discrete design (Rf; R2 and R4 of a
	// difference amplifier; Rtop of a divider; Rf1 and Rf2 of an
	// instrumentation amplifier). Per Rg value the search tries the series
	// pair x + y (x the largest value below the target, y the values either
	// side of the rest) and the parallel pair x∥y (x the smallest value
	// above the target, y either side of the value that completes it), and
	// keeps a pair only when it is nearer the target ratio than the best
	// single value. The spec's combos list allows one kind alone.
	Combos bool
	// Progress, when set, is called now and then with the classes visited
	// and the classes in the search space.
	Progress func(done, total int)
	// Trials, when set, is called now and then during each Monte Carlo run
	// of the exact budget with the trials run and the trials of the run.
	Trials func(done, total int)
	// Rates are the exchange rates (currency.rates of the configuration)
	// that turn prices in other currencies into the spec's build currency;
	// a part priced in a currency with no rate is left out, counted and
	// named in the notes.
	Rates cost.Rates

	// Frontier asks for the designs on the cost-versus-margin frontier
	// (Result.Frontier): those no cheaper design matches in margin on every
	// limit, among the FrontierPool cheapest passing classes.
	Frontier bool

	// spec is the spec Solve searches for: near misses try changes on its
	// side (a calibration) with the exact budget (nil: none tried).
	spec *spec.Spec
	// quick skips the near misses: the diagnosis of an infeasible spec
	// only asks whether a design passes.
	quick bool
	// ceiling, when above 0, asks for every design the screening passes
	// up to that build cost, each value option of each class, unconfirmed
	// (see space.solveBelow); a chain's search draws on it.
	ceiling float64
	// most, with ceiling, stops the list past that many designs (then
	// Result.cut is set).
	most int
	// failed, when set, makes the search a sub-search of a merged one
	// (the in-amp's per second-stage gain, the current sense's per shunt):
	// it counts the designs the exact budget failed over every
	// sub-search, so that maxRejected bounds the merged search, and the
	// merged search states the verdict's notes once (Result.verdict).
	failed *int
	// below, when above 0, is the cost past which a sub-search budgets no
	// design: the merged search already ranks Top designs at or below it.
	below float64
}

const defaultTop = 5

// MaxTop is the most designs one search ranks: each ranked design (and a
// few spares) gets its own exact budget, a Monte Carlo run under that
// method, so Top sizes the work.
const MaxTop = 50

// Result is the outcome of a search: the ranked designs and the near
// misses, and when nothing passes, why. Its JSON field names are a
// contract documented in the README.
type Result struct {
	Designs    []Design   `json:"designs"`
	NearMisses []NearMiss `json:"near_misses"`
	// Frontier are the designs on the cost-versus-margin frontier, by
	// cost (Options.Frontier).
	Frontier []Design `json:"frontier,omitempty"`
	// CheapestFailing are the cheapest failing designs (cheaper than rank
	// 1), beside the near misses, which are the closest.
	CheapestFailing []NearMiss  `json:"cheapest_failing,omitempty"`
	Infeasible      *Infeasible `json:"infeasible,omitempty"`
	Method          string      `json:"method"`
	Cautions        []string    `json:"cautions,omitempty"`
	Notes           []string    `json:"notes,omitempty"`
	// Conversions lists the prices turned into the build currency, per
	// currency, with the rate and the date it was set.
	Conversions []cost.Conversion `json:"currency_conversions,omitempty"`
	Search      Stats             `json:"search"`

	spec    *spec.Spec
	designs []*spec.Design
	// cut is set by a search with Options.ceiling when a passing design
	// may cost more than the ceiling.
	cut bool
	// unproven is set when the search dropped classes past its caps on
	// designs the exact budget fails (maxRejected): "no design" is then
	// not proven.
	unproven bool
	// verdict counts what the exact budget refused on the way.
	verdict verdict
	// pool holds a sub-search's candidates for the merged search's
	// frontier (frontierPool).
	pool []subDesign
}

// Stats count the work of the search.
type Stats struct {
	Classes     int `json:"classes"`      // design classes in the search space
	Visited     int `json:"visited"`      // classes looked at
	BoundPruned int `json:"bound_pruned"` // skipped by their error lower bound
	Evaluated   int `json:"evaluated"`    // classes whose values were evaluated
}

// Design is one ranked design.
type Design struct {
	Rank      int     `json:"rank"`
	Family    string  `json:"family"`
	TotalCost float64 `json:"total_cost"` // the whole build
	UnitCost  float64 `json:"unit_cost"`  // per stage built
	Currency  string  `json:"currency"`
	Parts     []Part  `json:"parts"`
	Metrics   Metrics `json:"metrics"`
	Limits    []Limit `json:"limits"`
	// Binding is the limit with the least margin.
	Binding string   `json:"binding"`
	Reasons []string `json:"reasons"`
	// ValueVariants counts the value choices of this class that pass.
	ValueVariants int      `json:"value_variants"`
	ShortStock    []string `json:"short_stock,omitempty"`
	// Cautions are the exact budget's cautions for this design: parts
	// near their ratings, amplifier pins near their limits, hazardous
	// voltage.
	Cautions []string `json:"cautions,omitempty"`
	// Assumptions are the figures of this design's parts that the catalog
	// does not give and the search took at their documented defaults.
	Assumptions []assume.Assumption `json:"assumptions,omitempty"`

	// budget is the exact budget adopted for the design (nil: screening
	// figures only, as in SolveProblem and Exhaustive).
	budget *budget.Result
}

// Part is one position of a design.
type Part struct {
	Position string `json:"position"`
	// Kind is resistor, network or amplifier.
	Kind string `json:"kind"`
	Part string `json:"part"`
	// Quantity is the pieces per stage at this position.
	Quantity int `json:"quantity"`
	// Bought is the pieces of this part number bought for the build.
	Bought    int     `json:"bought"`
	UnitPrice float64 `json:"unit_price"`
	ValueOhm  float64 `json:"value_ohm,omitempty"`
	Tolerance float64 `json:"tolerance,omitempty"` // fraction
	TCRppm    float64 `json:"tcr_ppm,omitempty"`
	// Network elements only.
	RatioTolerance float64 `json:"ratio_tolerance,omitempty"`
	TCRTracking    float64 `json:"tcr_tracking_ppm,omitempty"`
	// Strapping is a strapped amplifier's pin connections (package
	// strap's text form), "" for any other part.
	Strapping string `json:"strapping,omitempty"`
}

// Metrics are a design's figures under the spec's method.
type Metrics struct {
	Gain float64 `json:"gain"`
	// GainError is the worst |gain error| over tolerances and temperature.
	GainError        float64 `json:"gain_error"`
	GainErrorInitial float64 `json:"gain_error_initial"`
	CMRRdB           float64 `json:"cmrr_db,omitempty"` // absent: single-ended stage
	DriftPPMPerK     float64 `json:"drift_ppm_per_k"`
	OutputOffsetV    float64 `json:"output_offset_v"`
	OffsetDriftVPerK float64 `json:"offset_drift_v_per_k"`
	NoiseDensity     float64 `json:"noise_v_per_rthz"`
	NoiseRMSV        float64 `json:"noise_rms_v"`
	BandwidthHz      float64 `json:"bandwidth_hz"`
	// The channel into the ADC (specs with an adc block; see
	// budget.Channel): total error at full scale and the temperature's
	// part of it, fractions of full scale and LSB.
	TotalErrorFS  float64 `json:"total_error_fs,omitempty"`
	TotalErrorLSB float64 `json:"total_error_lsb,omitempty"`
	TotalDriftFS  float64 `json:"total_drift_fs,omitempty"`
	TotalDriftLSB float64 `json:"total_drift_lsb,omitempty"`
}

// Limit is one spec limit checked against a design. Margin is limit/value
// for a maximum and value/limit for a minimum (linear ratio for dB), so
// above 1 passes.
type Limit struct {
	Name   string  `json:"name"`
	Value  float64 `json:"value"`
	Limit  float64 `json:"limit"`
	Margin float64 `json:"margin"`
	Pass   bool    `json:"pass"`
	// Unit of Value and Limit where the exact budget gives one ("", "V",
	// "V/K", "Hz", "dB", "ppm/K", "V/rtHz", "ohm").
	Unit string `json:"unit,omitempty"`
	// MarginText is the margin in words where the exact budget gives it
	// ("1.64x inside the limit", "+1.1 dB", "+0.702 V"), as plumb check
	// prints it.
	MarginText string `json:"margin_text,omitempty"`
}

// NearMiss is a failing design (cheaper than the first rank when there is
// one), with what it fails, how far it is from passing and the cheapest
// change that makes it pass.
type NearMiss struct {
	Design
	Fails []Failure `json:"fails"`
	// Shortfall is how far the design is from passing: the product over
	// its failing limits of 1/margin (1.4: one limit missed by 1.4x).
	Shortfall float64 `json:"shortfall"`
	Fix       *Fix    `json:"fix"`
	// Alternatives are other changes that pass, on the spec's side (a
	// calibration) where Fix changes parts.
	Alternatives []Fix `json:"alternatives,omitempty"`

	// class is the search's class of the near miss (for its fix).
	class classBest

	// sd and fixSD are the near miss and its fix as spec designs, for the
	// exact budget (nil when not built; fixSD nil for a calibration).
	sd, fixSD *spec.Design
}

// Failure is one limit a near miss breaks.
type Failure struct {
	Name  string  `json:"name"`
	Value float64 `json:"value"`
	Limit float64 `json:"limit"`
	// By is how far past the limit, as a fraction of the limit (dB limits:
	// in dB).
	By   float64 `json:"by"`
	Text string  `json:"text"`
}

// Fix is the cheapest change that turns a near miss into a passing design.
type Fix struct {
	// Kind is grade, network or amplifier (one change), pair (two
	// changes: an amplifier with a grade or a network) or calibration
	// (the same parts with a one-time calibration the spec does not ask
	// for yet).
	Kind string `json:"kind"`
	// Change words every change of Changes (or the calibration).
	Change string `json:"change"`
	// Part is the new part at the first position that changes (Changes
	// lists them all; "" for a calibration).
	Part string `json:"part"`
	// Changes are the positions whose part or value the fix changes, each
	// with its new and its former part and value (none for a calibration).
	Changes   []PartChange `json:"changes,omitempty"`
	TotalCost float64      `json:"total_cost"`
	ExtraCost float64      `json:"extra_cost"` // per stage
}

// PartChange is one position a fix changes: the part and value it takes
// and the ones it had. A position the fix adds has no former part, one it
// removes no new part (a series pair in place of one resistor: Rf.a and
// Rf.b added, Rf removed).
type PartChange struct {
	Position     string  `json:"position"`
	Kind         string  `json:"kind"`
	Part         string  `json:"part,omitempty"`
	ValueOhm     float64 `json:"value_ohm,omitempty"`
	Tolerance    float64 `json:"tolerance,omitempty"` // fraction
	TCRppm       float64 `json:"tcr_ppm,omitempty"`
	WasPart      string  `json:"was_part,omitempty"`
	WasValueOhm  float64 `json:"was_value_ohm,omitempty"`
	WasTolerance float64 `json:"was_tolerance,omitempty"`
	WasTCRppm    float64 `json:"was_tcr_ppm,omitempty"`
}

// Infeasible explains a spec no design meets.
type Infeasible struct {
	Message string `json:"message"`
	// Limits are the limits no design meets even alone, each with the best
	// value reached, what sets it and the smallest relaxation that lets a
	// design pass.
	Limits []InfeasibleLimit `json:"limits"`
	// Conflicts are pairs of limits each met alone but never together,
	// with the design closest to both.
	Conflicts []Conflict `json:"conflicts,omitempty"`
	// Relaxations are, where limits conflict, the smallest relaxation of
	// each limit (the others kept) that lets a design pass.
	Relaxations []Relaxation `json:"relaxations,omitempty"`
	// HardLimits counts the amplifiers removed per hard limit.
	HardLimits map[string]int `json:"hard_limits,omitempty"`
	// Hard explains, with the figures, each hard limit that removed every
	// amplifier (output range against the rails, input headroom, supply,
	// bandwidth).
	Hard []string `json:"hard,omitempty"`

	// rails are where hardCauses asks the rails to go (see checkRails).
	rails *railNeed
}

// InfeasibleLimit is a limit no design meets, with the best value any
// design reaches, the design that reaches it, what sets that value and the
// smallest relaxation that lets a design pass.
type InfeasibleLimit struct {
	Name  string  `json:"name"`
	Limit float64 `json:"limit"`
	Best  float64 `json:"best"`
	// Unit of Limit and Best, as in a design's limits.
	Unit string `json:"unit,omitempty"`
	// BestParts are the parts of the design that reaches Best.
	BestParts string `json:"best_parts,omitempty"`
	// SetBy are the causes of Best, largest first.
	SetBy []Cause `json:"set_by,omitempty"`
	// Relax is the smallest relaxation of this limit, every other limit
	// kept, that lets a design pass (nil: none up to 10^4x).
	Relax  *Relaxation `json:"relax,omitempty"`
	Needed string      `json:"needed"`
}

// Cause is one thing that sets a limit's best value: on the catalog's side
// an exact-budget contributor of the best design (a grade's tolerance or
// tempco, an amplifier figure); on the spec's side the reference's
// tolerance or drift (contributors too), or what the value improves when a
// spec figure is made ideal with the same parts (source impedance 0, no
// load, the temperature range shrunk to the reference temperature).
type Cause struct {
	Name string `json:"name"`
	// Side is "catalog" or "spec".
	Side  string  `json:"side"`
	Value float64 `json:"value"`
	// Share is the cause's part of the best value (0..1).
	Share float64 `json:"share"`
	Unit  string  `json:"unit,omitempty"`
}

// Relaxation is a limit relaxed just enough for a design to pass, with
// that design's parts and cost.
type Relaxation struct {
	Limit     string  `json:"limit"`
	From      float64 `json:"from"`
	To        float64 `json:"to"`
	Unit      string  `json:"unit,omitempty"`
	Parts     string  `json:"parts"`
	TotalCost float64 `json:"total_cost"`
	UnitCost  float64 `json:"unit_cost"`
	Currency  string  `json:"currency"`
}

// Conflict is a pair of limits each met alone but never together.
type Conflict struct {
	Limits []string `json:"limits"`
	// Closest is the design closest to meeting both.
	Closest *NearMiss `json:"closest,omitempty"`
}

// Limit names, shared with package budget's result.
const (
	limGain        = budget.LimitGainError
	limGainInitial = "gain error initial"
	limCMRR        = budget.LimitCMRR
	limDrift       = budget.LimitGainDrift
	limOffset      = budget.LimitOutputOffset
	limOffDrift    = budget.LimitOffsetDrift
	limNoise       = budget.LimitNoiseDensity
	limNoiseRMS    = budget.LimitNoiseRMS
	limBandwidth   = budget.LimitBandwidth
)

// limitSet checks metrics against the problem's limits.
func (s *space) limitSet(m *metrics) []Limit {
	l := &s.p.Limits
	var out []Limit
	max := func(name string, v, lim float64, unit string) {
		if lim > 0 {
			mg := budget.MaxMargin
			if v != 0 {
				mg = math.Min(lim/math.Abs(v), budget.MaxMargin)
			}
			out = append(out, Limit{Name: name, Value: v, Limit: lim, Margin: mg, Pass: withinMax(v, lim), Unit: unit})
		}
	}
	max(limGain, m.totalErr, l.TotalGainError, "")
	max(limGainInitial, m.gainErr, l.GainError, "")
	if l.CMRRdB > 0 {
		out = append(out, Limit{Name: limCMRR, Value: m.cmrrDB, Limit: l.CMRRdB, Margin: math.Min(math.Pow(10, (m.cmrrDB-l.CMRRdB)/20), budget.MaxMargin), Pass: m.cmrrDB >= l.CMRRdB, Unit: "dB"})
	}
	max(limDrift, m.drift, l.DriftPPM, "ppm/K")
	max(limOffset, m.offset, l.OffsetV, "V")
	max(limOffDrift, m.offDrift, l.OffsetDriftVK, "V/K")
	max(limNoise, m.noise, l.NoiseDensity, "V/rtHz")
	max(limNoiseRMS, m.noiseRMS, l.NoiseRMS, "V")
	// An unbounded bandwidth (a divider: no amplifier sets it) is not
	// checked here, as the budget leaves it unchecked.
	if s.p.BandwidthHz > 0 && !math.IsInf(m.bw, 1) {
		out = append(out, Limit{Name: limBandwidth, Value: m.bw, Limit: s.p.BandwidthHz, Margin: math.Min(m.bw/s.p.BandwidthHz, budget.MaxMargin), Pass: m.bw >= s.p.BandwidthHz, Unit: "Hz"})
	}
	return out
}

func binding(ls []Limit) (Limit, bool) {
	best, ok := Limit{}, false
	for _, l := range ls {
		if !ok || l.Margin < best.Margin {
			best, ok = l, true
		}
	}
	return best, ok
}

// toMetrics is the screening figures in the result contract; an unbounded
// bandwidth (no amplifier sets it) is written as 0, unknown.
func toMetrics(m *metrics) Metrics {
	bw := m.bw
	if math.IsInf(bw, 1) {
		bw = 0
	}
	return Metrics{Gain: m.gain, GainError: m.totalErr, GainErrorInitial: m.gainErr, CMRRdB: m.cmrrDB,
		DriftPPMPerK: m.drift, OutputOffsetV: m.offset, OffsetDriftVPerK: m.offDrift, NoiseDensity: m.noise, NoiseRMSV: m.noiseRMS, BandwidthHz: bw}
}

// famName is the spec family a search family builds: the circuit's
// family for a discrete or network build, else the integrated family whose
// part it is (see variant).
func famName(f Family) string {
	for _, b := range []string{buildDiscrete, buildNetwork} {
		if name, ok := strings.CutSuffix(string(f), "-"+b); ok {
			return name
		}
	}
	for _, g := range family.All() {
		if g.Search.Strategy == family.Part && strings.HasSuffix(string(f), "-"+g.Name) {
			return g.Name
		}
	}
	return string(f)
}

// positions names the Rg and Rf positions of the circuit.
func (s *space) positions() (rg, rf []string) {
	if sh := s.fam().Search.Shift; sh != nil {
		return sh.Positions(s.p.lsInv())
	}
	if m := s.model(); m != nil {
		return m.Rg, m.Rf
	}
	return nil, nil // a part walked as a circuit of its own has no positions
}

// describe builds the parts, the priced BOM and the spec design of a class
// best.
func (s *space) describe(b *classBest) (Design, *spec.Design, error) {
	var uses []cost.Use
	var parts []Part
	sd := &spec.Design{}
	var a *catalog.Amplifier
	var fam Family
	strapping := ""
	if b.cfg >= 0 {
		c := &s.cfgs[b.cfg]
		fam = c.fam
		a = s.amps[b.amp].a
		rgPos, rfPos := s.positions()
		// Positions that take one value of one group share a part number,
		// bought as one line: the part is the group's pick at the line's
		// placements, as priceLines priced it. The elements are filled in
		// once every position is known.
		type slot struct {
			g *group
			i int32
		}
		placed := map[slot]int{}
		var slots []slot
		add := func(_ string, g *group, i int32) spec.Element {
			placed[slot{g, i}]++
			slots = append(slots, slot{g, i})
			return spec.Element{}
		}
		switch {
		case s.pairNetwork(c):
			n := s.nets[c.net]
			uses = append(uses, cost.Use{Part: n.Part, Offer: &n.Offer, Placements: 1})
			parts, sd.Positions = networkParts(n, c.na, c.nb, parts, sd.Positions)
		case s.strategy() == family.ShiftNetwork:
			o := c.opts[b.opt]
			ga, gb := s.groups[c.ga], s.groups[c.gb]
			for _, e := range []struct {
				pos string
				g   *group
				i   int32
			}{{"R1", ga, o.rg}, {"R2", ga, o.rf}, {"R3", ga, o.rf2}, {"Rg", gb, c.fbv}, {"Rf", gb, c.fbv}} {
				if e.pos == "R2" && s.p.lsInv() {
					e.g = gb
				}
				sd.Positions = append(sd.Positions, spec.Position{Name: e.pos, Elements: []spec.Element{add(e.pos, e.g, e.i)}})
			}
			sd.Options.OffsetToInverting = s.p.lsInv()
		default:
			o := c.opts[b.opt]
			ga, gb := s.groups[c.ga], s.groups[c.gb]
			for _, pos := range rgPos {
				sd.Positions = append(sd.Positions, spec.Position{Name: pos, Elements: []spec.Element{add(pos, ga, o.rg)}})
			}
			for _, pos := range rfPos {
				if o.rf2 >= 0 {
					e1, e2 := add(pos+".a", gb, o.rf), add(pos+".b", gb, o.rf2)
					pair := spec.Series
					if o.par {
						pair = spec.Parallel
					}
					sd.Positions = append(sd.Positions, spec.Position{Name: pos, Pair: pair, Elements: []spec.Element{e1, e2}})
				} else {
					sd.Positions = append(sd.Positions, spec.Position{Name: pos, Elements: []spec.Element{add(pos, gb, o.rf)}})
				}
			}
			// The second stage of an instrumentation amplifier.
			if st := c.g.s2; st != nil && st.grp >= 0 {
				for _, pos := range []string{"R1", "R2", "R3", "R4"} {
					sd.Positions = append(sd.Positions, spec.Position{Name: pos, Elements: []spec.Element{add(pos, s.groups[st.grp], st.vi)}})
				}
			} else if st != nil {
				n := s.nets[st.net]
				uses = append(uses, cost.Use{Part: n.Part, Offer: &n.Offer, Placements: 1})
				parts, sd.Positions = networkParts(n, st.r1, st.r2, parts, sd.Positions)
			}
		}
		k := 0
		for pi := range sd.Positions {
			for ei := range sd.Positions[pi].Elements {
				e := &sd.Positions[pi].Elements[ei]
				if e.Network != "" {
					continue
				}
				sl := slots[k]
				k++
				pk := sl.g.at(int(sl.i), placed[sl])
				gr, part, v := sl.g.grade, pk.part.part, sl.g.values[sl.i]
				name := sd.Positions[pi].Name
				if len(sd.Positions[pi].Elements) > 1 {
					name += "." + string(rune('a'+ei))
				}
				uses = append(uses, cost.Use{Part: part, Offer: &pk.part.offer, Placements: 1})
				parts = append(parts, Part{Position: name, Kind: string(catalog.KindResistor), Part: part, Quantity: 1,
					ValueOhm: v, Tolerance: gr.Tolerance, TCRppm: gr.TCR})
				*e = spec.Element{Part: part, Ohm: v, Tolerance: gr.Tolerance, TCR: gr.TCR * 1e-6,
					PowerW: gr.PowerW, MaxVoltageV: gr.MaxVoltageV, ThermalResistance: gr.ThermalResistance, LoadLife: gr.LoadLife, Resolved: true}
			}
		}
	} else {
		m := &s.matched[b.amp]
		a, fam = m.a, m.build
		if m.st != nil {
			part, err := m.st.Part(a.Network)
			if err != nil {
				return Design{}, nil, fmt.Errorf("search: %s strapped %s: %w", a.Part, m.st.Text, err)
			}
			sd.Options.Part, sd.Amplifier.Strapping, strapping = part, m.st.Text, m.st.Text
		} else {
			sd.Amplifier.Gain = m.k0
		}
	}
	sortPositions(sd.Positions)
	sort.SliceStable(parts, func(i, j int) bool { return parts[i].Position < parts[j].Position })
	sd.Family = famName(fam)
	sd.Name = sd.Family
	sd.Amplifier.Resolved = true // an unbuffered divider has none
	if a.Part != "" {
		sd.Amplifier.Part, sd.Amplifier.Amp, sd.Amplifier.Resolved = a.Part, *a, true
		sd.Name = fmt.Sprintf("%s with %s", sd.Family, a.Part)
		// The in-amp's three op-amps count channels: one package each, or
		// fewer of a dual or quad part.
		n := packages(s.p, a)
		uses = append(uses, cost.Use{Part: a.Part, Offer: &a.Offer, Placements: n})
		parts = append(parts, Part{Position: "U1", Kind: string(catalog.KindAmplifier), Part: a.Part, Quantity: n, Strapping: strapping})
	}
	bd, err := cost.Price(s.p.Build, uses)
	if err != nil {
		return Design{}, nil, err
	}
	for i := range parts {
		for _, ln := range bd.Lines {
			if ln.Part == parts[i].Part {
				parts[i].Bought, parts[i].UnitPrice = ln.Bought, ln.UnitPrice
			}
		}
	}
	d := Design{Family: string(fam), TotalCost: bd.Total, UnitCost: bd.PerUnit, Currency: bd.Currency, Parts: parts,
		Metrics: toMetrics(&b.m), Limits: s.limitSet(&b.m), ShortStock: bd.Short}
	if bl, ok := binding(d.Limits); ok {
		d.Binding = bl.Name
	}
	return d, sd, nil
}

// networkParts appends the four difference-amplifier positions R1..R4 on
// network n (R1 = R3 of value na, R2 = R4 of value nb) to parts and ps.
func networkParts(n *catalog.Network, na, nb float64, parts []Part, ps []spec.Position) ([]Part, []spec.Position) {
	ia, ib := elementIndexes(n.Values, na), elementIndexes(n.Values, nb)
	if na == nb {
		ib = ia[2:]
	}
	names := []string{"R1", "R2", "R3", "R4"}
	idx := []int{ia[0], ib[0], ia[1], ib[1]}
	for i, name := range names {
		v := n.Values[idx[i]]
		parts = append(parts, Part{Position: name, Kind: string(catalog.KindNetwork), Part: n.Part, Quantity: 1, ValueOhm: v,
			Tolerance: n.Tolerance, TCRppm: n.TCR, RatioTolerance: n.RatioTolerance, TCRTracking: n.TCRTracking})
		ps = append(ps, spec.Position{Name: name, Elements: []spec.Element{{Network: n.Part, Index: idx[i] + 1, Ohm: v,
			Tolerance: n.Tolerance, TCR: n.TCR * 1e-6, PowerW: n.PowerW, MaxVoltageV: n.MaxVoltageV,
			RatioTolerance: n.RatioTolerance, TCRTracking: n.TCRTracking * 1e-6, Resolved: true}}})
	}
	return parts, ps
}

func elementIndexes(vs []float64, v float64) []int {
	var out []int
	for i, x := range vs {
		if x == v {
			out = append(out, i)
		}
	}
	return out
}

func sortPositions(ps []spec.Position) {
	for i := 1; i < len(ps); i++ {
		for j := i; j > 0 && ps[j].Name < ps[j-1].Name; j-- {
			ps[j], ps[j-1] = ps[j-1], ps[j]
		}
	}
}
