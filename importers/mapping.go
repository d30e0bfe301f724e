package importers

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"maps"
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"sort"
	"strconv"
	"strings"
	"unicode"

	"go.yaml.in/yaml/v3"

	"plumb/catalog"
	"plumb/catalog/units"
)

// Mapping tells which column holds which catalog field. It is guessed from
// the header (GuessMapping) or loaded from a YAML file of our own shape:
//
//	kind: resistor            # resistor | network | amplifier | reference; blank = guess
//	columns:                  # field: header text (case and punctuation ignored)
//	  part: Order Code
//	  resistance: Value
//	price_breaks:             # one column per price break
//	  - column: Price 1000+
//	    min_qty: 1000
//	fixed:                    # values for fields no column holds
//	  currency: EUR
//	  technology: thin-film
//	decimal_comma: true       # blank = sniffed from the file
type Mapping struct {
	Kind         catalog.Kind     `yaml:"kind,omitempty"`
	Columns      map[Field]string `yaml:"columns"`
	PriceBreaks  []BreakColumn    `yaml:"price_breaks,omitempty"`
	Fixed        map[Field]string `yaml:"fixed,omitempty"`
	DecimalComma *bool            `yaml:"decimal_comma,omitempty"`
	// Units says how bare numbers of a field are read, where the header
	// does not say: units: {tolerance: "%"} or {tolerance: fraction},
	// {vos: mV}.
	Units map[Field]string `yaml:"units,omitempty"`
	// Guesses says, for a guessed mapping, how sure each column choice is.
	Guesses []Guess `yaml:"-"`
}

// BreakColumn is a column holding the unit price from MinQty pieces on.
type BreakColumn struct {
	Column string `yaml:"column"`
	MinQty int    `yaml:"min_qty"`
}

// Confidence grades a header guess.
type Confidence float64

// Confidence levels of a guess.
const (
	// ConfExact: the header is one of the field's trade words.
	ConfExact Confidence = 1.0
	// ConfPhrase: the header contains a trade word as a whole phrase.
	ConfPhrase Confidence = 0.8
	// ConfOverlap: the header shares words with a trade word.
	ConfOverlap Confidence = 0.5
	// typicalPenalty ranks a "typ" column below a "max" one for a field.
	typicalPenalty = 0.05
	// confFloor is the least score taken as a match.
	confFloor = 0.4
)

// Guess is one column choice of a guessed mapping.
type Guess struct {
	Field      Field
	Column     string
	Index      int
	Confidence Confidence
	// How says why: "exact", "phrase", "words in common", "price break", "mapping".
	How string
}

// headerInfo is what a header cell says besides its words.
type headerInfo struct {
	text    string
	tokens  []string
	unit    string // unit hint in brackets: "mV", "%", "ppm/°C"
	curr    string // currency code from the header: "EUR"
	typical bool   // "typ", "typical"
	breakQ  int    // >0: a price-break column for this quantity
	// rail is "+" or "-" when the header gives its figure relative to a
	// rail ("V from V+", "below V+", "above V-"); railSigned is true for
	// a signed offset from the rail (bound - rail: "-1.5 from V+" is 1.5 V
	// below it), false for a distance inwards ("1.5 below V+").
	rail       string
	railSigned bool
}

// railRE finds a figure given relative to a supply rail in a header.
var railRE = regexp.MustCompile(`(?i)\b(from|relative\s+to|rel\.?\s*to|re|vs\.?|below|under|above|over|to)\s*\(?\s*(v\s*\+|v\s*-|v\s*−|vcc|vdd|vee|vss|\+\s*vs|-\s*vs|vs\s*\+|vs\s*-|positive\s+rail|negative\s+rail|pos(?:itive)?\s+supply|neg(?:ative)?\s+supply)\s*\)?`)

// railOf reads the rail and its sign convention from a railRE match.
func railOf(m []string) (rail string, signed bool) {
	r := strings.ToLower(strings.Join(strings.Fields(m[2]), ""))
	rail = "+"
	if strings.Contains(r, "-") || strings.Contains(r, "−") || r == "vee" || r == "vss" || strings.Contains(r, "negative") || strings.HasPrefix(r, "neg") {
		rail = "-"
	}
	switch strings.ToLower(strings.Fields(m[1])[0]) {
	case "from", "relative", "rel", "rel.", "re", "vs", "vs.":
		signed = true
	}
	return rail, signed
}

var qualifierTokens = map[string]bool{"typ": true, "typical": true, "max": true, "maximum": true,
	"min": true, "minimum": true, "nom": true, "nominal": false}

var (
	bracketRE   = regexp.MustCompile(`[(\[{]([^)\]}]*)[)\]}]`)
	breakNumRE  = regexp.MustCompile(`(\d[\d,.' ]*)\s*(k)?\s*(?:pcs|pc|pieces|piece|units|unit|stk|st)?\b`)
	qtyOnlyRE   = regexp.MustCompile(`^\s*(?:qty\s*)?(\d[\d,.']*)\s*(k)?\s*(\+|-\s*\d[\d,.']*|and up|or more)\s*$`)
	currencyMap = map[string]string{"$": "USD", "€": "EUR", "£": "GBP", "¥": "JPY",
		"usd": "USD", "eur": "EUR", "gbp": "GBP", "chf": "CHF", "jpy": "JPY", "cad": "CAD",
		"aud": "AUD", "sek": "SEK", "dkk": "DKK", "nok": "NOK", "pln": "PLN", "cny": "CNY", "inr": "INR"}
)

// analyseHeader splits a header cell into words, unit and currency hints.
func analyseHeader(h string) headerInfo {
	hi := headerInfo{text: h}
	if m := railRE.FindStringSubmatchIndex(h); m != nil {
		sub := []string{h[m[0]:m[1]], h[m[2]:m[3]], h[m[4]:m[5]]}
		hi.rail, hi.railSigned = railOf(sub)
		h = h[:m[0]] + " " + h[m[1]:]
		if hi.unit == "" {
			hi.unit = "V"
		}
	}
	rest := bracketRE.ReplaceAllStringFunc(h, func(m string) string {
		inner := strings.TrimSpace(m[1 : len(m)-1])
		toks := words(inner)
		allQual := len(toks) > 0
		for _, t := range toks {
			if _, q := qualifierTokens[t]; !q {
				allQual = false
			}
		}
		switch {
		case allQual:
			return " " + inner + " "
		case currencyOf(inner) != "":
			hi.curr = currencyOf(inner)
		case hasDigit(inner) && !strings.ContainsAny(inner, "/"):
			// "Unit Price (1,000)": a quantity, kept for break detection.
			return " " + inner + " "
		default:
			// A tolerance is symmetric: "(±%)" is the unit "%".
			hi.unit = unitWord(strings.TrimSpace(strings.TrimPrefix(strings.TrimPrefix(inner, "±"), "+/-")))
		}
		return " "
	})
	rest = strings.ToLower(rest)
	hi.tokens = words(rest)
	for i, t := range hi.tokens {
		if c, ok := currencyMap[t]; ok && len(t) == 3 {
			hi.curr = c
			hi.tokens = append(hi.tokens[:i:i], hi.tokens[i+1:]...)
			break
		}
	}
	for _, s := range []string{"$", "€", "£", "¥"} {
		if strings.Contains(rest, s) {
			hi.curr = currencyMap[s]
		}
	}
	for _, t := range hi.tokens {
		if t == "typ" || t == "typical" {
			hi.typical = true
		}
	}
	if hi.unit == "" && strings.Contains(h, "_") {
		hi.unit = snakeUnit(hi.tokens)
	}
	hi.breakQ = breakQty(rest, hi.tokens)
	return hi
}

// snakeUnits are the SI unit suffixes of snake_case column names
// ("cm_neg_v", "ib_a", "gbw_hz", "vos_drift_v_per_k"), longest first,
// as the catalog's own names write them.
var snakeUnits = []struct {
	suffix []string
	unit   string
}{
	{[]string{"v", "per", "rthz"}, "V/√Hz"}, {[]string{"a", "per", "rthz"}, "A/√Hz"},
	{[]string{"v", "per", "k"}, "V/K"}, {[]string{"v", "per", "s"}, "V/s"}, {[]string{"v", "per", "v"}, "V/V"},
	{[]string{"k", "per", "w"}, "K/W"},
	{[]string{"ohm"}, "Ω"}, {[]string{"v"}, "V"}, {[]string{"a"}, "A"}, {[]string{"hz"}, "Hz"},
	{[]string{"w"}, "W"}, {[]string{"db"}, "dB"}, {[]string{"ppm"}, "ppm"},
}

// snakeUnit returns the unit a snake_case name ends with, or "".
func snakeUnit(toks []string) string {
	for _, su := range snakeUnits {
		if n := len(su.suffix); len(toks) > n && slices.Equal(toks[len(toks)-n:], su.suffix) {
			return su.unit
		}
	}
	return ""
}

// breakQty reads the quantity of a per-break price column: "Price @ 1000",
// "1000+", "Unit Price (1,000)", "Price 100-999", "Price for 1k",
// "Price (EUR) 1pc", "10+ (USD)". 0 when the header is not one.
func breakQty(low string, toks []string) int {
	if m := qtyOnlyRE.FindStringSubmatch(low); m != nil {
		return qtyNumber(m[1], m[2])
	}
	priceWord := false
	for _, t := range toks {
		switch t {
		case "price", "prices", "cost", "break", "pricing", "preis", "prix", "precio":
			priceWord = true
		}
	}
	if !priceWord {
		return 0
	}
	m := breakNumRE.FindStringSubmatch(low)
	if m == nil {
		return 0
	}
	return qtyNumber(m[1], m[2])
}

// qtyNumber reads the piece count of a price break ("1,000", "1 000",
// "1.000": whole pieces, so a single dot splits thousands here), times
// 1000 with the "k" of "1k"; 0 when num is no count.
func qtyNumber(num, k string) int {
	n, err := units.ParseCount(num)
	if err != nil {
		// A price break is whole pieces: "1.000" has a dot for thousands.
		n, err = units.ParseCount(units.FromDecimalComma(num))
	}
	if err != nil || n <= 0 {
		return 0
	}
	if k != "" {
		n *= 1000
	}
	return n
}

// unitWord turns a unit written as a word in a header ("Ohms", "Watts")
// into its symbol, for appending to bare numbers.
func unitWord(u string) string {
	switch strings.ToLower(u) {
	case "ohm", "ohms":
		return "Ω"
	case "watt", "watts":
		return "W"
	case "volt", "volts":
		return "V"
	case "percent", "pct":
		return "%"
	case "amp", "amps", "ampere", "amperes":
		return "A"
	}
	return u
}

func currencyOf(s string) string {
	s = strings.TrimSpace(strings.ToLower(s))
	if c, ok := currencyMap[s]; ok {
		return c
	}
	return ""
}

func hasDigit(s string) bool { return strings.IndexFunc(s, unicode.IsDigit) >= 0 }

// words lower-cases s and splits it at everything but letters and digits;
// "#" reads as "number" ("Mfr Part #").
func words(s string) []string {
	s = strings.ReplaceAll(strings.ToLower(s), "#", " number ")
	return strings.FieldsFunc(s, func(r rune) bool { return !unicode.IsLetter(r) && !unicode.IsDigit(r) })
}

// score grades how well header words h match the synonym words s.
func score(h, s []string) (Confidence, string) {
	inS := map[string]bool{}
	for _, t := range s {
		inS[t] = true
	}
	var hs []string
	for _, t := range h {
		if _, q := qualifierTokens[t]; q && !inS[t] {
			continue
		}
		hs = append(hs, t)
	}
	if len(hs) == 0 {
		return 0, ""
	}
	if strings.Join(hs, " ") == strings.Join(s, " ") {
		return ConfExact, "exact"
	}
	if i := indexSeq(hs, s); i >= 0 {
		return ConfPhrase - 0.2*Confidence(len(hs)-len(s))/Confidence(len(hs)), "phrase"
	}
	common := 0
	for _, t := range hs {
		if inS[t] {
			common++
		}
	}
	if common == 0 || common < len(s) && len(s) > 1 && common*2 < len(s)+1 {
		return 0, ""
	}
	union := len(hs) + len(s) - common
	return ConfOverlap * Confidence(common) / Confidence(union) * 1.6, "words in common"
}

func indexSeq(h, s []string) int {
	for i := 0; i+len(s) <= len(h); i++ {
		ok := true
		for j := range s {
			if h[i+j] != s[j] {
				ok = false
				break
			}
		}
		if ok {
			return i
		}
	}
	return -1
}

type candidate struct {
	field Field
	col   int
	conf  Confidence
	how   string
}

// railField is the headroom field of a rail-relative header: the input
// common-mode range or the output swing, at the rail named.
func railField(hi headerInfo) Field {
	if hi.rail == "" {
		return ""
	}
	has := func(ws ...string) bool {
		for _, t := range hi.tokens {
			if slices.Contains(ws, t) {
				return true
			}
		}
		return false
	}
	switch {
	case has("swing", "output", "out", "vo", "voh", "vol", "vout"):
		if hi.rail == "+" {
			return FieldSwingPos
		}
		return FieldSwingNeg
	case has("cm", "common", "input", "in", "vicm", "icmr", "cmvr", "vcm"):
		if hi.rail == "+" {
			return FieldCMPos
		}
		return FieldCMNeg
	}
	return ""
}

// GuessMapping guesses the kind (unless kind is set) and the column of each
// field from the header words. Price-break columns are found by their
// quantity. Each column serves at most one field; the best-scored pairs
// are taken first.
//
// A header written by the catalog's own CSV export is mapped by its column
// names, whatever the kind.
func GuessMapping(header []string, kind catalog.Kind) (*Mapping, error) {
	if m := exportMapping(header, kind); m != nil {
		return m, nil
	}
	infos := make([]headerInfo, len(header))
	for i, h := range header {
		infos[i] = analyseHeader(h)
	}
	all := candidates(infos, "")
	if kind == "" || kind == "auto" {
		kind = guessKind(all)
		if kind == "" {
			return nil, fmt.Errorf("%w: no column reads as resistance, network matching or op-amp figures (header: %s); pass the kind or a mapping",
				ErrUnknownKind, headerList(header))
		}
	}
	m := &Mapping{Kind: kind, Columns: map[Field]string{}}
	used := map[int]bool{}
	for i, hi := range infos {
		if hi.breakQ > 0 {
			m.PriceBreaks = append(m.PriceBreaks, BreakColumn{Column: header[i], MinQty: hi.breakQ})
			m.Guesses = append(m.Guesses, Guess{Field: FieldPrice, Column: header[i], Index: i,
				Confidence: ConfPhrase, How: fmt.Sprintf("price break from %d", hi.breakQ)})
			used[i] = true
		}
	}
	cands := candidates(infos, kind)
	sort.SliceStable(cands, func(a, b int) bool { return cands[a].conf > cands[b].conf })
	for _, c := range cands {
		if used[c.col] {
			continue
		}
		if _, done := m.Columns[c.field]; done {
			continue
		}
		used[c.col] = true
		if c.field == fieldIgnore {
			continue
		}
		m.Columns[c.field] = header[c.col]
		how := c.how
		if u := infos[c.col].unit; u != "" && !strings.HasPrefix(how, "rail-relative") {
			how += ", bare numbers in " + u
		}
		if cur := infos[c.col].curr; cur != "" {
			how += ", prices in " + cur
		}
		m.Guesses = append(m.Guesses, Guess{Field: c.field, Column: header[c.col], Index: c.col, Confidence: c.conf, How: how})
	}
	sort.SliceStable(m.Guesses, func(a, b int) bool { return m.Guesses[a].Index < m.Guesses[b].Index })
	return m, nil
}

// candidates scores every (field, column) pair above the floor, for one
// kind or ("") for all.
func candidates(infos []headerInfo, kind catalog.Kind) []candidate {
	var out []candidate
	for col, hi := range infos {
		if hi.breakQ > 0 || len(hi.tokens) == 0 {
			continue
		}
		if f := railField(hi); f != "" && (kind == "" || kind == catalog.KindAmplifier) {
			how := "distance inwards from V" + hi.rail
			if hi.railSigned {
				how = "signed offset from V" + hi.rail + " (below it is negative)"
				if hi.rail == "-" {
					how = "signed offset from V- (above it is positive)"
				}
			}
			out = append(out, candidate{f, col, ConfExact, "rail-relative: " + how})
			continue
		}
		for _, fi := range fieldTable {
			if kind != "" && !fi.has(kind) {
				continue
			}
			var best Confidence
			var how string
			for _, syn := range fi.synonyms {
				if c, h := score(hi.tokens, strings.Fields(syn)); c > best {
					best, how = c, h
				}
			}
			if hi.typical {
				// A maximum beats a typical figure for the same field.
				best -= typicalPenalty
			}
			if best >= confFloor {
				out = append(out, candidate{fi.field, col, best, how})
			}
		}
	}
	return out
}

// guessKind weighs the columns that only one kind has.
func guessKind(c []candidate) catalog.Kind {
	seen := map[Field]Confidence{}
	for _, x := range c {
		if x.conf > seen[x.field] {
			seen[x.field] = x.conf
		}
	}
	sum := func(k catalog.Kind) Confidence {
		var s Confidence
		for _, f := range kindFields[k] {
			if seen[f] >= ConfPhrase-0.2 {
				s += seen[f]
			}
		}
		return s
	}
	ampScore, netScore, resScore := sum(catalog.KindAmplifier), sum(catalog.KindNetwork), sum(catalog.KindResistor)
	refScore := sum(catalog.KindReference)
	switch {
	case seen[FieldOutputV] >= ConfPhrase-0.2 && seen[FieldResistance] == 0 && refScore >= ampScore:
		// An output voltage and no resistance: a voltage reference.
		return catalog.KindReference
	case ampScore >= 2 && ampScore > resScore:
		return catalog.KindAmplifier
	case netScore >= ConfPhrase && seen[FieldResistance] > 0:
		return catalog.KindNetwork
	case seen[FieldResistance] > 0:
		return catalog.KindResistor
	}
	return ""
}

// resolve turns a mapping's header texts into column indexes for header.
// Header texts compare by their words, so case and punctuation do not
// matter.
func (m *Mapping) resolve(file string, header []string) (map[Field]int, []breakCol, error) {
	key := func(s string) string { return strings.Join(words(s), " ") }
	idx := map[string]int{}
	for i, h := range header {
		if _, dup := idx[key(h)]; !dup {
			idx[key(h)] = i
		}
	}
	cols := map[Field]int{}
	for f, h := range m.Columns {
		if !knownField(f) {
			return nil, nil, &ParseError{File: file, Err: fmt.Errorf("%w: unknown field %q (known: %s)", ErrMapping, f, knownFields())}
		}
		i, ok := idx[key(h)]
		if !ok {
			return nil, nil, &ParseError{File: file, Column: h, Err: fmt.Errorf("%w: the mapping puts %s in column %q, which the header does not have (header: %s)",
				ErrMapping, f, h, headerList(header))}
		}
		cols[f] = i
	}
	var breaks []breakCol
	for _, b := range m.PriceBreaks {
		i, ok := idx[key(b.Column)]
		if !ok {
			return nil, nil, &ParseError{File: file, Column: b.Column, Err: fmt.Errorf("%w: price-break column %q is not in the header", ErrMapping, b.Column)}
		}
		if b.MinQty <= 0 {
			return nil, nil, &ParseError{File: file, Column: b.Column, Err: fmt.Errorf("%w: price-break column %q needs min_qty of 1 or more", ErrMapping, b.Column)}
		}
		breaks = append(breaks, breakCol{col: i, minQty: b.MinQty, curr: analyseHeader(header[i]).curr})
	}
	sort.Slice(breaks, func(a, b int) bool { return breaks[a].minQty < breaks[b].minQty })
	return cols, breaks, nil
}

type breakCol struct {
	col    int
	minQty int
	curr   string
}

func knownField(f Field) bool {
	for _, fi := range fieldTable {
		if fi.field == f && f != fieldIgnore {
			return true
		}
	}
	return false
}

func knownFields() string {
	var s []string
	for _, fi := range fieldTable {
		if fi.field != fieldIgnore {
			s = append(s, string(fi.field))
		}
	}
	return strings.Join(s, ", ")
}

// forFile returns a copy of a given mapping whose Guesses say, for the
// report, which header each field was taken from ("mapping", confidence 1).
// A price column whose header states its quantity ("Price (EUR) 1pc") is
// a price break from that quantity, and so is every other such column the
// mapping does not name: a mapping's single price column once dropped the
// file's other price columns without a word.
func (m *Mapping) forFile(header []string) *Mapping {
	c := *m
	c.Guesses = nil
	c.Columns = maps.Clone(m.Columns)
	c.PriceBreaks = slices.Clone(m.PriceBreaks)
	key := func(s string) string { return strings.Join(words(s), " ") }
	named := map[string]bool{}
	for _, col := range c.Columns {
		named[key(col)] = true
	}
	for _, b := range c.PriceBreaks {
		named[key(b.Column)] = true
	}
	for _, h := range header {
		q := analyseHeader(h).breakQ
		if q <= 0 {
			continue
		}
		if col, ok := c.Columns[FieldPrice]; ok && key(col) == key(h) {
			delete(c.Columns, FieldPrice)
		} else if named[key(h)] {
			continue
		}
		named[key(h)] = true
		c.PriceBreaks = append(c.PriceBreaks, BreakColumn{Column: h, MinQty: q})
	}
	for i, h := range header {
		for f, col := range c.Columns {
			if key(col) == key(h) {
				c.Guesses = append(c.Guesses, Guess{Field: f, Column: h, Index: i, Confidence: ConfExact, How: "mapping"})
			}
		}
		for j, b := range c.PriceBreaks {
			if key(b.Column) == key(h) {
				how := fmt.Sprintf("mapping: price break from %d", b.MinQty)
				if j >= len(m.PriceBreaks) {
					how = fmt.Sprintf("price break from %d, by its header (the mapping does not list it)", b.MinQty)
				}
				c.Guesses = append(c.Guesses, Guess{Field: FieldPrice, Column: h, Index: i, Confidence: ConfExact, How: how})
			}
		}
	}
	return &c
}

// validate checks a loaded mapping.
func (m *Mapping) validate(src string) error {
	switch m.Kind {
	case "", catalog.KindResistor, catalog.KindNetwork, catalog.KindAmplifier, catalog.KindReference:
	default:
		return fmt.Errorf("%s: %w: kind %q (use resistor, network, amplifier or reference)", src, ErrMapping, m.Kind)
	}
	for f := range m.Columns {
		if !knownField(f) {
			return fmt.Errorf("%s: %w: unknown field %q under columns (known: %s)", src, ErrMapping, f, knownFields())
		}
	}
	for f := range m.Fixed {
		if !knownField(f) {
			return fmt.Errorf("%s: %w: unknown field %q under fixed (known: %s)", src, ErrMapping, f, knownFields())
		}
	}
	for f := range m.Units {
		if !knownField(f) {
			return fmt.Errorf("%s: %w: unknown field %q under units (known: %s)", src, ErrMapping, f, knownFields())
		}
	}
	return nil
}

// MappingDir is the directory saved mappings live in when Options or the
// caller give none: plumb/mappings under the user's configuration
// directory.
func MappingDir() (string, error) {
	d, err := os.UserConfigDir()
	if err != nil {
		return "", fmt.Errorf("importers: no configuration directory for saved mappings: %w", err)
	}
	return filepath.Join(d, "plumb", "mappings"), nil
}

var mappingNameRE = regexp.MustCompile(`^[A-Za-z0-9][A-Za-z0-9._-]{0,63}$`)

// LoadMapping reads a mapping by name (a file NAME.yaml in dir, or in
// MappingDir when dir is "") or, when nameOrFile has a path separator or a
// .yaml/.yml suffix, from that file.
func LoadMapping(dir, nameOrFile string) (*Mapping, error) {
	path := nameOrFile
	if !strings.ContainsAny(nameOrFile, `/\`) && !strings.HasSuffix(nameOrFile, ".yaml") && !strings.HasSuffix(nameOrFile, ".yml") {
		if !mappingNameRE.MatchString(nameOrFile) {
			return nil, fmt.Errorf("%w: mapping name %q: use letters, digits, '.', '_' or '-'", ErrMapping, nameOrFile)
		}
		if dir == "" {
			var err error
			if dir, err = MappingDir(); err != nil {
				return nil, err
			}
		}
		path = filepath.Join(dir, nameOrFile+".yaml")
	}
	b, err := os.ReadFile(path)
	if errors.Is(err, os.ErrNotExist) {
		return nil, fmt.Errorf("%w: no mapping %q (looked for %s); save one with --save-mapping or give a file", ErrMapping, nameOrFile, path)
	}
	if err != nil {
		return nil, fmt.Errorf("importers: reading mapping: %w", err)
	}
	m, err := parseMapping(path, b)
	if err != nil {
		return nil, err
	}
	if err := m.validate(path); err != nil {
		return nil, err
	}
	return m, nil
}

// maxMappingBytes caps a mapping file: a real one is a few dozen lines.
const maxMappingBytes = 256 << 10

// parseMapping reads a mapping file's YAML. The node tree is checked
// before anything is decoded, so a file of the wrong shape gets messages in
// the file's own terms (line, column, key) rather than Go type names, and
// anchors and aliases, which no mapping needs and which can expand a small
// file into a huge one, are refused.
func parseMapping(path string, b []byte) (*Mapping, error) {
	fail := func(format string, args ...any) error {
		return fmt.Errorf("%s: %w: %s", path, ErrMapping, fmt.Sprintf(format, args...))
	}
	if len(b) > maxMappingBytes {
		return nil, fail("the file is %d bytes; a mapping is a few dozen lines (at most %d bytes are read)", len(b), maxMappingBytes)
	}
	dec := yaml.NewDecoder(bytes.NewReader(b))
	var doc yaml.Node
	if err := dec.Decode(&doc); err != nil {
		if errors.Is(err, io.EOF) {
			return nil, fail("the file is empty; see plumb help mapping")
		}
		return nil, fail("not YAML: %v", strings.TrimPrefix(err.Error(), "yaml: "))
	}
	var extra yaml.Node
	if err := dec.Decode(&extra); err == nil {
		return nil, fail("line %d: a second YAML document (after ---); a mapping file holds one", extra.Line)
	}
	var probs []string
	add := func(n *yaml.Node, format string, args ...any) {
		probs = append(probs, fmt.Sprintf("line %d, column %d: %s", n.Line, n.Column, fmt.Sprintf(format, args...)))
	}
	var walk func(n *yaml.Node) bool
	walk = func(n *yaml.Node) bool {
		if n.Kind == yaml.AliasNode || n.Anchor != "" {
			add(n, "anchors and aliases (& and *) are not used in a mapping file; write each value out")
			return false
		}
		for _, c := range n.Content {
			if !walk(c) {
				return false
			}
		}
		return true
	}
	if !walk(&doc) {
		return nil, fail("%s", probs[0])
	}
	root := &doc
	if root.Kind == yaml.DocumentNode && len(root.Content) == 1 {
		root = root.Content[0]
	}
	kindName := map[yaml.Kind]string{yaml.ScalarNode: "a single value", yaml.SequenceNode: "a list", yaml.MappingNode: "key: value lines"}
	pairs := func(n *yaml.Node, what string, each func(k, v *yaml.Node)) {
		if n.Kind != yaml.MappingNode {
			add(n, "%s must be key: value lines, not %s", what, kindName[n.Kind])
			return
		}
		seen := map[string]bool{}
		for i := 0; i+1 < len(n.Content); i += 2 {
			k, v := n.Content[i], n.Content[i+1]
			if k.Kind != yaml.ScalarNode {
				add(k, "a key under %s must be a plain word", what)
				continue
			}
			if seen[k.Value] {
				add(k, "%s is given twice under %s", k.Value, what)
				continue
			}
			seen[k.Value] = true
			each(k, v)
		}
	}
	scalar := func(v *yaml.Node, what string) {
		if v.Kind != yaml.ScalarNode {
			add(v, "%s must be a single value, not %s", what, kindName[v.Kind])
		}
	}
	pairs(root, "the file", func(k, v *yaml.Node) {
		switch k.Value {
		case "kind":
			scalar(v, "kind")
		case "columns", "fixed", "units":
			pairs(v, k.Value, func(f, h *yaml.Node) { scalar(h, k.Value+"."+f.Value) })
		case "decimal_comma":
			scalar(v, "decimal_comma")
			if v.Kind == yaml.ScalarNode && v.Value != "true" && v.Value != "false" {
				add(v, "decimal_comma must be true or false, not %q", v.Value)
			}
		case "price_breaks":
			if v.Kind != yaml.SequenceNode {
				add(v, "price_breaks must be a list of {column: HEADER, min_qty: N}, not %s", kindName[v.Kind])
				return
			}
			for _, e := range v.Content {
				pairs(e, "a price break", func(bk, bv *yaml.Node) {
					switch bk.Value {
					case "column":
						scalar(bv, "price_breaks.column")
					case "min_qty":
						scalar(bv, "price_breaks.min_qty")
						if n, err := strconv.Atoi(bv.Value); bv.Kind == yaml.ScalarNode && (err != nil || n < 1 || n > maxPieces) {
							add(bv, "min_qty must be a whole number of pieces from 1, not %q", bv.Value)
						}
					default:
						add(bk, "unknown key %q in a price break (known: column, min_qty)", bk.Value)
					}
				})
			}
		default:
			add(k, "unknown key %q (known: kind, columns, price_breaks, fixed, units, decimal_comma; see plumb help mapping)", k.Value)
		}
	})
	if len(probs) > 0 {
		return nil, fail("%s", strings.Join(probs, "; "))
	}
	var m Mapping
	if err := root.Decode(&m); err != nil {
		return nil, fail("%v", strings.TrimPrefix(err.Error(), "yaml: "))
	}
	return &m, nil
}

// SaveMapping writes m as NAME.yaml in dir (MappingDir when ""), replacing
// an older one atomically, and returns the path written.
func SaveMapping(dir, name string, m *Mapping) (string, error) {
	if !mappingNameRE.MatchString(name) {
		return "", fmt.Errorf("%w: mapping name %q: use letters, digits, '.', '_' or '-'", ErrMapping, name)
	}
	if dir == "" {
		var err error
		if dir, err = MappingDir(); err != nil {
			return "", err
		}
	}
	if err := m.validate(name); err != nil {
		return "", err
	}
	b, err := yaml.Marshal(m)
	if err != nil {
		return "", fmt.Errorf("importers: encoding mapping %q: %w", name, err)
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return "", fmt.Errorf("importers: saving mapping %q: %w", name, err)
	}
	path := filepath.Join(dir, name+".yaml")
	tmp, err := os.CreateTemp(dir, "."+name+"-*.yaml")
	if err != nil {
		return "", fmt.Errorf("importers: saving mapping %q: %w", name, err)
	}
	if _, err := tmp.Write(b); err != nil {
		tmp.Close()
		os.Remove(tmp.Name())
		return "", fmt.Errorf("importers: saving mapping %q: %w", name, err)
	}
	if err := tmp.Close(); err != nil {
		os.Remove(tmp.Name())
		return "", fmt.Errorf("importers: saving mapping %q: %w", name, err)
	}
	if err := os.Rename(tmp.Name(), path); err != nil {
		os.Remove(tmp.Name())
		return "", fmt.Errorf("importers: saving mapping %q: %w", name, err)
	}
	return path, nil
}

// headerList names the columns of a header for a message, the first
// twenty of a wide one.
func headerList(h []string) string {
	const most = 20
	if len(h) <= most {
		return strings.Join(h, ", ")
	}
	return fmt.Sprintf("%s, … (%d more)", strings.Join(h[:most], ", "), len(h)-most)
}
