package budget

import (
	"fmt"
	"math"

	"plumb/catalog/units"
	"plumb/optimize/assume"
	"plumb/optimize/family"
	"plumb/optimize/spec"
)

// ChainBudget is the error budget of a chain of stages (spec.Spec.Stages)
// at the chain's output, from each stage's own budget under its stage spec
// (spec.StageSpec), against the chain's limits.
type ChainBudget struct {
	Method  string  `json:"method"`
	Metrics Metrics `json:"metrics"`
	Limits  []Limit `json:"limits"`
	Binding string  `json:"binding"`
	// Pass is true when every chain limit passes and every stage passes
	// its own hard limits (pins, output swing, ratings).
	Pass    bool     `json:"pass"`
	Channel *Channel `json:"channel,omitempty"`
	Notes   []string `json:"notes,omitempty"`
	// Assumptions are the ADC figures taken at their defaults.
	Assumptions []assume.Assumption `json:"assumptions,omitempty"`
	// Loads are what each later stage's input draws from the stage before.
	Loads []StageLoad `json:"loads,omitempty"`
}

// StageLoad is the load a stage's input puts on the earlier stage's
// output: the stage's lowest input resistance (its budget's
// InputImpedanceOhm), the earlier stage's ideal output peak over the
// chain's input range, and the current it then draws, by Ohm's law
// I = V/R.
type StageLoad struct {
	Stage    int     `json:"stage"`
	InputOhm float64 `json:"input_ohm"`
	PeakV    float64 `json:"peak_v"`
	CurrentA float64 `json:"current_a"`
}

// stageLoads are the loads of the stages after the first (StageLoad).
func stageLoads(s *spec.Spec, stages []*Result) []StageLoad {
	var out []StageLoad
	g := 1.0
	for k := 1; k < len(stages); k++ {
		g *= s.Stages[k-1].Gain
		rin := stages[k].Metrics.InputImpedanceOhm
		if !(rin > 0) || math.IsInf(rin, 1) {
			continue
		}
		peak := math.Abs(g) * math.Max(math.Abs(s.Input.Min), math.Abs(s.Input.Max))
		out = append(out, StageLoad{Stage: k + 1, InputOhm: rin, PeakV: peak, CurrentA: peak / rin})
	}
	return out
}

// Cascade combines the budgets of a chain's stages, first to last, into
// the chain's figures at its output, the standard cascade of gain stages
// (any text on amplifier error budgets; common practice). With stage k of
// nominal gain G_k, gain error e_k, gain drift d_k, output offset o_k,
// offset drift u_k, common-mode error c_k (its CMRR acting on the common
// mode its inputs see: for a later stage, the earlier stage's output
// common mode), noise density n_k and RMS noise r_k, the output of the
// stages up to k is G_k (1 + e_k) (V_{k-1} + o_{k-1}) + o_k, so that
//
//	gain error   worst case (1 + e)(1 + e_k) - 1 = e + e_k + e e_k; RSS √(e² + e_k²)
//	gain drift   worst case d + d_k; RSS √(d² + d_k²)
//	offset       worst case |G_k|(1 + e_k) o + o_k; RSS √((G_k o)² + o_k²)
//
// and the same for offset drift and the common-mode error; noise adds in
// quadrature at the output, √((G_k n)² + n_k²) (uncorrelated sources),
// the RMS figure taken over each stage's own bandwidth (an upper bound: the
// later stage filters the earlier stage's noise further). The bandwidth of
// two single-pole stages f1, f2 is where (1 + (f/f1)²)(1 + (f/f2)²) = 2,
//
//	f² = (√((f1² + f2²)² + 4 f1² f2²) - (f1² + f2²)) / 2,
//
// 0.644 f for two equal poles (√(√2 - 1), the shrinkage of cascaded
// identical stages). The chain's CMRR is the first stage's, less what a
// later stage adds: the first stage's common-mode output moves the later
// stage's input common mode by half of it (its other input at ground), so
// 1/CMRR = (1/CMRR_1)(1 + 1/(2 CMRR_2)). The input impedance is the first
// stage's. Where the spec has an ADC, its total error is computed as for a
// single stage (see Channel) from the chain's figures.
func Cascade(s *spec.Spec, stages []*Result) (*ChainBudget, error) {
	if len(stages) != len(s.Stages) || len(stages) == 0 {
		return nil, fmt.Errorf("budget: a chain of %d stages needs %d stage budgets, got %d", len(s.Stages), len(s.Stages), len(stages))
	}
	worst := s.Analysis.Method == spec.WorstCase
	add := func(a, b float64) float64 {
		if worst {
			return a + b
		}
		return math.Hypot(a, b)
	}
	first := stages[0].Metrics
	m := first
	m.TotalErrorFS, m.TotalErrorLSB, m.TotalDriftFS, m.TotalDriftLSB, m.ADCRangeMarginV = 0, 0, 0, 0, 0
	contrib := map[string][]Contribution{}
	stageTerms := func(k int, scale float64, sm *Metrics) {
		name := fmt.Sprintf("stage %d ", k+1)
		contrib[LimitGainError] = append(contrib[LimitGainError], Contribution{Name: name + "gain error", Value: sm.GainError})
		contrib[LimitGainDrift] = append(contrib[LimitGainDrift], Contribution{Name: name + "gain drift", Value: sm.DriftPPMPerK})
		contrib[LimitOutputOffset] = append(contrib[LimitOutputOffset], Contribution{Name: name + "offset", Value: scale * sm.OutputOffsetV})
		contrib[LimitOffsetDrift] = append(contrib[LimitOffsetDrift], Contribution{Name: name + "offset drift", Value: scale * sm.OffsetDriftVPerK})
		contrib[LimitNoiseRMS] = append(contrib[LimitNoiseRMS], Contribution{Name: name + "noise", Value: scale * sm.NoiseRMSV})
		contrib[LimitNoiseDensity] = append(contrib[LimitNoiseDensity], Contribution{Name: name + "noise", Value: scale * sm.NoiseDensity})
	}
	for k := 1; k < len(stages); k++ {
		sm := stages[k].Metrics
		g := math.Abs(s.Stages[k].Gain)
		gw := g // the gain an earlier stage's error is carried by, worst case
		if worst {
			gw = g * (1 + sm.GainError)
		}
		m.Gain *= sm.Gain
		m.GainTarget *= sm.GainTarget
		if worst {
			m.GainError = m.GainError + sm.GainError + m.GainError*sm.GainError
			m.GainErrorInitial = m.GainErrorInitial + sm.GainErrorInitial + m.GainErrorInitial*sm.GainErrorInitial
		} else {
			m.GainError = math.Hypot(m.GainError, sm.GainError)
			m.GainErrorInitial = math.Hypot(m.GainErrorInitial, sm.GainErrorInitial)
		}
		m.DriftPPMPerK = add(m.DriftPPMPerK, sm.DriftPPMPerK)
		m.OutputOffsetV = add(gw*m.OutputOffsetV, sm.OutputOffsetV)
		m.OffsetDriftVPerK = add(gw*m.OffsetDriftVPerK, sm.OffsetDriftVPerK)
		m.CommonModeErrorV = add(gw*m.CommonModeErrorV, sm.CommonModeErrorV)
		m.NoiseDensity = math.Hypot(g*m.NoiseDensity, sm.NoiseDensity)
		m.NoiseRMSV = math.Hypot(g*m.NoiseRMSV, sm.NoiseRMSV)
		m.BandwidthHz = CascadeBandwidth(m.BandwidthHz, sm.BandwidthHz)
		m.CMRRdB = CascadeCMRRdB(m.CMRRdB, sm.CMRRdB)
		m.CMRRResistorsdB = CascadeCMRRdB(m.CMRRResistorsdB, sm.CMRRResistorsdB)
		m.HeadroomV = math.Min(m.HeadroomV, sm.HeadroomV)
		m.PowerRatio = math.Max(m.PowerRatio, sm.PowerRatio)
		m.VoltageRatio = math.Max(m.VoltageRatio, sm.VoltageRatio)
	}
	m.GainNominalError = 0
	if m.GainTarget != 0 {
		m.GainNominalError = (m.Gain - m.GainTarget) / m.GainTarget
	}
	for k := range stages {
		scale := 1.0
		for _, st := range s.Stages[k+1:] {
			scale *= math.Abs(st.Gain)
		}
		stageTerms(k, scale, &stages[k].Metrics)
	}

	cb := &ChainBudget{Method: s.Analysis.Method, Metrics: m, Pass: true}
	e := &Evaluator{s: s, differential: s.Differential, matched: true}
	var sc Score
	sc.Binding = -1
	e.judge(&cb.Metrics, &sc)
	res := &Result{Metrics: cb.Metrics, Pass: sc.AllPass}
	limitUnits := LimitUnits
	l := &s.Limits
	lims := [NumLimits]float64{l.GainError, l.CMRRdB, l.GainDrift * 1e6, l.OutputOffsetV, l.OffsetDriftVK, l.NoiseRMSV,
		l.NoiseDensity, l.BandwidthHz, l.InputImpedance, 0, 1, 1}
	values := [NumLimits]float64{m.GainError, m.CMRRdB, m.DriftPPMPerK, m.OutputOffsetV, m.OffsetDriftVPerK, m.NoiseRMSV,
		m.NoiseDensity, m.BandwidthHz, m.InputImpedanceOhm, m.HeadroomV, m.PowerRatio, m.VoltageRatio}
	isMax := [NumLimits]bool{true, false, true, true, true, true, true, false, false, false, true, true}
	for i := range NumLimits {
		if !sc.Checked[i] {
			continue
		}
		lim := Limit{Name: LimitNames[i], Value: values[i], Limit: lims[i], Max: isMax[i], Margin: finite(sc.Margin[i]), Pass: sc.Pass[i], Unit: limitUnits[i]}
		lim.MarginText = marginText(lim, sc.Margin[i])
		lim.Contributors = e.sorted(contrib[LimitNames[i]])
		res.Limits = append(res.Limits, lim)
	}
	if sc.Binding >= 0 {
		res.Binding = LimitNames[sc.Binding]
	}
	if s.ADC != nil {
		last := s.StageSpec(len(s.Stages) - 1)
		st := stageFigures{gain: s.Gain, zero: specZero(last), gainErr: m.GainError, offset: m.OutputOffsetV, cmErr: m.CommonModeErrorV,
			noiseRMS: m.NoiseRMSV, drift: m.DriftPPMPerK * 1e-6, offDrift: m.OffsetDriftVPerK,
			refInStage: last.Reference != nil && !s.ADC.SharedRef && usesReference(last)}
		cb.Assumptions = e.channelFrom(&st, res, res, s.ADC.SharedRef)
	}
	for k, st := range stages {
		if !st.Pass {
			res.Pass = false
			res.Notes = append(res.Notes, fmt.Sprintf("stage %d fails its own limits (binding: %s)", k+1, st.Binding))
		}
	}
	cb.Metrics, cb.Limits, cb.Binding, cb.Pass, cb.Channel = res.Metrics, res.Limits, res.Binding, res.Pass, res.Channel
	cb.Notes = append(res.Notes, chainNotes(s)...)
	cb.Loads = stageLoads(s, stages)
	for _, l := range cb.Loads {
		cb.Notes = append(cb.Notes, fmt.Sprintf("chain: stage %d's input (at least %s) draws up to %s from stage %d's output at its peak of %s; the catalog gives no op-amp output current, so check it against the part's own figures",
			l.Stage, units.Format(l.InputOhm, "Ω"), units.Format(l.CurrentA, "A"), l.Stage-1, units.Format(l.PeakV, "V")))
	}
	return cb, nil
}

// usesReference reports whether a stage spec's families take a reference.
func usesReference(s *spec.Spec) bool {
	for _, name := range s.Families {
		if f := family.Lookup(name); f != nil && f.Reference != family.RefNone {
			return true
		}
	}
	return false
}

// chainNotes say what the chain's budget assumes.
func chainNotes(s *spec.Spec) []string {
	out := []string{
		"chain: each stage's errors carried through the next by the cascade equations (gain errors multiply, an earlier stage's offset, drift and common-mode error scaled by the later stage's gain, noise added in quadrature at the output)",
		"chain: the earlier stage's output drives the later stage's input with the other input at ground, so the later stage's common-mode error acts on half the earlier stage's output; the earlier stage is referred to ground, the spec's reference feeds the last stage",
		"chain: noise RMS takes each stage's noise over its own bandwidth (an upper bound); the bandwidth is that of the stages' single poles in cascade",
		"chain: the earlier stage's output is taken as an ideal source: its closed-loop output resistance, the op-amp's open-loop output resistance divided by its loop gain (milliohms at these gains), sits in series with the later stage's input resistors (kilohms) and moves the gain and the match by parts per million at most, so it is neglected (the catalog gives no open-loop output resistance); the swing limits are the catalog's, at its rated load",
	}
	if s.ADC != nil && s.ADC.SharedRef {
		out = append(out, "chain: the last stage's budget takes the reference as ideal; its tolerance and drift enter the ADC's total error once, on the signal's share (ratiometric)")
	}
	return out
}

// CascadeBandwidth is the -3 dB frequency of two single poles f1 and f2
// in cascade, where (1 + (f/f1)²)(1 + (f/f2)²) = 2 (a quadratic in f²). A
// zero or unknown (0) pole leaves the other.
func CascadeBandwidth(f1, f2 float64) float64 {
	switch {
	case !(f1 > 0):
		return f2
	case !(f2 > 0):
		return f1
	case math.IsInf(f1, 1):
		return f2
	case math.IsInf(f2, 1):
		return f1
	}
	a, b := f1*f1, f2*f2
	sum := a + b
	// f² = (√(sum² + 4ab) - sum)/2, written to avoid cancellation.
	return math.Sqrt(2 * a * b / (math.Sqrt(sum*sum+4*a*b) + sum))
}

// CascadeCMRRdB is the CMRR of a first stage of CMRR c1 (dB) followed by a
// stage of CMRR c2 whose input common mode moves by half the first stage's
// common-mode output: 1/CMRR = (1/CMRR1)(1 + 1/(2 CMRR2)).
func CascadeCMRRdB(c1, c2 float64) float64 {
	if math.IsInf(c2, 1) || math.IsNaN(c2) {
		return c1
	}
	lin2 := math.Pow(10, c2/20)
	return c1 - 20*math.Log10(1+1/(2*lin2))
}

// BestOf is a stage budget whose figures are, each on its own, the best
// among rs (the least error, drift, offset, noise, stress and resistor
// ratio; the largest CMRR, bandwidth, headroom and input impedance), and
// which passes. Cascade is monotone in every stage figure it reads (the
// cascade equations above add or multiply non-negative magnitudes, take
// the least bandwidth, CMRR and headroom and the largest stress; the ADC's
// total error adds the same magnitudes and its range margin subtracts
// them), so the chain of a stage and BestOf(rs) is at least as good on
// every limit as the chain of that stage and any of rs: where it fails,
// every such chain fails. Nil for an empty rs.
func BestOf(rs []*Result) *Result {
	if len(rs) == 0 {
		return nil
	}
	m := rs[0].Metrics
	for _, r := range rs[1:] {
		o := &r.Metrics
		m.GainError = math.Min(m.GainError, o.GainError)
		m.GainErrorInitial = math.Min(m.GainErrorInitial, o.GainErrorInitial)
		m.CMRRdB = math.Max(m.CMRRdB, o.CMRRdB)
		m.CMRRResistorsdB = math.Max(m.CMRRResistorsdB, o.CMRRResistorsdB)
		m.DriftPPMPerK = math.Min(m.DriftPPMPerK, o.DriftPPMPerK)
		m.OutputOffsetV = math.Min(m.OutputOffsetV, o.OutputOffsetV)
		m.CommonModeErrorV = math.Min(m.CommonModeErrorV, o.CommonModeErrorV)
		m.OffsetDriftVPerK = math.Min(m.OffsetDriftVPerK, o.OffsetDriftVPerK)
		m.BandwidthHz = math.Max(m.BandwidthHz, o.BandwidthHz)
		m.NoiseDensity = math.Min(m.NoiseDensity, o.NoiseDensity)
		m.NoiseRMSV = math.Min(m.NoiseRMSV, o.NoiseRMSV)
		m.InputImpedanceOhm = math.Max(m.InputImpedanceOhm, o.InputImpedanceOhm)
		m.HeadroomV = math.Max(m.HeadroomV, o.HeadroomV)
		m.PowerRatio = math.Min(m.PowerRatio, o.PowerRatio)
		m.VoltageRatio = math.Min(m.VoltageRatio, o.VoltageRatio)
	}
	return &Result{Metrics: m, Pass: true}
}
