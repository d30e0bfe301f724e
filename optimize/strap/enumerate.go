package strap

import (
	"cmp"
	"errors"
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"

	"plumb/catalog"
	"plumb/optimize/circuit"
)

// Enumerate returns every usable strapping of the network n, one per class
// of equivalent strappings (see the package comment), sorted by kind
// (differential first), then gain, then the number of connected pins.
// It walks every assignment of a terminal to each pin but the output
// (terminals vp, vn, ref, out, or a tie group numbered in order of first
// use, so each partition of the pins into tie groups is seen once; a tie
// group of one pin is an open pin), reduces each to its canonical key
// without solving, and solves one representative of each class through
// package circuit. It returns an error wrapping ErrNetwork for a network it
// cannot strap.
func Enumerate(n *catalog.MatchedNetwork) ([]Strapping, error) {
	m, err := prepare(n)
	if err != nil {
		return nil, err
	}
	type rep struct {
		conns     [maxPins]Terminal
		connected int
	}
	classes := map[[2*maxElements + 2]uint8]int{}
	var reps []rep
	np := len(m.pins)
	var cur [maxPins]Terminal
	var size [maxPins + 1]int // pins in each tie group
	cur[m.outPin] = Output
	var r resolved
	var walk func(i, groups int)
	walk = func(i, groups int) {
		if i == np {
			m.resolve(cur[:np], &r)
			// A single-ended strapping takes its input at vp; its twin at
			// vn is the same circuit.
			if !r.candidate(m) || !r.used[InPlus] {
				return
			}
			connected := 0
			for _, t := range cur[:np] {
				if t < Tie1 || size[t-Tie1] > 1 {
					connected++
				}
			}
			k, seen := classes[r.key]
			switch {
			case !seen:
				classes[r.key] = len(reps)
				reps = append(reps, rep{conns: cur, connected: connected})
			case connected < reps[k].connected:
				reps[k] = rep{conns: cur, connected: connected}
			}
			return
		}
		if i == m.outPin {
			walk(i+1, groups)
			return
		}
		for t := InPlus; t < Tie1; t++ {
			cur[i] = t
			walk(i+1, groups)
		}
		for g := 0; g <= groups; g++ {
			cur[i] = Tie1 + Terminal(g)
			size[g]++
			walk(i+1, max(groups, g+1))
			size[g]--
		}
	}
	walk(0, 0)

	var all []Strapping
	st := newStage(m)
	for _, rp := range reps {
		c := Connections(rp.conns[:np])
		m.resolve(c, &r)
		v := st.check(m, &r)
		if v == singular && !errors.Is(st.err, circuit.ErrSingular) {
			return nil, st.reason(v, &r)
		}
		// A differential strapping of negative gain is one of positive
		// gain with vp and vn swapped, which the walk also sees.
		if v != usable || (r.used[InMinus] && st.gain(&r) < 0) {
			continue
		}
		all = append(all, *st.figures(m, &r, c.canonical()))
	}
	slices.SortStableFunc(all, func(a, b Strapping) int {
		return cmp.Or(cmp.Compare(a.Kind, b.Kind), cmp.Compare(a.Gain, b.Gain),
			cmp.Compare(a.Connections.connected(), b.Connections.connected()), strings.Compare(a.Text, b.Text))
	})
	// Strappings that behave alike at their terminals are one choice for
	// the engineer: the simplest stands for them and lists the others.
	var out []Strapping
	same := map[string]int{}
	for _, s := range all {
		k := s.behaviour()
		if i, ok := same[k]; ok {
			out[i].Equivalents = append(out[i].Equivalents, s.Text)
			continue
		}
		same[k] = len(out)
		out = append(out, s)
	}
	return out, nil
}

// behaviour returns a key equal for strappings whose figures agree to nine
// significant digits: kind, transfers, impedances, noise gain, the
// resistances at the op-amp's inputs, the op-amp input's dependence on the
// inputs, and the error figures.
func (s *Strapping) behaviour() string {
	var b strings.Builder
	b.WriteString(s.Kind.String())
	for _, x := range [...]float64{s.GainPlus, s.GainMinus, s.GainRef, s.InputPlusOhm, s.InputMinusOhm, s.RefOhm,
		s.NoiseGain, s.SourcePlusOhm, s.SourceMinusOhm, s.plusPin[0], s.plusPin[1], s.plusPin[2],
		s.GainErrorWorst, s.GainErrorRSS, s.GainDriftPPM, s.CMRRWorst} {
		if math.Abs(x) < roundoff {
			x = 0
		}
		b.WriteByte(' ')
		b.WriteString(strconv.FormatFloat(x, 'g', 9, 64))
	}
	return b.String()
}

// Evaluate returns the figures of one strapping c of the network n: an
// error wrapping ErrNetwork for a network that cannot be strapped, ErrText
// for connections of the wrong length or an output pin not at the output,
// and ErrUnusable (with the reason) for a strapping that is not a usable
// amplifier. The result's Connections are c in canonical form (tie groups
// renumbered, single-pin ties opened).
func Evaluate(n *catalog.MatchedNetwork, c Connections) (*Strapping, error) {
	m, err := prepare(n)
	if err != nil {
		return nil, err
	}
	if len(c) != len(m.pins) {
		return nil, fmt.Errorf("%w: %d pin terminals for a network of %d pins", ErrText, len(c), len(m.pins))
	}
	if c[m.outPin] != Output {
		return nil, fmt.Errorf("%w: pin %q is the op-amp's output and must be at out, not %s", ErrText, m.pins[m.outPin], c[m.outPin])
	}
	return m.evaluate(c.canonical())
}

// Parse reads a strapping text of the network n: PIN=terminal fields
// separated by spaces, the terminal one of vp, vn, ref, out or a tie group
// n1, n2, ...; pins not named are open, and the op-amp's output pin is at
// out whether named or not. Errors wrap ErrText and name the field.
func Parse(n *catalog.MatchedNetwork, text string) (Connections, error) {
	m, err := prepare(n)
	if err != nil {
		return nil, err
	}
	c := make(Connections, len(m.pins))
	c[m.outPin] = Output
	named := make([]bool, len(m.pins))
	for _, f := range strings.Fields(text) {
		pin, term, ok := strings.Cut(f, "=")
		if !ok {
			return nil, fmt.Errorf("%w %q: field %q: write PIN=terminal (for example %s=vp)", ErrText, text, f, m.pins[0])
		}
		k := slices.Index(m.pins, pin)
		if k < 0 {
			return nil, fmt.Errorf("%w %q: field %q: no pin %q; the pins are %s", ErrText, text, f, pin, strings.Join(m.pins, ", "))
		}
		if named[k] {
			return nil, fmt.Errorf("%w %q: pin %q is named twice", ErrText, text, pin)
		}
		named[k] = true
		t, ok := parseTerminal(term)
		if !ok || t == Open {
			return nil, fmt.Errorf("%w %q: field %q: terminal %q: use vp, vn, ref, out or a tie group n1, n2, ... (leave an open pin out)", ErrText, text, f, term)
		}
		if k == m.outPin && t != Output {
			return nil, fmt.Errorf("%w %q: pin %q is the op-amp's output; it can only be at out", ErrText, text, pin)
		}
		c[k] = t
	}
	return c.canonical(), nil
}

// Supply holds the rails and the internal op-amp's input common-mode range
// relative to them, as catalog.Amplifier gives it: the op-amp's inputs
// work from NegV + CMNegV to PosV − CMPosV (a negative CMPosV reaches
// above the positive rail).
type Supply struct {
	NegV, PosV     float64
	CMNegV, CMPosV float64
}

// InputRange returns the range of input voltage over which the op-amp's
// inputs stay inside their common-mode range: for a differential strapping
// the common-mode voltage Vcm with Vp = Vcm + vdiff/2 and Vn = Vcm −
// vdiff/2, for a single-ended one the input itself (vdiff is ignored),
// with the reference at vref. The op-amp's inputs sit at Kp·Vp + Kn·Vn +
// Kr·Vref (package comment); where the input does not reach them at all
// (an inverting strapping with its non-inverting input at the reference)
// the range is unbounded, ±Inf. ok is false, with NaN bounds, when no
// input voltage keeps them inside the range or a figure is unknown (NaN).
func (s *Strapping) InputRange(sup Supply, vref, vdiff float64) (lo, hi float64, ok bool) {
	low, high := sup.NegV+sup.CMNegV, sup.PosV-sup.CMPosV
	kp, kn, kr := s.plusPin[0], s.plusPin[1], s.plusPin[2]
	var a, b float64 // V(op-amp input) = a·x + b
	switch s.Kind {
	case Differential:
		a, b = kp+kn, (kp-kn)*vdiff/2+kr*vref
	case FromPlus:
		a, b = kp, kr*vref
	default:
		a, b = kn, kr*vref
	}
	nan := math.NaN()
	if math.IsNaN(low) || math.IsNaN(high) || math.IsNaN(b) || !(low <= high) {
		return nan, nan, false
	}
	if math.Abs(a) < zeroGain {
		if b < low || b > high {
			return nan, nan, false
		}
		return math.Inf(-1), math.Inf(1), true
	}
	lo, hi = (low-b)/a, (high-b)/a
	if lo > hi {
		lo, hi = hi, lo
	}
	return lo, hi, true
}
