package catalog

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"reflect"
	"strconv"
	"strings"

	"plumb/catalog/eseries"
)

// SnapshotFormat is the value of the "format" field that marks plumb
// snapshot JSON.
const SnapshotFormat = "plumb-catalog-snapshot"

// ErrSnapshot: snapshot JSON that cannot be read (wrong format, bad syntax,
// unknown field, newer schema).
var ErrSnapshot = errors.New("catalog: bad snapshot JSON")

// Snapshot is a whole catalog (or part of one) in memory, and the JSON
// export and demo format. Format and SchemaVersion form the header of the
// JSON: Format is always SnapshotFormat, SchemaVersion the catalog schema
// version the snapshot was written with.
type Snapshot struct {
	Format         string           `json:"format"`
	SchemaVersion  int              `json:"schema_version"`
	ResistorSeries []ResistorSeries `json:"resistor_series"`
	Resistors      []Resistor       `json:"resistors"`
	Networks       []Network        `json:"networks"`
	Amplifiers     []Amplifier      `json:"amplifiers"`
	// References are voltage references (schema 3 on; absent before).
	References []Reference `json:"references"`
}

// Len returns the number of parts in the snapshot (series count once each).
func (s *Snapshot) Len() int {
	return len(s.ResistorSeries) + len(s.Resistors) + len(s.Networks) + len(s.Amplifiers) + len(s.References)
}

// WriteSnapshotJSON writes s as indented snapshot JSON with its header set.
func WriteSnapshotJSON(w io.Writer, s *Snapshot) error {
	out := *s
	out.Format = SnapshotFormat
	out.SchemaVersion = SchemaVersionCurrent
	// Empty lists are written as [], never null, so readers need not
	// tell the two apart.
	if out.ResistorSeries == nil {
		out.ResistorSeries = []ResistorSeries{}
	}
	if out.Resistors == nil {
		out.Resistors = []Resistor{}
	}
	if out.Networks == nil {
		out.Networks = []Network{}
	}
	if out.Amplifiers == nil {
		out.Amplifiers = []Amplifier{}
	}
	if out.References == nil {
		out.References = []Reference{}
	}
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	if err := enc.Encode(&out); err != nil {
		return fmt.Errorf("catalog: write snapshot JSON: %w", err)
	}
	return nil
}

// ReadSnapshotJSON reads snapshot JSON, checking its format header and
// schema version, refusing unknown fields and validating every part. Errors
// wrap ErrSnapshot (or ErrInvalid for a part) and give the line and column.
func ReadSnapshotJSON(r io.Reader) (*Snapshot, error) {
	data, err := io.ReadAll(r)
	if err != nil {
		return nil, fmt.Errorf("%w: read: %v", ErrSnapshot, err)
	}
	var head struct {
		Format        string `json:"format"`
		SchemaVersion int    `json:"schema_version"`
	}
	if err := json.Unmarshal(data, &head); err != nil {
		return nil, jsonError(data, err)
	}
	if head.Format != SnapshotFormat {
		return nil, fmt.Errorf("%w: \"format\" is %q, want %q: give a file written by plumb's catalog export",
			ErrSnapshot, head.Format, SnapshotFormat)
	}
	if head.SchemaVersion < 1 {
		return nil, fmt.Errorf("%w: \"schema_version\" is %d, which no plumb writes: give a file written by plumb's catalog export",
			ErrSnapshot, head.SchemaVersion)
	}
	if head.SchemaVersion > SchemaVersionCurrent {
		return nil, fmt.Errorf("%w: %w: snapshot has schema version %d, this plumb knows up to %d: upgrade plumb",
			ErrSnapshot, ErrNewerSchema, head.SchemaVersion, SchemaVersionCurrent)
	}
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.DisallowUnknownFields()
	var s Snapshot
	if err := dec.Decode(&s); err != nil {
		return nil, jsonError(data, err)
	}
	// Which figures each part gives: one left out or null is unknown.
	var given struct {
		ResistorSeries []map[string]json.RawMessage `json:"resistor_series"`
		Resistors      []map[string]json.RawMessage `json:"resistors"`
		Networks       []map[string]json.RawMessage `json:"networks"`
		Amplifiers     []map[string]json.RawMessage `json:"amplifiers"`
		References     []map[string]json.RawMessage `json:"references"`
	}
	if err := json.Unmarshal(data, &given); err != nil {
		return nil, jsonError(data, err)
	}
	legacy := head.SchemaVersion < schemaUnknownNull
	markUnknown(seriesTable, reflect.ValueOf(s.ResistorSeries), given.ResistorSeries, legacy)
	markUnknown(resistorTable, reflect.ValueOf(s.Resistors), given.Resistors, legacy)
	markUnknown(networkTable, reflect.ValueOf(s.Networks), given.Networks, legacy)
	markUnknown(amplifierTable, reflect.ValueOf(s.Amplifiers), given.Amplifiers, legacy)
	markMatchedUnknown(s.Amplifiers, given.Amplifiers)
	markUnknown(referenceTable, reflect.ValueOf(s.References), given.References, legacy)
	if err := s.Validate(); err != nil {
		return nil, err
	}
	return &s, nil
}

// jsonError turns a decoding error into one naming the line and column.
func jsonError(data []byte, err error) error {
	var off int64 = -1
	var se *json.SyntaxError
	var te *json.UnmarshalTypeError
	switch {
	case errors.As(err, &se):
		off = se.Offset
	case errors.As(err, &te):
		off = te.Offset
	}
	if off < 0 {
		return fmt.Errorf("%w: %v: check the field names against a plumb catalog export", ErrSnapshot, err)
	}
	line, col := 1, 1
	for _, c := range data[:min(int(off), len(data))] {
		if c == '\n' {
			line++
			col = 1
		} else {
			col++
		}
	}
	return fmt.Errorf("%w: line %d column %d: %v", ErrSnapshot, line, col, err)
}

// ExpandSeries returns every value of rs.ESeries in [rs.MinOhm, rs.MaxOhm]
// as a Resistor carrying the series' maker, line, grade, offer and
// provenance, with part number rs.PartNumber(value) and SeriesPart rs.Part.
// The value list comes from eseries (IEC 60063).
func ExpandSeries(rs ResistorSeries) ([]Resistor, error) {
	es, err := eseries.ByName(rs.ESeries)
	if err != nil {
		return nil, fmt.Errorf("catalog: series %s: %w", rs.Part, err)
	}
	values := es.Values(rs.MinOhm, rs.MaxOhm)
	if len(values) == 0 {
		return nil, fmt.Errorf("%w: series %s: no %s value between %s and %s ohm: check min_ohm and max_ohm",
			ErrInvalid, rs.Part, es.Name, formatFloat(rs.MinOhm), formatFloat(rs.MaxOhm))
	}
	out := make([]Resistor, len(values))
	for i, v := range values {
		out[i] = Resistor{
			Part: rs.PartNumber(v), Maker: rs.Maker, Line: rs.Line, ValueOhm: v, SeriesPart: rs.Part,
			ResistorGrade: rs.ResistorGrade, Offer: rs.Offer, Provenance: rs.Provenance,
		}
	}
	return out, nil
}

// PartNumber returns the part number of one value of the series: the stem,
// a hyphen and the value code (see ValueCode): "QP1-0603-4K99".
func (rs ResistorSeries) PartNumber(valueOhm float64) string {
	return rs.Part + "-" + ValueCode(valueOhm)
}

// valueLetters mark the decimal point and the multiplier in a value code:
// ohm, kilo-, mega-, giga-, tera-ohm.
const valueLetters = "RKMGT"

// ValueCode returns the value code of a resistance in R-notation, plumb's
// rule: three significant figures, the multiplier letter (R, K, M, G, T)
// standing in for the decimal point, no trailing letter dropped:
//
//	0.0499 -> R0499   0.1 -> R100   4.7 -> 4R70   100 -> 100R
//	4990 -> 4K99      10000 -> 10K0  1e6 -> 1M00
//
// Below 1 ohm the code is R and the decimals (the leading zero dropped). A
// value that is not finite and positive gives "".
func ValueCode(v float64) string {
	if !(v > 0) || math.IsInf(v, 0) || v >= 1e15 {
		return ""
	}
	s := strconv.FormatFloat(v, 'e', 2, 64) // "4.99e+03"
	mant, expText, _ := strings.Cut(s, "e")
	digits := mant[:1] + mant[2:]
	exp, _ := strconv.Atoi(expText)
	if exp < 0 {
		return "R" + strings.Repeat("0", -exp-1) + digits
	}
	lead := exp%3 + 1
	return digits[:lead] + valueLetters[exp/3:exp/3+1] + digits[lead:]
}

// ParseValueCode reads a value code written by ValueCode (and the shorter
// forms engineers write, such as 4K7 or 10R); ok is false when code is not
// one.
func ParseValueCode(code string) (v float64, ok bool) {
	i := strings.IndexAny(code, valueLetters)
	if i < 0 || strings.IndexAny(code[i+1:], valueLetters) >= 0 || len(code) < 2 {
		return 0, false
	}
	whole, frac := code[:i], code[i+1:]
	for _, c := range whole + frac {
		if c < '0' || c > '9' {
			return 0, false
		}
	}
	if whole == "" {
		whole = "0"
	}
	x, err := strconv.ParseFloat(whole+"."+frac+"0", 64)
	if err != nil || x <= 0 {
		return 0, false
	}
	exp := 3 * strings.IndexByte(valueLetters, code[i])
	// Parse the decimal string with its exponent, so 4K99 is exactly 4990.
	v, err = strconv.ParseFloat(whole+"."+frac+"0e"+strconv.Itoa(exp), 64)
	return v, err == nil
}
