package search

import "math"

// slack is how far above the exact budget's figures a screen may read,
// per figure, as factors of at least 1 (CMRR: of its linear
// rejection). The instrumentation amplifier's screen (evalInAmp) and the
// difference stage behind a current-sense shunt are first-order models:
// under worst case they read a few per cent above the budget (the
// corners they take apart, the self-heating taken at the larger
// temperature excursion), and under RSS they add linearly terms the
// budget adds in quadrature (the three op-amps' offsets and bias terms,
// the resistors' and the amplifier's common-mode terms), up to 2.4 times
// the budget's output offset. Pruning against limits loosened by these
// factors keeps "a screen never reads worse than the budget"; the exact
// budget then confirms every design. TestMergedScreenWithinSlack measures
// the factors over random designs of random variations of the load-cell
// and current-sense examples and holds them; the values below are the
// largest it found with about 10 % to spare.
type slack struct {
	gainErr, totalErr, drift, offset, offDrift, noise, cmrr float64
}

// mergedSlack is the slack of the merged searches' screens per strategy
// (true: the in-amp's; false: the stage behind a shunt) and method (RSS
// also stands for Monte Carlo, which the search screens with RSS
// figures).
func mergedSlack(inamp bool, m Method) slack {
	switch {
	case inamp && m == WorstCase:
		return slack{gainErr: 1.05, totalErr: 1.05, drift: 1.05, offset: 1.05, offDrift: 1.05, noise: 1.05, cmrr: 1.05}
	case inamp:
		return slack{gainErr: 1.55, totalErr: 1.6, drift: 1.6, offset: 2.7, offDrift: 1.6, noise: 1.05, cmrr: 2.15}
	case m == WorstCase:
		return slack{gainErr: 1.05, totalErr: 1.12, drift: 1.05, offset: 1.05, offDrift: 1.05, noise: 1.05, cmrr: 1.05}
	default:
		return slack{gainErr: 1.1, totalErr: 1.1, drift: 1.1, offset: 1.36, offDrift: 1.1, noise: 1.05, cmrr: 1.56}
	}
}

// loosen sets the limits p's screen prunes with: its limits loosened by
// sl (a maximum times its factor, a minimum CMRR less 20·log10 of its).
// Only a search whose designs the exact budget confirms loosens them:
// without the budget the screening figures are the result.
func (p *Problem) loosen(sl slack) {
	l := p.Limits
	l.GainError *= sl.gainErr
	l.TotalGainError *= sl.totalErr
	l.DriftPPM *= sl.drift
	l.OffsetV *= sl.offset
	l.OffsetDriftVK *= sl.offDrift
	l.NoiseDensity *= sl.noise
	l.NoiseRMS *= sl.noise
	if l.CMRRdB > 0 {
		l.CMRRdB -= 20 * math.Log10(sl.cmrr)
	}
	p.screen = &l
}

// screenLimits are the limits the screening prunes with.
func (p *Problem) screenLimits() *Limits {
	if p.screen != nil {
		return p.screen
	}
	return &p.Limits
}
