package search

import (
	"math"

	"plumb/optimize/assume"
	"plumb/optimize/family"
	"plumb/optimize/strap"
)

// metrics are the screening figures of one design under the problem's
// method (see the package comment for the equations).
type metrics struct {
	gain     float64 // closed-loop gain, V/V (negative for inverting)
	gainErr  float64 // |gain error| at the reference temperature, fraction
	totalErr float64 // |gain error| over the temperature range, fraction
	drift    float64 // gain drift, ppm/K
	cmrrDB   float64
	offset   float64 // output offset over temperature, V
	offDrift float64 // output offset drift, V/K
	noise    float64 // output noise density, V/√Hz
	noiseRMS float64 // output noise over π/2 x the closed-loop bandwidth, V
	bw       float64 // closed-loop bandwidth, Hz
	// lowHead says the output's errors take it past the amplifier's swing
	// (space.movedHeadroom); the zero value passes.
	lowHead bool
	nomOff  float64 // a level shift's nominal shift less the target's, V (part of offset)
}

// boltzmann is k in J/K, exact since the 2019 SI.
const boltzmann = 1.380649e-23

// noiseDensity is the output noise density of a stage whose op-amp sees
// Thevenin resistance rp at each of nIn inputs: NG·sqrt(en² + nIn·(4kT·rp +
// (in·rp)²)). The resistor term 4kT·Rf∥Rg·NG² is exactly the output noise
// of Rf and Rg (4kT·Rg·(Rf/Rg)² + 4kT·Rf).
func noiseDensity(ng, en, in, rp, tempK float64, nIn int) float64 {
	r := 4*boltzmann*tempK*rp + in*in*rp*rp
	return ng * math.Sqrt(en*en+float64(nIn)*r)
}

// grades holds the ratio figures of the resistors of a design class.
type grades struct {
	hi, lo   float64 // worst ratio multipliers at the reference temperature: k in k0·[lo, hi]
	hiT, loT float64 // the same with the tempcos at the worst excursion and load life (CMRR)
	hiL, loL float64 // tolerance and load-life shift together (gain error over life)
	hiS, loS float64 // load-life shift alone (what a calibration cannot remove)
	sr       float64 // RSS ratio spread (3 sigma), fraction
	srL      float64 // the same with the load-life shifts
	cmRSS    float64 // RSS spread of the difference of the two ratios, over temperature
	drift    float64 // worst ratio drift, ppm/K
	driftRSS float64
	tmax     float64 // largest tolerance (bias-current mismatch)
	// s2 is the second stage of an instrumentation amplifier (nil for
	// every other circuit).
	s2 *stage2
}

// discreteGrades returns the ratio figures of Rf/Rg from two discrete
// grades (tolerance t, tempco c in ppm/K, load-life shift l) over a worst
// excursion of dT kelvin: each ratio lies within (1±tf)/(1∓tg) at the
// reference temperature, within (1±tf)(1±lf)/((1∓tg)(1∓lg)) over life and
// within that times (1±cf·dT)/(1∓cg·dT) over temperature; its drift is at
// most ((1+cf·dT)/(1-cg·dT) - 1)/dT, which is TCRf + TCRg to first order
// (two resistors of opposite sign, domain notes §6).
func discreteGrades(tg, cg, lg, tf, cf, lf, dT float64) grades {
	ag, af := cg*1e-6*dT, cf*1e-6*dT
	g := grades{
		hi: (1 + tf) / (1 - tg), lo: (1 - tf) / (1 + tg),
		hiL: (1 + tf) * (1 + lf) / ((1 - tg) * (1 - lg)), loL: (1 - tf) * (1 - lf) / ((1 + tg) * (1 + lg)),
		hiS: (1 + lf) / (1 - lg), loS: (1 - lf) / (1 + lg),
		sr: math.Hypot(tf, tg), srL: math.Sqrt(tf*tf + tg*tg + lf*lf + lg*lg),
		drift: cf + cg, driftRSS: math.Hypot(cf, cg), tmax: math.Max(tf, tg),
	}
	g.hiT = g.hiL * (1 + af) / (1 - ag)
	g.loT = g.loL * (1 - af) / (1 + ag)
	g.cmRSS = math.Sqrt(2 * (tf*tf + tg*tg + lf*lf + lg*lg + af*af + ag*ag))
	if dT > 0 {
		g.drift = ((1+af)/(1-ag) - 1) / (1e-6 * dT)
	}
	return g
}

// networkGrades returns the ratio figures of a matched network whose
// element ratios hold within r and track within tr ppm/K, over a worst
// excursion of dT kelvin.
func networkGrades(r, tr, dT float64) grades {
	a := tr * 1e-6 * dT
	// Tracking is the drift of the ratio itself; the catalog holds no
	// load-life figure for networks.
	return grades{hi: 1 + r, lo: 1 - r, hiL: 1 + r, loL: 1 - r, hiS: 1, loS: 1,
		hiT: (1 + r) * (1 + a), loT: (1 - r) * (1 - a), sr: r, srL: r,
		cmRSS: math.Sqrt2 * math.Hypot(r, a), drift: tr, driftRSS: tr, tmax: r}
}

// cmWorst returns the worst |Acm/Adm| of a difference amplifier whose two
// ratios k1 = R2/R1 and k2 = R4/R3 each lie in k0·[lo, hi]:
// Acm = (k2-k1)/(1+k2), Adm = (k2(1+k1)/(1+k2) + k1)/2 (domain notes §2).
func cmWorst(k0, hi, lo float64) float64 {
	f := func(k1, k2 float64) float64 {
		acm := math.Abs(k2-k1) / (1 + k2)
		adm := (k2*(1+k1)/(1+k2) + k1) / 2
		return acm / adm
	}
	return math.Max(f(k0*lo, k0*hi), f(k0*hi, k0*lo))
}

// noiseFloorDB caps the CMRR of an ideal design, dB.
const noiseFloorDB = 300

func toDB(inv float64) float64 {
	if inv <= 0 {
		return noiseFloorDB
	}
	return math.Min(noiseFloorDB, -20*math.Log10(inv))
}

// gainSens is the magnitude of the gain's sensitivity to the ratio
// (family.Ratio.Sens: 1 for the difference and inverting amplifiers,
// k/(1+k) for the non-inverting amplifier and the divider).
func (s *space) gainSens(k0 float64) float64 { return s.model().Sens(k0) }

// noiseGain is the gain the amplifier's offset and noise see
// (family.Ratio.NoiseGain: 1 + Rf/Rg, 1 for the unbuffered divider, whose
// leakage error is not amplified).
func (s *space) noiseGain(k0 float64) float64 { return s.model().NoiseGain(k0) }

// gainMult is the exact factor by which the ideal gain moves when the
// ratio k0 is multiplied by m (family.Ratio.Mult).
func (s *space) gainMult(k0, m float64) float64 { return s.model().Mult(k0, m) }

// eval computes the metrics of a design with ratio k0 = Rf/Rg, Rf∥Rg = rp,
// resistor figures g and amplifier a.
func (s *space) eval(g *grades, k0, rp float64, a *amp, m *metrics) {
	p, r := s.p, s.model()
	if s.strategy() == family.TwoStage {
		s.evalInAmp(g, k0, rp, a, m)
		return
	}
	am := a.a
	ng := s.noiseGain(k0)
	f := 1.0
	if am.AolVV > 0 {
		f = 1 / (1 + ng/am.AolVV)
	}
	sg, ideal := s.gainSens(k0), s.idealGain(k0)
	rho := ideal / p.Gain
	dT := s.dT
	sys := rho*f - 1
	if s.rss {
		m.drift = sg * g.driftRSS
	} else {
		m.drift = sg * g.drift
	}
	dr := m.drift * 1e-6 * dT
	// corners is the worst |gain error| with the ratio at k0·hi or k0·lo.
	corners := func(rho, hi, lo float64) float64 {
		return math.Max(math.Abs(rho*s.gainMult(k0, hi)-1), math.Abs(rho*s.gainMult(k0, lo)-1))
	}
	switch {
	case p.CalGain:
		// Calibration removes the initial error, not the later shifts.
		m.gainErr = 0
		if s.rss {
			m.totalErr = math.Hypot(sg*math.Sqrt(math.Max(g.srL*g.srL-g.sr*g.sr, 0)), dr)
		} else {
			m.totalErr = (1+corners(1, g.hiS, g.loS))*(1+dr) - 1
		}
	case s.rss:
		m.gainErr = math.Abs(sys) + sg*g.sr
		m.totalErr = math.Abs(sys) + math.Hypot(sg*g.srL, dr)
	default:
		m.gainErr = corners(rho*f, g.hi, g.lo)
		m.totalErr = (1+corners(rho*f, g.hiL, g.loL))*(1+dr) - 1
	}
	inv := a.ainv
	if r.FourResistor {
		if s.rss {
			inv += g.cmRSS / (1 + k0)
		} else {
			inv += cmWorst(k0, g.hiT, g.loT)
		}
	}
	m.cmrrDB = toDB(inv)
	var bias float64
	if r.FourResistor {
		bias = am.IosA*rp + am.IbA*rp*2*g.tmax
	} else {
		bias = am.IbA * rp
	}
	s.offset(m, ng, am.VosV, bias, am.VosDriftVK)
	nIn := 1
	if r.FourResistor {
		nIn = 2
	}
	m.noise = noiseDensity(ng, am.NoiseVHz, am.NoiseAHz, rp, s.tempK, nIn)
	m.gain = ideal * f
	if r.Inverts {
		m.gain = -m.gain
	}
	m.bw = am.GBWHz / ng
	m.noiseRMS = rmsNoise(m.noise, m.bw)
	if r.Passive {
		// No amplifier limits the bandwidth: the source and the load's
		// capacitance do, which the catalog does not hold.
		m.bw, m.noiseRMS = math.Inf(1), 0
	}
}

// rmsNoise integrates a white density over the noise bandwidth of a
// single pole, π/2 x f-3dB (common practice).
func rmsNoise(density, bw float64) float64 {
	return density * math.Sqrt(math.Pi/2*bw)
}

// offset fills the output offset: NG·(Vos + bias) initially plus
// NG·dVos/dT·ΔT, added linearly (worst case) or in quadrature (RSS).
func (s *space) offset(m *metrics, ng, vos, bias, vdrift float64) {
	init := ng * (vos + bias)
	if s.p.CalOffset {
		init = 0
	}
	d := ng * vdrift * s.dT
	m.offDrift = ng * vdrift
	if s.rss {
		m.offset = math.Hypot(init, d)
	} else {
		m.offset = init + d
	}
}

// evalMatched computes the metrics of an amplifier with matched resistors
// inside at its gain a.k0: the maker's gain error and drift limits, its CMRR
// and its offset at noise gain 1 + G.
//
// A strapped part (a.st) takes its figures from the strapping instead
// (package strap): the ratio tolerance propagated through its
// sensitivities (worst case, or RSS under the RSS method), the drift from
// the ratio tracking, the noise gain 1/β, and the bias currents through
// the resistances Rp and Rm at the op-amp's inputs, NG·(Ib·|Rp − Rm| +
// Ios·(Rp + Rm)/2) at the output. These are first order in the ratio
// tolerance; the exact budget that confirms each design solves the
// strapped circuit.
//
// A source resistance Rs in series with the strapping's input resistance
// Zin (the inverting input's for a differential strapping, the input's for
// a single-ended one) scales the gain by Zin/(Zin + Rs) (see sourceLoss);
// the elements' absolute tolerance t and tempco α (which the ratio does
// not see) then move it by Rs/(Zin + Rs) times t and α·ΔT.
func (s *space) evalMatched(a *amp, m *metrics) {
	p := s.p
	am := a.a
	ng := 1 + a.k0
	rho := math.Abs(a.k0) / p.Gain
	gerr, bias, rn := am.GainErrorMax, am.IosA*am.InternalOhm/2, am.InternalOhm/2
	m.drift = am.GainDriftPPM
	cmInv := 0.0
	if st := a.st; st != nil {
		ng, gerr, m.drift = st.NoiseGain, st.GainErrorWorst, st.GainDriftPPM
		if s.rss {
			gerr = st.GainErrorRSS
		}
		rp, rm := st.SourcePlusOhm, st.SourceMinusOhm
		bias = am.IbA*math.Abs(rp-rm) + am.IosA*(rp+rm)/2
		rn = (rp + rm) / 2
		zin := st.InputMinusOhm
		if st.Kind != strap.Differential {
			zin = st.InputPlusOhm
			// The source resistance carries the non-inverting input's bias
			// current where the input drives that pin.
			if math.IsInf(zin, 1) {
				bias += am.IbA * p.SourceOhm
			}
		}
		if x := sourceLoss(p.SourceOhm, zin); x > 0 {
			rho *= 1 - x
			tcr, _ := assume.StrappedTCR(am.Part)
			gerr += x * am.Network.Tolerance
			m.drift += x * tcr * 1e6
		}
	}
	if a.st == nil && am.InternalOhm > 0 {
		// The part as the classic difference amplifier R1 = R3 (its
		// internal resistor), R2 = R4 = G·R1, behind the source and
		// reference resistances (budget's evalMatched gives the exact
		// transfers): the gain falls to G·R1/(R1 + Rs), moved by R1's
		// absolute tolerance and tempco through Rs/(R1 + Rs), and the
		// reference resistance unbalances it, Acm = Rref/(R1 + Rs + R2 + Rref).
		if x := sourceLoss(p.SourceOhm, am.InternalOhm); x > 0 {
			rho *= 1 - x
			tol, _ := assume.MatchedAbsTolerance(am)
			tcr, _ := assume.StrappedTCR(am.Part)
			gerr += x * tol
			m.drift += x * tcr * 1e6
		}
		if p.RefOhm > 0 && p.family().Input == family.Differential {
			// Over the gain G·R1/(R1 + Rs) = rho·G.
			r1 := am.InternalOhm + p.SourceOhm
			cmInv += p.RefOhm / (r1 + a.k0*am.InternalOhm + p.RefOhm) / (rho * p.Gain)
			// The output at zero input is Vref·(R1' + R2)/(R1' + R2 + Rref):
			// short of Vref by Vref·Rref/(R1' + R2 + Rref), at the output.
			bias += math.Abs(p.Ref) * p.RefOhm / (r1 + a.k0*am.InternalOhm + p.RefOhm) / ng
		}
	}
	dr := m.drift * 1e-6 * s.dT
	switch {
	case p.CalGain:
		m.gainErr, m.totalErr = 0, dr
	case s.rss:
		m.gainErr = math.Abs(rho-1) + gerr
		m.totalErr = math.Abs(rho-1) + math.Hypot(gerr, dr)
	default:
		m.gainErr = math.Abs(rho-1) + gerr
		m.totalErr = m.gainErr + dr
	}
	m.cmrrDB = toDB(a.ainv + cmInv)
	s.offset(m, ng, am.VosV, bias, am.VosDriftVK)
	m.noise = noiseDensity(ng, am.NoiseVHz, am.NoiseAHz, rn, s.tempK, 2)
	m.gain = a.k0
	m.bw = am.GBWHz / ng
	m.noiseRMS = rmsNoise(m.noise, m.bw)
}

// pass reports whether metrics m meet every limit.
// Every maximum bounds a magnitude: a figure that came out negative (a
// resistance driven through zero by an absurd tempco) must not pass, and
// NaN passes nothing.
func (s *space) pass(m *metrics) bool {
	l := s.p.screenLimits()
	return withinMax(m.gainErr, l.GainError) &&
		withinMax(m.totalErr, l.TotalGainError) &&
		withinMax(m.drift, l.DriftPPM) &&
		(l.CMRRdB == 0 || m.cmrrDB >= l.CMRRdB) &&
		withinMax(m.offset, l.OffsetV) &&
		withinMax(m.offDrift, l.OffsetDriftVK) &&
		withinMax(m.noise, l.NoiseDensity) &&
		withinMax(m.noiseRMS, l.NoiseRMS) &&
		!m.lowHead &&
		s.p.Channel.Pass(m.totalErr, m.offset, m.drift, m.offDrift, m.noiseRMS)
}

// withinMax reports whether |v| meets maximum lim (0: no limit; a NaN v
// meets none).
func withinMax(v, lim float64) bool { return lim == 0 || math.Abs(v) <= lim }

// boundSafety shrinks a lower bound by a few parts in 10^12 so that
// rounding in the bound's arithmetic never prunes a design that passes.
const boundSafety = 1 - 1e-12

// bound fills m with optimistic metrics for every design of a class with
// resistor figures g (nil: ideal resistors) and amplifier a (nil: ideal
// amplifier), over every ratio k0 in k·[1-w, 1+w]:
//
//	gain error ≥ min over ρ of max|ρ·H - 1|, |ρ·L - 1| = (H-L)/(H+L),
//	  H = 1 + s(hi-1), L = 1 + s(lo-1)  (exact minimum over the quantization)
//	CMRR ≤ its value at the largest k0 (it rises with the gain)
//	offset ≥ the amplifier's terms at the smallest noise gain
//
// so pass(bound) false proves that no design of the class passes.
func (s *space) bound(g *grades, a *amp, m *metrics) {
	p := s.p
	switch s.strategy() {
	case family.ShiftNetwork:
		s.boundLevelShift(a, m)
		s.shrinkBound(m)
		return
	case family.TwoStage:
		s.boundInAmp(g, a, m)
		s.shrinkBound(m)
		return
	}
	kmin, kmax := s.k*(1-s.w), s.k*(1+s.w)
	sg := s.gainSens(kmin)
	// spread is min over ρ of max|ρ·H - 1|, |ρ·L - 1| for multipliers hi, lo.
	spread := func(hi, lo float64) float64 {
		H, L := 1+sg*(hi-1), 1+sg*(lo-1)
		return (H - L) / (H + L)
	}
	var ge, geL, geS, sr, srL, srS, drift float64
	if g != nil {
		ge, geL, geS = spread(g.hi, g.lo), spread(g.hiL, g.loL), spread(g.hiS, g.loS)
		sr, srL = sg*g.sr, sg*g.srL
		srS = sg * math.Sqrt(math.Max(g.srL*g.srL-g.sr*g.sr, 0))
		drift = sg * g.drift
		if s.rss {
			drift = sg * g.driftRSS
		}
	}
	dr := drift * 1e-6 * s.dT
	switch {
	case p.CalGain && s.rss:
		m.gainErr, m.totalErr = 0, math.Hypot(srS, dr)
	case p.CalGain:
		m.gainErr, m.totalErr = 0, (1+geS)*(1+dr)-1
	case s.rss:
		m.gainErr, m.totalErr = sr, math.Hypot(srL, dr)
	default:
		m.gainErr, m.totalErr = ge, (1+geL)*(1+dr)-1
	}
	m.drift = drift
	inv := 0.0
	if a != nil {
		inv = a.ainv
	}
	if g != nil && s.model().FourResistor {
		if s.rss {
			inv += g.cmRSS / (1 + kmax)
		} else {
			inv += cmWorst(kmax, g.hiT, g.loT)
		}
	}
	m.cmrrDB = toDB(inv * boundSafety)
	m.offset, m.offDrift, m.noise, m.noiseRMS = 0, 0, 0, 0
	if a != nil {
		ng := s.noiseGain(kmin)
		s.offset(m, ng, a.a.VosV, 0, a.a.VosDriftVK)
		m.noise = ng * a.a.NoiseVHz
		m.noiseRMS = rmsNoise(m.noise, a.a.GBWHz/s.noiseGain(kmax))
		if s.model().Passive {
			m.noiseRMS = 0
		}
	}
	s.shrinkBound(m)
}

// shrinkBound applies boundSafety to every bounded figure but the CMRR.
func (s *space) shrinkBound(m *metrics) {
	m.gainErr *= boundSafety
	m.totalErr *= boundSafety
	m.drift *= boundSafety
	m.offset *= boundSafety
	m.offDrift *= boundSafety
	m.noise *= boundSafety
	m.noiseRMS *= boundSafety
}

// sourceLoss returns the fraction x = Rs/(Zin + Rs) of the gain that a
// source resistance rs in series with an input impedance zin takes away,
// G' = G·(1 − x): the source and the stage form a divider (Thevenin). It is
// exact for a single-ended input and for the classic difference amplifier
// with equal source resistances, G' = R2/(R1 + Rs) (domain notes §2); 0
// where there is no source resistance or the input is an op-amp pin.
func sourceLoss(rs, zin float64) float64 {
	if !(rs > 0) || !(zin > 0) || math.IsInf(zin, 1) || math.IsNaN(zin) {
		return 0
	}
	return rs / (zin + rs)
}
