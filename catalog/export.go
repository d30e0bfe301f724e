package catalog

import (
	"context"
	"fmt"
	"io"
	"math"
	"reflect"
	"strconv"
	"strings"
)

// writeCSV writes the parts of one kind: a header of the JSON field names,
// then one row per part in part-number order. Figures are SI (ohm, fraction,
// ppm/K, W, V, A, Hz), blank where a figure is unknown or an optional one
// is zero (as the JSON snapshot omits both); a network's values and an amplifier's gains are
// joined with ";"; price breaks are packed as FormatBreaks writes them.
func (s *Store) writeCSV(ctx context.Context, w io.Writer, kind Kind) error {
	var t *table
	for _, tt := range allTables {
		if tt.kind == kind {
			t = tt
		}
	}
	if t == nil {
		return fmt.Errorf("catalog: CSV export of %s: unknown kind %q: use series, resistor, network, amplifier or reference", s.name(), kind)
	}
	snap, err := s.load(ctx, Filter{Kind: kind})
	if err != nil {
		return err
	}
	var parts reflect.Value
	switch kind {
	case KindSeries:
		parts = reflect.ValueOf(snap.ResistorSeries)
	case KindResistor:
		parts = reflect.ValueOf(snap.Resistors)
	case KindNetwork:
		parts = reflect.ValueOf(snap.Networks)
	case KindReference:
		parts = reflect.ValueOf(snap.References)
	default:
		parts = reflect.ValueOf(snap.Amplifiers)
	}
	cw := NewCSVWriter(w)
	header := make([]string, 0, len(t.cols)+2)
	for _, c := range t.cols {
		header = append(header, c.name)
	}
	if t.child != nil {
		header = append(header, t.child.name)
	}
	if t.matched != nil {
		header = append(header, MatchedCSVColumns[:]...)
	}
	header = append(header, "price_breaks")
	if err := cw.Write(header); err != nil {
		return fmt.Errorf("catalog: CSV export: %w", err)
	}
	record := make([]string, len(header))
	for i := range parts.Len() {
		v := parts.Index(i)
		for j := range t.cols {
			c := &t.cols[j]
			switch x := columnValue(c, v).(type) {
			case nil:
				record[j] = "" // unknown
			case float64:
				record[j] = formatFloat(x)
				if x == 0 && c.optional {
					record[j] = ""
				}
			case int64:
				record[j] = strconv.FormatInt(x, 10)
				if x == 0 && c.optional {
					record[j] = ""
				}
			case string:
				record[j] = x
			}
		}
		k := len(t.cols)
		if t.child != nil {
			xs := v.FieldByIndex(t.child.field).Interface().([]float64)
			s := make([]string, len(xs))
			for n, x := range xs {
				s[n] = formatFloat(x)
			}
			record[k] = strings.Join(s, ";")
			k++
		}
		if t.matched != nil {
			k += copy(record[k:], matchedCSV(v.FieldByIndex(t.matched).Interface().(*MatchedNetwork)))
		}
		record[k] = FormatBreaks(v.FieldByIndex(t.breaks).Interface().([]PriceBreak))
		if err := cw.Write(record); err != nil {
			return fmt.Errorf("catalog: CSV export: %w", err)
		}
	}
	if err := cw.Flush(); err != nil {
		return fmt.Errorf("catalog: CSV export: %w", err)
	}
	return nil
}

// MatchedCSVColumns are the CSV export's columns of an amplifier's matched
// network: its text form (FormatMatchedNetwork) and its tolerances.
var MatchedCSVColumns = [4]string{"network", "network_tolerance", "network_ratio_tolerance", "network_ratio_drift_ppm"}

// matchedCSV returns the cells of MatchedCSVColumns for n: blank for no
// network and for an unknown figure.
func matchedCSV(n *MatchedNetwork) []string {
	if n == nil {
		return []string{"", "", "", ""}
	}
	cell := func(x float64) string {
		if math.IsNaN(x) {
			return ""
		}
		return formatFloat(x)
	}
	return []string{FormatMatchedNetwork(n), cell(n.Tolerance), cell(n.RatioTolerance), cell(n.RatioDriftPPM)}
}

// writeJSON writes the whole catalog as snapshot JSON, parts ordered by
// part number within each kind.
func (s *Store) writeJSON(ctx context.Context, w io.Writer) error {
	snap, err := s.Snapshot(ctx)
	if err != nil {
		return err
	}
	return WriteSnapshotJSON(w, snap)
}
