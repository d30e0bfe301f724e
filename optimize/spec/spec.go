package spec

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"reflect"
	"regexp"
	"slices"
	"strconv"
	"strings"

	"go.yaml.in/yaml/v3"

	"plumb/optimize/family"
)

// ErrInvalid is wrapped by every error about a spec or design file's content.
var ErrInvalid = errors.New("spec: invalid file")

// KnownFamilies lists every family name in registry order (package
// family).
var KnownFamilies = family.Names()

// Analysis methods.
const (
	WorstCase  = "worst-case"
	RSS        = "rss"
	MonteCarlo = "monte-carlo"
)

// Monte Carlo distributions.
const (
	Uniform = "uniform"
	Normal  = "normal"
)

// Range is a closed interval in SI units.
type Range struct {
	Min float64 `json:"min"`
	Max float64 `json:"max"`
}

// Span returns Max - Min.
func (r Range) Span() float64 { return r.Max - r.Min }

// Reference is the voltage a stage is referred or shifted to.
type Reference struct {
	V         float64 `json:"v"`
	Tolerance float64 `json:"tolerance"`   // fraction
	Drift     float64 `json:"drift_per_k"` // fraction per K
	SourceOhm float64 `json:"source_ohm"`  // output resistance of the reference
	// Part is RefAuto when the search picks the reference from the
	// catalog's references of voltage V (its tolerance and drift are then
	// the part's); "" when the spec gives the figures.
	Part string `json:"part,omitempty"`
}

// Limits are the pass/fail limits of a spec. Zero means no limit.
type Limits struct {
	GainError      float64 `json:"gain_error"`           // max |error|, fraction
	CMRRdB         float64 `json:"cmrr_db"`              // min
	GainDrift      float64 `json:"gain_drift_per_k"`     // max, fraction per K
	OutputOffsetV  float64 `json:"output_offset_v"`      // max |offset| at the output
	OffsetDriftVK  float64 `json:"offset_drift_v_per_k"` // max, output referred
	NoiseRMSV      float64 `json:"noise_rms_v"`          // max, output referred, over the bandwidth
	NoiseDensity   float64 `json:"noise_v_per_rthz"`     // max, output referred
	BandwidthHz    float64 `json:"bandwidth_hz"`         // min closed-loop -3 dB
	InputImpedance float64 `json:"input_impedance_ohm"`  // min
	// TotalError and TotalDrift limit the channel's error at the ADC
	// (Spec.ADC), fractions of its full-scale range: the whole error, and
	// the part the temperature range adds. InLSB says the spec wrote them
	// in LSB, so results show them so.
	TotalError      float64 `json:"total_error_fs,omitempty"`
	TotalDrift      float64 `json:"total_drift_fs,omitempty"`
	TotalErrorInLSB bool    `json:"total_error_in_lsb,omitempty"`
	TotalDriftInLSB bool    `json:"total_drift_in_lsb,omitempty"`
}

// Analysis chooses the error-budget method.
type Analysis struct {
	Method       string `json:"method"`
	Trials       int    `json:"trials"`
	Seed         uint64 `json:"seed"`
	Distribution string `json:"distribution"`
	// Sigmas is how many standard deviations a tolerance stands for (3).
	Sigmas float64 `json:"sigmas"`
	// Yield is the fraction of Monte Carlo trials that must pass (0 = none asked).
	Yield float64 `json:"yield"`
}

// Calibration says which initial errors are trimmed once at the reference
// temperature.
type Calibration struct {
	Gain   bool `json:"gain"`
	Offset bool `json:"offset"`
}

// Build holds the figures the cost of a build depends on.
type Build struct {
	Quantity      int     `json:"quantity"`
	Attrition     float64 `json:"attrition"` // fraction
	PlacementCost float64 `json:"placement_cost"`
	LineItemCost  float64 `json:"line_item_cost"`
	Currency      string  `json:"currency"`
	// Stock is "exclude" (skip parts short of stock) or "flag".
	Stock string `json:"stock"`
}

// Spec is a signal-conditioning requirement in SI units.
type Spec struct {
	Name     string   `json:"name"`
	About    string   `json:"about"`
	Families []string `json:"families"`
	// Gain is the target transfer: V/V, or V/A for a current-sense stage.
	Gain float64 `json:"gain"`
	// Offset is the target output for zero input, V (level-shift).
	Offset float64 `json:"offset_v"`
	// Input is the signal range: differential or single-ended volts, or
	// amperes through the shunt of a current-sense stage.
	Input        Range `json:"input"`
	Differential bool  `json:"differential"`
	// CommonMode is the input common-mode range, V.
	CommonMode Range `json:"common_mode"`
	// Output is the wanted output range (level-shift), V.
	Output    Range       `json:"output"`
	Supply    Range       `json:"supply"` // Min is the negative rail, Max the positive
	Reference *Reference  `json:"reference,omitempty"`
	SourceOhm float64     `json:"source_ohm"`
	LoadOhm   float64     `json:"load_ohm"`  // 0 = unloaded
	LeakageA  float64     `json:"leakage_a"` // current drawn by the load, A
	Temp      Range       `json:"temperature_c"`
	TempRef   float64     `json:"temperature_ref_c"`
	Limits    Limits      `json:"limits"`
	Analysis  Analysis    `json:"analysis"`
	Calibrate Calibration `json:"calibration"`
	Impedance Range       `json:"impedance_ohm"`
	Build     Build       `json:"build"`
	Combos    []string    `json:"combos"` // "series", "parallel"
	Derating  float64     `json:"derating"`
	// Assumptions is AssumeDefaults or AssumeStrict: what a catalog figure
	// nobody gave may do for a limit.
	Assumptions string `json:"assumptions"`
	// ADC is the converter the stage drives (nil: none given).
	ADC *ADC `json:"adc,omitempty"`
	// Stages, when given, make the spec a chain (see StageSpec): Gain is
	// then the product of the stages' gains and Families the first
	// stage's.
	Stages     []Stage `json:"stages,omitempty"`
	SourceFile string  `json:"-"`
}

// What unknown catalog figures may do (Spec.Assumptions).
const (
	// AssumeDefaults takes an unknown figure at its documented default
	// (package assume) and lists the assumption with the result.
	AssumeDefaults = "defaults"
	// AssumeStrict refuses to call a limit met when a figure it depends on
	// is unknown.
	AssumeStrict = "strict"
)

// WorstExcursion is max(|Tmax-Tref|, |Tmin-Tref|), K (domain notes §3).
func (s *Spec) WorstExcursion() float64 {
	return math.Max(math.Abs(s.Temp.Max-s.TempRef), math.Abs(s.Temp.Min-s.TempRef))
}

// HasFamily reports whether the spec allows family f.
func (s *Spec) HasFamily(f string) bool { return slices.Contains(s.Families, f) }

// Load reads a spec file.
func Load(path string) (*Spec, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("spec %s: %w", path, err)
	}
	return Parse(data, path)
}

// problems collects every error found in one file, each at the line and
// column of its field when the file's index knows it.
type problems struct {
	kind, file string
	errs       []error
	index      *docIndex
	// more counts the problems past maxProblems, which are not kept.
	more int
	// prefix is put before every field path: a stage of a chain's design
	// is read by the one-stage code under "stages[i].".
	prefix string
}

// maxProblems is how many problems one file reports: past it, a count.
// A file with thousands of mistakes is fixed from its first ones.
const maxProblems = 50

func (p *problems) add(field, format string, args ...any) {
	if p.prefix != "" {
		field = strings.TrimSuffix(p.prefix+field, ".")
	}
	line, col := p.index.position(field)
	p.addAt(field, line, col, format, args...)
}

func (p *problems) addAt(field string, line, col int, format string, args ...any) {
	if len(p.errs) >= maxProblems {
		p.more++
		return
	}
	p.errs = append(p.errs, &FieldError{Kind: p.kind, File: p.file, Line: line, Column: col, Field: field, Msg: fmt.Sprintf(format, args...)})
}

// FieldError is one problem in a spec or design file. It matches ErrInvalid
// under errors.Is.
type FieldError struct {
	Kind string // "spec" or "design"
	File string
	// Line and Column locate the field in the file, from 1 (0: the field
	// is missing, or the problem is the file's as a whole).
	Line, Column int
	Field        string // path such as limits.cmrr or positions.R1.tolerance
	Msg          string
}

// Error returns "spec FILE:LINE:COLUMN: FIELD: MESSAGE" (without the line
// and column when there are none, without the field when the problem is
// the file's).
func (e *FieldError) Error() string {
	at := e.File
	if e.Line > 0 {
		at = fmt.Sprintf("%s:%d:%d", e.File, e.Line, e.Column)
	}
	if e.Field == "" {
		return fmt.Sprintf("%s %s: %s", e.Kind, at, e.Msg)
	}
	return fmt.Sprintf("%s %s: %s: %s", e.Kind, at, e.Field, e.Msg)
}

// Is reports true for ErrInvalid.
func (e *FieldError) Is(target error) bool { return target == ErrInvalid }

func (p *problems) err() error {
	if len(p.errs) == 0 {
		return nil
	}
	errs := p.errs
	if p.more > 0 {
		errs = append(errs[:len(errs):len(errs)], &FieldError{Kind: p.kind, File: p.file,
			Msg: fmt.Sprintf("and %d more problems, not listed: fix the ones above first", p.more)})
	}
	return errors.Join(errs...)
}

// failed reports whether a problem is already recorded for any of fields or
// a field beneath one ("input" covers "input.differential", "families"
// covers "families[1]"). Checks that depend on a field skip it once it has
// failed, so one mistake gives one error.
func (p *problems) failed(fields ...string) bool {
	for _, err := range p.errs {
		fe, ok := err.(*FieldError)
		if !ok {
			continue
		}
		for _, f := range fields {
			f = strings.TrimSuffix(p.prefix+f, ".")
			if fe.Field == f || strings.HasPrefix(fe.Field, f+".") || strings.HasPrefix(fe.Field, f+"[") {
				return true
			}
		}
	}
	return false
}

// decodeStrict unmarshals YAML refusing unknown fields and a second
// document, and returns a problems list for the file whose entries carry
// the line and column of their field. The decoder reports type errors and
// unknown fields by line only; each is recorded at its field path, found
// through an index of the document's node tree (built once, so the work
// grows with the file, not with the file times its errors), with advice on
// how to write the field.
func decodeStrict(data []byte, v any, kind, file string) (*problems, error) {
	p := &problems{kind: kind, file: file}
	var root yaml.Node
	if yaml.Unmarshal(data, &root) == nil {
		p.index = indexDoc(pathNodes(&root, reflect.TypeOf(v)))
		if wideMappings(p, &root, "", reflect.TypeOf(v)) {
			return p, p.err()
		}
	}
	dec := yaml.NewDecoder(bytes.NewReader(data))
	dec.KnownFields(true)
	err := dec.Decode(v)
	var te *yaml.TypeError
	errors.As(err, &te)
	switch {
	case err == nil:
		var extra yaml.Node
		switch derr := dec.Decode(&extra); {
		case errors.Is(derr, io.EOF):
		case derr != nil:
			p.add("", "%s after the first document; check the indentation and quoting, and keep to one document", strings.TrimPrefix(derr.Error(), "yaml: "))
		default:
			line, col := extra.Line, 0
			if line > 0 {
				col = 1
			}
			p.addAt("", line, col, "a second YAML document follows the first (after a --- line); a %s file holds one document: remove it, or put it in a file of its own", kind)
		}
	case errors.Is(err, io.EOF):
		p.add("", "file is empty; write the fields described in the README of the examples")
	case te != nil:
		types := structTypes(reflect.TypeOf(v))
		for _, msg := range te.Errors {
			translateYAMLError(p, msg, types)
		}
	case strings.HasPrefix(err.Error(), "yaml: line "):
		p.add("", "%s; check the indentation and quoting of that line", strings.TrimPrefix(err.Error(), "yaml: "))
	default:
		p.add("", "%v", err)
	}
	return p, p.err()
}

// maxMappingKeys is the most keys one mapping of a spec or design file may
// hold. The YAML decoder checks a mapping's keys for repeats pair by pair,
// so its time grows with the square of their number; no layout of ours has
// a tenth of this many fields or positions.
const maxMappingKeys = 256

// wideMappings reports every mapping of the document under n with more
// than maxMappingKeys keys without running the decoder on it: its unknown
// and repeated keys for a layout, its size for a list of named entries. It
// returns whether there was one.
func wideMappings(p *problems, n *yaml.Node, path string, t reflect.Type) bool {
	for t != nil && t.Kind() == reflect.Pointer {
		t = t.Elem()
	}
	found := false
	switch n.Kind {
	case yaml.DocumentNode:
		for _, c := range n.Content {
			found = wideMappings(p, c, path, t) || found
		}
	case yaml.SequenceNode:
		var et reflect.Type
		if t != nil && t.Kind() == reflect.Slice {
			et = t.Elem()
		}
		for i, c := range n.Content {
			found = wideMappings(p, c, fmt.Sprintf("%s[%d]", path, i), et) || found
		}
	case yaml.MappingNode:
		wide := len(n.Content)/2 > maxMappingKeys
		if wide && (t == nil || t.Kind() != reflect.Struct) {
			p.add(path, "has %d entries; a %s file takes at most %d here", len(n.Content)/2, p.kind, maxMappingKeys)
		}
		seen := map[string]int{}
		known := ""
		if wide && t != nil && t.Kind() == reflect.Struct {
			known = strings.Join(yamlFields(t), ", ")
		}
		for i := 0; i+1 < len(n.Content); i += 2 {
			k := n.Content[i]
			child := k.Value
			if path != "" {
				child = path + "." + k.Value
			}
			ct := fieldType(t, k.Value)
			if wide && t != nil && t.Kind() == reflect.Struct {
				if ct == nil {
					p.addAt(child, k.Line, k.Column, "is not a known field (check the spelling against the README of the examples); the fields here are %s", known)
				} else if line, dup := seen[k.Value]; dup {
					p.addAt(child, k.Line, k.Column, "given twice (also at line %d); keep one", line)
				}
				seen[k.Value] = k.Line
			}
			found = wideMappings(p, n.Content[i+1], child, ct) || found
		}
		found = found || wide
	}
	return found
}

// docIndex finds the nodes of one document by field path, by key and line,
// and by value line, each in constant time.
type docIndex struct {
	byPath map[string]nodeAt
	keys   map[keyAt]nodeAt
	vals   map[int][]nodeAt
}

// keyAt is a mapping key by its text and line.
type keyAt struct {
	line int
	name string
}

func indexDoc(nodes []nodeAt) *docIndex {
	ix := &docIndex{byPath: map[string]nodeAt{}, keys: map[keyAt]nodeAt{}, vals: map[int][]nodeAt{}}
	for _, n := range nodes {
		if _, dup := ix.byPath[n.path]; !dup {
			ix.byPath[n.path] = n
		}
		if n.key != nil {
			k := keyAt{n.key.Line, n.key.Value}
			if _, dup := ix.keys[k]; !dup {
				ix.keys[k] = n
			}
		}
		ix.vals[n.val.Line] = append(ix.vals[n.val.Line], n)
	}
	return ix
}

// position returns the line and column of the field at path, or of the
// nearest field above it that the file holds (0, 0: none).
func (ix *docIndex) position(path string) (line, col int) {
	for ix != nil && path != "" {
		if n, ok := ix.byPath[path]; ok {
			at := n.val
			if n.key != nil {
				at = n.key
			}
			return at.Line, at.Column
		}
		i := strings.LastIndexAny(path, ".[")
		if i < 0 {
			break
		}
		path = path[:i]
	}
	return 0, 0
}

// nodeAt is one node of a YAML document with its field path and the Go
// type it decodes into (nil for an unknown field); key is nil for sequence
// entries and the document itself.
type nodeAt struct {
	path     string
	key, val *yaml.Node
	into     reflect.Type
}

// pathNodes lists every node of a document decoded into a value of type t
// with its path, in document order: "" for the document, "limits.cmrr",
// "families[1]", "positions.R4.series[0].tcr".
func pathNodes(root *yaml.Node, t reflect.Type) []nodeAt {
	var out []nodeAt
	var walk func(n *yaml.Node, path string, t reflect.Type)
	walk = func(n *yaml.Node, path string, t reflect.Type) {
		for t != nil && t.Kind() == reflect.Pointer {
			t = t.Elem()
		}
		switch n.Kind {
		case yaml.DocumentNode:
			for _, c := range n.Content {
				out = append(out, nodeAt{path: path, val: c, into: t})
				walk(c, path, t)
			}
		case yaml.MappingNode:
			for i := 0; i+1 < len(n.Content); i += 2 {
				k, v := n.Content[i], n.Content[i+1]
				child := k.Value
				if path != "" {
					child = path + "." + k.Value
				}
				ct := fieldType(t, k.Value)
				out = append(out, nodeAt{path: child, key: k, val: v, into: ct})
				walk(v, child, ct)
			}
		case yaml.SequenceNode:
			var et reflect.Type
			if t != nil && t.Kind() == reflect.Slice {
				et = t.Elem()
			}
			for i, c := range n.Content {
				child := fmt.Sprintf("%s[%d]", path, i)
				out = append(out, nodeAt{path: child, val: c, into: et})
				walk(c, child, et)
			}
		}
	}
	walk(root, "", t)
	return out
}

// fieldType is the type the YAML key name decodes into within a value of
// type t (a struct, inline structs included, or a map), or nil.
func fieldType(t reflect.Type, name string) reflect.Type {
	switch {
	case t == nil:
		return nil
	case t.Kind() == reflect.Map:
		return t.Elem()
	case t.Kind() != reflect.Struct:
		return nil
	}
	for i := range t.NumField() {
		f := t.Field(i)
		tag, opts, _ := strings.Cut(f.Tag.Get("yaml"), ",")
		switch {
		case strings.Contains(opts, "inline"):
			if ft := fieldType(f.Type, name); ft != nil {
				return ft
			}
		case tag == name, tag == "" && strings.ToLower(f.Name) == name:
			return f.Type
		}
	}
	return nil
}

// structTypes maps the name the decoder prints for each struct type reached
// from t ("spec.rawLimits") to its type, so that errors can list the fields
// a mapping takes.
func structTypes(t reflect.Type) map[string]reflect.Type {
	m := map[string]reflect.Type{}
	var visit func(t reflect.Type)
	visit = func(t reflect.Type) {
		for t.Kind() == reflect.Pointer || t.Kind() == reflect.Slice || t.Kind() == reflect.Map {
			t = t.Elem()
		}
		if t.Kind() != reflect.Struct || m[t.String()] != nil {
			return
		}
		m[t.String()] = t
		for i := range t.NumField() {
			visit(t.Field(i).Type)
		}
	}
	visit(t)
	return m
}

// yamlFields lists the field names a struct takes in YAML, inline structs
// expanded, in declaration order.
func yamlFields(t reflect.Type) []string {
	var out []string
	for i := range t.NumField() {
		f := t.Field(i)
		name, opts, _ := strings.Cut(f.Tag.Get("yaml"), ",")
		switch {
		case name == "-":
		case strings.Contains(opts, "inline") && f.Type.Kind() == reflect.Struct:
			out = append(out, yamlFields(f.Type)...)
		case name == "":
			out = append(out, strings.ToLower(f.Name))
		default:
			out = append(out, name)
		}
	}
	return out
}

// The decoder's messages (go.yaml.in/yaml/v3, decode.go).
var (
	reCannot     = regexp.MustCompile("^line ([0-9]+): cannot unmarshal (!![a-z]+)(?: `(.*)`)? into (.+)$")
	reUnknown    = regexp.MustCompile(`^line ([0-9]+): field (.+) not found in type (.+)$`)
	reDuplicate  = regexp.MustCompile(`^line ([0-9]+): mapping key (".*") already defined at line ([0-9]+)$`)
	reAlreadySet = regexp.MustCompile(`^line ([0-9]+): field (.+) already set in type (.+)$`)
)

// translateYAMLError records one decoder message at the field it is about.
// A message it cannot place is kept as the decoder wrote it.
func translateYAMLError(p *problems, msg string, types map[string]reflect.Type) {
	line := func(s string) int { n, _ := strconv.Atoi(s); return n }
	if m := reCannot.FindStringSubmatch(msg); m != nil {
		if at, ok := p.index.findValue(line(m[1]), m[2], m[3], m[4]); ok {
			p.add(at.path, "%s", typeAdvice(at, m[4], types))
			return
		}
	}
	if m := reUnknown.FindStringSubmatch(msg); m != nil {
		if at, ok := p.index.findKey(line(m[1]), m[2]); ok {
			known := ""
			if t := types[m[3]]; t != nil {
				known = "; the fields here are " + strings.Join(yamlFields(t), ", ")
			}
			p.add(at.path, "is not a known field (check the spelling against the README of the examples)%s", known)
			return
		}
	}
	if m := reDuplicate.FindStringSubmatch(msg); m != nil {
		key, _ := strconv.Unquote(m[2])
		if at, ok := p.index.findKey(line(m[1]), key); ok && at.key != nil {
			// At the repeat itself: the path alone would place it at the
			// first of the two, which the message names as the other.
			p.addAt(at.path, at.key.Line, at.key.Column, "given twice (also at line %s); keep one", m[3])
			return
		}
	}
	if m := reAlreadySet.FindStringSubmatch(msg); m != nil {
		if at, ok := p.index.findKey(line(m[1]), m[2]); ok {
			p.add(at.path, "given twice; keep one")
			return
		}
	}
	p.add("", "%s", msg)
}

// findKey finds the mapping key name written on line.
func (ix *docIndex) findKey(line int, name string) (nodeAt, bool) {
	n, ok := ix.keys[keyAt{line, name}]
	return n, ok
}

// findValue finds the value on line that the decoder could not read into
// Go type into: of the tag it names, for a scalar starting with the text it
// quotes (cut to seven characters and "..." when long), and, among several
// such (a flow mapping holds several values on one line), the one that
// decodes into that type.
func (ix *docIndex) findValue(line int, tag, text, into string) (nodeAt, bool) {
	var match []nodeAt
	for _, n := range ix.vals[line] {
		if n.val.ShortTag() != tag {
			continue
		}
		if prefix, cut := strings.CutSuffix(text, "..."); n.val.Kind != yaml.ScalarNode ||
			n.val.Value == text || (cut && len(n.val.Value) > 10 && strings.HasPrefix(n.val.Value, prefix)) {
			match = append(match, n)
		}
	}
	for _, n := range match {
		if n.into != nil && strings.TrimPrefix(n.into.String(), "*") == strings.TrimPrefix(into, "*") {
			return n, true
		}
	}
	if len(match) > 0 {
		return match[0], true
	}
	return nodeAt{}, false
}

// typeAdvice says what was written where the decoder wanted a value of Go
// type into, and how to write it.
func typeAdvice(at nodeAt, into string, types map[string]reflect.Type) string {
	v := at.val
	given := fmt.Sprintf("%q", v.Value)
	switch v.Kind {
	case yaml.SequenceNode:
		given = "a list"
	case yaml.MappingNode:
		given = "a group of fields"
	}
	name := at.path
	if name == "" {
		name = "the file"
	}
	switch into = strings.TrimPrefix(into, "*"); {
	case into == "bool":
		return given + " is not a yes-or-no value; write true or false"
	case strings.HasPrefix(into, "int") || strings.HasPrefix(into, "uint"):
		return given + " is not a whole number; write it in digits, e.g. 2"
	case into == "string":
		return given + " is given where one value belongs; write a single value (quote it if it holds a colon, brackets or braces)"
	case into == "[]string" && v.Kind == yaml.ScalarNode:
		return fmt.Sprintf("%s is given where a list belongs; write a list, e.g. [%s]", given, v.Value)
	case strings.HasPrefix(into, "[]"):
		return given + " is given where a list belongs; write a list in brackets, e.g. [a, b], or one entry per line starting with -"
	case strings.HasPrefix(into, "map["):
		return given + " is given where one entry per resistor position belongs; write e.g. R1: {value: 10k, tolerance: 0.1%, tcr: 25ppm/K} on an indented line below"
	}
	if t := types[into]; t != nil {
		fields := yamlFields(t)
		if name == "the file" {
			return fmt.Sprintf("is %s, not a mapping of fields; write one field per line (%s)", given, strings.Join(fields, ", "))
		}
		eg := ""
		if v.Kind == yaml.ScalarNode && len(fields) > 0 {
			eg = fmt.Sprintf(", e.g. {%s: %s}", fields[0], v.Value)
		}
		return fmt.Sprintf("%s is given where a group of fields belongs; %s takes %s, written as {field: value, ...} or on indented lines below%s",
			given, name, strings.Join(fields, ", "), eg)
	}
	return fmt.Sprintf("%s cannot be read here (the decoder wanted %s); see the layout in the README of the examples", given, into)
}
