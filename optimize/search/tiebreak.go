package search

import (
	"math"

	"plumb/optimize/family"
)

// tieKey orders designs of equal cost by their normalised margins, worst
// first: the larger worst margin ranks first; where the worst margins agree
// (a limit no value choice moves, such as a drift set by the tempcos) the
// next-worst decides, and so on; then the lower resistor power stress, then
// the lower voltage stress. Margins are the screening figures' limit/value
// for a maximum, value/limit for a minimum (the linear ratio for dB), and
// 1/stress for the resistor power and voltage ratings, so a resistor near
// its derated power counts as a thin margin like any limit. A spec without
// a gain-error limit (and no gain calibration) compares the ratio's
// quantization |k0/k - 1| before anything else: the gain asked for comes
// first when no limit says how near it must be.
type tieKey struct {
	margins        [numTieMargins]float64 // ascending, +Inf past the limits set
	power, voltage float64
	quant          float64 // |k0/k - 1| without a gain-error limit (else 0)
}

// numTieMargins holds every screening limit and the two ratings.
const numTieMargins = 12

// tieTol is the relative difference below which two margins count as equal,
// so that rounding in the screening figures does not decide a tie that the
// next margin should.
const tieTol = 1e-6

// better reports whether a should rank before b among equal costs.
func (a tieKey) better(b tieKey) bool {
	if math.Abs(a.quant-b.quant) > tieTol*math.Max(a.quant, b.quant) {
		return a.quant < b.quant
	}
	for i := range a.margins {
		x, y := a.margins[i], b.margins[i]
		if math.IsInf(x, 1) && math.IsInf(y, 1) {
			break
		}
		if math.Abs(x-y) > tieTol*math.Max(math.Abs(x), math.Abs(y)) {
			return x > y
		}
	}
	if a.power != b.power {
		return a.power < b.power
	}
	return a.voltage < b.voltage
}

// margins fills k.margins with the normalised margins of screening metrics
// m over the problem's limits and of the stresses in k, sorted ascending.
func (s *space) margins(m *metrics, k *tieKey) {
	l := &s.p.Limits
	n := 0
	add := func(v float64) {
		k.margins[n] = v
		n++
	}
	max := func(v, lim float64) {
		switch {
		case lim <= 0:
		case v > 0:
			add(lim / v)
		default:
			add(math.Inf(1))
		}
	}
	max(m.totalErr, l.TotalGainError)
	max(m.gainErr, l.GainError)
	max(m.drift, l.DriftPPM)
	max(m.offset, l.OffsetV)
	max(m.offDrift, l.OffsetDriftVK)
	max(m.noise, l.NoiseDensity)
	max(m.noiseRMS, l.NoiseRMS)
	if l.CMRRdB > 0 {
		add(math.Pow(10, (m.cmrrDB-l.CMRRdB)/20))
	}
	if s.p.BandwidthHz > 0 {
		add(m.bw / s.p.BandwidthHz)
	}
	max(k.power, 1)
	max(k.voltage, 1)
	for i := n; i < numTieMargins; i++ {
		k.margins[i] = math.Inf(1)
	}
	// Insertion sort: a dozen entries, no allocation.
	for i := 1; i < n; i++ {
		for j := i; j > 0 && k.margins[j] < k.margins[j-1]; j-- {
			k.margins[j], k.margins[j-1] = k.margins[j-1], k.margins[j]
		}
	}
}

// stress is the worst resistor power and voltage stress of option o of
// configuration c at the screening voltages (vG across an Rg position, vF
// across an Rf position): dissipation over the derated power, voltage over
// the rated voltage sqrt(P·R) capped by the limiting element voltage
// (IEC 60115-1, as ratingOK). Zero where the grade gives no rating.
func (s *space) stress(c *config, o *option) (power, voltage float64) {
	one := func(powerW, maxV, r, v float64) {
		if r <= 0 || v == 0 {
			return
		}
		u := maxV
		if powerW > 0 {
			power = math.Max(power, v*v/r/(s.p.Derating*powerW))
			if rp := math.Sqrt(powerW * r); u == 0 || rp < u {
				u = rp
			}
		}
		if u > 0 {
			voltage = math.Max(voltage, v/u)
		}
	}
	switch {
	case s.pairNetwork(c):
		n := s.nets[c.net]
		one(n.PowerW, n.MaxVoltageV, c.na, s.vG)
		one(n.PowerW, n.MaxVoltageV, c.nb, s.vF)
	case s.strategy() != family.ShiftNetwork && c.ga >= 0 && c.gb >= 0 && o.rg >= 0 && o.rf >= 0:
		ga, gb := s.groups[c.ga], s.groups[c.gb]
		one(ga.grade.PowerW, ga.grade.MaxVoltageV, ga.values[o.rg], s.vG)
		rf, vf := gb.values[o.rf], s.vF
		if o.rf2 >= 0 && !o.par {
			// A series pair shares the voltage in proportion to its values.
			y := gb.values[o.rf2]
			vf *= rf / (rf + y)
		}
		one(gb.grade.PowerW, gb.grade.MaxVoltageV, rf, vf)
	}
	return power, voltage
}

// tie is the tie key of option o of configuration c with metrics m (c nil:
// a matched amplifier, no resistor stress).
func (s *space) tie(c *config, o *option, m *metrics) tieKey {
	var k tieKey
	if c != nil {
		k.power, k.voltage = s.stress(c, o)
		l := &s.p.Limits
		if s.strategy() != family.ShiftNetwork && s.k > 0 && !s.p.CalGain && l.GainError == 0 && l.TotalGainError == 0 {
			k.quant = math.Abs(o.k0/s.k - 1)
		}
	}
	s.margins(m, &k)
	return k
}
