package eseries

import (
	"errors"
	"fmt"
	"math"
	"strings"
)

// ErrUnknown is returned (wrapped) by ByName for a name that is not one of
// the series.
var ErrUnknown = errors.New("eseries: unknown series")

// Decades outside this range are not produced: values are built as an exact
// decimal mantissa times a power of ten, which float64 holds exactly only up
// to 10^22. The range covers 0.1 ohm to 1e12 ohm with room to spare.
const (
	minDecade = -20 // smallest value 1.00e-20
	maxDecade = 20  // largest value 9.xxe20
)

// ContainsTolerance is the relative tolerance Contains allows between a value
// and a series value, so that values computed in floating point still match.
const ContainsTolerance = 1e-9

// Series is one IEC 60063 preferred number series: N values per decade.
type Series struct {
	Name string // "E96"
	N    int    // values per decade
	m    []uint16
}

// The series of IEC 60063:2015.
var (
	E3   = &Series{Name: "E3", N: 3, m: e3}
	E6   = &Series{Name: "E6", N: 6, m: e6}
	E12  = &Series{Name: "E12", N: 12, m: e12}
	E24  = &Series{Name: "E24", N: 24, m: e24}
	E48  = &Series{Name: "E48", N: 48, m: e48}
	E96  = &Series{Name: "E96", N: 96, m: e96}
	E192 = &Series{Name: "E192", N: 192, m: e192}
)

var all = []*Series{E3, E6, E12, E24, E48, E96, E192}

// All returns the series from the coarsest (E3) to the finest (E192).
func All() []*Series {
	out := make([]*Series, len(all))
	copy(out, all)
	return out
}

// ByName returns the series with the given name, ignoring case and
// surrounding spaces ("E96", "e96").
func ByName(name string) (*Series, error) {
	n := strings.TrimSpace(name)
	for _, s := range all {
		if strings.EqualFold(n, s.Name) {
			return s, nil
		}
	}
	names := make([]string, len(all))
	for i, s := range all {
		names[i] = s.Name
	}
	return nil, fmt.Errorf("%w %q: use one of %s", ErrUnknown, name, strings.Join(names, ", "))
}

// String returns the series name.
func (s *Series) String() string { return s.Name }

// Mantissas returns the values of one decade, 1.00 up to below 10, as exact
// decimals.
func (s *Series) Mantissas() []float64 {
	out := make([]float64, len(s.m))
	for i, m := range s.m {
		out[i] = float64(m) / 100
	}
	return out
}

// pow10 holds the powers of ten that float64 represents exactly.
var pow10 = [...]float64{
	1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11,
	1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22,
}

// scaled returns m·10^k rounded once to float64, so that the result is the
// float64 nearest to the decimal value (both operands are exact, and one
// IEEE multiplication or division rounds correctly).
func scaled(m float64, k int) float64 {
	if k >= 0 {
		return m * pow10[k]
	}
	return m / pow10[-k]
}

// value returns the i-th value of decade d (mantissa i times 10^d); i may run
// one past either end of the table, which moves into the neighbouring decade.
func (s *Series) value(i, d int) float64 {
	for i < 0 {
		i += len(s.m)
		d--
	}
	for i >= len(s.m) {
		i -= len(s.m)
		d++
	}
	return scaled(float64(s.m[i]), d-2)
}

// locate returns the position (i, d) of the largest series value not above
// v. ok is false when v is not positive, not finite, or outside the decades
// the package produces.
func (s *Series) locate(v float64) (i, d int, ok bool) {
	if !(v > 0) || math.IsInf(v, 1) {
		return 0, 0, false
	}
	d = int(math.Floor(math.Log10(v)))
	if d < minDecade-1 || d > maxDecade+1 {
		return 0, 0, false
	}
	// Log10 may be off by one near powers of ten; settle d exactly.
	for d > minDecade-1 && scaled(1, d) > v {
		d--
	}
	for d < maxDecade+1 && scaled(1, d+1) <= v {
		d++
	}
	if d < minDecade || d > maxDecade {
		return 0, 0, false
	}
	lo, hi := 0, len(s.m)-1 // s.value(lo, d) <= v holds: the first mantissa is 1.00
	for lo < hi {
		mid := (lo + hi + 1) / 2
		if s.value(mid, d) <= v {
			lo = mid
		} else {
			hi = mid - 1
		}
	}
	return lo, d, true
}

// Nearest returns the series value nearest to v in log distance, that is
// the one with the smallest ratio max(v/x, x/v); a tie goes to the larger
// value. It returns NaN for v that is not positive and finite or outside
// 1e-20 .. 1e21.
//
// The log midpoint between neighbours a < b is sqrt(a·b), so v rounds up
// when v² >= a·b.
func (s *Series) Nearest(v float64) float64 {
	i, d, ok := s.locate(v)
	if !ok {
		return math.NaN()
	}
	lo := s.value(i, d)
	if lo == v {
		return lo
	}
	hi := s.value(i+1, d)
	if v*v >= lo*hi {
		return hi
	}
	return lo
}

// Up returns the smallest series value strictly greater than v, or NaN
// where Nearest would.
func (s *Series) Up(v float64) float64 {
	i, d, ok := s.locate(v)
	if !ok {
		return math.NaN()
	}
	return s.value(i+1, d)
}

// Down returns the largest series value strictly less than v, or NaN where
// Nearest would (and for v at or below 1e-20).
func (s *Series) Down(v float64) float64 {
	i, d, ok := s.locate(v)
	if !ok {
		return math.NaN()
	}
	if s.value(i, d) == v {
		i--
		if i < 0 && d == minDecade {
			return math.NaN()
		}
	}
	return s.value(i, d)
}

// Contains reports whether v is a value of the series within the relative
// tolerance ContainsTolerance.
func (s *Series) Contains(v float64) bool {
	n := s.Nearest(v)
	if math.IsNaN(n) {
		return false
	}
	return math.Abs(v-n) <= ContainsTolerance*n
}

// Values returns every series value in the closed interval [from, to] in
// ascending order, across as many decades as the interval spans, each an
// exact decimal. It returns nil when the interval is empty or holds no
// value.
func (s *Series) Values(from, to float64) []float64 {
	if !(to >= from) || !(to > 0) {
		return nil
	}
	start := from
	minValue := scaled(1, minDecade)
	if start < minValue {
		start = minValue
	}
	i, d, ok := s.locate(start)
	if !ok {
		return nil
	}
	if s.value(i, d) < from {
		i++
	}
	var out []float64
	for {
		for i >= len(s.m) {
			i -= len(s.m)
			d++
		}
		if d > maxDecade {
			break
		}
		v := s.value(i, d)
		if v > to {
			break
		}
		out = append(out, v)
		i++
	}
	return out
}

// Smallest returns the coarsest series (E3 first, E192 last) that contains
// v, for tagging catalog values; ok is false when none does.
func Smallest(v float64) (s *Series, ok bool) {
	for _, s := range all {
		if s.Contains(v) {
			return s, true
		}
	}
	return nil, false
}
