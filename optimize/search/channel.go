package search

import (
	"plumb/optimize/budget"
	"plumb/optimize/spec"
)

// unreachable is the screening limit of a stage figure the channel leaves
// no room for: every design fails it, and the exact budget says why.
const unreachable = 1e-30

// channelLimits sets the screening of the channel's total error and
// tightens the stage's screening limits with what the
// channel's limits (total_error, total_drift at the ADC) leave the stage
// (budget.ChannelAllowance): each is necessary for the channel to pass, so
// the search prunes with them without losing a design the exact budget,
// which judges the channel itself, would pass.
func channelLimits(s *spec.Spec, p *Problem) {
	p.Channel = budget.NewChannelScreen(s)
	l := &p.Limits
	al, ok := budget.ChannelAllowance(s)
	if !ok {
		return
	}
	tighten := func(dst *float64, v float64) {
		switch {
		case v == 0:
			return
		case v < 0:
			v = unreachable
		}
		if *dst == 0 || v < *dst {
			*dst = v
		}
	}
	tighten(&l.TotalGainError, al.GainError)
	tighten(&l.OffsetV, al.OffsetV)
	tighten(&l.DriftPPM, al.DriftPerK*1e6)
	tighten(&l.OffsetDriftVK, al.OffsetDriftVK)
}

// channelConstrained adds the channel's limits to the limits a spec sets.
func channelConstrained(s *spec.Spec, set map[string]bool) {
	if s.ADC == nil {
		return
	}
	set[budget.LimitTotalError] = s.Limits.TotalError > 0
	set[budget.LimitTotalDrift] = s.Limits.TotalDrift > 0
	set[budget.LimitADCRange] = true
}
