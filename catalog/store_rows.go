package catalog

import (
	"context"
	"database/sql"
	"fmt"
	"math"

	"plumb/catalog/eseries"
)

// ResistorQuery selects the resistor rows a search can use: values inside
// a window, tolerances below a bound, optionally a currency and stock on
// hand. Zero fields do not filter.
type ResistorQuery struct {
	// MinOhm and MaxOhm bound the value, inclusive (MaxOhm 0: no bound).
	MinOhm, MaxOhm float64
	// BelowTolerance leaves out rows whose tolerance is at or above it
	// (fraction; 0: none).
	BelowTolerance float64
	// Currency keeps only parts priced wholly in this ISO 4217 code.
	Currency string
	// InStock leaves out parts whose stock is 0 (unknown stock, -1, stays).
	InStock bool
}

// ResistorRow is one orderable resistor value as EachResistor streams it:
// a resistor row, or one value of a series. The row and its PriceBreaks
// slice are reused for the next row: copy what must outlive the callback.
// The grade's strings are shared between rows (interned), so they may be
// kept.
type ResistorRow struct {
	Part     string
	ValueOhm float64
	Grade    ResistorGrade
	Offer    Offer
}

// ResistorSource streams resistor rows; a *Store reads them from SQLite
// with an indexed query, a *Snapshot from memory.
type ResistorSource interface {
	EachResistor(ctx context.Context, q ResistorQuery, fn func(*ResistorRow) error) error
}

var (
	_ ResistorSource = (*Store)(nil)
	_ ResistorSource = (*Snapshot)(nil)
)

// keep reports whether a row passes the query.
func (q *ResistorQuery) keep(v float64, g *ResistorGrade, o *Offer) bool {
	if v < q.MinOhm || (q.MaxOhm > 0 && v > q.MaxOhm) {
		return false
	}
	if q.BelowTolerance > 0 && !(g.Tolerance < q.BelowTolerance) {
		return false
	}
	if q.InStock && o.Stock == 0 {
		return false
	}
	if q.Currency != "" {
		for _, b := range o.PriceBreaks {
			if b.Currency != q.Currency {
				return false
			}
		}
	}
	return true
}

// eachSeriesValue calls fn with every value of the series inside the
// query's window (IEC 60063 values from eseries).
func eachSeriesValue(ctx context.Context, series []ResistorSeries, q *ResistorQuery, row *ResistorRow, fn func(*ResistorRow) error) error {
	for i := range series {
		rs := &series[i]
		es, err := eseries.ByName(rs.ESeries)
		if err != nil {
			return fmt.Errorf("catalog: series %s: %w", rs.Part, err)
		}
		lo, hi := math.Max(rs.MinOhm, q.MinOhm), rs.MaxOhm
		if q.MaxOhm > 0 {
			hi = math.Min(hi, q.MaxOhm)
		}
		if lo > hi || !q.keep(lo, &rs.ResistorGrade, &rs.Offer) {
			continue
		}
		if err := ctx.Err(); err != nil {
			return err
		}
		row.Grade, row.Offer = rs.ResistorGrade, rs.Offer
		for _, v := range es.Values(lo, hi) {
			row.Part, row.ValueOhm = rs.PartNumber(v), v
			if err := fn(row); err != nil {
				return err
			}
		}
	}
	return nil
}

// EachResistor calls fn with every resistor row and series value of the
// snapshot that q selects, resistor rows first.
func (s *Snapshot) EachResistor(ctx context.Context, q ResistorQuery, fn func(*ResistorRow) error) error {
	var row ResistorRow
	for i := range s.Resistors {
		r := &s.Resistors[i]
		if !q.keep(r.ValueOhm, &r.ResistorGrade, &r.Offer) {
			continue
		}
		if i%4096 == 0 {
			if err := ctx.Err(); err != nil {
				return err
			}
		}
		row.Part, row.ValueOhm, row.Grade, row.Offer = r.Part, r.ValueOhm, r.ResistorGrade, r.Offer
		if err := fn(&row); err != nil {
			return err
		}
	}
	return eachSeriesValue(ctx, s.ResistorSeries, &q, &row, fn)
}

// resistorRowsQuery selects the resistor rows of a value window with their
// price breaks, one result row per break, a part's breaks together in
// ascending quantity. The value index (resistors_value) bounds the scan to
// the window and the price_breaks primary key finds each part's breaks.
const resistorRowsQuery = `SELECT r.id, r.part, r.value_ohm, r.technology, r.package, r.tolerance, r.tcr_ppm, r.power_w,
	r.max_voltage_v, r.thermal_resistance_k_per_w, r.load_life, r.min_order, r.stock, b.min_qty, b.unit_price, b.currency
FROM resistors r INDEXED BY resistors_value CROSS JOIN price_breaks b ON b.kind = 'resistor' AND b.part_id = r.id
WHERE r.value_ohm BETWEEN ? AND ?`

// sql returns the query of the resistor rows q selects and its arguments,
// the value window first.
func (q *ResistorQuery) sql() (string, []any) {
	hi := q.MaxOhm
	if hi <= 0 {
		hi = math.MaxFloat64
	}
	query, args := resistorRowsQuery, []any{q.MinOhm, hi}
	if q.BelowTolerance > 0 {
		query += " AND r.tolerance < ?"
		args = append(args, q.BelowTolerance)
	}
	if q.InStock {
		query += " AND r.stock != 0"
	}
	return query + " ORDER BY r.value_ohm, r.id, b.min_qty", args
}

// EachResistor streams the resistor rows and series values q selects from
// the catalog in one read transaction: the resistors through an indexed
// range query with their price breaks joined, never the whole table, and
// the series (few rows) expanded in memory. Memory stays that of one row.
func (s *Store) EachResistor(ctx context.Context, q ResistorQuery, fn func(*ResistorRow) error) error {
	err := s.readTx(ctx, func(tx querier) error {
		query, args := q.sql()
		rows, err := tx.QueryContext(ctx, query, args...)
		if err != nil {
			return err
		}
		defer rows.Close()
		var (
			row                ResistorRow
			id, cur            int64 = 0, -1
			minOrder, stock    int64
			qty                int64
			pb                 PriceBreak
			part, tech, pkg, c string
		)
		intern := map[string]string{}
		in := func(s string) string {
			if v, ok := intern[s]; ok {
				return v
			}
			intern[s] = s
			return s
		}
		emit := func() error {
			if cur < 0 || !q.keep(row.ValueOhm, &row.Grade, &row.Offer) {
				return nil
			}
			return fn(&row)
		}
		// Each result row is scanned into next; a new part id emits the
		// part before it.
		var next ResistorRow
		g := &next.Grade
		var figs [5]sql.NullFloat64
		n := 0
		for rows.Next() {
			if err := rows.Scan(&id, &part, &next.ValueOhm, &tech, &pkg, &g.Tolerance, &figs[0], &figs[1], &figs[2],
				&figs[3], &figs[4], &minOrder, &stock, &qty, &pb.UnitPrice, &c); err != nil {
				return err
			}
			// NULL: a figure nobody gave, unknown (NaN).
			for i, dst := range [...]*float64{&g.TCR, &g.PowerW, &g.MaxVoltageV, &g.ThermalResistance, &g.LoadLife} {
				*dst = math.NaN()
				if figs[i].Valid {
					*dst = figs[i].Float64
				}
			}
			if id != cur {
				if err := emit(); err != nil {
					return err
				}
				if n++; n%4096 == 0 {
					if err := ctx.Err(); err != nil {
						return err
					}
				}
				cur = id
				row.Part, row.ValueOhm, row.Grade = part, next.ValueOhm, next.Grade
				row.Grade.Technology, row.Grade.Package = in(tech), in(pkg)
				row.Offer.MinOrder, row.Offer.Stock = int(minOrder), int(stock)
				row.Offer.PriceBreaks = row.Offer.PriceBreaks[:0]
			}
			pb.MinQty, pb.Currency = int(qty), in(c)
			row.Offer.PriceBreaks = append(row.Offer.PriceBreaks, pb)
		}
		if err := rows.Err(); err != nil {
			return err
		}
		if err := emit(); err != nil {
			return err
		}
		series, err := loadRows[ResistorSeries](ctx, tx, seriesTable, "max_ohm >= ? AND min_ohm <= ?", args[:2]...)
		if err != nil {
			return err
		}
		return eachSeriesValue(ctx, series, &q, &row, fn)
	})
	if err != nil {
		return fmt.Errorf("catalog: read resistors of %s: %w", s.name(), err)
	}
	return nil
}

// ScanResistorRows runs the query EachResistor runs over q's window and
// scans every column of every row into reused variables, doing nothing
// else: the bare cost of reading the candidate rows, which the search's
// benchmarks compare themselves with.
func (s *Store) ScanResistorRows(ctx context.Context, q ResistorQuery) (rows int, err error) {
	err = s.readTx(ctx, func(tx querier) error {
		query, args := q.sql()
		rs, err := tx.QueryContext(ctx, query, args...)
		if err != nil {
			return err
		}
		defer rs.Close()
		var id, mo, st, qty int64
		var v, tol, tcr, pw, mv, th, ll, price float64
		var part, tech, pkg, c string
		for rs.Next() {
			if err := rs.Scan(&id, &part, &v, &tech, &pkg, &tol, &tcr, &pw, &mv, &th, &ll, &mo, &st, &qty, &price, &c); err != nil {
				return err
			}
			rows++
		}
		return rs.Err()
	})
	if err != nil {
		return 0, fmt.Errorf("catalog: scan resistors of %s: %w", s.name(), err)
	}
	return rows, nil
}

// Networks returns every network with its price breaks.
func (s *Store) Networks(ctx context.Context) ([]Network, error) {
	snap, err := s.load(ctx, Filter{Kind: KindNetwork})
	if err != nil {
		return nil, err
	}
	return snap.Networks, nil
}

// Amplifiers returns every amplifier with its price breaks.
func (s *Store) Amplifiers(ctx context.Context) ([]Amplifier, error) {
	snap, err := s.load(ctx, Filter{Kind: KindAmplifier})
	if err != nil {
		return nil, err
	}
	return snap.Amplifiers, nil
}
