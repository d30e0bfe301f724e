package search

import (
	"plumb/optimize/budget"
	"plumb/optimize/spec"
)

// unreachable is the screening limit of a stage figure the channel leaves
// no room for: every design fails it, and the exact budget says why.
const unreachable = 1e-30

// channelSlack is how far below its screening figures the channel's
// screening takes a stage's figures. The screening figures are models of
// the exact budget's (first order in places, products of factors where the
// budget sums them); measured against the exact budget over every design
// class of the adc-channel example under worst case and RSS they read at
// most about 2 % high (TestChannelScreenBelowExact), so 5 % keeps the
// screen below the budget with room. Too loose costs only budget runs: a
// design the screen passes and the budget fails is replaced (see solve).
const channelSlack = 0.05

// channelLimits sets the screening of the channel's total error and
// tightens the stage's screening limits with what the
// channel's limits (total_error, total_drift at the ADC) leave the stage
// (budget.ChannelAllowance): each is necessary for the channel to pass, so
// the search prunes with them without losing a design the exact budget,
// which judges the channel itself, would pass.
func channelLimits(s *spec.Spec, p *Problem) {
	p.Channel = budget.NewChannelScreen(s).WithSlack(channelSlack)
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
	loose := 1 / (1 - channelSlack)
	if al.ResOffsetV > 0 {
		p.ResOffsetV = al.ResOffsetV * loose
	}
	tighten(&l.TotalGainError, al.GainError*loose)
	tighten(&l.OffsetV, al.OffsetV*loose)
	tighten(&l.DriftPPM, al.DriftPerK*1e6*loose)
	tighten(&l.OffsetDriftVK, al.OffsetDriftVK*loose)
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
