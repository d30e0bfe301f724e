package importers

import (
	"errors"
	"fmt"
	"math"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"unicode"

	"plumb/catalog"
	"plumb/catalog/units"
)

// rowReader turns the records of one file into parts, by a resolved
// mapping.
type rowReader struct {
	file         string
	header       []string
	info         []headerInfo
	kind         catalog.Kind
	cols         map[Field]int
	breaks       []breakCol
	fixed        map[Field]string
	decimalComma bool
	currency     string // from the mapping, the options, or ""
	// checkCurrency: no currency is known but from the cells; the first
	// priced row must show one.
	checkCurrency bool
	allowUnusual  bool
	units         map[Field]string // the mapping's unit words by field
	fixedTol      float64          // a bare tolerance read as a fraction
	haveFixedTol  bool
	// si is set for the catalog's own export: a bare number is the figure
	// in SI units (a fraction for a tolerance), read exactly.
	si   bool
	prov catalog.Provenance

	check catalog.Snapshot // one-part batch for the store's validation
	strs  map[string]string
	techs map[string]string // technology cell -> trade word, "" for none

	rec      []string
	line     int
	problems []Problem
	part     string
	// unknown lists the figures the row does not give, stored as unknown;
	// unknownRows counts the rows that leave each out, for one note per
	// file (unknownOrder: first seen first).
	unknown      []string
	unknownRows  map[string]int
	unknownOrder []string
}

// unknownNote is the file's one note on the figures its rows leave out.
func (r *rowReader) unknownNote() (Problem, bool) {
	if len(r.unknownOrder) == 0 {
		return Problem{}, false
	}
	parts := make([]string, len(r.unknownOrder))
	for i, u := range r.unknownOrder {
		parts[i] = fmt.Sprintf("%s (%d row%s)", u, r.unknownRows[u], map[bool]string{true: "s"}[r.unknownRows[u] != 1])
	}
	return newProblem(Info, &ParseError{File: r.file, Err: fmt.Errorf("not given, stored as unknown: %s; a solve takes each at its documented default (README, \"Unknown figures\") and lists it", strings.Join(parts, ", "))}, ""), true
}

// parsed is one row read into a part of the file's kind.
type parsed struct {
	line      int
	series    *catalog.ResistorSeries
	resistor  *catalog.Resistor
	network   *catalog.Network
	amplifier *catalog.Amplifier
	reference *catalog.Reference
}

func (p parsed) key() string {
	switch {
	case p.series != nil:
		return p.series.Part
	case p.resistor != nil:
		return p.resistor.Part
	case p.network != nil:
		return p.network.Part
	case p.reference != nil:
		return p.reference.Part
	}
	return p.amplifier.Part
}

// intern returns one shared copy of a text that repeats from row to row
// (maker, line, package, technology), so the parsed rows do not keep their
// records alive. Past maxInterned distinct texts it just copies.
func (r *rowReader) intern(s string) string {
	if v, ok := r.strs[s]; ok {
		return v
	}
	v := strings.Clone(s)
	if r.strs == nil {
		r.strs = map[string]string{}
	}
	if len(r.strs) < maxInterned {
		r.strs[v] = v
	}
	return v
}

const maxInterned = 4096

// technology reads a technology cell (normaliseTechnology), remembering
// the answer for the few texts a file repeats row after row.
func (r *rowReader) technology(s string) (string, bool) {
	if w, ok := r.techs[s]; ok {
		return w, w != ""
	}
	w, ok := normaliseTechnology(s)
	if r.techs == nil {
		r.techs = map[string]string{}
	}
	if len(r.techs) < maxInterned {
		r.techs[strings.Clone(s)] = w
	}
	return w, ok
}

// errSkip ends the reading of a row; the problem has been recorded.
var errSkip = errors.New("importers: row skipped")

func (r *rowReader) note(sev Severity, f Field, raw string, err error) {
	col := ""
	if i, ok := r.cols[f]; ok {
		col = r.header[i]
	} else if f != "" {
		col = string(f)
	}
	r.problems = append(r.problems, newProblem(sev, &ParseError{File: r.file, Line: r.line, Column: col, Raw: raw, Err: err}, r.part))
}

// skip records a reason to drop the row and returns errSkip.
func (r *rowReader) skip(f Field, raw string, err error) error {
	r.note(Skip, f, raw, err)
	return errSkip
}

// raw returns the cell for f, or the mapping's fixed value, and whether
// either is there and not blank.
func (r *rowReader) raw(f Field) (string, bool) {
	if i, ok := r.cols[f]; ok && i < len(r.rec) {
		s := cleanCell(r.rec[i])
		if !isBlank(s) {
			return s, true
		}
		if v, ok := r.fixed[f]; ok {
			return v, true
		}
		return s, false
	}
	v, ok := r.fixed[f]
	return v, ok && !isBlank(v)
}

func (r *rowReader) unitHint(f Field) string {
	if u, ok := r.units[f]; ok {
		return u
	}
	if i, ok := r.cols[f]; ok {
		return r.info[i].unit
	}
	return ""
}

// value reads a figure. ok is false when it is blank; a bad value skips the
// row. typ is set when the header or cell marks it typical.
func (r *rowReader) value(f Field, q quantity) (v float64, ok, typ bool, err error) {
	return r.valueIn(f, q, r.decimalComma)
}

// count reads a count as value does. In a file that writes a decimal
// comma, parseCountDecimalComma rewrites the cell itself, once: rewritten
// twice, "1,234" (1.234) would read as 1234.
func (r *rowReader) count(f Field) (v float64, ok, typ bool, err error) {
	if r.decimalComma {
		return r.valueIn(f, parseCountDecimalComma, false)
	}
	return r.valueIn(f, parseCount, false)
}

func (r *rowReader) valueIn(f Field, q quantity, decimalComma bool) (v float64, ok, typ bool, err error) {
	s, present := r.raw(f)
	if !present {
		return 0, false, false, nil
	}
	if r.si {
		if v, err := strconv.ParseFloat(s, 64); err == nil && !math.IsInf(v, 0) && !math.IsNaN(v) {
			return v, true, false, nil
		}
	}
	hint := r.unitHint(f)
	v, typ, ignored, err := readValueHint(s, hint, decimalComma, q)
	if errors.Is(err, units.ErrBlank) {
		return 0, false, false, nil
	}
	if err != nil && ignored {
		return 0, false, false, r.skip(f, s, fmt.Errorf("%w: %s (the header's unit %q is not a unit of this figure)", ErrBadValue, unitErr(err), hint))
	}
	if err != nil {
		return 0, false, false, r.skip(f, s, fmt.Errorf("%w: %s", ErrBadValue, unitErr(err)))
	}
	if ignored {
		r.note(Doubt, f, s, fmt.Errorf("the header's unit %q does not read as a unit of this figure: the bare number was read as %g (SI); check it", hint, v))
	}
	if i, ok := r.cols[f]; ok && r.info[i].typical {
		typ = true
	}
	return v, true, typ, nil
}

// need reads a figure the kind cannot do without.
func (r *rowReader) need(f Field, q quantity, what string) (float64, error) {
	v, ok, _, err := r.value(f, q)
	if err != nil {
		return 0, err
	}
	if !ok {
		s, _ := r.raw(f)
		return 0, r.skip(f, s, fmt.Errorf("%w: no %s; fill the column or set a fixed value in the mapping", ErrMissingValue, what))
	}
	return v, nil
}

func (r *rowReader) text(f Field) string {
	s, _ := r.raw(f)
	if isBlank(s) {
		return ""
	}
	return s
}

// read turns one record into a part.
func (r *rowReader) read(rec []string, line int) (parsed, error) {
	r.rec, r.line, r.part, r.unknown = rec, line, "", r.unknown[:0]
	if err := r.checkWidth(); err != nil {
		return parsed{}, err
	}
	// A cell is a slice of its whole record; a copy lets the record go.
	part := strings.Clone(r.text(FieldPart))
	if part == "" {
		return parsed{}, r.skip(FieldPart, "", fmt.Errorf("%w: no part number", ErrMissingValue))
	}
	// Every problem of the row is reported in one pass: a failed check
	// is recorded (r.skip) and the others still run; the row is skipped
	// at the end.
	var failed error
	keep := func(err error) {
		if err != nil && failed == nil {
			failed = err
		}
	}
	if err := r.plainText(FieldPart, part, "part number"); err != nil {
		return parsed{}, err
	}
	r.part = part
	offer, err := r.offer()
	keep(err)
	if strings.IndexFunc(part, unicode.IsSpace) >= 0 || strings.Contains(part, ",") {
		keep(r.skip(FieldPart, part, fmt.Errorf("%w: part number %q contains a space or comma, which no order code has; check the column", ErrBadValue, part)))
	}
	if err := r.plainText(FieldMaker, r.text(FieldMaker), "maker"); err != nil {
		keep(err)
	} else if r.text(FieldMaker) == "" {
		keep(r.skip(FieldMaker, "", fmt.Errorf("%w: no maker; fill the column or set fixed maker in a mapping", ErrMissingValue)))
	}
	p := parsed{line: line}
	snap := &r.check
	snap.ResistorSeries, snap.Resistors, snap.Networks, snap.Amplifiers = snap.ResistorSeries[:0], snap.Resistors[:0], snap.Networks[:0], snap.Amplifiers[:0]
	snap.References = snap.References[:0]
	switch r.kind {
	case catalog.KindSeries:
		p.series, err = r.series(part, offer)
		if err == nil {
			snap.ResistorSeries = append(snap.ResistorSeries, *p.series)
		}
	case catalog.KindResistor:
		p.resistor, err = r.resistor(part, offer)
		if err == nil {
			snap.Resistors = append(snap.Resistors, *p.resistor)
		}
	case catalog.KindNetwork:
		p.network, err = r.network(part, offer)
		if err == nil {
			snap.Networks = append(snap.Networks, *p.network)
		}
	case catalog.KindReference:
		p.reference, err = r.reference(part, offer)
		if err == nil {
			snap.References = append(snap.References, *p.reference)
		}
	default:
		p.amplifier, err = r.amplifier(part, offer)
		if err == nil {
			snap.Amplifiers = append(snap.Amplifiers, *p.amplifier)
		}
	}
	keep(err)
	if failed != nil {
		return parsed{}, failed
	}
	// The store refuses a whole batch for one invalid part; its own rules,
	// applied here row by row, turn that into one skipped row.
	if err := snap.Validate(); err != nil {
		return parsed{}, r.skip("", "", fmt.Errorf("the catalog refuses it: %s", rowRefRE.ReplaceAllString(err.Error(), "")))
	}
	for _, u := range r.unknown {
		if r.unknownRows == nil {
			r.unknownRows = map[string]int{}
		}
		if r.unknownRows[u] == 0 {
			r.unknownOrder = append(r.unknownOrder, u)
		}
		r.unknownRows[u]++
	}
	return p, nil
}

// Bounds of what the trade makes (common practice): beyond them a figure
// is far more likely a unit slip than a real part.
const (
	// maxTolerance: no resistor is sold looser than ±50 %.
	maxTolerance = 0.5
	// maxTempcoPPM: carbon-composition parts reach about ±1500 ppm/K;
	// a few thousand is a unit slip (ppm for %/K, or per-mille).
	maxTempcoPPM = 3000
	// minOhm, maxOhm: current-sense shunts go down to about 1 mΩ,
	// high-value resistors up to about 1 TΩ.
	minOhm, maxOhm = 1e-3, 1e12
)

// plausibleGrade refuses (or with --allow-unusual flags) a resistor or
// network grade outside what the trade makes.
func (r *rowReader) plausibleGrade(g *catalog.ResistorGrade, ohm float64) error {
	if g.Tolerance > maxTolerance {
		s, _ := r.raw(FieldTolerance)
		if err := r.unusual(FieldTolerance, s, fmt.Sprintf("a tolerance of %g %%, looser than any resistor sold (at most %g %%)", 100*g.Tolerance, 100*maxTolerance)); err != nil {
			return err
		}
	}
	if g.TCR > maxTempcoPPM {
		s, _ := r.raw(FieldTCR)
		if err := r.unusual(FieldTCR, s, fmt.Sprintf("a tempco of %g ppm/K, beyond the %g ppm/K of any fixed resistor", g.TCR, float64(maxTempcoPPM))); err != nil {
			return err
		}
	}
	if r.kind == catalog.KindResistor && (ohm < minOhm || ohm > maxOhm) {
		s, _ := r.raw(FieldResistance)
		if err := r.unusual(FieldResistance, s, fmt.Sprintf("a resistance of %g ohm, outside the 1 mΩ to 1 TΩ resistors are made in", ohm)); err != nil {
			return err
		}
	}
	return nil
}

// unitFraction is the unit word of a mapping that reads bare tolerances as
// fractions (0.001 = 0.1 %).
const unitFraction = "fraction"

// bareNumber reports whether a cell is a number with no unit or mark.
func bareNumber(s string, decimalComma bool) bool {
	// Most cells carry a unit or mark: tell them apart without parsing
	// (and without the error value a failed parse allocates).
	for i := 0; i < len(s); i++ {
		if c := s[i]; !(c >= '0' && c <= '9' || c == '.' || c == ',' || c == '+' || c == '-' || c == ' ' || c == 'e' || c == 'E' || c == '/' || c >= 0x80) {
			return false
		}
	}
	if strings.Contains(s, "%") || strings.ContainsRune(s, '‰') {
		return false
	}
	t := strings.TrimSpace(strings.TrimPrefix(strings.TrimPrefix(strings.TrimSpace(s), "±"), "+/-"))
	_, err := parseNumber(t, decimalComma)
	return err == nil
}

func mustFloat(s string, decimalComma bool) float64 {
	v, _ := parseNumber(strings.TrimSpace(strings.TrimPrefix(strings.TrimSpace(s), "±")), decimalComma)
	return v
}

// unusual refuses a row whose figure lies outside what the trade makes
// (ErrUnusual, with the reason), or with allowUnusual keeps it, flagged.
func (r *rowReader) unusual(f Field, raw, why string) error {
	if r.allowUnusual {
		r.note(Doubt, f, raw, fmt.Errorf("%w: %s; kept because of --allow-unusual", ErrUnusual, why))
		return nil
	}
	return r.skip(f, raw, fmt.Errorf("%w: %s; check the cell (a unit slip?), or pass --allow-unusual to keep such rows, flagged", ErrUnusual, why))
}

// plainText refuses a part number or maker holding a control, format or
// bidirectional character (ESC, U+202E RIGHT-TO-LEFT OVERRIDE, a zero-width
// space ...): printed raw, they can recolour a terminal or show a part
// number other than the one stored.
func (r *rowReader) plainText(f Field, s, what string) error {
	pos := 0
	for _, c := range s {
		pos++
		if catalog.UnsafeRune(c) {
			kind := "a control character"
			if unicode.Is(unicode.Bidi_Control, c) {
				kind = "a bidirectional control character"
			} else if !unicode.IsControl(c) {
				kind = "an invisible formatting character"
			}
			return r.skip(f, s, fmt.Errorf("%w: character %d of the %s is U+%04X, %s, which no %s holds; correct the cell", ErrBadValue, pos, what, c, kind, what))
		}
	}
	return nil
}

// rowRefRE cuts the store's "(resistor row 1)", which would point at the
// one-part batch a row is checked in, not at the file.
var rowRefRE = regexp.MustCompile(` \([a-z]+ row \d+\)`)

// checkWidth skips a row with fewer fields than the header, or with extra
// fields that hold text (an unquoted comma shifts every later column:
// "0.125W, 1/8W" unquoted).
func (r *rowReader) checkWidth() error {
	n, want := len(r.rec), len(r.header)
	if n == want {
		return nil
	}
	if n > want {
		extra := strings.Join(r.rec[want:], "")
		if strings.TrimSpace(extra) == "" {
			return nil
		}
	}
	return r.skip("", strings.Join(r.rec, string(',')), fmt.Errorf("%w: %d fields, the header has %d (an unquoted separator inside a value?)", ErrRagged, n, want))
}

// pricesLackCurrency reports whether the file has price columns and
// neither a currency column nor a currency in any price header.
func (r *rowReader) pricesLackCurrency(cols map[Field]int, breaks []breakCol) bool {
	if _, ok := cols[FieldCurrency]; ok {
		return false
	}
	i, ok := cols[FieldPrice]
	if !ok && len(breaks) == 0 {
		return false
	}
	if ok && r.info[i].curr != "" {
		return false
	}
	for _, b := range breaks {
		if b.curr != "" {
			return false
		}
	}
	return true
}

// currencyInCells checks the first row with a price: its cells must name
// a currency, or the file is refused before any row is taken.
func (r *rowReader) currencyInCells(rec []string, line int, cols map[Field]int, breaks []breakCol) error {
	var cells []int
	if i, ok := cols[FieldPrice]; ok {
		cells = append(cells, i)
	}
	for _, b := range breaks {
		cells = append(cells, b.col)
	}
	for _, i := range cells {
		if i >= len(rec) || isBlank(cleanCell(rec[i])) {
			continue
		}
		r.checkCurrency = false
		if _, cur, err := parseMoney(cleanCell(rec[i]), r.decimalComma); err == nil && cur == "" || err != nil && !hasCurrencyMark(rec[i]) {
			return &ParseError{File: r.file, Line: line, Column: r.header[i], Raw: cleanCell(rec[i]),
				Err: fmt.Errorf("%w (not in the cells, the headers or a mapping): pass --currency CODE, for example --currency EUR, or set import.currency in the config", ErrNoCurrency)}
		}
		return nil
	}
	return nil
}

func hasCurrencyMark(s string) bool {
	if strings.IndexFunc(s, isCurrencySymbol) >= 0 {
		return true
	}
	for _, w := range strings.Fields(strings.ToLower(s)) {
		if c, ok := currencyMap[w]; ok && len(c) == 3 {
			return true
		}
	}
	return false
}

// maxPieces bounds stock and order counts: far above any distributor's
// stock of one part (common practice), and well inside an int, so a
// 19-digit count is refused instead of wrapping negative.
const maxPieces = 1e12

// offer reads stock, minimum order and prices.
func (r *rowReader) offer() (catalog.Offer, error) {
	o := catalog.Offer{Stock: -1}
	if v, ok, _, err := r.count(FieldStock); err != nil {
		return o, err
	} else if ok {
		if v > maxPieces {
			s, _ := r.raw(FieldStock)
			return o, r.skip(FieldStock, s, fmt.Errorf("%w: a stock of %s pieces is beyond any real stock (at most %.0e are taken); check the column", ErrBadValue, s, maxPieces))
		}
		o.Stock = int(v)
	}
	if v, ok, _, err := r.count(FieldMinOrder); err != nil {
		return o, err
	} else if ok {
		if v > maxPieces {
			s, _ := r.raw(FieldMinOrder)
			return o, r.skip(FieldMinOrder, s, fmt.Errorf("%w: a minimum order of %s pieces is beyond any real order (at most %.0e are taken); check the column", ErrBadValue, s, maxPieces))
		}
		o.MinOrder = int(v)
	}
	first := max(o.MinOrder, 1)
	cur := r.currency
	if c, ok := r.raw(FieldCurrency); ok {
		if cc := currencyOf(c); cc != "" {
			cur = cc
		} else if len(c) == 3 {
			cur = r.intern(strings.ToUpper(c))
		}
	}
	var breaks []catalog.PriceBreak
	if s, ok := r.raw(FieldPrice); ok {
		hcur := cur
		if i, ok := r.cols[FieldPrice]; ok && r.info[i].curr != "" {
			hcur = r.info[i].curr
		}
		b, err := parsePrices(s, r.decimalComma, first, hcur)
		if err != nil {
			return o, r.skip(FieldPrice, s, err)
		}
		breaks = append(breaks, b...)
	}
	for _, bc := range r.breaks {
		if bc.col >= len(r.rec) || isBlank(r.rec[bc.col]) {
			continue
		}
		s := cleanCell(r.rec[bc.col])
		p, c, err := parseMoney(s, r.decimalComma)
		if err != nil {
			r.problems = append(r.problems, newProblem(Skip, &ParseError{File: r.file, Line: r.line, Column: r.header[bc.col], Raw: s,
				Err: fmt.Errorf("%w: price %s", ErrBadValue, err)}, r.part))
			return o, errSkip
		}
		if c == "" {
			c = bc.curr
		}
		if c == "" {
			c = cur
		}
		breaks = append(breaks, catalog.PriceBreak{MinQty: bc.minQty, UnitPrice: p, Currency: c})
	}
	if len(breaks) > 0 {
		b, err := normaliseBreaks(breaks)
		if err != nil {
			return o, r.skip(FieldPrice, "", err)
		}
		for _, pb := range b {
			if pb.UnitPrice <= 0 {
				if err := r.unusual(FieldPrice, fmt.Sprintf("%g", pb.UnitPrice), fmt.Sprintf("a unit price of %g %s from %s: no part is free", pb.UnitPrice, pb.Currency, pieces(pb.MinQty))); err != nil {
					return o, err
				}
			}
		}
		for _, pb := range b {
			if pb.Currency == "" {
				r.note(Doubt, FieldPrice, "", errors.New("no currency in the cell, the header or the mapping: prices kept without one; set fixed currency in a mapping"))
				break
			}
		}
		o.PriceBreaks = b
	} else {
		r.note(Doubt, FieldPrice, "", errors.New("no price: the part is kept but cannot be costed"))
	}
	return o, nil
}

// grade reads the figures resistors and networks share, taking a missing
// resistance, tolerance, tempco, power or size from the description and
// saying so, and flagging a description that disagrees with a column.
func (r *rowReader) grade() (g catalog.ResistorGrade, ohm float64, err error) {
	desc := r.text(FieldDescription)
	d := describe(desc, r.decimalComma)
	pick := func(f Field, q quantity, fromDesc float64, what string, need bool) (float64, error) {
		v, ok, _, err := r.value(f, q)
		if err != nil {
			return 0, err
		}
		if !ok {
			v = catalog.Unknown()
		}
		words, inDesc := d.words(f)
		switch {
		case ok && inDesc && !closeTo(v, fromDesc):
			r.note(Doubt, f, desc, fmt.Errorf("the description says %q, the column says %g: the column is used; check the part", words, v))
		case !ok && inDesc:
			r.note(Info, f, desc, fmt.Errorf("%s taken from the description (%q)", what, words))
			return fromDesc, nil
		case !ok && need:
			s, _ := r.raw(f)
			return 0, r.skip(f, s, fmt.Errorf("%w: no %s in its column or the description; fill it or set a fixed value in the mapping", ErrMissingValue, what))
		case !ok:
			r.unknown = append(r.unknown, what)
		}
		return v, nil
	}
	optional := func(f Field, q quantity, what string) (float64, error) {
		v, ok, _, err := r.value(f, q)
		if err != nil || ok {
			return v, err
		}
		r.unknown = append(r.unknown, what)
		return catalog.Unknown(), nil
	}
	// Each figure is read even when an earlier one failed, so a row's
	// problems are reported together; the first failure is returned.
	var failed error
	keep := func(err error) bool {
		if err != nil && failed == nil {
			failed = err
		}
		return err == nil
	}
	if r.kind == catalog.KindResistor {
		if ohm, err = pick(FieldResistance, units.ParseResistance, d.resistance, "resistance", true); keep(err) && ohm <= 0 {
			s, _ := r.raw(FieldResistance)
			keep(r.skip(FieldResistance, s, fmt.Errorf("%w: resistance must be above zero (a 0 Ω jumper is not a resistor for a budget)", ErrBadValue)))
		}
		if err != nil || ohm <= 0 {
			// Refused already: the plausibility check below has nothing to add.
			ohm = catalog.Unknown()
		}
	}
	tolOK := true
	if s, ok := r.raw(FieldTolerance); ok && !r.si && bareNumber(s, r.decimalComma) {
		switch r.unitHint(FieldTolerance) {
		case "%":
		case unitFraction:
			v, err := parseNumber(strings.TrimLeft(strings.TrimSpace(s), "±"), r.decimalComma)
			if err != nil {
				tolOK = keep(r.skip(FieldTolerance, s, fmt.Errorf("%w: %v", ErrBadValue, err)))
			}
			r.fixedTol, r.haveFixedTol = v, true
		default:
			if mustFloat(s, r.decimalComma) == 0 {
				// Not ambiguous: zero is no tolerance in any unit.
				tolOK = keep(r.skip(FieldTolerance, s, fmt.Errorf("%w: a tolerance of 0 is no resistor's grade; give the part's tolerance (1%%, 0.1%%)", ErrBadValue)))
				break
			}
			tolOK = keep(r.skip(FieldTolerance, s, fmt.Errorf("%w: a bare tolerance %s is ambiguous (%s %% or a fraction, %g %%?); write it with %%, name the unit in the header (\"Tolerance (%%)\"), or say in the mapping: units: {tolerance: \"%%\"} or {tolerance: fraction}", ErrBadValue, s, s, 100*mustFloat(s, r.decimalComma))))
		}
	}
	if tolOK {
		if g.Tolerance, err = pick(FieldTolerance, parseTolerance, d.tolerance, "tolerance", true); keep(err) {
			if r.haveFixedTol {
				g.Tolerance = r.fixedTol
			}
			if g.Tolerance <= 0 || g.Tolerance >= 1 {
				s, _ := r.raw(FieldTolerance)
				tolOK = keep(r.skip(FieldTolerance, s, fmt.Errorf("%w: tolerance %g %% is not between 0 and 100 %%", ErrBadValue, g.Tolerance*100)))
			}
		} else {
			tolOK = false
		}
	}
	r.haveFixedTol = false
	g.TCR, err = pick(FieldTCR, units.ParsePPM, d.tcr, "temperature coefficient", false)
	tcrOK := keep(err)
	if tcrOK && g.TCR < 0 {
		g.TCR = -g.TCR
	}
	g.PowerW, err = pick(FieldPower, units.ParsePower, d.power, "power rating", false)
	keep(err)
	g.MaxVoltageV, err = optional(FieldMaxVoltage, units.ParseVoltage, "voltage rating")
	keep(err)
	if r.kind != catalog.KindNetwork { // figures a network does not have
		g.ThermalResistance, err = optional(FieldThermalRes, units.ParseThermalResistance, "thermal resistance")
		keep(err)
		g.LoadLife, err = optional(FieldLoadLife, parseTolerance, "load life")
		keep(err)
	}
	if !tolOK {
		g.Tolerance = 0 // not checked for plausibility
	}
	if !tcrOK {
		g.TCR = 0
	}
	keep(r.plausibleGrade(&g, ohm))
	if failed != nil {
		return g, 0, failed
	}
	g.Package = r.intern(r.text(FieldPackage))
	if g.Package == "" && d.pkg != "" {
		g.Package = d.pkg
		r.note(Info, FieldPackage, desc, fmt.Errorf("size %s taken from the description", d.pkg))
	}
	if t := r.text(FieldTechnology); t != "" {
		if r.si {
			// The catalog's own export: the word as the catalog has it.
			g.Technology = r.intern(t)
		} else if word, ok := r.technology(t); ok {
			g.Technology = r.intern(word)
		} else {
			r.note(Doubt, FieldTechnology, t, unknownTechnology(t))
		}
	}
	if g.Technology == "" && d.tech != "" {
		g.Technology = d.tech
		r.note(Info, FieldTechnology, desc, fmt.Errorf("technology %s taken from the description", d.tech))
	}
	if g.Technology == "" {
		r.unknown = append(r.unknown, "technology")
	}
	if g.Package == "" {
		r.unknown = append(r.unknown, "package")
	}
	if g.PowerW <= 0 {
		s, _ := r.raw(FieldPower)
		return g, 0, r.skip(FieldPower, s, fmt.Errorf("%w: a power rating must be above zero", ErrBadValue))
	}
	return g, ohm, nil
}

// closeTo compares a column value with the description's, allowing for the
// description's rounding (three figures).
func closeTo(a, b float64) bool {
	if a == b {
		return true
	}
	return math.Abs(a-b) <= 5e-3*math.Max(math.Abs(a), math.Abs(b))
}

func (r *rowReader) resistor(part string, o catalog.Offer) (*catalog.Resistor, error) {
	g, ohm, err := r.grade()
	if err != nil {
		return nil, err
	}
	return &catalog.Resistor{Part: part, Maker: r.intern(r.text(FieldMaker)), Line: r.intern(r.text(FieldLine)), ValueOhm: ohm,
		SeriesPart: r.intern(r.text(FieldSeriesPart)), ResistorGrade: g, Offer: o, Provenance: r.prov}, nil
}

// series reads a resistor series row of the catalog's own export: the
// grade, the IEC 60063 series name and the value range.
func (r *rowReader) series(part string, o catalog.Offer) (*catalog.ResistorSeries, error) {
	g, _, err := r.grade()
	if err != nil {
		return nil, err
	}
	s := &catalog.ResistorSeries{Part: part, Maker: r.intern(r.text(FieldMaker)), Line: r.intern(r.text(FieldLine)),
		ESeries: r.intern(r.text(FieldESeries)), ResistorGrade: g, Offer: o, Provenance: r.prov}
	if s.ESeries == "" {
		return nil, r.skip(FieldESeries, "", fmt.Errorf("%w: no E-series name (E24, E96, ...)", ErrMissingValue))
	}
	if s.MinOhm, err = r.need(FieldMinOhm, units.ParseResistance, "smallest value"); err != nil {
		return nil, err
	}
	if s.MaxOhm, err = r.need(FieldMaxOhm, units.ParseResistance, "largest value"); err != nil {
		return nil, err
	}
	return s, nil
}

func (r *rowReader) network(part string, o catalog.Offer) (*catalog.Network, error) {
	g, _, err := r.grade()
	if err != nil {
		return nil, err
	}
	s, ok := r.raw(FieldResistance)
	if !ok {
		return nil, r.skip(FieldResistance, s, fmt.Errorf("%w: no element values", ErrMissingValue))
	}
	vals, err := r.networkValues(s)
	if err != nil {
		return nil, r.skip(FieldResistance, s, err)
	}
	n := &catalog.Network{Part: part, Maker: r.intern(r.text(FieldMaker)), Values: vals, Technology: g.Technology, Package: g.Package,
		Tolerance: g.Tolerance, TCR: g.TCR, PowerW: g.PowerW, MaxVoltageV: g.MaxVoltageV, Offer: o, Provenance: r.prov}
	if n.RatioTolerance, err = r.need(FieldRatioTolerance, units.ParsePercent, "ratio tolerance"); err != nil {
		return nil, err
	}
	v, ok, _, err := r.value(FieldTCRTracking, units.ParsePPM)
	if err != nil {
		return nil, err
	}
	n.TCRTracking = math.Abs(v)
	if !ok {
		n.TCRTracking = catalog.Unknown()
		r.unknown = append(r.unknown, "TCR tracking")
	}
	return n, nil
}

// networkValues reads "10k", "10k/10k/1k/1k", "4 x 10k" or "2x10k + 2x1k",
// with the element count column to repeat a single value.
func (r *rowReader) networkValues(s string) ([]float64, error) {
	if r.decimalComma {
		s = units.FromDecimalComma(s)
	}
	var vals []float64
	for _, group := range strings.FieldsFunc(s, func(c rune) bool { return c == '/' || c == '+' || c == ';' || c == ',' || c == '|' }) {
		group = strings.TrimSpace(group)
		count := 1
		if i := strings.IndexAny(group, "x×*"); i > 0 {
			if c, err := parseCount(group[:i]); err == nil && c >= 1 && c <= 64 {
				count, group = int(c), strings.TrimSpace(group[i+len(string([]rune(group[i:])[0])):])
			}
		}
		v, _, err := readValue(group, r.unitHint(FieldResistance), false, units.ParseResistance)
		if x, perr := strconv.ParseFloat(group, 64); r.si && perr == nil {
			v, err = x, nil
		}
		if err != nil {
			return nil, fmt.Errorf("%w: %s", ErrBadValue, unitErr(err))
		}
		if v <= 0 {
			return nil, fmt.Errorf("%w: element value must be above zero", ErrBadValue)
		}
		for range count {
			vals = append(vals, v)
		}
	}
	nv, ok, _, err := r.count(FieldElements)
	if err != nil {
		return nil, errSkip
	}
	switch {
	case ok && len(vals) == 1 && nv >= 2 && nv <= 64:
		for len(vals) < int(nv) {
			vals = append(vals, vals[0])
		}
	case ok && int(nv) != len(vals):
		return nil, fmt.Errorf("%w: %d values given but %g elements", ErrBadValue, len(vals), nv)
	}
	if len(vals) < 2 {
		return nil, fmt.Errorf("%w: a network needs at least two elements (give the count or the values)", ErrMissingValue)
	}
	return vals, nil
}

// ampFigure reads one op-amp figure; missing ones are reported, since a
// zero would make the budget optimistic.
type ampFigure struct {
	field Field
	q     quantity
	dst   *float64
	json  string
	what  string
}

// Headroom assumed for the input common-mode range and output swing of an
// amplifier whose export says it is not rail-to-rail and gives no figures:
// 1.5 V from each rail (common practice for classic bipolar parts; the
// report says so, and the datasheet decides).
const defaultHeadroomV = 1.5

func (r *rowReader) amplifier(part string, o catalog.Offer) (*catalog.Amplifier, error) {
	a := &catalog.Amplifier{Part: part, Maker: r.intern(r.text(FieldMaker)), Type: catalog.OpAmp, Channels: 1,
		Package: r.intern(r.text(FieldPackage)), Offer: o, Provenance: r.prov}
	// Each figure is read even when an earlier one failed, so a row's
	// problems are reported together; the first failure is returned.
	var failed error
	keep := func(err error) bool {
		if err != nil && failed == nil {
			failed = err
		}
		return err == nil
	}
	if _, err := r.supplyRange(&a.SupplyMinV, &a.SupplyMaxV); keep(err) {
		for _, f := range []struct {
			field Field
			v     float64
			what  string
		}{{FieldSupplyMin, a.SupplyMinV, "minimum supply"}, {FieldSupplyMax, a.SupplyMaxV, "maximum supply"}} {
			if !catalog.Known(f.v) {
				s, _ := r.raw(f.field)
				keep(r.skip(f.field, s, fmt.Errorf("%w: no %s; fill the column (or one supply range column, \"2.7 V to 36 V\") or set a fixed value in the mapping", ErrMissingValue, f.what)))
			}
		}
	}
	figs := []ampFigure{
		{FieldVos, units.ParseVoltage, &a.VosV, "vos_v", "input offset voltage"},
		{FieldVosDrift, units.ParseDrift, &a.VosDriftVK, "vos_drift_v_per_k", "offset drift"},
		{FieldIb, units.ParseCurrent, &a.IbA, "ib_a", "input bias current"},
		{FieldIos, units.ParseCurrent, &a.IosA, "ios_a", "input offset current"},
		{FieldAol, units.ParseOpenLoopGain, &a.AolVV, "aol_v_per_v", "open-loop gain"},
		{FieldCMRR, units.ParseDB, &a.CMRRdB, "cmrr_db", "CMRR"},
		{FieldGBW, units.ParseFrequency, &a.GBWHz, "gbw_hz", "gain-bandwidth product"},
		{FieldSlew, units.ParseSlewRate, &a.SlewVs, "slew_v_per_s", "slew rate"},
		{FieldNoiseV, units.ParseVoltageNoise, &a.NoiseVHz, "noise_v_per_rthz", "voltage noise density"},
		{FieldNoiseI, units.ParseCurrentNoise, &a.NoiseAHz, "noise_a_per_rthz", "current noise density"},
		{FieldIq, units.ParseCurrent, &a.IqA, "iq_a", "quiescent current"},
	}
	var missing []string
	for _, f := range figs {
		v, ok, typ, err := r.value(f.field, f.q)
		if !keep(err) {
			continue
		}
		if !ok {
			*f.dst = catalog.Unknown()
			missing = append(missing, f.what)
			continue
		}
		*f.dst = math.Abs(v)
		if typ {
			a.TypicalOnly = append(a.TypicalOnly, f.json)
		}
	}
	r.unknown = append(r.unknown, missing...)
	if a.Package == "" {
		r.unknown = append(r.unknown, "package")
	}
	// The matched-resistor figures do not apply to an op-amp; matched reads
	// them for an amplifier with fixed gains.
	a.GainErrorMax, a.GainDriftPPM, a.InNegV, a.InPosV, a.InternalOhm = catalog.Unknown(), catalog.Unknown(), catalog.Unknown(), catalog.Unknown(), catalog.Unknown()
	if len(a.TypicalOnly) > 0 {
		r.note(Doubt, "", "", fmt.Errorf("typical figures only for %s: a worst-case budget needs maximums", strings.Join(a.TypicalOnly, ", ")))
	}
	if a.SupplyMinV > a.SupplyMaxV {
		keep(r.skip(FieldSupplyMin, "", fmt.Errorf("%w: minimum supply %g V above maximum %g V", ErrBadValue, a.SupplyMinV, a.SupplyMaxV)))
	}
	if v, ok, _, err := r.count(FieldChannels); keep(err) && ok {
		if v < 1 || v > 16 {
			keep(r.skip(FieldChannels, "", fmt.Errorf("%w: %g channels", ErrBadValue, v)))
		}
		a.Channels = int(v)
	}
	keep(r.matched(a))
	var err error
	if a.Network, err = r.matchedNetwork(); !keep(err) {
		a.Network = nil
	}
	keep(r.ranges(a))
	if s, ok := r.raw(FieldTypicalOnly); ok {
		var list []string
		for _, n := range strings.FieldsFunc(s, func(c rune) bool { return c == ',' || c == ';' || c == ' ' }) {
			if !slices.Contains(list, n) {
				list = append(list, n)
			}
		}
		for _, n := range a.TypicalOnly {
			if !slices.Contains(list, n) {
				list = append(list, n)
			}
		}
		a.TypicalOnly = list
	}
	if s, ok := r.raw(FieldAmpType); ok {
		switch t := strings.ToLower(s); {
		case t == string(catalog.OpAmp) || t == "op-amp" || t == "op amp":
			if a.Type == catalog.MatchedAmp {
				keep(r.skip(FieldAmpType, s, fmt.Errorf("%w: type %s, but the row gives fixed gains", ErrBadValue, s)))
			}
		case t == string(catalog.MatchedAmp) || strings.Contains(t, "difference") || strings.Contains(t, "instrumentation"):
			a.Type = catalog.MatchedAmp
		default:
			keep(r.skip(FieldAmpType, s, fmt.Errorf("%w: amplifier type %q: use opamp or matched", ErrBadValue, s)))
		}
	}
	if failed != nil {
		return nil, failed
	}
	return a, nil
}

// matched reads the fixed gains of an amplifier with matched resistors
// inside ("1, 2, 5, 10" or "1/10/100", V/V), its gain error (a tolerance)
// and gain drift (ppm/K); a row with gains is such an amplifier.
func (r *rowReader) matched(a *catalog.Amplifier) error {
	s, ok := r.raw(FieldGains)
	if !ok {
		return nil
	}
	if r.decimalComma {
		s = units.FromDecimalComma(s)
	}
	for _, g := range strings.FieldsFunc(s, func(c rune) bool { return c == ',' || c == '/' || c == ';' || c == ' ' || c == '|' }) {
		v, err := units.ParseGain(g)
		if err != nil || !(v > 0) {
			return r.skip(FieldGains, s, fmt.Errorf("%w: gain %q is not a positive number (V/V)", ErrBadValue, g))
		}
		a.Gains = append(a.Gains, v)
	}
	a.Type = catalog.MatchedAmp
	var err error
	if a.GainErrorMax, err = r.need(FieldGainError, parseTolerance, "gain error (the matched resistors' worst case)"); err != nil {
		return err
	}
	opt := func(f Field, q quantity, what string) (float64, error) {
		v, ok, _, err := r.value(f, q)
		if err == nil && !ok {
			v = catalog.Unknown()
			r.unknown = append(r.unknown, what)
		}
		return v, err
	}
	v, err := opt(FieldGainDrift, units.ParsePPM, "gain drift")
	if err != nil {
		return err
	}
	a.GainDriftPPM = math.Abs(v)
	// Headroom may be negative (the inputs work beyond the rails).
	if a.InNegV, err = opt(FieldInNeg, units.ParseVoltage, "input range from V-"); err != nil {
		return err
	}
	if a.InPosV, err = opt(FieldInPos, units.ParseVoltage, "input range from V+"); err != nil {
		return err
	}
	if a.InternalOhm, err = opt(FieldInternalR, units.ParseResistance, "internal resistor value"); err != nil {
		return err
	}
	return nil
}

// pieces writes a quantity of parts: "1 piece", "100 pieces".
func pieces(n int) string {
	if n == 1 {
		return "1 piece"
	}
	return strconv.Itoa(n) + " pieces"
}
