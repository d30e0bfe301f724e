package circuit

import (
	"errors"
	"fmt"
	"math"
)

// ErrNoResponse is returned by Bandwidth when the present excitation gives
// no output at DC, so that no -3 dB level is defined.
var ErrNoResponse = errors.New("circuit: no output at DC for the present excitation")

// Bandwidth search settings. The -3 dB point is bracketed by sampling
// |H(f)| at frequencies a factor bwScanRatio apart, from bwScanFrom x the
// lowest gain-bandwidth up to bwScanTo x the highest, and then located to
// bwTol in log frequency.
const (
	// bwScanFrom covers noise gains up to 1e7: a single-pole loop closes at
	// GBW/NG + GBW/Aol, never below GBW/1e7 for NG <= 1e7. A lower corner is
	// still found, by stepping down from there by bwScanDown.
	bwScanFrom = 1e-7
	// bwScanTo: beyond 1e4 x GBW every op-amp's |1/A| exceeds 1e4, so its
	// output is below 1e-4 of its input difference and the response has
	// reached its high-frequency limit.
	bwScanTo = 1e4
	// bwScanRatio is the sampling step: two octaves. A dip below -3 dB and
	// back that is narrower than this (a notch, which these resistive
	// stages do not make) may be missed.
	bwScanRatio = 4
	bwScanDown  = 1e3
	// bwTol is the width, in natural log of frequency (so relative
	// frequency), at which the bracket is accepted: far below the 1e-6
	// the search needs, and above the rounding of ln|H|.
	bwTol = 1e-10
	// bwMaxSteps bounds each phase of the search (scan down, root finding).
	bwMaxSteps = 200
)

// ACGain returns the complex phasor V(Out) at frequency f (Hz) for the
// netlist's present excitations taken as AC amplitudes of zero phase: every
// source voltage, current source, offset voltage and bias current, as Solve
// takes them at DC. Each op-amp k is a single-pole amplifier,
//
//	1/A_k(jω) = 1/Aol_k + jω/(2π GBW_k) = 1/Aol_k + j f/GBW_k,
//
// so that A_k = Aol_k/(1 + j f Aol_k/GBW_k): DC gain Aol_k (OpAmp.Gain;
// +Inf makes it an integrator of unity gain at GBW_k) and a dominant pole at
// GBW_k/Aol_k (the one-pole op-amp model, S. Franco, "Design with
// Operational Amplifiers and Analog Integrated Circuits", ch. 6, from
// memory). gbw[k] is op-amp k's gain-bandwidth product in Hz; a gbw[k] of 0
// or less, or +Inf, makes that op-amp frequency-independent (its DC model).
//
// The system is Factor's reduced nodal matrix with each op-amp row's
// V(Out)/Gain term replaced by V(Out)/A_k(jω), the same row scale, and the
// same right-hand side as Solve; it is solved in complex arithmetic by
// Gaussian elimination with partial pivoting, so at f = 0 the result is
// Solve's output to rounding. ACGain calls Factor (a later Solve sees the
// present values) and returns its errors; it returns an error wrapping
// ErrSingular when the matrix at f is singular, and an error for a negative
// or non-finite f or a NaN gain-bandwidth. It panics if len(gbw) is not the
// number of op-amps. It does not allocate unless it fails.
func (s *Solver) ACGain(f float64, gbw []float64) (complex128, error) {
	if !(f >= 0) || math.IsInf(f, 1) {
		return 0, fmt.Errorf("circuit: AC analysis at %g Hz: give a finite frequency of 0 Hz or more", f)
	}
	var sys acSystem
	if err := s.acCompile(&sys, gbw); err != nil {
		return 0, err
	}
	h, bad := sys.solve(f)
	if bad >= 0 {
		return 0, s.acSingular(f, bad)
	}
	return h, nil
}

// Bandwidth returns the -3 dB frequency (Hz) of V(Out) for the present
// excitation, with the op-amp model and gbw of ACGain: the lowest frequency
// at which |H(f)| falls to |H(0)|/√2. A response that peaks (rises above
// |H(0)| before it rolls off) crosses that level first on its way down, so
// the frequency reported is the -3 dB point above the peak. The crossing is
// bracketed by sampling a factor of 4 apart in frequency, from 1e-7 x the
// lowest finite gain-bandwidth (lower if the response is already down
// there) to 1e4 x the highest, and then found by the Illinois variant of
// regula falsi on ln|H|² against ln f, with bisection as a safeguard
// (G. Dahlquist and Å. Björck, "Numerical Methods", ch. 6, from memory), to
// a relative precision of 1e-10. Like ACGain, it calls Factor.
//
// It returns +Inf when no op-amp is frequency-dependent or the response does
// not fall 3 dB below its DC value within the scan (the op-amps are not in
// the signal's path, or a path around them holds the output up). It returns
// an error wrapping ErrNoResponse when V(Out) is zero at DC, and the errors
// of ACGain. It does not allocate unless it fails.
func (s *Solver) Bandwidth(gbw []float64) (float64, error) {
	var sys acSystem
	if err := s.acCompile(&sys, gbw); err != nil {
		return 0, err
	}
	h0, bad := sys.solve(0)
	if bad >= 0 {
		return 0, s.acSingular(0, bad)
	}
	p0 := real(h0)*real(h0) + imag(h0)*imag(h0)
	if p0 == 0 {
		return 0, fmt.Errorf("%w: V(%s) is 0 at DC; set a source, current, offset or bias current that reaches the output", ErrNoResponse, s.n.Nodes[s.n.Out])
	}
	lo, hi := math.Inf(1), 0.0
	for _, g := range gbw {
		if g > 0 && !math.IsInf(g, 1) {
			lo, hi = min(lo, g), max(hi, g)
		}
	}
	if hi == 0 {
		return math.Inf(1), nil
	}
	// level is ln(|H(f)|² / (|H(0)|²/2)): positive above the -3 dB level.
	level := func(f float64) (float64, error) {
		h, bad := sys.solve(f)
		if bad >= 0 {
			return 0, s.acSingular(f, bad)
		}
		return math.Log(2 * (real(h)*real(h) + imag(h)*imag(h)) / p0), nil
	}
	fa := lo * bwScanFrom
	ga, err := level(fa)
	if err != nil {
		return 0, err
	}
	fb, gb := fa, ga
	if ga <= 0 {
		// Already down at the start: step down until above the level.
		for i := 0; ga <= 0; i++ {
			if i == bwMaxSteps {
				return 0, fmt.Errorf("circuit: bandwidth: V(%s) is still 3 dB below its DC value at %g Hz", s.n.Nodes[s.n.Out], fa)
			}
			fb, gb = fa, ga
			fa /= bwScanDown
			if ga, err = level(fa); err != nil {
				return 0, err
			}
		}
	} else {
		for gb > 0 {
			fa, ga = fb, gb
			fb *= bwScanRatio
			if fb > hi*bwScanTo {
				return math.Inf(1), nil
			}
			if gb, err = level(fb); err != nil {
				return 0, err
			}
		}
	}
	if gb == 0 {
		return fb, nil
	}
	return illinois(math.Log(fa), ga, math.Log(fb), gb, func(u float64) (float64, error) { return level(math.Exp(u)) })
}

// illinois finds a root of g in [ua, ub], where g(ua) = ga > 0 and
// g(ub) = gb < 0, by the Illinois method (regula falsi that halves the
// value kept at an end point twice in a row; Dahlquist and Björck ch. 6,
// from memory), bisecting whenever a step fails to halve the bracket's width
// within three steps. It returns exp(u) at the root.
func illinois(ua, ga, ub, gb float64, g func(float64) (float64, error)) (float64, error) {
	side := 0
	width := ub - ua // the bracket's width three steps ago
	for i := 1; i <= bwMaxSteps && ub-ua > bwTol; i++ {
		u := (ua*gb - ub*ga) / (gb - ga)
		if i%3 == 0 {
			if ub-ua > width/2 {
				u = ua + (ub-ua)/2
			}
			width = ub - ua
		}
		if !(u > ua && u < ub) {
			u = ua + (ub-ua)/2
		}
		gu, err := g(u)
		switch {
		case err != nil:
			return 0, err
		case gu == 0:
			return math.Exp(u), nil
		case gu > 0:
			ua, ga = u, gu
			if side > 0 {
				gb /= 2
			}
			side = 1
		default:
			ub, gb = u, gu
			if side < 0 {
				ga /= 2
			}
			side = -1
		}
	}
	return math.Exp(ua + (ub-ua)/2), nil
}

// acSystem is the real part of the AC system, its right-hand side and
// where each frequency-dependent op-amp adds jωC: built once per ACGain or
// Bandwidth call, solved at each frequency.
type acSystem struct {
	m     int
	out   int     // unknown index of V(Out), or -1 when ground or source-driven
	fixed float64 // V(Out) when out < 0
	a     [MaxUnknowns * MaxUnknowns]float64
	b     [MaxUnknowns]float64
	tiny  [MaxUnknowns]float64 // Factor's singular-pivot thresholds
	nPole int
	pole  [MaxUnknowns]int     // matrix offset of a frequency-dependent op-amp's diagonal
	slope [MaxUnknowns]float64 // its imaginary part per hertz, scale/GBW

	// Work space of solve, kept here so that each frequency does not clear
	// it again: solve writes the m x m entries it reads.
	lu      [MaxUnknowns * MaxUnknowns]complex128
	x, inv  [MaxUnknowns]complex128
	tinyAtF [MaxUnknowns]float64
}

// acCompile factors the DC system (for its checks, conductances and row
// scale) and fills sys from the solver's compiled stamps.
func (s *Solver) acCompile(sys *acSystem, gbw []float64) error {
	ops := s.n.OpAmps
	if len(gbw) != len(ops) {
		panic(fmt.Sprintf("circuit: AC analysis: len(gbw) = %d, want %d op-amps", len(gbw), len(ops)))
	}
	for k, g := range gbw {
		if g != g {
			return fmt.Errorf("circuit: op-amp %q has gain-bandwidth NaN; give it in Hz, or 0 for a frequency-independent amplifier", ops[k].Name)
		}
	}
	if err := s.Factor(); err != nil {
		return err
	}
	m := s.m
	sys.m = m
	a := sys.a[:m*m]
	clear(a)
	for i, st := range s.rStamps {
		g := s.g[i]
		for _, o := range [2]int{st.aa, st.bb} {
			if o >= 0 {
				a[o] += g
			}
		}
		for _, o := range [2]int{st.ab, st.ba} {
			if o >= 0 {
				a[o] -= g
			}
		}
	}
	for j := range m {
		sys.tiny[j] = a[j*m+j] // a current-law column's largest entry
	}
	sc := s.scale
	sys.nPole = 0
	for k, st := range s.aStamps {
		a[st.diag] += sc / ops[k].Gain
		if st.plus >= 0 {
			a[st.plus] -= sc
			sys.tiny[st.plus%m] = max(sys.tiny[st.plus%m], sc)
		}
		if st.minus >= 0 {
			a[st.minus] += sc
			sys.tiny[st.minus%m] = max(sys.tiny[st.minus%m], sc)
		}
		if g := gbw[k]; g > 0 && !math.IsInf(g, 1) {
			sys.pole[sys.nPole] = st.diag
			sys.slope[sys.nPole] = sc / g
			sys.nPole++
		}
	}
	for j := range m {
		if s.ampRow[j] >= 0 {
			sys.tiny[j] = max(sys.tiny[j], sc)
		}
	}
	for j := range m {
		sys.tiny[j] *= singularTol
	}
	s.acRHS(sys.b[:m])
	sys.out = s.unk[s.n.Out]
	if sys.out < 0 {
		sys.fixed = s.voltage(s.n.Out)
	}
	return nil
}

// acRHS writes Solve's right-hand side into b: each excitation's entry
// into the current-law rows of the nodes it drives, and each op-amp row's
// scale x (Vos + V(Plus) - V(Minus)) for inputs fixed by sources.
func (s *Solver) acRHS(b []float64) {
	clear(b)
	n := s.n
	for _, d := range s.drives {
		b[d.row] += s.g[d.res] * n.Sources[d.src].V
	}
	// A current source's current enters its To row and leaves its From
	// row; bias currents leave both input nodes.
	into := func(row int, i float64) {
		if row >= 0 {
			b[row] += i
		}
	}
	for k, c := range n.Currents {
		into(s.cRows[k].a, c.A)
		into(s.cRows[k].b, -c.A)
	}
	for k, op := range n.OpAmps {
		into(s.ibRows[k].a, -op.IbPlus)
		into(s.ibRows[k].b, -op.IbMinus)
		as := s.aRHS[k]
		v := op.Vos
		if as.plusSrc >= 0 {
			v += n.Sources[as.plusSrc].V
		}
		if as.minusSrc >= 0 {
			v -= n.Sources[as.minusSrc].V
		}
		b[as.row] += s.scale * v
	}
}

// acSingular is the error for a zero pivot in column k of the AC system.
func (s *Solver) acSingular(f float64, k int) error {
	return fmt.Errorf("%w: at %g Hz node %q has no path that fixes its voltage (check for open resistors, a floating input or a loop of op-amps)", ErrSingular, f, s.n.Nodes[s.unkNode[k]])
}

// cabs1 is |Re z| + |Im z|, the pivot size of complex LU (LAPACK's izamax
// convention): within √2 of |z| and equal to it for real z, so that at
// f = 0 the pivots are Factor's.
func cabs1(z complex128) float64 { return math.Abs(real(z)) + math.Abs(imag(z)) }

// solve returns V(Out) at f, or the unknown index of a zero pivot.
func (sys *acSystem) solve(f float64) (complex128, int) {
	if sys.out < 0 {
		return complex(sys.fixed, 0), -1
	}
	m := sys.m
	a, b, inv, tiny := sys.lu[:m*m], sys.x[:m], sys.inv[:m], sys.tinyAtF[:m]
	for i, v := range sys.a[:m*m] {
		a[i] = complex(v, 0)
	}
	for i, v := range sys.b[:m] {
		b[i] = complex(v, 0)
	}
	copy(tiny, sys.tiny[:m])
	for k := range sys.nPole {
		o := sys.pole[k]
		a[o] = complex(real(a[o]), sys.slope[k]*f)
		// The diagonal may now be the column's largest entry.
		tiny[o%m] = max(tiny[o%m], singularTol*cabs1(a[o]))
	}
	for k := 0; k < m; k++ {
		p, pv := k, cabs1(a[k*m+k])
		for i := k + 1; i < m; i++ {
			if v := cabs1(a[i*m+k]); v > pv {
				p, pv = i, v
			}
		}
		if !(pv > tiny[k]) {
			return 0, k
		}
		if p != k {
			rk, rp := a[k*m+k:k*m+m], a[p*m+k:p*m+m]
			rp = rp[:len(rk)]
			for j := range rk {
				rk[j], rp[j] = rp[j], rk[j]
			}
			b[k], b[p] = b[p], b[k]
		}
		inv[k] = 1 / a[k*m+k]
		tail := a[k*m+k+1 : k*m+m]
		for i := k + 1; i < m; i++ {
			l := a[i*m+k]
			if l == 0 {
				continue
			}
			l *= inv[k]
			ri := a[i*m+k+1 : i*m+m]
			ri = ri[:len(tail)]
			for j, u := range tail {
				ri[j] -= l * u
			}
			b[i] -= l * b[k]
		}
	}
	// Back substitution down to the output, which is the last unknown.
	for i := m - 1; i >= sys.out; i-- {
		sum := b[i]
		for j := i + 1; j < m; j++ {
			sum -= a[i*m+j] * b[j]
		}
		b[i] = sum * inv[i]
	}
	return b[sys.out], -1
}
