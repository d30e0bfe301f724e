package search

import (
	"math"

	"plumb/optimize/budget"

	"plumb/optimize/family"
)

// tieKey orders designs of equal cost by their normalised margins, worst
// first, compared in two tiers. The material tier rounds each limit's
// margin to a step that means something in that limit's unit (tieStepDB of
// headroom for a dB limit, tieStepFrac of the limit for the others): the
// larger worst rounded margin ranks first, where the worst agree the
// next-worst decides, and so on. Only where every rounded margin agrees
// does the nominal ratio's quantization |k0/k - 1| decide (the exact
// ratio first, in steps of tieQuantStep), then the fine tier compare the
// margins themselves (to tieTol, so that rounding in the screening
// figures does not decide), then the lower
// resistor power stress, then the lower voltage stress. A negligible
// difference on one limit (0.006 dB of CMRR) thus never outweighs a
// material one on another (a third less gain error).
//
// Margins are the screening figures' limit/value for a maximum, value/limit
// for a minimum (the input impedance included), the linear ratio for dB,
// 1 + headroom/0.1 V for the output swing (the exact budget's amplifier
// headroom margin, budget.NearPinV), and 1/stress for the resistor power
// and voltage ratings, so an output near its rail or a resistor near its
// derated power counts as a thin margin like any limit. A spec
// without a gain-error limit (and no gain calibration) compares the ratio's
// quantization |k0/k - 1|, in steps of tieQuantStep, before anything else:
// the gain asked for comes first when no limit says how near it must be.
//
// Every tier is a vector computed from the design alone and compared
// lexicographically with exact comparisons, so better is a strict weak
// ordering (irreflexive, asymmetric, transitive, with transitive ties):
// sorting with it is deterministic and independent of the input order. A
// tolerance applied pairwise (|x-y| < tol counts as equal) would not be:
// x ~ y and y ~ z do not give x ~ z. The price of rounding is that two
// margins a hair apart can fall either side of a step; they then differ by
// one step, the least difference the tier can see.
type tieKey struct {
	material [numTieMargins]float64 // rounded margins, ascending, +Inf past the limits set
	fine     [numTieMargins]float64 // log margins in units of tieTol, ascending
	power    float64
	voltage  float64
	quant    float64 // |k0/k - 1| in units of tieQuantStep without a gain-error limit (else 0)
	ratio    float64 // |k0/k - 1| in units of tieQuantStep where the design sets a ratio (else 0)
	zin      float64 // input impedance over its limit (0: no limit or no model)
	head     float64 // output swing margin 1 + headroom/budget.NearPinV (0: no amplifier)
}

// numTieMargins holds every screening limit (the channel's two among
// them), the input impedance, the output swing headroom and the two
// ratings.
const numTieMargins = 16

// The steps of the material tier. A tenth of a dB is the resolution a CMRR
// or rejection figure is quoted to on a datasheet (common practice), and
// 1 % of the limit is the same size on a linear scale (0.1 dB is 1.16 %):
// nearer than that, two designs meet a limit equally well for a review.
const (
	tieStepDB   = 0.1  // dB of headroom over a dB limit
	tieStepFrac = 0.01 // fraction of a linear limit (value/limit, limit/value for a minimum)
)

// tieTol is the relative difference the fine tier rounds margins to, so
// that rounding in the screening figures does not decide a tie that the
// next margin should.
const tieTol = 1e-6

// tieQuantStep is the ratio error below which two values' quantizations
// count as equal without a gain-error limit: 1 ppm of gain, far below any
// resistor's tolerance.
const tieQuantStep = 1e-6

// better reports whether a should rank before b among equal costs.
func (a tieKey) better(b tieKey) bool {
	if a.quant != b.quant {
		return a.quant < b.quant
	}
	if c := compareMargins(&a.material, &b.material); c != 0 {
		return c > 0
	}
	if a.ratio != b.ratio {
		// Margins equal for a review: the ratio nearer the gain asked for
		// (100k/20k for 0.2, not 76.8k/15.4k) leaves the calibration, and
		// the reader, less to explain.
		return a.ratio < b.ratio
	}
	if c := compareMargins(&a.fine, &b.fine); c != 0 {
		return c > 0
	}
	if a.power != b.power {
		return a.power < b.power
	}
	return a.voltage < b.voltage
}

// compareMargins compares ascending margin vectors lexicographically: +1
// when x has the larger margin at the first place they differ, -1 when y
// has, 0 when they agree.
func compareMargins(x, y *[numTieMargins]float64) int {
	for i := range x {
		switch {
		case x[i] > y[i]:
			return 1
		case x[i] < y[i]:
			return -1
		case math.IsInf(x[i], 1):
			return 0 // both past the limits set
		}
	}
	return 0
}

// eachMargin calls f with the normalised margin of each limit set (see
// tieKey), db true for a limit in dB, for screening metrics m, input
// impedance margin zin (0: none), output swing margin head (0: none) and
// resistor stresses power and voltage.
func (s *space) eachMargin(m *metrics, zin, head, power, voltage float64, f func(margin float64, db bool)) {
	l := &s.p.Limits
	max := func(v, lim float64) {
		switch {
		case lim <= 0:
		case v > 0:
			f(lim/v, false)
		default:
			f(math.Inf(1), false)
		}
	}
	max(m.totalErr, l.TotalGainError)
	max(m.gainErr, l.GainError)
	max(m.drift, l.DriftPPM)
	max(m.offset, l.OffsetV)
	max(m.offDrift, l.OffsetDriftVK)
	max(m.noise, l.NoiseDensity)
	max(m.noiseRMS, l.NoiseRMS)
	if cs := s.p.Channel; cs != nil {
		// The channel's total error and drift at the ADC, screened.
		e, d := cs.Totals(m.totalErr, m.offset, m.drift, m.offDrift, m.noiseRMS)
		le, ld := cs.Limits()
		max(e, le)
		max(d, ld)
	}
	if l.CMRRdB > 0 {
		f(math.Pow(10, (m.cmrrDB-l.CMRRdB)/20), true)
	}
	if s.p.BandwidthHz > 0 {
		f(m.bw/s.p.BandwidthHz, false)
	}
	if zin > 0 {
		f(zin, false)
	}
	if head > 0 {
		f(head, false)
	}
	max(power, 1)
	max(voltage, 1)
}

// margins fills k's margin vectors from screening metrics m and the
// stresses and input impedance already in k.
func (s *space) margins(m *metrics, k *tieKey) {
	n := 0
	s.eachMargin(m, k.zin, k.head, k.power, k.voltage, func(v float64, db bool) {
		k.material[n] = materialMargin(v, db)
		k.fine[n] = fineMargin(v)
		n++
	})
	for i := n; i < numTieMargins; i++ {
		k.material[i] = math.Inf(1)
		k.fine[i] = math.Inf(1)
	}
	sortMargins(k.material[:n])
	sortMargins(k.fine[:n])
}

// materialMargin rounds margin v to the material tier's step: the headroom
// 20·log10(v) to tieStepDB for a dB limit, the used fraction 1/v to
// tieStepFrac of the limit otherwise; it returns the margin of the rounded
// figure (+Inf where the used fraction rounds to zero, 0 for NaN).
func materialMargin(v float64, db bool) float64 {
	switch {
	case math.IsNaN(v) || v <= 0:
		return 0
	case math.IsInf(v, 1):
		return v
	case db:
		return math.Pow(10, math.Round(20*math.Log10(v)/tieStepDB)*tieStepDB/20)
	}
	n := math.Round(1 / v / tieStepFrac)
	if n == 0 {
		return math.Inf(1)
	}
	return 1 / (n * tieStepFrac)
}

// fineMargin is log(v) in units of tieTol, rounded (-Inf for 0 or NaN).
func fineMargin(v float64) float64 {
	if math.IsNaN(v) || v <= 0 {
		return math.Inf(-1)
	}
	return math.Round(math.Log(v) / tieTol)
}

// sortMargins sorts a dozen margins ascending: insertion sort, no
// allocation.
func sortMargins(x []float64) {
	for i := 1; i < len(x); i++ {
		for j := i; j > 0 && x[j] < x[j-1]; j-- {
			x[j], x[j-1] = x[j-1], x[j]
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

// tie is the tie key of option o of configuration c on amplifier a with
// metrics m (c nil: a matched amplifier, no resistor stress).
func (s *space) tie(c *config, o *option, a *amp, m *metrics) tieKey {
	var k tieKey
	if a != nil && a.a != nil && a.a.Part != "" {
		kk := a.k0
		if c != nil {
			kk = o.k0
		}
		k.head = 1 + math.Max(0, swingHeadroom(s.p, a.a, kk, a.st))/budget.NearPinV
	}
	if c != nil {
		k.power, k.voltage = s.stress(c, o)
		l := &s.p.Limits
		if s.strategy() != family.ShiftNetwork && s.k > 0 {
			k.ratio = math.Round(math.Abs(o.k0/s.k-1) / tieQuantStep)
			if !s.p.CalGain && l.GainError == 0 && l.TotalGainError == 0 {
				k.quant = k.ratio
			}
		}
		if rg, rf, ok := s.values(c, o); ok && s.p.ZinMinOhm > 0 && s.model() != nil {
			k.zin = s.model().Zin(rg, rf) / s.p.ZinMinOhm
		}
	}
	s.margins(m, &k)
	return k
}

// values returns the resistances at the Rg and Rf positions of option o of
// configuration c (a pair at Rf combined), where the circuit has them.
func (s *space) values(c *config, o *option) (rg, rf float64, ok bool) {
	switch {
	case s.pairNetwork(c):
		return c.na, c.nb, true
	case s.strategy() != family.ShiftNetwork && c.ga >= 0 && c.gb >= 0 && o.rg >= 0 && o.rf >= 0:
		rg, rf = s.groups[c.ga].values[o.rg], s.groups[c.gb].values[o.rf]
		if o.rf2 >= 0 {
			y := s.groups[c.gb].values[o.rf2]
			if o.par {
				rf = rf * y / (rf + y)
			} else {
				rf += y
			}
		}
		return rg, rf, true
	}
	return 0, 0, false
}
