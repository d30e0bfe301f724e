package catalog

import (
	"context"
	"database/sql"
	"encoding/json"
	"fmt"
	"math"
	"reflect"
	"strings"
)

// An amplifier's matched network is stored in two tables (schema 3):
// amplifier_networks (one row per amplifier that has one: pins, op-amp
// nodes, tolerances) and amplifier_network_elements (one row per element).

var (
	matchedColumns = []string{"amplifier_id", "pins", "opamp_inv", "opamp_noninv", "opamp_out",
		"tolerance", "ratio_tolerance", "ratio_drift_ppm"}
	matchedElementColumns = []string{"amplifier_id", "position", "name", "ohms", "node_a", "node_b"}
)

// nullable is a figure's SQL argument: NULL when unknown.
func nullable(x float64) any {
	if math.IsNaN(x) {
		return nil
	}
	return x
}

// writeMatched queues the network n of the amplifier with row id (nothing
// when n is nil).
func (k *kindState) writeMatched(id int64, n *MatchedNetwork) error {
	if n == nil {
		return nil
	}
	k.nets.args = append(k.nets.args, id, strings.Join(n.Pins, ","), n.OpAmpInv, n.OpAmpNonInv, n.OpAmpOut,
		nullable(n.Tolerance), nullable(n.RatioTolerance), nullable(n.RatioDriftPPM))
	if err := k.nets.done(); err != nil {
		return err
	}
	for pos, e := range n.Elements {
		k.elems.args = append(k.elems.args, id, pos, e.Name, e.Ohms, e.A, e.B)
		if err := k.elems.done(); err != nil {
			return err
		}
	}
	return nil
}

// flushMatched writes the queued networks (a no-op for other tables).
func (k *kindState) flushMatched() error {
	if k.nets == nil {
		return nil
	}
	if err := k.nets.flush(); err != nil {
		return err
	}
	return k.elems.flush()
}

// attachMatched reads the networks of the amplifiers of t matching cond and
// sets the Network field of each part in parts (a slice of t's type).
func attachMatched(ctx context.Context, q querier, t *table, cond string, args []any, parts reflect.Value) error {
	sub := ""
	if cond != "" {
		sub = " WHERE amplifier_id IN (SELECT id FROM " + t.name + cond + ")"
	}
	byID := map[int64]*MatchedNetwork{}
	rows, err := q.QueryContext(ctx, "SELECT "+strings.Join(matchedColumns, ", ")+" FROM amplifier_networks"+sub, args...)
	if err != nil {
		return fmt.Errorf("catalog: read amplifier_networks: %w", err)
	}
	defer rows.Close()
	for rows.Next() {
		var id int64
		var pins string
		var tol, ratio, drift sql.NullFloat64
		n := &MatchedNetwork{}
		if err := rows.Scan(&id, &pins, &n.OpAmpInv, &n.OpAmpNonInv, &n.OpAmpOut, &tol, &ratio, &drift); err != nil {
			return fmt.Errorf("catalog: read amplifier_networks: %w", err)
		}
		if pins != "" {
			n.Pins = strings.Split(pins, ",")
		}
		n.Tolerance, n.RatioTolerance, n.RatioDriftPPM = nullFigure(tol), nullFigure(ratio), nullFigure(drift)
		byID[id] = n
	}
	if err := rows.Err(); err != nil {
		return fmt.Errorf("catalog: read amplifier_networks: %w", err)
	}
	if len(byID) == 0 {
		return nil
	}
	erows, err := q.QueryContext(ctx, "SELECT "+strings.Join(matchedElementColumns, ", ")+
		" FROM amplifier_network_elements"+sub+" ORDER BY amplifier_id, position", args...)
	if err != nil {
		return fmt.Errorf("catalog: read amplifier_network_elements: %w", err)
	}
	defer erows.Close()
	for erows.Next() {
		var id, pos int64
		var e MatchedElement
		if err := erows.Scan(&id, &pos, &e.Name, &e.Ohms, &e.A, &e.B); err != nil {
			return fmt.Errorf("catalog: read amplifier_network_elements: %w", err)
		}
		if n := byID[id]; n != nil {
			n.Elements = append(n.Elements, e)
		}
	}
	if err := erows.Err(); err != nil {
		return fmt.Errorf("catalog: read amplifier_network_elements: %w", err)
	}
	for i := range parts.Len() {
		v := parts.Index(i)
		if n := byID[v.FieldByIndex(t.id).Int()]; n != nil {
			v.FieldByIndex(t.matched).Set(reflect.ValueOf(n))
		}
	}
	return nil
}

func nullFigure(x sql.NullFloat64) float64 {
	if x.Valid {
		return x.Float64
	}
	return math.NaN()
}

// showMatched writes a network for a change report: its text form and its
// tolerances.
func showMatched(n *MatchedNetwork) string {
	if n == nil {
		return "none"
	}
	return "[" + FormatMatchedNetwork(n) + "; tolerance " + show(nullable(n.Tolerance)) +
		", ratio " + show(nullable(n.RatioTolerance)) + ", tracking " + show(nullable(n.RatioDriftPPM)) + " ppm/K]"
}

// markMatchedUnknown sets to NaN each tolerance of an amplifier's network
// that its JSON object leaves out or gives as null.
func markMatchedUnknown(amps []Amplifier, raw []map[string]json.RawMessage) {
	for i := range min(len(amps), len(raw)) {
		n := amps[i].Network
		m, ok := raw[i]["network"]
		if n == nil || !ok {
			continue
		}
		var given map[string]json.RawMessage
		if json.Unmarshal(m, &given) != nil {
			continue
		}
		for name, f := range map[string]*float64{"tolerance": &n.Tolerance, "ratio_tolerance": &n.RatioTolerance,
			"ratio_drift_ppm": &n.RatioDriftPPM} {
			if g, ok := given[name]; !ok || string(g) == "null" {
				*f = math.NaN()
			}
		}
	}
}
