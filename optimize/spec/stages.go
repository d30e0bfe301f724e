package spec

import (
	"fmt"
	"math"
	"slices"
	"strings"

	"plumb/optimize/family"
)

// Stage is one stage of a chain (Spec.Stages): the families it may use,
// its gain and its rails.
type Stage struct {
	Families []string `json:"families"`
	Gain     float64  `json:"gain"`
	Supply   Range    `json:"supply"`
}

// ChainStages is how many stages a chain takes: an instrumentation
// amplifier (or another first stage) and the stage into the ADC.
const ChainStages = 2

type rawStage struct {
	Family   string   `yaml:"family"`
	Families []string `yaml:"families"`
	Gain     string   `yaml:"gain"`
	Supply   string   `yaml:"supply"`
}

// IsChain reports whether the spec lists stages.
func (s *Spec) IsChain() bool { return len(s.Stages) > 0 }

// parseStages reads the stages of a chain. The top-level input is the
// first stage's; the top-level supply is every stage's unless a stage
// gives its own; the top-level reference feeds the last stage (and the ADC
// where it shares it), the earlier stages being referred to ground. For
// the rest of Parse the spec stands for its first stage (its families and
// gain), so that the input is checked against that stage; Parse then sets
// Gain to the chain's.
func parseStages(p *problems, r *rawSpec) []Stage {
	if len(r.Stages) == 0 {
		return nil
	}
	for _, f := range []struct{ name, val string }{{"family", r.Family}, {"gain", r.Gain}, {"output", r.Output}} {
		if f.val != "" {
			p.add(f.name, "given together with stages; a chain gives it per stage, under stages")
		}
	}
	if len(r.Families) > 0 {
		p.add("families", "given together with stages; a chain gives them per stage, under stages")
	}
	if len(r.Stages) != ChainStages {
		p.add("stages", "lists %d stages; a chain takes %d (a first stage, then the stage into the ADC)", len(r.Stages), ChainStages)
		return nil
	}
	out := make([]Stage, len(r.Stages))
	for i, rs := range r.Stages {
		at := fmt.Sprintf("stages[%d]", i)
		st := &out[i]
		switch {
		case rs.Family != "" && len(rs.Families) > 0:
			p.add(at+".family", "given together with families; use one of them")
		case rs.Family != "":
			st.Families = []string{strings.TrimSpace(rs.Family)}
		case len(rs.Families) > 0:
			st.Families = rs.Families
		default:
			p.add(at+".family", "missing; name one of %s, or list several under families", strings.Join(KnownFamilies, ", "))
		}
		kind := family.Input(-1)
		for j, name := range st.Families {
			fld := at + ".family"
			if len(rs.Families) > 0 {
				fld = fmt.Sprintf("%s.families[%d]", at, j)
			}
			f := family.Lookup(name)
			switch {
			case f == nil:
				p.add(fld, "%q is not a family; use one of %s", name, strings.Join(KnownFamilies, ", "))
			case slices.Index(st.Families, name) != j:
				p.add(fld, "%q is listed twice", name)
			case f.Input == family.Current || f.OutputRange:
				p.add(fld, "family %s cannot be a stage of a chain (its input is a current, or its gain follows from an output range); use a voltage-in, gain-given family", name)
			case kind >= 0 && f.Input != kind:
				p.add(fld, "family %s takes another kind of input than the stage's other families; list families of one input kind per stage", name)
			default:
				kind = f.Input
			}
		}
		if rs.Gain == "" {
			p.add(at+".gain", "missing; give the stage's gain, e.g. 10")
		} else {
			st.Gain = field(p, at+".gain", rs.Gain, uGain)
			if st.Gain == 0 && !p.failed(at+".gain") {
				p.add(at+".gain", "is zero; a stage needs a non-zero gain")
			}
		}
		if rs.Supply != "" {
			st.Supply = rangeField(p, at+".supply", rs.Supply, uVolt)
			if !p.failed(at+".supply") && (st.Supply.Min > 0 || st.Supply.Max < 0 || st.Supply.Min == st.Supply.Max) {
				p.add(at+".supply", "%q must span ground (0 V) between its rails; write e.g. 0..5V or ±15V", rs.Supply)
			}
		}
		for _, name := range st.Families {
			if f := family.Lookup(name); f != nil && st.Gain != 0 {
				if msg := f.GainProblem(st.Gain); msg != "" {
					p.add(at+".gain", "%g does not suit family %s: %s", st.Gain, f.Name, msg)
				}
			}
		}
	}
	if p.failed("stages") {
		return nil
	}
	return out
}

// StageSpec is the spec of stage i of a chain alone, as the search and the
// budget take it: the stage's families, gain and rails; the chain's input
// for the first stage; for a later stage, the earlier stage's ideal output
// as its input (a differential stage takes it between its inputs, the
// other input at the earlier stage's ground reference, so its common mode
// is half that output). The chain's reference feeds the last stage only;
// earlier stages are referred to ground. Only the last stage drives the
// spec's load; where the ADC shares the chain's reference, the last stage
// takes it as ideal. The stage spec has no limits and no ADC (the chain's apply
// to the chain's output; see StageLimits), and keeps the build, the
// temperature, the method and the rest.
func (s *Spec) StageSpec(i int) *Spec {
	st := s.Stages[i]
	sub := *s
	sub.Stages = nil
	sub.Families = slices.Clone(st.Families)
	sub.Gain = st.Gain
	sub.Offset = 0
	sub.Output = Range{}
	sub.Limits = Limits{}
	sub.ADC = nil
	sub.Name = fmt.Sprintf("%s stage %d", s.Name, i+1)
	if st.Supply != (Range{}) {
		sub.Supply = st.Supply
	}
	last := i == len(s.Stages)-1
	switch {
	case !last:
		sub.Reference = nil
		sub.LoadOhm, sub.LeakageA = 0, 0
	case s.Reference != nil && s.ADC != nil && s.ADC.SharedRef:
		// The ADC divides by the same reference: its tolerance and drift
		// enter the chain's total error once, ratiometrically, there.
		r := *s.Reference
		r.Tolerance, r.Drift = 0, 0
		sub.Reference = &r
	}
	if i > 0 {
		g := 1.0
		for _, p := range s.Stages[:i] {
			g *= p.Gain
		}
		a, b := g*s.Input.Min, g*s.Input.Max
		in := Range{Min: math.Min(a, b), Max: math.Max(a, b)}
		sub.Input = in
		sub.SourceOhm = 0 // an op-amp's output drives it
		sub.Differential = false
		sub.CommonMode = Range{}
		if f := family.Lookup(st.Families[0]); f != nil && f.Input == family.Differential {
			sub.Differential = true
			sub.CommonMode = Range{Min: in.Min / 2, Max: in.Max / 2}
		}
	}
	return &sub
}

// StageProblem is stage i of a chain as the chain's search and check
// judge it alone: StageSpec with StageLimits.
func (s *Spec) StageProblem(i int) *Spec {
	sub := s.StageSpec(i)
	sub.Limits = s.StageLimits(i)
	return sub
}

// StageLimits are limits on stage i of a chain that every chain design
// meeting the chain's limits also meets, so that a search of each stage
// under them loses no passing chain (the chain's cascade equations, in
// package budget, are never below the stage's own share): the gain error,
// gain drift and bandwidth limits apply to each stage; offset, offset
// drift and noise to the last stage as given and to an earlier stage
// divided by the |nominal gain| of the stages after it (its figures reach
// the output multiplied by at least that, as the cascade takes them); CMRR
// and input impedance to the first stage. The ADC's total error and drift
// give none.
func (s *Spec) StageLimits(i int) Limits {
	l := s.Limits
	after := 1.0
	for _, st := range s.Stages[i+1:] {
		after *= math.Abs(st.Gain)
	}
	out := Limits{GainError: l.GainError, GainDrift: l.GainDrift, BandwidthHz: l.BandwidthHz,
		OutputOffsetV: l.OutputOffsetV / after, OffsetDriftVK: l.OffsetDriftVK / after,
		NoiseRMSV: l.NoiseRMSV / after, NoiseDensity: l.NoiseDensity / after}
	if i == 0 {
		out.CMRRdB, out.InputImpedance = l.CMRRdB, l.InputImpedance
	}
	return out
}

// checkStages checks each stage's spec as Parse checks a one-stage spec
// (output swing against its rails, its reference, and for the last stage
// the ADC), each problem under its stage.
func checkStages(p *problems, s *Spec) {
	if s.Analysis.Method == MonteCarlo {
		p.add("analysis.method", "a chain is budgeted by worst-case or rss in this version; Monte Carlo of a chain is not built yet")
	}
	for i := range s.Stages {
		sub := s.StageSpec(i)
		if i == len(s.Stages)-1 {
			sub.ADC = s.ADC
		}
		q := &problems{kind: p.kind, file: p.file, index: p.index}
		checkConsistency(q, sub)
		for _, err := range q.errs {
			fe, ok := err.(*FieldError)
			if !ok {
				continue
			}
			at := fmt.Sprintf("stages[%d]", i)
			if strings.HasPrefix(fe.Field, "adc") || strings.HasPrefix(fe.Field, "reference") {
				at = fe.Field
			}
			p.add(at, "stage %d: %s: %s", i+1, fe.Field, fe.Msg)
		}
	}
}
