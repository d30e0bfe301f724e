package catalog

import (
	"context"
	"database/sql"
	"fmt"
	"reflect"
	"slices"
	"strings"
	"unicode/utf8"
)

// readTx runs f in one read transaction (a consistent view while another
// process writes).
func (s *Store) readTx(ctx context.Context, f func(q querier) error) error {
	tx, err := s.db.BeginTxx(ctx, &sql.TxOptions{ReadOnly: true})
	if err != nil {
		return damaged(s.name(), fmt.Errorf("catalog: read %s: %w", s.name(), err))
	}
	defer tx.Rollback()
	return damaged(s.name(), f(tx))
}

// where builds the SQL condition of f for table t; skip is true when the
// filter leaves the whole table out.
func (f Filter) where(t *table) (cond string, args []any, skip bool) {
	if f.Kind != "" && f.Kind != t.kind {
		return "", nil, true
	}
	resistive := f.MinOhm > 0 || f.MaxOhm > 0 || f.MaxTolerance > 0 || f.MaxTCR > 0 || f.Technology != ""
	if (t == amplifierTable || t == referenceTable) && resistive {
		return "", nil, true
	}
	var conds []string
	add := func(c string, a ...any) { conds = append(conds, c); args = append(args, a...) }
	switch t {
	case seriesTable:
		if f.MinOhm > 0 {
			add("max_ohm >= ?", f.MinOhm)
		}
		if f.MaxOhm > 0 {
			add("min_ohm <= ?", f.MaxOhm)
		}
	case resistorTable:
		if f.MinOhm > 0 {
			add("value_ohm >= ?", f.MinOhm)
		}
		if f.MaxOhm > 0 {
			add("value_ohm <= ?", f.MaxOhm)
		}
	case networkTable:
		if f.MinOhm > 0 || f.MaxOhm > 0 {
			hi := f.MaxOhm
			if hi <= 0 {
				hi = 1e300
			}
			add("EXISTS (SELECT 1 FROM network_elements e WHERE e.network_id = networks.id AND e.value_ohm BETWEEN ? AND ?)", f.MinOhm, hi)
		}
	}
	if t != amplifierTable && t != referenceTable {
		if f.MaxTolerance > 0 {
			add("tolerance <= ?", f.MaxTolerance)
		}
		if f.MaxTCR > 0 {
			add("tcr_ppm <= ?", f.MaxTCR)
		}
		if f.Technology != "" {
			add("technology = ? COLLATE NOCASE", f.Technology)
		}
	}
	if f.Package != "" {
		add("package = ? COLLATE NOCASE", f.Package)
	}
	if f.Maker != "" {
		add("maker = ? COLLATE NOCASE", f.Maker)
	}
	if f.PartLike != "" {
		add(`part LIKE ? ESCAPE '\'`, likePattern(f.PartLike))
	}
	return strings.Join(conds, " AND "), args, false
}

// likePattern turns a part pattern (* and ? wildcards, else a substring)
// into an SQL LIKE pattern.
func likePattern(p string) string {
	var b strings.Builder
	wild := strings.ContainsAny(p, "*?")
	if !wild {
		b.WriteByte('%')
	}
	for _, r := range p {
		switch r {
		case '%', '_', '\\':
			b.WriteByte('\\')
			b.WriteRune(r)
		case '*':
			b.WriteByte('%')
		case '?':
			b.WriteByte('_')
		default:
			b.WriteRune(r)
		}
	}
	if !wild {
		b.WriteByte('%')
	}
	return b.String()
}

func (s *Store) load(ctx context.Context, f Filter) (*Snapshot, error) {
	switch f.Kind {
	case "", KindSeries, KindResistor, KindNetwork, KindAmplifier, KindReference:
	default:
		return nil, fmt.Errorf("catalog: list %s: unknown kind %q: use series, resistor, network, amplifier or reference", s.name(), f.Kind)
	}
	out := &Snapshot{Format: SnapshotFormat, SchemaVersion: s.version}
	err := s.readTx(ctx, func(q querier) error {
		var err error
		if c, a, skip := f.where(seriesTable); !skip {
			if out.ResistorSeries, err = loadRows[ResistorSeries](ctx, q, seriesTable, c, a...); err != nil {
				return err
			}
		}
		if c, a, skip := f.where(resistorTable); !skip {
			if out.Resistors, err = loadRows[Resistor](ctx, q, resistorTable, c, a...); err != nil {
				return err
			}
		}
		if c, a, skip := f.where(networkTable); !skip {
			if out.Networks, err = loadRows[Network](ctx, q, networkTable, c, a...); err != nil {
				return err
			}
		}
		if c, a, skip := f.where(amplifierTable); !skip {
			if out.Amplifiers, err = loadRows[Amplifier](ctx, q, amplifierTable, c, a...); err != nil {
				return err
			}
		}
		if c, a, skip := f.where(referenceTable); !skip {
			if out.References, err = loadRows[Reference](ctx, q, referenceTable, c, a...); err != nil {
				return err
			}
		}
		return nil
	})
	if err != nil {
		return nil, fmt.Errorf("catalog: read %s: %w", s.name(), err)
	}
	return out, nil
}

func (s *Store) find(ctx context.Context, part string) (Kind, any, error) {
	part = strings.TrimSpace(part)
	var kind Kind
	var v any
	err := s.readTx(ctx, func(q querier) error {
		if rs, err := loadRows[ResistorSeries](ctx, q, seriesTable, "part = ?", part); err != nil || len(rs) > 0 {
			if len(rs) > 0 {
				kind, v = KindSeries, &rs[0]
			}
			return err
		}
		if rs, err := loadRows[Resistor](ctx, q, resistorTable, "part = ?", part); err != nil || len(rs) > 0 {
			if len(rs) > 0 {
				kind, v = KindResistor, &rs[0]
			}
			return err
		}
		if ns, err := loadRows[Network](ctx, q, networkTable, "part = ?", part); err != nil || len(ns) > 0 {
			if len(ns) > 0 {
				kind, v = KindNetwork, &ns[0]
			}
			return err
		}
		if as, err := loadRows[Amplifier](ctx, q, amplifierTable, "part = ?", part); err != nil || len(as) > 0 {
			if len(as) > 0 {
				kind, v = KindAmplifier, &as[0]
			}
			return err
		}
		if rs, err := loadRows[Reference](ctx, q, referenceTable, "part = ?", part); err != nil || len(rs) > 0 {
			if len(rs) > 0 {
				kind, v = KindReference, &rs[0]
			}
			return err
		}
		// A series value: STEM-CODE.
		i := strings.LastIndexByte(part, '-')
		if i <= 0 {
			return nil
		}
		value, ok := ParseValueCode(part[i+1:])
		if !ok {
			return nil
		}
		rs, err := loadRows[ResistorSeries](ctx, q, seriesTable, "part = ?", part[:i])
		if err != nil || len(rs) == 0 {
			return err
		}
		values, err := ExpandSeries(rs[0])
		if err != nil {
			return err
		}
		for j := range values {
			if values[j].Part == part || ValueCode(values[j].ValueOhm) == ValueCode(value) {
				kind, v = KindResistor, &values[j]
				return nil
			}
		}
		return nil
	})
	if err != nil {
		return "", nil, fmt.Errorf("catalog: find %s in %s: %w", part, s.name(), err)
	}
	if v != nil {
		return kind, v, nil
	}
	hint, err := s.closeParts(ctx, part)
	if err != nil {
		return "", nil, err
	}
	return "", nil, fmt.Errorf("%w: %s is not in %s%s", ErrNotFound, part, s.title(), hint)
}

// maxHints bounds the close part numbers named in a not-found error.
const maxHints = 3

// closeParts returns ": close part numbers: A, B" for a part that is not
// in the catalog, or a hint to list the catalog.
func (s *Store) closeParts(ctx context.Context, part string) (string, error) {
	if hint, err := s.seriesValueHint(ctx, part); hint != "" || err != nil {
		return hint, err
	}
	var parts []string
	err := s.db.SelectContext(ctx, &parts, `SELECT part FROM resistor_series UNION ALL SELECT part FROM resistors
		UNION ALL SELECT part FROM networks UNION ALL SELECT part FROM amplifiers UNION ALL SELECT part FROM voltage_references`)
	if err != nil {
		return "", fmt.Errorf("catalog: find %s in %s: %w", part, s.name(), err)
	}
	type cand struct {
		part string
		d    int
	}
	want := strings.ToUpper(part)
	limit := max(2, utf8.RuneCountInString(part)/4)
	var close []cand
	for _, p := range parts {
		up := strings.ToUpper(p)
		d := EditDistance(want, up)
		if strings.HasPrefix(up, want) || strings.HasPrefix(want, up) {
			d = min(d, 1)
		}
		if d <= limit {
			close = append(close, cand{p, d})
		}
	}
	if len(close) == 0 {
		return ": check the part number, or look for it with `plumb catalog list --part PATTERN`", nil
	}
	slices.SortFunc(close, func(a, b cand) int {
		if a.d != b.d {
			return a.d - b.d
		}
		return strings.Compare(a.part, b.part)
	})
	names := make([]string, 0, maxHints)
	for _, c := range close[:min(len(close), maxHints)] {
		names = append(names, c.part)
	}
	return ": close part numbers: " + strings.Join(names, ", "), nil
}

// seriesValueHint returns, for STEM-CODE where STEM is a resistor series
// and CODE a value it does not make (off its E-series, or outside its
// range), the series' values nearest CODE below and above: a slip of one
// E-series step is the usual mistake, and the nearest part numbers are
// what the user wants. "" when part is no such code.
func (s *Store) seriesValueHint(ctx context.Context, part string) (string, error) {
	i := strings.LastIndexByte(part, '-')
	if i <= 0 {
		return "", nil
	}
	value, ok := ParseValueCode(part[i+1:])
	if !ok {
		return "", nil
	}
	var rs []ResistorSeries
	err := s.readTx(ctx, func(q querier) error {
		var err error
		rs, err = loadRows[ResistorSeries](ctx, q, seriesTable, "part = ?", part[:i])
		return err
	})
	if err != nil || len(rs) == 0 {
		return "", err
	}
	values, err := ExpandSeries(rs[0])
	if err != nil || len(values) == 0 {
		return "", err
	}
	var below, above *Resistor
	for j := range values {
		v := &values[j]
		if v.ValueOhm <= value && (below == nil || v.ValueOhm > below.ValueOhm) {
			below = v
		}
		if v.ValueOhm >= value && (above == nil || v.ValueOhm < above.ValueOhm) {
			above = v
		}
	}
	near := make([]string, 0, 2)
	for _, v := range []*Resistor{below, above} {
		if v != nil {
			near = append(near, v.Part)
		}
	}
	return fmt.Sprintf(": series %s (%s, %s to %s) has no value %s; the nearest it makes: %s", rs[0].Part, rs[0].ESeries,
		ValueCode(rs[0].MinOhm), ValueCode(rs[0].MaxOhm), part[i+1:], strings.Join(near, ", ")), nil
}

// EditDistance is the Levenshtein distance between a and b (byte-wise):
// the fewest single-byte insertions, deletions and substitutions that turn
// one into the other. It suggests the nearest known word for a slip.
func EditDistance(a, b string) int {
	prev := make([]int, len(b)+1)
	cur := make([]int, len(b)+1)
	for j := range prev {
		prev[j] = j
	}
	for i := 1; i <= len(a); i++ {
		cur[0] = i
		for j := 1; j <= len(b); j++ {
			cost := 1
			if a[i-1] == b[j-1] {
				cost = 0
			}
			cur[j] = min(prev[j]+1, cur[j-1]+1, prev[j-1]+cost)
		}
		prev, cur = cur, prev
	}
	return prev[len(b)]
}

func (s *Store) history(ctx context.Context, part string) ([]HistoryEntry, error) {
	part = strings.TrimSpace(part)
	names := []any{part}
	// A series value's figures are those of its series; a code the series
	// does not make (a value off its E-series or outside its range) is no
	// part of it, and has no history of its own.
	if i := strings.LastIndexByte(part, '-'); i > 0 {
		if _, ok := ParseValueCode(part[i+1:]); ok {
			if _, _, err := s.find(ctx, part); err != nil {
				return nil, err
			}
			names = append(names, part[:i])
		}
	}
	q := "SELECT part, kind, source, imported_at, outcome, figures, changes FROM part_history WHERE part IN (?" +
		strings.Repeat(", ?", len(names)-1) + ") ORDER BY id"
	rows, err := s.db.QueryContext(ctx, q, names...)
	if err != nil {
		return nil, fmt.Errorf("catalog: history of %s in %s: %w", part, s.name(), err)
	}
	defer rows.Close()
	var out []HistoryEntry
	for rows.Next() {
		var e HistoryEntry
		var at, changes string
		if err := rows.Scan(&e.Part, &e.Kind, &e.Source, &at, &e.Outcome, &e.Figures, &changes); err != nil {
			return nil, fmt.Errorf("catalog: history of %s in %s: %w", part, s.name(), err)
		}
		if e.ImportedAt, err = parseTime(at); err != nil {
			return nil, fmt.Errorf("catalog: history of %s in %s: %w", part, s.name(), err)
		}
		if changes != "" {
			e.Changes = strings.Split(changes, "\n")
		}
		out = append(out, e)
	}
	if err := rows.Err(); err != nil {
		return nil, fmt.Errorf("catalog: history of %s in %s: %w", part, s.name(), err)
	}
	// An "added" row does not repeat the figures: they are the part's
	// own, never overwritten. Fill them in from the part.
	for i := range out {
		if out[i].Figures != "" {
			continue
		}
		kind, v, err := s.find(ctx, out[i].Part)
		if err != nil {
			return nil, fmt.Errorf("catalog: history of %s in %s: %w", part, s.name(), err)
		}
		for _, t := range allTables {
			if t.kind == kind {
				out[i].Figures = string(t.appendFigures(nil, reflect.ValueOf(v).Elem()))
			}
		}
	}
	if len(out) == 0 {
		if _, _, err := s.find(ctx, part); err != nil {
			return nil, err
		}
	}
	return out, nil
}

func (s *Store) stats(ctx context.Context) (Stats, error) {
	var st Stats
	err := s.readTx(ctx, func(q querier) error {
		counts := []struct {
			n     *int
			query string
		}{
			{&st.Series, "SELECT COUNT(*) FROM resistor_series"},
			{&st.Resistors, "SELECT COUNT(*) FROM resistors"},
			{&st.Networks, "SELECT COUNT(*) FROM networks"},
			{&st.Amplifiers, "SELECT COUNT(*) FROM amplifiers"},
			{&st.References, "SELECT COUNT(*) FROM voltage_references"},
			{&st.PriceBreaks, "SELECT COUNT(*) FROM price_breaks"},
			{&st.NoStock, `SELECT (SELECT COUNT(*) FROM resistor_series WHERE stock = 0) +
				(SELECT COUNT(*) FROM resistors WHERE stock = 0) + (SELECT COUNT(*) FROM networks WHERE stock = 0) +
				(SELECT COUNT(*) FROM amplifiers WHERE stock = 0) + (SELECT COUNT(*) FROM voltage_references WHERE stock = 0)`},
		}
		for _, c := range counts {
			if err := q.GetContext(ctx, c.n, c.query); err != nil {
				return err
			}
		}
		lists := []struct {
			v     *[]string
			query string
		}{
			{&st.Makers, `SELECT maker FROM resistor_series UNION SELECT maker FROM resistors
				UNION SELECT maker FROM networks UNION SELECT maker FROM amplifiers UNION SELECT maker FROM voltage_references ORDER BY 1`},
			{&st.Currencies, "SELECT DISTINCT currency FROM price_breaks ORDER BY 1"},
			{&st.Sources, `SELECT source FROM resistor_series UNION SELECT source FROM resistors
				UNION SELECT source FROM networks UNION SELECT source FROM amplifiers UNION SELECT source FROM voltage_references ORDER BY 1`},
		}
		for _, l := range lists {
			if err := sqlxSelect(ctx, q, l.v, l.query); err != nil {
				return err
			}
		}
		series, err := loadRows[ResistorSeries](ctx, q, seriesTable, "")
		if err != nil {
			return err
		}
		for _, rs := range series {
			values, err := ExpandSeries(rs)
			if err != nil {
				return err
			}
			st.SeriesValues += len(values)
		}
		return nil
	})
	if err != nil {
		return Stats{}, fmt.Errorf("catalog: statistics of %s: %w", s.name(), err)
	}
	return st, nil
}

func sqlxSelect(ctx context.Context, q querier, dest *[]string, query string) error {
	rows, err := q.QueryContext(ctx, query)
	if err != nil {
		return err
	}
	defer rows.Close()
	for rows.Next() {
		var v string
		if err := rows.Scan(&v); err != nil {
			return err
		}
		*dest = append(*dest, v)
	}
	return rows.Err()
}
