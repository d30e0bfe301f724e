package catalog

import (
	"context"
	"database/sql"
	"encoding/json"
	"fmt"
	"math"
	"reflect"
	"strconv"
	"strings"
	"time"

	"github.com/jmoiron/sqlx"
)

// The catalog tables are mapped onto the part types by reflection once, at
// start-up: a column per scalar field, named by the field's JSON name, so
// the schema, the JSON format and the CSV export share one vocabulary.

type colKind int

const (
	colString colKind = iota
	colFloat
	colInt
	colTime // RFC 3339 text, UTC; "" for the zero time
	colList // []string stored comma-separated
)

type column struct {
	name   string
	index  []int
	kind   colKind
	figure bool // part of the part's figures (not its offer or provenance)
	// optional: zero means "not given" (the JSON field is omitempty), so the
	// CSV export leaves it blank.
	optional bool
	// unknown: the figure may be unknown (tag catalog:"unknown"): NaN in
	// Go, NULL in the table.
	unknown bool
}

// childTable holds a []float64 field of a part in its own table of
// (owner id, position, value) rows.
type childTable struct {
	field []int
	name  string // JSON name of the field
	table string
	fk    string
	col   string
}

type table struct {
	name   string
	kind   Kind
	typ    reflect.Type
	cols   []column
	child  *childTable
	id     []int
	part   []int
	offer  []int
	prov   []int
	breaks []int // Offer.PriceBreaks
	// matched is the index of an amplifier's Network field (stored in
	// amplifier_networks and amplifier_network_elements), nil elsewhere.
	matched []int
}

var (
	seriesTable    = newTable("resistor_series", KindSeries, ResistorSeries{}, nil)
	resistorTable  = newTable("resistors", KindResistor, Resistor{}, nil)
	networkTable   = newTable("networks", KindNetwork, Network{}, &childTable{table: "network_elements", fk: "network_id", col: "value_ohm", name: "values_ohm"})
	amplifierTable = newTable("amplifiers", KindAmplifier, Amplifier{}, &childTable{table: "amplifier_gains", fk: "amplifier_id", col: "gain", name: "gains"})
	referenceTable = newTable("voltage_references", KindReference, Reference{}, nil)
	allTables      = []*table{seriesTable, resistorTable, networkTable, amplifierTable, referenceTable}
)

var (
	typeTime       = reflect.TypeFor[time.Time]()
	typeOffer      = reflect.TypeFor[Offer]()
	typeProvenance = reflect.TypeFor[Provenance]()
)

func newTable(name string, kind Kind, sample any, child *childTable) *table {
	t := &table{name: name, kind: kind, typ: reflect.TypeOf(sample), child: child}
	t.walk(t.typ, nil, true)
	if t.id == nil || t.part == nil || t.offer == nil || t.prov == nil || t.breaks == nil ||
		(child != nil && child.field == nil) {
		panic("catalog: part type " + t.typ.Name() + " lacks ID, Part, Offer, Provenance or its list field")
	}
	return t
}

func (t *table) walk(typ reflect.Type, prefix []int, figure bool) {
	for i := range typ.NumField() {
		f := typ.Field(i)
		index := append(append([]int(nil), prefix...), i)
		if f.Anonymous {
			switch f.Type {
			case typeOffer:
				t.offer = index
				t.walk(f.Type, index, false)
			case typeProvenance:
				t.prov = index
				t.walk(f.Type, index, false)
			default:
				t.walk(f.Type, index, figure)
			}
			continue
		}
		name, opts, _ := strings.Cut(f.Tag.Get("json"), ",")
		if name == "-" {
			if f.Name == "ID" {
				t.id = index
			}
			continue
		}
		if f.Tag.Get("catalog") == "apart" {
			// Stored in tables of its own, by the code that owns them.
			if f.Type != reflect.TypeFor[*MatchedNetwork]() {
				panic("catalog: no storage for field " + f.Name + " of " + t.typ.Name())
			}
			t.matched = index
			continue
		}
		if f.Name == "Part" {
			t.part = index
		}
		c := column{name: name, index: index, figure: figure, optional: strings.Contains(opts, "omitempty"),
			unknown: f.Tag.Get("catalog") == "unknown"}
		switch {
		case f.Type == typeTime:
			c.kind = colTime
		case f.Type.Kind() == reflect.String:
			c.kind = colString
		case f.Type.Kind() == reflect.Float64:
			c.kind = colFloat
		case f.Type.Kind() == reflect.Int:
			c.kind = colInt
		case f.Type == reflect.TypeFor[[]string]():
			c.kind = colList
		case f.Type == reflect.TypeFor[[]PriceBreak]():
			t.breaks = index
			continue
		case f.Type == reflect.TypeFor[[]float64]() && t.child != nil && t.child.name == name:
			t.child.field = index
			continue
		default:
			panic("catalog: no column mapping for field " + f.Name + " of " + t.typ.Name())
		}
		t.cols = append(t.cols, c)
	}
}

// columnList returns "id, col1, col2, ..." for SELECT and INSERT.
func (t *table) columnList() string {
	var b strings.Builder
	b.WriteString("id")
	for _, c := range t.cols {
		b.WriteString(", ")
		b.WriteString(c.name)
	}
	return b.String()
}

// appendArgs appends the id and column values of part v (a struct value of
// t.typ) as SQL arguments.
func (t *table) appendArgs(args []any, id int64, v reflect.Value) []any {
	args = append(args, id)
	for i := range t.cols {
		args = append(args, columnValue(&t.cols[i], v))
	}
	return args
}

func columnValue(c *column, v reflect.Value) any {
	f := v.FieldByIndex(c.index)
	switch c.kind {
	case colString:
		return f.String()
	case colFloat:
		x := f.Float()
		if c.unknown && math.IsNaN(x) {
			return nil // NULL: not given
		}
		return x
	case colInt:
		return f.Int()
	case colTime:
		return formatTime(f.Interface().(time.Time))
	default: // colList
		return strings.Join(f.Interface().([]string), ",")
	}
}

func formatTime(t time.Time) string {
	if t.IsZero() {
		return ""
	}
	return t.UTC().Format(time.RFC3339Nano)
}

func parseTime(s string) (time.Time, error) {
	if s == "" {
		return time.Time{}, nil
	}
	return time.Parse(time.RFC3339Nano, s)
}

// querier is what loadRows needs of a *sqlx.DB or *sqlx.Tx.
type querier interface {
	QueryContext(ctx context.Context, query string, args ...any) (*sql.Rows, error)
	GetContext(ctx context.Context, dest any, query string, args ...any) error
}

var (
	_ querier = (*sqlx.DB)(nil)
	_ querier = (*sqlx.Tx)(nil)
)

// loadRows reads the parts of t matching where (SQL over the columns of t,
// "" for all) ordered by part number, with their price breaks and child
// values: three queries, whatever the number of rows.
func loadRows[T any](ctx context.Context, q querier, t *table, where string, args ...any) ([]T, error) {
	cond := ""
	if where != "" {
		cond = " WHERE " + where
	}
	var n int
	if err := q.GetContext(ctx, &n, "SELECT COUNT(*) FROM "+t.name+cond, args...); err != nil {
		return nil, fmt.Errorf("catalog: count %s: %w", t.name, err)
	}
	if n == 0 {
		return nil, nil
	}
	breaks, err := loadBreaks(ctx, q, t, cond, n, args)
	if err != nil {
		return nil, err
	}
	var children map[int64][]float64
	if t.child != nil {
		if children, err = loadChildren(ctx, q, t, cond, args); err != nil {
			return nil, err
		}
	}
	rows, err := q.QueryContext(ctx, "SELECT "+t.columnList()+" FROM "+t.name+cond+" ORDER BY part", args...)
	if err != nil {
		return nil, fmt.Errorf("catalog: read %s: %w", t.name, err)
	}
	defer rows.Close()
	out := make([]T, 0, n)
	dest := make([]any, len(t.cols)+1)
	scratch := make([]string, len(t.cols))
	ints := make([]int64, len(t.cols))
	nulls := make([]sql.NullFloat64, len(t.cols))
	for rows.Next() {
		out = append(out, *new(T))
		v := reflect.ValueOf(&out[len(out)-1]).Elem()
		dest[0] = v.FieldByIndex(t.id).Addr().Interface()
		for i := range t.cols {
			c := &t.cols[i]
			switch c.kind {
			case colString:
				dest[i+1] = v.FieldByIndex(c.index).Addr().Interface()
				if _, ok := dest[i+1].(*string); !ok {
					dest[i+1] = &scratch[i]
				}
			case colFloat:
				if c.unknown {
					dest[i+1] = &nulls[i]
				} else {
					dest[i+1] = v.FieldByIndex(c.index).Addr().Interface()
				}
			case colInt:
				// Scanning into an int goes through a string in
				// database/sql; into an int64 it does not.
				dest[i+1] = &ints[i]
			default:
				dest[i+1] = &scratch[i]
			}
		}
		if err := rows.Scan(dest...); err != nil {
			return nil, fmt.Errorf("catalog: read %s: %w", t.name, err)
		}
		for i := range t.cols {
			c := &t.cols[i]
			f := v.FieldByIndex(c.index)
			switch {
			case c.kind == colFloat && c.unknown:
				if nulls[i].Valid {
					f.SetFloat(nulls[i].Float64)
				} else {
					f.SetFloat(math.NaN())
				}
			case c.kind == colInt:
				f.SetInt(ints[i])
			case c.kind == colString && dest[i+1] == &scratch[i]:
				f.SetString(scratch[i])
			case c.kind == colTime:
				tm, err := parseTime(scratch[i])
				if err != nil {
					return nil, fmt.Errorf("catalog: read %s: %s: %w", t.name, c.name, err)
				}
				f.Set(reflect.ValueOf(tm))
			case c.kind == colList && scratch[i] != "":
				f.Set(reflect.ValueOf(strings.Split(scratch[i], ",")))
			}
		}
		id := v.FieldByIndex(t.id).Int()
		if b := breaks[id]; b != nil {
			v.FieldByIndex(t.breaks).Set(reflect.ValueOf(b))
		}
		if t.child != nil {
			if c := children[id]; c != nil {
				v.FieldByIndex(t.child.field).Set(reflect.ValueOf(c))
			}
		}
	}
	if err := rows.Err(); err != nil {
		return nil, fmt.Errorf("catalog: read %s: %w", t.name, err)
	}
	if t.matched != nil {
		if err := attachMatched(ctx, q, t, cond, args, reflect.ValueOf(out)); err != nil {
			return nil, err
		}
	}
	return out, nil
}

// loadBreaks returns the price breaks of the parts of t matching cond, by
// part id, each list in ascending MinQty. The lists share one backing array.
func loadBreaks(ctx context.Context, q querier, t *table, cond string, n int, args []any) (map[int64][]PriceBreak, error) {
	query := "SELECT part_id, min_qty, unit_price, currency FROM price_breaks WHERE kind = ?"
	qargs := []any{string(t.kind)}
	if cond != "" {
		query += " AND part_id IN (SELECT id FROM " + t.name + cond + ")"
		qargs = append(qargs, args...)
	}
	rows, err := q.QueryContext(ctx, query+" ORDER BY part_id, min_qty", qargs...)
	if err != nil {
		return nil, fmt.Errorf("catalog: read price breaks of %s: %w", t.name, err)
	}
	defer rows.Close()
	out := make(map[int64][]PriceBreak, n)
	all := make([]PriceBreak, 0, 5*n)
	var cur int64 = -1
	start := 0
	var currency string
	for rows.Next() {
		var id, qty int64
		var b PriceBreak
		if err := rows.Scan(&id, &qty, &b.UnitPrice, &currency); err != nil {
			return nil, fmt.Errorf("catalog: read price breaks of %s: %w", t.name, err)
		}
		b.MinQty = int(qty)
		// Most parts share a currency: reuse the previous string.
		if len(all) > 0 && all[len(all)-1].Currency == currency {
			b.Currency = all[len(all)-1].Currency
		} else {
			b.Currency = strings.Clone(currency)
		}
		if id != cur {
			if cur >= 0 {
				out[cur] = all[start:len(all):len(all)]
			}
			cur, start = id, len(all)
		}
		all = append(all, b)
	}
	if cur >= 0 {
		out[cur] = all[start:len(all):len(all)]
	}
	if err := rows.Err(); err != nil {
		return nil, fmt.Errorf("catalog: read price breaks of %s: %w", t.name, err)
	}
	return out, nil
}

func loadChildren(ctx context.Context, q querier, t *table, cond string, args []any) (map[int64][]float64, error) {
	c := t.child
	query := "SELECT " + c.fk + ", " + c.col + " FROM " + c.table
	if cond != "" {
		query += " WHERE " + c.fk + " IN (SELECT id FROM " + t.name + cond + ")"
	}
	rows, err := q.QueryContext(ctx, query+" ORDER BY "+c.fk+", position", args...)
	if err != nil {
		return nil, fmt.Errorf("catalog: read %s: %w", c.table, err)
	}
	defer rows.Close()
	out := map[int64][]float64{}
	for rows.Next() {
		var id int64
		var x float64
		if err := rows.Scan(&id, &x); err != nil {
			return nil, fmt.Errorf("catalog: read %s: %w", c.table, err)
		}
		out[id] = append(out[id], x)
	}
	if err := rows.Err(); err != nil {
		return nil, fmt.Errorf("catalog: read %s: %w", c.table, err)
	}
	return out, nil
}

// formatFloat prints a figure exactly and briefly, for change reports and CSV.
func formatFloat(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }

// appendFigures appends the JSON object of the figure columns (and list
// field) of part v: the figures as imported, for part_history. It is
// written by hand from the column list because encoding/json's reflection
// would dominate the cost of a large import.
func (t *table) appendFigures(buf []byte, v reflect.Value) []byte {
	buf = append(buf, '{')
	first := true
	key := func(name string) { buf = appendJSONKey(buf, &first, name) }
	for i := range t.cols {
		c := &t.cols[i]
		if !c.figure {
			continue
		}
		f := v.FieldByIndex(c.index)
		switch c.kind {
		case colString:
			key(c.name)
			buf = appendJSONString(buf, f.String())
		case colFloat:
			if math.IsNaN(f.Float()) {
				continue // unknown: absent, as in snapshot JSON
			}
			key(c.name)
			buf = strconv.AppendFloat(buf, f.Float(), 'g', -1, 64)
		case colInt:
			key(c.name)
			buf = strconv.AppendInt(buf, f.Int(), 10)
		case colList:
			list := f.Interface().([]string)
			if len(list) == 0 {
				continue
			}
			key(c.name)
			buf = append(buf, '[')
			for j, s := range list {
				if j > 0 {
					buf = append(buf, ',')
				}
				buf = appendJSONString(buf, s)
			}
			buf = append(buf, ']')
		}
	}
	if t.child != nil {
		key(t.child.name)
		buf = append(buf, '[')
		for j, x := range v.FieldByIndex(t.child.field).Interface().([]float64) {
			if j > 0 {
				buf = append(buf, ',')
			}
			buf = strconv.AppendFloat(buf, x, 'g', -1, 64)
		}
		buf = append(buf, ']')
	}
	if t.matched != nil {
		if n := v.FieldByIndex(t.matched).Interface().(*MatchedNetwork); n != nil {
			if b, err := n.MarshalJSON(); err == nil {
				key("network")
				buf = append(buf, b...)
			}
		}
	}
	return append(buf, '}')
}

// appendJSONString appends s as a JSON string.
func appendJSONString(buf []byte, s string) []byte {
	for i := 0; i < len(s); i++ {
		if c := s[i]; c < 0x20 || c == '"' || c == '\\' || c >= 0x80 {
			b, _ := json.Marshal(s)
			return append(buf, b...)
		}
	}
	buf = append(buf, '"')
	buf = append(buf, s...)
	return append(buf, '"')
}
