package assume

import (
	"fmt"
	"math"
	"sort"
	"strings"

	"plumb/catalog"
)

// Assumption is one figure a part was given because the catalog does not
// know it.
type Assumption struct {
	// Part is the part number (a series' stem for its values).
	Part string `json:"part"`
	// Figure is the catalog's JSON name of the figure.
	Figure string `json:"figure"`
	// Value is the value taken, in the catalog's units (SI, ppm/K for
	// tempcos, dB for CMRR).
	Value float64 `json:"value"`
	// Text says it in words: "load life not given: taken as 0.5 %
	// (thin-film, common practice)".
	Text string `json:"text"`
}

// Set holds the assumptions made, by part number.
type Set map[string][]Assumption

// Add records the assumptions of one part (once per part).
func (s Set) Add(as []Assumption) {
	for _, a := range as {
		if _, done := s[a.Part]; !done || !has(s[a.Part], a.Figure) {
			s[a.Part] = append(s[a.Part], a)
		}
	}
}

func has(as []Assumption, figure string) bool {
	for _, a := range as {
		if a.Figure == figure {
			return true
		}
	}
	return false
}

// For returns the assumptions of the given parts, in part order, each
// part once. A value of a resistor series (its part number is the stem, a
// dash and a value code) has the series' assumptions.
func (s Set) For(parts ...string) []Assumption {
	seen := map[string]bool{}
	var out []Assumption
	sorted := append([]string(nil), parts...)
	sort.Strings(sorted)
	for _, p := range sorted {
		key := p
		if _, ok := s[key]; !ok {
			if i := strings.LastIndexByte(p, '-'); i > 0 {
				key = p[:i]
			}
		}
		if seen[key] {
			continue
		}
		seen[key] = true
		out = append(out, s[key]...)
	}
	return out
}

// Notes turns assumptions into one note line per part.
func Notes(as []Assumption) []string {
	var out []string
	var part string
	var texts []string
	flush := func() {
		if len(texts) > 0 {
			out = append(out, fmt.Sprintf("%s: assumed, not in the catalog: %s", part, strings.Join(texts, "; ")))
		}
		texts = nil
	}
	for _, a := range as {
		if a.Part != part {
			flush()
			part = a.Part
		}
		texts = append(texts, a.Text)
	}
	flush()
	return out
}

// unknown reports a figure nobody gave.
func unknown(x float64) bool { return math.IsNaN(x) }

type filler struct {
	part string
	as   []Assumption
}

// set gives *x the value v when it is unknown, and records why.
func (f *filler) set(x *float64, figure string, v float64, text string) {
	if !unknown(*x) {
		return
	}
	*x = v
	f.as = append(f.as, Assumption{Part: f.part, Figure: figure, Value: v, Text: text})
}

// quiet gives *x the value v when it is unknown, without an assumption:
// for figures no budget uses (slew rate, quiescent current) or that do not
// apply to the part (an op-amp's matched-resistor figures).
func quiet(x *float64, v float64) {
	if unknown(*x) {
		*x = v
	}
}

// Grade fills the unknown figures of a resistor grade in place and says
// what it assumed.
func Grade(part string, g *catalog.ResistorGrade) []Assumption {
	filled := FillGrade(g)
	if len(filled) == 0 {
		return nil
	}
	tech, pkg := techDefaults(g.Technology), packageDefaults(g.Package)
	texts := map[string]string{
		"tcr_ppm":       fmt.Sprintf("tempco not given: taken as %g ppm/K (%s)", tech.tcr, tech.why),
		"power_w":       fmt.Sprintf("power rating not given: taken as %g W (%s)", pkg.power, pkg.why),
		"max_voltage_v": fmt.Sprintf("limiting element voltage not given: taken as %g V (%s)", pkg.lev, pkg.why),
		"thermal_resistance_k_per_w": fmt.Sprintf("thermal resistance not given: taken as %.0f K/W, the 85 K rise from 70 °C rated ambient to 155 °C at rated power (IEC 60115-1 derating, from memory)",
			g.ThermalResistance),
		"load_life": fmt.Sprintf("load life not given: taken as %g %% (%s)", 100*tech.life, tech.why),
	}
	values := map[string]float64{"tcr_ppm": g.TCR, "power_w": g.PowerW, "max_voltage_v": g.MaxVoltageV,
		"thermal_resistance_k_per_w": g.ThermalResistance, "load_life": g.LoadLife}
	as := make([]Assumption, len(filled))
	for i, f := range filled {
		as[i] = Assumption{Part: part, Figure: f, Value: values[f], Text: texts[f]}
	}
	return as
}

// FillGrade fills the unknown figures of a resistor grade in place, as
// Grade does, and returns only the catalog names of the figures it filled
// (nil when none): the quick form for streamed rows.
func FillGrade(g *catalog.ResistorGrade) []string {
	if !unknown(g.TCR) && !unknown(g.PowerW) && !unknown(g.MaxVoltageV) && !unknown(g.ThermalResistance) && !unknown(g.LoadLife) {
		return nil
	}
	var filled []string
	fill := func(x *float64, figure string, v float64) {
		if unknown(*x) {
			*x = v
			filled = append(filled, figure)
		}
	}
	tech, pkg := techDefaults(g.Technology), packageDefaults(g.Package)
	fill(&g.TCR, "tcr_ppm", tech.tcr)
	fill(&g.PowerW, "power_w", pkg.power)
	fill(&g.MaxVoltageV, "max_voltage_v", pkg.lev)
	fill(&g.ThermalResistance, "thermal_resistance_k_per_w", thermalFromRating(g.PowerW))
	fill(&g.LoadLife, "load_life", tech.life)
	return filled
}

// thermalFromRating is the thermal resistance of a chip resistor that
// reaches its 155 °C upper category temperature at rated power from its
// 70 °C rated ambient: 85 K / P (IEC 60115-1's usual derating curve, from
// memory). Real parts on a good board run cooler, so it is conservative.
func thermalFromRating(p float64) float64 { return 85 / p }

// Network fills the unknown figures of a network in place.
func Network(n *catalog.Network) []Assumption {
	f := filler{part: n.Part}
	tech := techDefaults(n.Technology)
	f.set(&n.TCR, "tcr_ppm", tech.tcr, fmt.Sprintf("tempco not given: taken as %g ppm/K (%s)", tech.tcr, tech.why))
	// Two elements at opposite corners of the ±TCR box move their ratio by
	// 2·TCR (domain notes §6, common practice arithmetic).
	f.set(&n.TCRTracking, "tcr_tracking_ppm", 2*n.TCR, fmt.Sprintf("tempco tracking not given: taken as 2 × TCR = %g ppm/K, two independent elements at opposite corners", 2*n.TCR))
	f.set(&n.PowerW, "power_w", networkPowerW, fmt.Sprintf("power per element not given: taken as %g W (the smallest common network rating, common practice)", networkPowerW))
	f.set(&n.MaxVoltageV, "max_voltage_v", networkLEV, fmt.Sprintf("element voltage rating not given: taken as %g V (common practice for small networks)", networkLEV))
	return f.as
}

// Defaults for networks: the usual small-outline network ratings
// (common practice).
const (
	networkPowerW = 0.05
	networkLEV    = 25.0
)

// Amplifier fills the unknown figures of an amplifier in place.
func Amplifier(a *catalog.Amplifier) []Assumption {
	f := filler{part: a.Part}
	inRR := a.RailToRail == catalog.RailIn || a.RailToRail == catalog.RailInOut
	outRR := a.RailToRail == catalog.RailOut || a.RailToRail == catalog.RailInOut
	if inRR {
		f.set(&a.CMNegV, "cm_neg_v", 0, "input range not given, rail-to-rail input: taken to reach the rails and no further")
		f.set(&a.CMPosV, "cm_pos_v", 0, "input range not given, rail-to-rail input: taken to reach the rails and no further")
	} else {
		f.set(&a.CMNegV, "cm_neg_v", HeadroomV, fmt.Sprintf("input range not given: taken as %g V inside each rail (classic bipolar input, common practice)", HeadroomV))
		f.set(&a.CMPosV, "cm_pos_v", HeadroomV, fmt.Sprintf("input range not given: taken as %g V inside each rail (classic bipolar input, common practice)", HeadroomV))
	}
	if outRR {
		f.set(&a.SwingNegV, "swing_neg_v", RailToRailSwingV, fmt.Sprintf("output swing not given, rail-to-rail output: taken as %g V from each rail (tens of mV at light load, more under load; common practice)", RailToRailSwingV))
		f.set(&a.SwingPosV, "swing_pos_v", RailToRailSwingV, fmt.Sprintf("output swing not given, rail-to-rail output: taken as %g V from each rail (tens of mV at light load, more under load; common practice)", RailToRailSwingV))
	} else {
		f.set(&a.SwingNegV, "swing_neg_v", HeadroomV, fmt.Sprintf("output swing not given: taken as %g V from each rail (classic bipolar output, common practice)", HeadroomV))
		f.set(&a.SwingPosV, "swing_pos_v", HeadroomV, fmt.Sprintf("output swing not given: taken as %g V from each rail (classic bipolar output, common practice)", HeadroomV))
	}
	for _, d := range ampDefaults {
		f.set(d.field(a), d.figure, d.value, d.text)
	}
	ib := a.IbA
	f.set(&a.IosA, "ios_a", ib, fmt.Sprintf("input offset current not given: taken equal to the bias current, %g A (the most two same-sign input currents can differ by)", ib))
	quiet(&a.SlewVs, defaultSlewVs)
	quiet(&a.IqA, defaultIqA)
	if a.Type == catalog.MatchedAmp {
		f.set(&a.GainErrorMax, "gain_error_max", matchedGainError, fmt.Sprintf("gain error not given: taken as %g %% (common practice for the loosest grades)", 100*matchedGainError))
		f.set(&a.GainDriftPPM, "gain_drift_ppm", matchedGainDrift, fmt.Sprintf("gain drift not given: taken as %g ppm/K (common practice for the loosest grades)", matchedGainDrift))
		f.set(&a.InNegV, "in_neg_v", a.CMNegV, "input range not given: taken as the amplifier's own common-mode range (no extension by the internal divider)")
		f.set(&a.InPosV, "in_pos_v", a.CMPosV, "input range not given: taken as the amplifier's own common-mode range (no extension by the internal divider)")
		f.set(&a.InternalOhm, "internal_ohm", matchedInternalOhm, fmt.Sprintf("internal resistor value not given: taken as %g ohm; check noise and input impedance against the datasheet", matchedInternalOhm))
	} else {
		// Figures of amplifiers with matched resistors inside; an op-amp
		// has none.
		quiet(&a.GainErrorMax, 0)
		quiet(&a.GainDriftPPM, 0)
		quiet(&a.InNegV, 0)
		quiet(&a.InPosV, 0)
		quiet(&a.InternalOhm, 0)
	}
	return f.as
}

// Range defaults of an amplifier.
const (
	// HeadroomV is the input common-mode and output headroom from each
	// rail taken for an amplifier not called rail-to-rail whose export
	// gives no figure: classic bipolar parts stop about 1.5 V short of
	// each rail (common practice).
	HeadroomV = 1.5
	// RailToRailSwingV is the output swing from each rail taken for a
	// rail-to-rail output with no figure: tens of mV at light load and
	// more under a few-kilohm load (domain notes §7, common practice).
	RailToRailSwingV = 0.2
)

// Matched-amplifier defaults (the loosest common grades, common practice).
const (
	matchedGainError   = 0.01
	matchedGainDrift   = 25.0
	matchedInternalOhm = 50e3
)

// Figures no budget uses; filled so no NaN reaches an output.
const (
	defaultSlewVs = 0.1e6 // 0.1 V/µs
	defaultIqA    = 5e-3
)

type ampDefault struct {
	figure string
	field  func(*catalog.Amplifier) *float64
	value  float64
	text   string
}

// ampDefaults are the op-amp figures' defaults: the worst datasheet
// maximums of general-purpose parts (common practice), so a design that
// passes on them passes on any ordinary part.
var ampDefaults = []ampDefault{
	{"vos_v", func(a *catalog.Amplifier) *float64 { return &a.VosV }, 10e-3,
		"input offset voltage not given: taken as 10 mV (general-purpose parts over temperature, common practice)"},
	{"vos_drift_v_per_k", func(a *catalog.Amplifier) *float64 { return &a.VosDriftVK }, 20e-6,
		"offset drift not given: taken as 20 µV/K (general-purpose parts, common practice)"},
	{"ib_a", func(a *catalog.Amplifier) *float64 { return &a.IbA }, 1e-6,
		"input bias current not given: taken as 1 µA (bipolar inputs without bias cancellation, common practice)"},
	{"aol_v_per_v", func(a *catalog.Amplifier) *float64 { return &a.AolVV }, 1e4,
		"open-loop gain not given: taken as 80 dB (10^4 V/V, the low end of general-purpose parts, common practice)"},
	{"cmrr_db", func(a *catalog.Amplifier) *float64 { return &a.CMRRdB }, 60,
		"CMRR not given: taken as 60 dB (the lowest usual datasheet minimum, common practice)"},
	{"gbw_hz", func(a *catalog.Amplifier) *float64 { return &a.GBWHz }, 100e3,
		"gain-bandwidth not given: taken as 100 kHz (micropower parts, common practice)"},
	{"noise_v_per_rthz", func(a *catalog.Amplifier) *float64 { return &a.NoiseVHz }, 100e-9,
		"voltage noise not given: taken as 100 nV/√Hz (micropower CMOS parts, common practice)"},
	{"noise_a_per_rthz", func(a *catalog.Amplifier) *float64 { return &a.NoiseAHz }, 1e-12,
		"current noise not given: taken as 1 pA/√Hz (bipolar general-purpose inputs, common practice)"},
}

type techDefault struct {
	tcr, life float64
	why       string
}

// techDefaults returns the tempco and load-life taken for a technology
// when the catalog gives none: the loosest common grade of the technology
// (load life: the usual stability classes of IEC 60115-1, from memory;
// tempcos: common practice).
func techDefaults(tech string) techDefault {
	switch tech {
	case "thin-film":
		return techDefault{50, 0.005, "the loosest common thin-film grade, common practice"}
	case "metal-film":
		return techDefault{100, 0.01, "the loosest common metal-film grade, common practice"}
	case "thick-film":
		return techDefault{200, 0.02, "the loosest common thick-film grade, common practice"}
	case "foil":
		return techDefault{10, 0.0005, "the loosest common foil grade, common practice"}
	case "wirewound":
		return techDefault{50, 0.01, "the loosest common wirewound grade, common practice"}
	case "metal-strip":
		return techDefault{100, 0.01, "the loosest common current-sense alloy, common practice"}
	}
	return techDefault{500, 0.02, "technology unknown: the loosest common grade of any (carbon film), common practice"}
}

type packageDefault struct {
	power, lev float64
	why        string
}

// packageDefaults returns the power rating and limiting element voltage
// taken for a chip size when the catalog gives none: the usual thick-film
// chip ratings at 70 °C (common practice); the smallest common chip when
// the size is unknown too.
func packageDefaults(pkg string) packageDefault {
	switch pkg {
	case "0402":
		return packageDefault{0.063, 50, "usual 0402 chip rating, common practice"}
	case "0603":
		return packageDefault{0.1, 75, "usual 0603 chip rating, common practice"}
	case "0805":
		return packageDefault{0.125, 150, "usual 0805 chip rating, common practice"}
	case "1206":
		return packageDefault{0.25, 200, "usual 1206 chip rating, common practice"}
	case "1210":
		return packageDefault{0.5, 200, "usual 1210 chip rating, common practice"}
	case "2010":
		return packageDefault{0.75, 200, "usual 2010 chip rating, common practice"}
	case "2512":
		return packageDefault{1, 200, "usual 2512 chip rating, common practice"}
	}
	return packageDefault{0.05, 25, "size unknown or not a chip: the usual 0201 rating, the smallest common chip, common practice"}
}

// StrappedTCR returns the absolute tempco taken for the internal resistors
// of matched amplifier part (the elements of its network), which the
// catalog does not record
// (catalog.MatchedNetwork holds the ratio tracking only), with the
// assumption that says so: the thin-film default, the loosest common
// thin-film grade (common practice). The gain of a strapping depends on
// the elements' ratios only, so the figure reaches a budget only through
// resistances outside the part in series with its elements (the source's,
// the reference's); a caller lists the assumption where those exist.
func StrappedTCR(part string) (tcr float64, a Assumption) {
	d := techDefaults("thin-film")
	return d.tcr * 1e-6, Assumption{Part: part, Figure: "tcr_ppm", Value: d.tcr,
		Text: fmt.Sprintf("absolute tempco of the internal resistors not given: taken as %g ppm/K (%s); it moves the gain only through the source and reference resistances in series with them", d.tcr, d.why)}
}

// MatchedAbsTolerance returns the absolute tolerance of the internal
// resistors of matched amplifier a: its network's figure where the catalog
// holds one, else the loosest common figure for resistors integrated with
// an amplifier, ±25 % (common practice: their ratios are trimmed, their
// absolute values held only to ±20..25 %), with the assumption that says
// so. It matters only where a resistance outside the part is in series
// with them (a source or reference resistance).
func MatchedAbsTolerance(a *catalog.Amplifier) (float64, []Assumption) {
	if n := a.Network; n != nil && !unknown(n.Tolerance) {
		return n.Tolerance, nil
	}
	return matchedAbsTolerance, []Assumption{{Part: a.Part, Figure: "internal_ohm", Value: a.InternalOhm,
		Text: fmt.Sprintf("absolute tolerance of the internal resistors not given: taken as %g %% (integrated resistors are matched, not accurate; common practice); it moves the gain through the source and reference resistances in series with them", 100*matchedAbsTolerance)}}
}

// matchedAbsTolerance is the absolute tolerance taken for a matched
// amplifier's internal resistors (see MatchedAbsTolerance).
const matchedAbsTolerance = 0.25
