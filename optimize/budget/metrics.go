package budget

import (
	"math"
)

// Boltzmann is the Boltzmann constant, J/K (exact in the 2019 SI).
const Boltzmann = 1.380649e-23

// cmrrCapDB caps the CMRR of a perfectly matched ideal stage so that every
// figure stays finite (and JSON-encodable).
const cmrrCapDB = 240.0

// capLin is cmrrCapDB as a ratio.
var capLin = math.Pow(10, cmrrCapDB/20)

// zinCap caps the input impedance of a stage with no resistive path from
// the input (a non-inverting input): 1 TΩ.
const zinCap = 1e12

// ThermalNoise is the Johnson noise density of a resistor, sqrt(4 k T R) in
// V/√Hz, T in kelvin (Horowitz and Hill, The Art of Electronics, noise
// chapter).
func ThermalNoise(ohm, kelvin float64) float64 { return math.Sqrt(4 * Boltzmann * kelvin * ohm) }

// NoiseBandwidthFactor is the brick-wall equivalent noise bandwidth of a
// single-pole low-pass, π/2 x f-3dB: ∫0..∞ df/(1 + (f/fc)²) = fc π/2.
const NoiseBandwidthFactor = math.Pi / 2

// agg holds the metrics of one parameter point over the temperature points.
type agg struct {
	gainErr     float64 // worst |error| (calibrated: against the Tref gain)
	gainErrInit float64 // |error| at Tref before calibration
	gainSigned  float64 // signed error at the worst point
	// gainInitSigned is the signed error at Tref before calibration.
	gainInitSigned float64
	worstT         float64
	drift          float64 // per K
	offset         float64
	offsetDrift    float64
	cmrr           float64 // linear, worst (smallest)
	cmrrRes        float64 // linear, resistors only, smallest
}

// ampIdx gives the parameter index of each amplifier term (-1: absent).
func (e *Evaluator) ampX(a int, k paramKind) int {
	for j := range e.params {
		if e.params[j].kind == k && e.params[j].amp == a {
			return j
		}
	}
	return -1
}

func xs(x []float64, j int) float64 {
	if j < 0 {
		return 0
	}
	return x[j]
}

// ampOffset is the amplifiers' share of the output offset at point p and
// temperature t: Vos and its drift times the Vos transfer, the bias current
// times the sum of the two bias transfers and half the offset current times
// their difference (Ib± = Ib ± Ios/2). With signed the parameters' x values
// set the signs (Monte Carlo); otherwise every term counts at its worst
// sign. driftOnly keeps only the temperature-dependent part (what is left
// after offset calibration).
func (e *Evaluator) ampOffset(x []float64, p *point, t float64, signed, driftOnly bool) float64 {
	dt := t - e.s.TempRef
	a := &e.amp
	sum := 0.0
	for i := 0; i < e.nAmps(); i++ {
		tv, tsum, tdif := p.tvos[i], p.tibp[i]+p.tibm[i], p.tibp[i]-p.tibm[i]
		if signed {
			d := xs(x, e.ampIdx[i][1]) * a.VosDriftVK * dt * tv
			if driftOnly {
				sum += d
				continue
			}
			sum += d + xs(x, e.ampIdx[i][0])*a.VosV*tv + xs(x, e.ampIdx[i][2])*a.IbA*tsum + xs(x, e.ampIdx[i][3])*a.IosA/2*tdif
			continue
		}
		d := a.VosDriftVK * math.Abs(dt) * math.Abs(tv)
		if driftOnly {
			sum += d
			continue
		}
		sum += d + a.VosV*math.Abs(tv) + a.IbA*math.Abs(tsum) + a.IosA/2*math.Abs(tdif)
	}
	return sum
}

// cmrrAt combines the solved resistor common-mode gain with each
// amplifier's CMRR, referred through its pin common mode and Vos transfer
// (an amplifier's finite CMRR acts as an offset of Vpin,cm/CMRR):
// CMRR = |Adm| / |Acm,res + Σ Vpin,cm Tvos / CMRR_amp|, worst case with
// every term's magnitude added, which is 1/CMRR_total = 1/CMRR_res +
// 1/CMRR_amp for a single amplifier (domain notes §2).
func (e *Evaluator) cmrrAt(x []float64, p *point, signed bool) (total, res float64) {
	acm := p.acm
	res = capLin
	if math.Abs(acm) > tinyTransfer {
		res = min(capLin, math.Abs(p.adm/acm))
	}
	if signed {
		for i := 0; i < e.nAmps(); i++ {
			acm += xs(x, e.ampIdx[i][4]) * p.pinCM[i] * p.tvos[i] / e.cmrrAmp
		}
		acm = math.Abs(acm)
	} else {
		acm = math.Abs(acm)
		for i := 0; i < e.nAmps(); i++ {
			acm += math.Abs(p.pinCM[i]*p.tvos[i]) / e.cmrrAmp
		}
	}
	if acm <= tinyTransfer {
		return capLin, res
	}
	return min(capLin, math.Abs(p.adm/acm)), res
}

// tpoint is one temperature point of an evaluation.
type tpoint struct {
	t    float64
	life bool
}

// tpoints lists the temperature points: index 0 is the calibration point
// (Tref, as built); then Tref after load life (if any part has a load-life
// figure), then the range ends.
func (e *Evaluator) tpoints(buf *[4]tpoint) []tpoint {
	pts := buf[:0]
	pts = append(pts, tpoint{e.s.TempRef, false})
	if e.hasLife {
		pts = append(pts, tpoint{e.s.TempRef, true})
	}
	for i := 1; i < e.ntemps; i++ {
		pts = append(pts, tpoint{e.temps[i], true})
	}
	return pts
}

// metricsAt evaluates every varying metric at parameter point x over the
// temperature points. signed selects Monte Carlo use of the amplifier
// parameters in x; otherwise amplifier terms count at their worst sign.
func (e *Evaluator) metricsAt(x []float64, signed bool, out *agg) error {
	var buf [4]tpoint
	pts := e.tpoints(&buf)
	var p0, pr, p point
	e.spread(x) // once: only the temperature changes between the points
	if err := e.evalSpread(x, pts[0].t, false, &p0); err != nil {
		return err
	}
	gt := e.s.Gain
	cal, calOff := e.s.Calibrate.Gain, e.s.Calibrate.Offset
	*out = agg{worstT: pts[0].t}
	out.gainInitSigned = p0.gain/gt - 1
	out.gainErrInit = math.Abs(out.gainInitSigned)
	if !cal {
		out.gainErr, out.gainSigned = out.gainErrInit, p0.gain/gt-1
	}
	out.cmrr, out.cmrrRes = e.cmrrAt(x, &p0, signed)
	off0 := p0.base - e.target
	if !calOff {
		if signed {
			out.offset = math.Abs(off0 + e.ampOffset(x, &p0, pts[0].t, true, false))
		} else {
			out.offset = math.Abs(off0) + e.ampOffset(x, &p0, pts[0].t, false, false)
		}
	}
	pr = p0
	for _, tp := range pts[1:] {
		if err := e.evalSpread(x, tp.t, tp.life, &p); err != nil {
			return err
		}
		if tp.t == e.s.TempRef {
			pr = p // Tref after load life: the reference for drift
		}
		ge := p.gain/gt - 1
		if cal {
			ge = p.gain/p0.gain - 1
		}
		if math.Abs(ge) > out.gainErr {
			out.gainErr, out.gainSigned, out.worstT = math.Abs(ge), ge, tp.t
		}
		if c, r := e.cmrrAt(x, &p, signed); c < out.cmrr || r < out.cmrrRes {
			out.cmrr, out.cmrrRes = min(c, out.cmrr), min(r, out.cmrrRes)
		}
		var off float64
		switch {
		case calOff && signed:
			off = math.Abs(p.base - p0.base + e.ampOffset(x, &p, tp.t, true, true))
		case calOff:
			off = math.Abs(p.base-p0.base) + e.ampOffset(x, &p, tp.t, false, true)
		case signed:
			off = math.Abs(p.base - e.target + e.ampOffset(x, &p, tp.t, true, false))
		default:
			off = math.Abs(p.base-e.target) + e.ampOffset(x, &p, tp.t, false, false)
		}
		out.offset = max(out.offset, off)
		if dt := math.Abs(tp.t - e.s.TempRef); dt > 0 {
			out.drift = max(out.drift, math.Abs(p.gain/pr.gain-1)/dt)
			od := math.Abs(p.base - pr.base + e.ampOffset(x, &p, tp.t, true, true))
			if !signed {
				od = math.Abs(p.base-pr.base) + e.ampOffset(x, &p, tp.t, false, true)
			}
			out.offsetDrift = max(out.offsetDrift, od/dt)
		}
	}
	return nil
}
