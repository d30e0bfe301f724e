package strap

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"
)

// Sentinel errors. Callers branch on them with errors.Is.
var (
	// ErrNetwork is returned for a network that cannot be strapped: no
	// elements or pins, a bad element value, an output that is not a pin,
	// or more pins or nodes than the enumeration takes.
	ErrNetwork = errors.New("strap: invalid matched network")
	// ErrText is returned by Parse for a strapping text it cannot read.
	ErrText = errors.New("strap: invalid strapping")
	// ErrUnusable is returned by Evaluate for a strapping that is not a
	// usable amplifier (see the package comment).
	ErrUnusable = errors.New("strap: strapping is not a usable amplifier")
)

// Terminal is what one pin is tied to. Values from Tie1 on tie the pin to
// the other pins with the same value and to nothing else.
type Terminal uint8

// Terminals of a pin.
const (
	Open    Terminal = iota // not connected
	InPlus                  // the positive input, "vp"
	InMinus                 // the negative input, "vn"
	Ref                     // the reference, "ref"
	Output                  // the output, "out"
	Tie1                    // the first tie group, "n1"; Tie1+k is "n(k+1)"
)

// String returns the terminal's name in the strapping text.
func (t Terminal) String() string {
	switch t {
	case Open:
		return "open"
	case InPlus:
		return "vp"
	case InMinus:
		return "vn"
	case Ref:
		return "ref"
	case Output:
		return "out"
	}
	return "n" + strconv.Itoa(int(t-Tie1)+1)
}

// parseTerminal reads a terminal name of the strapping text.
func parseTerminal(s string) (Terminal, bool) {
	for t := Open; t < Tie1; t++ {
		if s == t.String() {
			return t, true
		}
	}
	if rest, ok := strings.CutPrefix(s, "n"); ok {
		k, err := strconv.Atoi(rest)
		if err == nil && k >= 1 && k <= maxPins {
			return Tie1 + Terminal(k-1), true
		}
	}
	return 0, false
}

// Connections is a strapping in structured form: the terminal of each pin,
// in the order of the network's Pins.
type Connections []Terminal

// canonical returns c with tie groups of one pin opened and the others
// renumbered n1, n2, ... in order of their first pin.
func (c Connections) canonical() Connections {
	var count, rename [256]int
	for _, t := range c {
		count[t]++
	}
	out := make(Connections, len(c))
	next := Tie1
	for i, t := range c {
		switch {
		case t < Tie1:
			out[i] = t
		case count[t] < 2:
			out[i] = Open
		default:
			if rename[t] == 0 {
				rename[t] = int(next)
				next++
			}
			out[i] = Terminal(rename[t])
		}
	}
	return out
}

// connected counts the pins that are not open.
func (c Connections) connected() int {
	n := 0
	for _, t := range c {
		if t != Open {
			n++
		}
	}
	return n
}

// Text returns the strapping text of c for a network with these pins: each
// connected pin as PIN=terminal in pin order, separated by spaces, open
// pins left out.
func (c Connections) Text(pins []string) string {
	var b strings.Builder
	for i, t := range c.canonical() {
		if t == Open {
			continue
		}
		if b.Len() > 0 {
			b.WriteByte(' ')
		}
		b.WriteString(pins[i])
		b.WriteByte('=')
		b.WriteString(t.String())
	}
	return b.String()
}

// Kind says which inputs a strapping uses.
type Kind int

// Kinds of strapping.
const (
	Differential Kind = iota // both inputs, zero nominal common-mode gain
	FromPlus                 // single-ended from vp (vn unconnected)
	FromMinus                // single-ended from vn (vp unconnected)
)

// String names the kind.
func (k Kind) String() string {
	switch k {
	case Differential:
		return "differential"
	case FromPlus:
		return "single-ended from vp"
	case FromMinus:
		return "single-ended from vn"
	}
	return "kind(" + strconv.Itoa(int(k)) + ")"
}

// Strapping is one usable strapping and its figures (see the package
// comment for each definition). Resistances are in ohms; figures that
// are unknown are NaN, never zero.
type Strapping struct {
	Connections Connections
	Text        string // the text form, see Connections.Text
	Kind        Kind
	// Equivalents lists, from Enumerate, the texts of the other
	// strappings with the same figures (element roles swapped between
	// equal elements, an input through an element that carries no
	// current); this one has the fewest connections.
	Equivalents []string

	// Gain is the differential gain Adm of a differential strapping, else
	// the single-ended gain (negative for an inverting strapping).
	Gain float64
	// GainPlus, GainMinus and GainRef are the transfers from vp, vn and
	// ref to the output; they sum to 1.
	GainPlus, GainMinus, GainRef float64
	// CommonModeGain is the nominal Acm = GainPlus + GainMinus (zero for a
	// differential strapping, NaN for a single-ended one).
	CommonModeGain float64

	// InputPlusOhm, InputMinusOhm and RefOhm are the impedances the vp, vn
	// and ref sources see, each driven alone; +Inf where the source drives
	// no current (an op-amp input), NaN where it is not connected.
	InputPlusOhm, InputMinusOhm, RefOhm float64

	// NoiseGain is the transfer of the op-amp's input offset to the
	// output, 1/β.
	NoiseGain float64
	// SourcePlusOhm and SourceMinusOhm are the resistances the op-amp's
	// bias currents see at its non-inverting and inverting inputs.
	SourcePlusOhm, SourceMinusOhm float64

	// Elements names the elements that carry current, in network order;
	// Sensitivity holds ∂ln|G|/∂ln R of each, CMSensitivity ∂Acm/∂ln R
	// (nil for a single-ended strapping).
	Elements      []string
	Sensitivity   []float64
	CMSensitivity []float64

	// GainErrorWorst and GainErrorRSS are the relative gain errors from
	// the ratio tolerance, GainDriftPPM the gain drift from the ratio
	// tracking (ppm/K), CMRRWorst the worst-case CMRR from the ratio
	// tolerance, a ratio (NaN for a single-ended strapping, which has no
	// common mode; +Inf for a perfect match).
	GainErrorWorst, GainErrorRSS float64
	GainDriftPPM                 float64
	CMRRWorst                    float64

	// plusPin holds Kp, Kn, Kr: V(op-amp input) = Kp·Vp + Kn·Vn + Kr·Vref.
	plusPin [3]float64
}

// CMRRdB returns CMRRWorst in decibels, 20·log10; NaN for a single-ended
// strapping or an unknown ratio tolerance.
func (s *Strapping) CMRRdB() float64 {
	if s.Kind != Differential {
		return math.NaN()
	}
	return 20 * math.Log10(s.CMRRWorst)
}

// String returns the text and gain, for messages.
func (s *Strapping) String() string {
	return fmt.Sprintf("%s (%s, gain %.6g)", s.Text, s.Kind, s.Gain)
}
