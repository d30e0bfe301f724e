package units

import (
	"strconv"
	"strings"
	"unicode/utf8"
)

// spaceLen returns the byte length of the space character at s[i], or 0.
// Besides ASCII space and tab it knows the no-break space (U+00A0), the
// spaces U+2000..U+200A (thin space U+2009 among them), the narrow no-break
// space U+202F, U+205F and the ideographic space U+3000.
func spaceLen(s string, i int) int {
	// Compare UTF-8 bytes directly: decoding every non-ASCII rune (Ω, µ, °)
	// would dominate the cost of a parse.
	switch s[i] {
	case ' ', '\t':
		return 1
	case 0xC2: // U+00A0 is C2 A0
		if i+1 < len(s) && s[i+1] == 0xA0 {
			return 2
		}
	case 0xE2: // U+2000..U+200A, U+202F, U+205F are E2 80 80..8A, E2 80 AF, E2 81 9F
		if i+2 < len(s) {
			b1, b2 := s[i+1], s[i+2]
			if b1 == 0x80 && (b2 <= 0x8A || b2 == 0xAF) && b2 >= 0x80 || b1 == 0x81 && b2 == 0x9F {
				return 3
			}
		}
	case 0xE3: // U+3000 is E3 80 80
		if i+2 < len(s) && s[i+1] == 0x80 && s[i+2] == 0x80 {
			return 3
		}
	}
	return 0
}

// trimSpaces removes leading and trailing spaces (as spaceLen knows them).
func trimSpaces(s string) string {
	s = skipSpaces(s)
	for len(s) > 0 {
		_, size := utf8.DecodeLastRuneInString(s)
		if spaceLen(s, len(s)-size) == 0 {
			break
		}
		s = s[:len(s)-size]
	}
	return s
}

// skipSpaces removes leading spaces.
func skipSpaces(s string) string {
	for len(s) > 0 {
		n := spaceLen(s, 0)
		if n == 0 {
			break
		}
		s = s[n:]
	}
	return s
}

// isBlank reports whether a trimmed cell is one of the placeholders that
// mean "no value".
func isBlank(t string) bool {
	switch t {
	case "", "-", "—", "–", "n/a", "N/A", "n.a.", "N.A.":
		return true
	}
	return false
}

// foldEq reports whether input equals sym, ignoring spaces in input and
// ASCII case.
func foldEq(input, sym string) bool {
	i, j := 0, 0
	for {
		for i < len(input) {
			n := spaceLen(input, i)
			if n == 0 {
				break
			}
			i += n
		}
		if i == len(input) || j == len(sym) {
			return i == len(input) && j == len(sym)
		}
		a, b := input[i], sym[j]
		if 'A' <= a && a <= 'Z' {
			a += 'a' - 'A'
		}
		if 'A' <= b && b <= 'Z' {
			b += 'a' - 'A'
		}
		if a != b {
			return false
		}
		i++
		j++
	}
}

// cutPlusMinus removes a leading "±", "+/-", "+-" or "+−" and reports
// whether one was there.
func cutPlusMinus(t string) (string, bool) {
	if t == "" || (t[0] != '+' && t[0] != '-' && t[0] != 0xC2 && t[0] != 0xE2) {
		return t, false
	}
	for _, p := range [...]string{"±", "+/-", "+-", "+−", "-/+", "∓"} {
		if strings.HasPrefix(t, p) {
			return skipSpaces(t[len(p):]), true
		}
	}
	return t, false
}

// number is a decimal number as written: sign, integer digits, fraction
// digits and a decimal exponent. It is converted to float64 only once the
// SI prefix is known, so that the result is the float64 nearest to the
// decimal value (4.99k gives exactly the float64 of 4990).
type number struct {
	neg        bool
	intDigits  string
	fracDigits string
	exp        int  // from an "e" exponent
	hasExp     bool // an "e" exponent was written
}

// maxExp bounds the magnitude of written exponents; anything beyond
// overflows or underflows float64 anyway.
const maxExp = 9999

// readNumber reads a number at the start of t and returns the rest. reason
// is non-empty when t does not start with a well-formed number.
func readNumber(t string) (n number, rest string, reason string) {
	i := 0
	switch {
	case strings.HasPrefix(t, "+"):
		i = 1
	case strings.HasPrefix(t, "-"):
		n.neg, i = true, 1
	case strings.HasPrefix(t, "−"): // U+2212 minus sign
		n.neg, i = true, len("−")
	}
	start := i
	for i < len(t) && isDigit(t[i]) {
		i++
	}
	n.intDigits = t[start:i]
	if i < len(t) && (t[i] == '.' || t[i] == ',') {
		sep := t[i]
		i++
		fs := i
		for i < len(t) && isDigit(t[i]) {
			i++
		}
		n.fracDigits = t[fs:i]
		if n.intDigits == "" && n.fracDigits == "" {
			return n, t, "expected a number"
		}
		if i < len(t) && (t[i] == '.' || t[i] == ',') && i+1 < len(t) && isDigit(t[i+1]) {
			if t[i] != sep {
				return n, t, "a comma and a dot together: write the number without thousands separators"
			}
			return n, t, "more than one decimal separator"
		}
		if sep == ',' {
			if strings.ContainsAny(t, ".") || strings.Count(t, ",") > 1 {
				return n, t, "a comma can be a decimal separator only when there is no dot and no other comma"
			}
			if len(n.fracDigits) == 3 {
				return n, t, "the comma could be a decimal or a thousands separator"
			}
			if n.fracDigits == "" {
				return n, t, "no digits after the decimal comma"
			}
		}
	}
	if n.intDigits == "" && n.fracDigits == "" {
		return n, t, "expected a number"
	}
	if i < len(t) && (t[i] == 'e' || t[i] == 'E') {
		j := i + 1
		eneg := false
		if j < len(t) && (t[j] == '+' || t[j] == '-') {
			eneg = t[j] == '-'
			j++
		}
		es := j
		for j < len(t) && isDigit(t[j]) {
			j++
		}
		if j > es {
			if j-es > 4 {
				return n, t, "exponent out of range"
			}
			e, _ := strconv.Atoi(t[es:j])
			if eneg {
				e = -e
			}
			n.exp, n.hasExp = e, true
			i = j
		}
	}
	return n, t[i:], ""
}

func isDigit(c byte) bool { return '0' <= c && c <= '9' }

// float returns the number times 10^shift, rounded once to float64. The
// digits are written into a stack buffer so that the common short forms
// allocate nothing.
func (n number) float(shift int) (float64, string) {
	var buf [64]byte
	b := buf[:0]
	if n.neg {
		b = append(b, '-')
	}
	if n.intDigits == "" {
		b = append(b, '0')
	}
	b = append(b, n.intDigits...)
	if n.fracDigits != "" {
		b = append(b, '.')
		b = append(b, n.fracDigits...)
	}
	e := n.exp + shift
	if e != 0 {
		b = append(b, 'e')
		b = strconv.AppendInt(b, int64(e), 10)
	}
	v, err := strconv.ParseFloat(string(b), 64)
	if err != nil {
		return 0, "number out of range"
	}
	return v, ""
}

// prefix bits: which SI prefixes a quantity accepts.
type prefixSet uint16

const (
	pFemto prefixSet = 1 << iota
	pPico
	pNano
	pMicro
	pMilli
	pKilo
	pUpperK // "K" as kilo (resistance, frequency; never where K is kelvin)
	pMega
	pGiga
	pMeg // "MEG" as mega in any case, as SPICE decks write it (resistance)

	pGeneral = pFemto | pPico | pNano | pMicro | pMilli | pKilo | pMega | pGiga
)

// readPrefix returns the decimal exponent and byte length of an accepted SI
// prefix at the start of r.
func readPrefix(r string, set prefixSet) (exp, size int, ok bool) {
	if r == "" {
		return 0, 0, false
	}
	// Before "M" and "m": "2.2MEG" is mega, never "M" then "EG", and
	// "2.2 meg" is not milli.
	if set&pMeg != 0 && len(r) >= 3 && strings.EqualFold(r[:3], "meg") {
		return 6, 3, true
	}
	type pf struct {
		s   string
		bit prefixSet
		exp int
	}
	for _, p := range [...]pf{
		{"f", pFemto, -15}, {"p", pPico, -12}, {"n", pNano, -9},
		{"u", pMicro, -6}, {"µ", pMicro, -6}, {"μ", pMicro, -6},
		{"m", pMilli, -3}, {"k", pKilo, 3}, {"K", pUpperK, 3},
		{"M", pMega, 6}, {"G", pGiga, 9},
	} {
		if set&p.bit != 0 && strings.HasPrefix(r, p.s) {
			return p.exp, len(p.s), true
		}
	}
	return 0, 0, false
}

// symbol is one way of writing a unit, with the power of ten that takes a
// number in it to the stored unit ("%" is -2 for a fraction). loose, when
// set, is why the symbol is refused by the strict parsers ("25 ppm" does
// not say per kelvin).
type symbol struct {
	text  string
	exp   int
	loose string
}

// kind describes one quantity for the shared reader.
type kind struct {
	name     string
	symbols  []symbol // matched with foldEq; a prefix adds its power of ten to the symbol's
	bare     bool     // a number without unit is accepted (never in strict mode)
	bareExp  int      // power of ten for a bare number
	prefixes prefixSet
	negative bool // negative values are accepted
	pm       bool // a leading ± is accepted (and dropped: the value is a magnitude)
	needUnit string
	refuse   []refusal
	strict   string // a valid form for the strict parsers' errors
}

// refusal is a unit that is recognised but not accepted, with the reason.
type refusal struct {
	text, reason string
}

// mode says how a read treats a missing unit: strict refuses a bare number
// (and a bare prefix), and unit, when not empty, is the unit text written
// once after the other end of a range ("mV" in "-500..500mV"), used when
// this value has none.
type mode struct {
	strict bool
	unit   string
}

// status says why a read failed.
type status uint8

const (
	stOK     status = iota
	stBlank         // a blank cell: wraps ErrBlank
	stNoUnit        // a unit is required and none was written: wraps ErrNoUnit
	stBad           // anything else
)

// parse reads s as a quantity of kind k.
func (k *kind) parse(s string) (float64, error) { return k.parseMode(s, mode{}) }

func (k *kind) parseMode(s string, m mode) (float64, error) {
	v, reason, st := k.read(s, m)
	if st != stOK {
		return 0, k.fail(s, reason, st, m.strict)
	}
	return v, nil
}

// fail builds the *Error for a read of kind k that failed with st.
func (k *kind) fail(s, reason string, st status, strict bool) *Error {
	e := newError(s, k.name, reason)
	if strict {
		e.example = k.strict
	}
	e.err = st.sentinel()
	return e
}

// sentinel is the error an *Error of this status wraps.
func (st status) sentinel() error {
	switch st {
	case stBlank:
		return ErrBlank
	case stNoUnit:
		return ErrNoUnit
	}
	return nil
}

// read is parse without building the error, for composite readers.
func (k *kind) read(s string, m mode) (v float64, reason string, st status) {
	t := trimSpaces(s)
	if isBlank(t) {
		return 0, "no value given", stBlank
	}
	t2, pm := cutPlusMinus(t)
	if pm && !k.pm {
		return 0, "± gives a pair of values (minus and plus), not one value", stBad
	}
	n, rest, reason := readNumber(t2)
	if reason != "" {
		return 0, reason, stBad
	}
	if pm && (strings.HasPrefix(t2, "+") || strings.HasPrefix(t2, "-") || strings.HasPrefix(t2, "−")) {
		return 0, "a sign after ±", stBad
	}
	rest = skipSpaces(rest)
	if rest == "" {
		rest = m.unit
	}
	exp, reason, st := k.unitExp(n, rest, m.strict)
	if st != stOK {
		return 0, reason, st
	}
	v, reason = n.float(exp)
	if reason != "" {
		return 0, reason, stBad
	}
	if v < 0 && !k.negative {
		return 0, "a " + k.name + " cannot be negative", stBad
	}
	return v, "", stOK
}

// unitExp matches the unit text r (after the number) and returns the power
// of ten it stands for.
func (k *kind) unitExp(n number, r string, strict bool) (int, string, status) {
	if r == "" {
		if !k.bare || strict {
			return 0, "a unit is needed (" + k.needUnit + ")", stNoUnit
		}
		return k.bareExp, "", stOK
	}
	for _, sym := range k.symbols {
		if foldEq(r, sym.text) {
			if strict && sym.loose != "" {
				return 0, sym.loose, stBad
			}
			return sym.exp, "", stOK
		}
	}
	for _, ref := range k.refuse {
		if foldEq(r, ref.text) {
			return 0, ref.reason, stBad
		}
	}
	pe, size, ok := readPrefix(r, k.prefixes)
	if ok {
		if n.hasExp {
			return 0, "use either an exponent or an SI prefix, not both", stBad
		}
		u := r[size:]
		if skipSpaces(u) == "" && k.bare && k.bareExp == 0 {
			if strict {
				return 0, "a unit is needed after the prefix (" + k.needUnit + ")", stNoUnit
			}
			return pe, "", stOK
		}
		for _, sym := range k.symbols {
			if sym.loose == "" && foldEq(u, sym.text) {
				return pe + sym.exp, "", stOK
			}
		}
	}
	return 0, "unknown unit or prefix " + strconv.Quote(r), stBad
}
