package catalog

import (
	"encoding/json"
	"math"
	"reflect"
	"strconv"
	"strings"
)

// The part types write their own JSON so that an unknown figure (NaN) is
// left out, which encoding/json cannot do (it refuses NaN). Everything
// else is written as encoding/json would write it, field by field in
// declaration order; ReadSnapshotJSON reads an absent or null figure back
// as unknown.

// MarshalJSON writes the series with unknown figures left out.
func (rs ResistorSeries) MarshalJSON() ([]byte, error) { return marshalPart(reflect.ValueOf(rs)) }

// MarshalJSON writes the resistor with unknown figures left out.
func (r Resistor) MarshalJSON() ([]byte, error) { return marshalPart(reflect.ValueOf(r)) }

// MarshalJSON writes the network with unknown figures left out.
func (n Network) MarshalJSON() ([]byte, error) { return marshalPart(reflect.ValueOf(n)) }

// MarshalJSON writes the network inside a matched amplifier with unknown
// figures left out.
func (n MatchedNetwork) MarshalJSON() ([]byte, error) { return marshalPart(reflect.ValueOf(n)) }

// MarshalJSON writes the reference with unknown figures left out.
func (r Reference) MarshalJSON() ([]byte, error) { return marshalPart(reflect.ValueOf(r)) }

// MarshalJSON writes the amplifier with unknown figures left out.
func (a Amplifier) MarshalJSON() ([]byte, error) { return marshalPart(reflect.ValueOf(a)) }

func marshalPart(v reflect.Value) ([]byte, error) {
	buf := make([]byte, 0, 512)
	buf = append(buf, '{')
	buf, err := appendFields(buf, v, true)
	if err != nil {
		return nil, err
	}
	return append(buf, '}'), nil
}

func appendFields(buf []byte, v reflect.Value, first bool) ([]byte, error) {
	t := v.Type()
	for i := range t.NumField() {
		f, fv := t.Field(i), v.Field(i)
		if f.Anonymous {
			n := len(buf)
			var err error
			if buf, err = appendFields(buf, fv, first); err != nil {
				return nil, err
			}
			first = first && len(buf) == n
			continue
		}
		name, opts, _ := strings.Cut(f.Tag.Get("json"), ",")
		if name == "-" || !f.IsExported() {
			continue
		}
		if name == "" {
			name = f.Name
		}
		if fv.Kind() == reflect.Float64 && math.IsNaN(fv.Float()) {
			continue // unknown
		}
		if strings.Contains(opts, "omitempty") && emptyJSON(fv) {
			continue
		}
		buf = appendJSONKey(buf, &first, name)
		switch fv.Kind() {
		case reflect.Float64:
			buf = appendJSONFloat(buf, fv.Float())
		case reflect.Int, reflect.Int64:
			buf = strconv.AppendInt(buf, fv.Int(), 10)
		case reflect.String:
			buf = appendJSONString(buf, fv.String())
		default:
			b, err := json.Marshal(fv.Interface())
			if err != nil {
				return nil, err
			}
			buf = append(buf, b...)
		}
	}
	return buf, nil
}

// appendJSONKey appends the key of the next member of a JSON object being
// written by hand, after the comma that separates it from the one before
// unless *first (which it then clears).
func appendJSONKey(buf []byte, first *bool, name string) []byte {
	if !*first {
		buf = append(buf, ',')
	}
	*first = false
	buf = append(buf, '"')
	buf = append(buf, name...)
	return append(buf, '"', ':')
}

// emptyJSON is encoding/json's test for omitempty.
func emptyJSON(v reflect.Value) bool {
	switch v.Kind() {
	case reflect.Slice, reflect.Map, reflect.String, reflect.Array:
		return v.Len() == 0
	case reflect.Float64, reflect.Int, reflect.Int64:
		return v.IsZero()
	case reflect.Bool:
		return !v.Bool()
	case reflect.Pointer, reflect.Interface:
		return v.IsNil()
	}
	return false
}

// appendJSONFloat formats x as encoding/json does (the shortest
// representation; exponent form below 1e-6 and from 1e21).
func appendJSONFloat(buf []byte, x float64) []byte {
	abs := math.Abs(x)
	format := byte('f')
	if abs != 0 && (abs < 1e-6 || abs >= 1e21) {
		format = 'e'
	}
	n := len(buf)
	buf = strconv.AppendFloat(buf, x, format, -1, 64)
	if format == 'e' {
		// clean up e-09 to e-9
		if m := len(buf) - n; m >= 4 && buf[len(buf)-4] == 'e' && buf[len(buf)-3] == '-' && buf[len(buf)-2] == '0' {
			buf[len(buf)-2] = buf[len(buf)-1]
			buf = buf[:len(buf)-1]
		}
	}
	return buf
}

// markUnknown sets to NaN each unknown-able figure of the parts (a slice of
// t's type) whose JSON object (raw, in the same order) leaves it out or
// gives null. legacy also reads a zero as unknown in the figures where
// schema 1 wrote 0 for "unknown".
func markUnknown(t *table, parts reflect.Value, raw []map[string]json.RawMessage, legacy bool) {
	for i := range min(parts.Len(), len(raw)) {
		v := parts.Index(i)
		for j := range t.cols {
			c := &t.cols[j]
			if !c.unknown {
				continue
			}
			f := v.FieldByIndex(c.index)
			m, ok := raw[i][c.name]
			if !ok || string(m) == "null" || legacy && f.Float() == 0 && legacyZeroUnknown[c.name] {
				f.SetFloat(math.NaN())
			}
		}
	}
}

// legacyZeroUnknown names the figures schema 1 documented as "0 =
// unknown".
var legacyZeroUnknown = map[string]bool{"max_voltage_v": true, "thermal_resistance_k_per_w": true, "load_life": true}

// same compares two figures, an unknown one equal only to another unknown.
func same(a, b float64) bool { return a == b || math.IsNaN(a) && math.IsNaN(b) }

// SameGrade reports whether two grades hold the same figures, an unknown
// figure matching only an unknown one (== would never match NaN).
func SameGrade(a, b ResistorGrade) bool {
	return a.Technology == b.Technology && a.Package == b.Package && same(a.Tolerance, b.Tolerance) && same(a.TCR, b.TCR) &&
		same(a.PowerW, b.PowerW) && same(a.MaxVoltageV, b.MaxVoltageV) && same(a.ThermalResistance, b.ThermalResistance) &&
		same(a.LoadLife, b.LoadLife)
}

// SameFigures reports whether a and b are deeply equal (as reflect.DeepEqual)
// with an unknown figure (NaN) equal to another unknown one: the equality
// of catalog content.
func SameFigures(a, b any) bool {
	return sameValue(reflect.ValueOf(a), reflect.ValueOf(b))
}

func sameValue(a, b reflect.Value) bool {
	if a.IsValid() != b.IsValid() {
		return false
	}
	if !a.IsValid() {
		return true
	}
	if a.Type() != b.Type() {
		return false
	}
	switch a.Kind() {
	case reflect.Float64, reflect.Float32:
		return same(a.Float(), b.Float())
	case reflect.Struct:
		for i := range a.NumField() {
			if !sameValue(a.Field(i), b.Field(i)) {
				return false
			}
		}
		return true
	case reflect.Slice, reflect.Array:
		if a.Kind() == reflect.Slice && (a.IsNil() != b.IsNil() || a.Len() != b.Len()) {
			return false
		}
		for i := range a.Len() {
			if !sameValue(a.Index(i), b.Index(i)) {
				return false
			}
		}
		return true
	case reflect.Pointer, reflect.Interface:
		if a.IsNil() || b.IsNil() {
			return a.IsNil() == b.IsNil()
		}
		return sameValue(a.Elem(), b.Elem())
	case reflect.Map:
		if a.Len() != b.Len() {
			return false
		}
		for _, k := range a.MapKeys() {
			if !sameValue(a.MapIndex(k), b.MapIndex(k)) {
				return false
			}
		}
		return true
	}
	switch a.Kind() {
	case reflect.String:
		return a.String() == b.String()
	case reflect.Int, reflect.Int8, reflect.Int16, reflect.Int32, reflect.Int64:
		return a.Int() == b.Int()
	case reflect.Uint, reflect.Uint8, reflect.Uint16, reflect.Uint32, reflect.Uint64, reflect.Uintptr:
		return a.Uint() == b.Uint()
	case reflect.Bool:
		return a.Bool() == b.Bool()
	}
	return false
}
