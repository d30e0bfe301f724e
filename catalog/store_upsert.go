package catalog

import (
	"context"
	"database/sql"
	"encoding/json"
	"fmt"
	"math"
	"reflect"
	"slices"
	"strconv"
	"strings"
	"time"

	"github.com/jmoiron/sqlx"
)

// maxBulkArgs bounds the parameters of one multi-row INSERT, well below
// SQLite's limit of 32766 host parameters.
const maxBulkArgs = 8000

// bulk inserts rows into one table with multi-row INSERT statements: far
// fewer statement executions than one INSERT per row, which is what makes a
// batch of 100,000 parts with their price breaks and history fast.
type bulk struct {
	ctx   context.Context
	tx    *sqlx.Tx
	head  string // "INSERT INTO t (a, b) VALUES "
	row   string // "(?, ?)"
	chunk int    // rows per full statement
	n     int    // rows pending
	args  []any
	full  *sql.Stmt
}

// newBulk prepares inserts of cols into table. A column named "kind" is
// written as the literal kind (one of the package's Kind constants, never
// user input) rather than a parameter, since it is the same on every row.
func newBulk(tx *sqlx.Tx, table string, cols []string, kind Kind) *bulk {
	marks := make([]string, len(cols))
	params := 0
	for i, c := range cols {
		if c == "kind" {
			marks[i] = "'" + string(kind) + "'"
			continue
		}
		marks[i] = "?"
		params++
	}
	return &bulk{
		tx:    tx,
		head:  "INSERT INTO " + table + " (" + strings.Join(cols, ", ") + ") VALUES ",
		row:   "(" + strings.Join(marks, ", ") + ")",
		chunk: max(1, maxBulkArgs/params),
	}
}

func (b *bulk) statement(rows int) string {
	var sb strings.Builder
	sb.Grow(len(b.head) + rows*(len(b.row)+2))
	sb.WriteString(b.head)
	for i := range rows {
		if i > 0 {
			sb.WriteString(", ")
		}
		sb.WriteString(b.row)
	}
	return sb.String()
}

// done marks the values appended to b.args since the last call as one row,
// and writes a full chunk.
func (b *bulk) done() error {
	b.n++
	if b.n < b.chunk {
		return nil
	}
	if b.full == nil {
		st, err := b.tx.PrepareContext(b.ctx, b.statement(b.chunk))
		if err != nil {
			return err
		}
		b.full = st
	}
	if _, err := b.full.ExecContext(b.ctx, b.args...); err != nil {
		return err
	}
	b.n, b.args = 0, b.args[:0]
	return nil
}

// flush writes the pending rows.
func (b *bulk) flush() error {
	if b.n > 0 {
		if _, err := b.tx.ExecContext(b.ctx, b.statement(b.n), b.args...); err != nil {
			return err
		}
	}
	b.n, b.args = 0, b.args[:0]
	return nil
}

func (b *bulk) close() {
	if b.full != nil {
		b.full.Close()
	}
}

// upsertRun is the state of one Upsert transaction.
type upsertRun struct {
	ctx     context.Context
	tx      *sqlx.Tx
	opt     UpsertOptions
	now     time.Time
	results []UpsertResult
}

// upsert is BeginUpsert, one Add and Commit: there is one way of writing.
func (s *Store) upsert(ctx context.Context, b *Batch, opt UpsertOptions) ([]UpsertResult, error) {
	if b == nil {
		return nil, nil
	}
	if err := b.Validate(); err != nil {
		return nil, fmt.Errorf("%w: nothing was written to %s; fix the part and import again", err, s.title())
	}
	us, err := s.BeginUpsert(ctx, opt)
	if err != nil {
		return nil, damaged(s.name(), err)
	}
	defer us.Rollback()
	res, err := us.Add(ctx, b)
	if err != nil {
		return nil, damaged(s.name(), err)
	}
	if err := us.Commit(); err != nil {
		return nil, damaged(s.name(), err)
	}
	return res, nil
}

func (s *Store) name() string {
	if s.label != "" {
		return s.label
	}
	if s.path == "" {
		return "(in memory)"
	}
	return s.path
}

// title names the catalog in a sentence: "catalog parts.db", or its label.
func (s *Store) title() string {
	if s.label != "" {
		return s.label
	}
	return "catalog " + s.name()
}

// provenance fills in the import's source and time where the part has none.
func (u *upsertRun) provenance(p *Provenance) {
	if p.Source == "" {
		p.Source = u.opt.Source
	}
	if p.ImportedAt.IsZero() {
		p.ImportedAt = u.now
	} else {
		p.ImportedAt = p.ImportedAt.UTC()
	}
}

func upsertKind[T any](us *UpsertSession, t *table, parts []T) error {
	if len(parts) == 0 {
		return nil
	}
	u := us.u
	k, err := us.state(t)
	if err != nil {
		return err
	}
	rows, kids, breaks, hist := k.rows, k.kids, k.breaks, k.hist
	for _, b := range []*bulk{rows, kids, breaks, hist, k.nets, k.elems} {
		if b != nil {
			b.ctx = u.ctx
		}
	}
	names := make([]string, len(parts))
	for i := range parts {
		names[i] = reflect.ValueOf(&parts[i]).Elem().FieldByIndex(t.part).String()
	}
	list, err := json.Marshal(names)
	if err != nil {
		return err
	}
	existing, err := loadRows[T](u.ctx, u.tx, t, "part IN (SELECT value FROM json_each(?))", string(list))
	if err != nil {
		return err
	}
	byPart := make(map[string]reflect.Value, len(existing))
	for i := range existing {
		v := reflect.ValueOf(&existing[i]).Elem()
		byPart[v.FieldByIndex(t.part).String()] = v
	}
	var figures []byte
	for i := range parts {
		if i%256 == 0 {
			if err := u.ctx.Err(); err != nil {
				return fmt.Errorf("stopped at %s row %d: %w", t.kind, i+1, err)
			}
		}
		p := parts[i]
		v := reflect.ValueOf(&p).Elem()
		u.provenance(v.FieldByIndex(t.prov).Addr().Interface().(*Provenance))
		res := UpsertResult{Part: names[i], Kind: t.kind}
		old, found := byPart[names[i]]
		var id int64
		switch {
		case !found:
			k.lastID++
			id = k.lastID
			res.Outcome = Added
			rows.args = t.appendArgs(rows.args, id, v)
			if err := rows.done(); err != nil {
				return fmt.Errorf("write %s: %w", t.name, err)
			}
			if t.matched != nil {
				if err := k.writeMatched(id, v.FieldByIndex(t.matched).Interface().(*MatchedNetwork)); err != nil {
					return fmt.Errorf("write the network of %s %s: %w", t.kind, names[i], err)
				}
			}
			if t.child != nil {
				for pos, x := range v.FieldByIndex(t.child.field).Interface().([]float64) {
					kids.args = append(kids.args, id, pos, x)
					if err := kids.done(); err != nil {
						return fmt.Errorf("write %s: %w", t.child.table, err)
					}
				}
			}
		default:
			id = old.FieldByIndex(t.id).Int()
			if k.seen(id) {
				res.Outcome = Repeated
				break
			}
			if u.opt.Figures != KeepFigures {
				// An export that leaves a figure out says nothing about it:
				// the catalog's stays.
				keepGiven(t, old, v)
			}
			changes, known := diffFigures(t, old, v)
			if res.Changes = changes; len(changes) > 0 {
				if u.opt.Figures == KeepFigures || known && u.opt.Figures != ReplaceFigures {
					res.Outcome = SpecChanged
					break
				}
				res.Outcome = FiguresUpdated
				res.Changes = append(res.Changes, diffOffer(t, old, v)...)
				if err := k.replaceFigures(u, t, id, old, v); err != nil {
					return fmt.Errorf("update the figures of %s %s: %w", t.kind, names[i], err)
				}
				break
			}
			if res.Changes = diffOffer(t, old, v); len(res.Changes) == 0 {
				res.Outcome = Unchanged
				break
			}
			res.Outcome = Updated
			update, err := prepare(u.ctx, u.tx, &k.update, t.updateOffer())
			if err != nil {
				return fmt.Errorf("update %s: %w", t.name, err)
			}
			drop, err := prepare(u.ctx, u.tx, &k.dropBreaks, "DELETE FROM price_breaks WHERE kind = '"+string(t.kind)+"' AND part_id = ?")
			if err != nil {
				return fmt.Errorf("update %s: %w", t.name, err)
			}
			args := t.offerArgs(v, id)
			if _, err := update.ExecContext(u.ctx, args...); err != nil {
				return fmt.Errorf("update %s %s: %w", t.kind, names[i], err)
			}
			if _, err := drop.ExecContext(u.ctx, id); err != nil {
				return fmt.Errorf("update price breaks of %s %s: %w", t.kind, names[i], err)
			}
		}
		u.results = append(u.results, res)
		if res.Outcome == Unchanged || res.Outcome == Repeated {
			continue
		}
		if res.Outcome != SpecChanged {
			for _, b := range v.FieldByIndex(t.breaks).Interface().([]PriceBreak) {
				breaks.args = append(breaks.args, id, b.MinQty, b.UnitPrice, b.Currency)
				if err := breaks.done(); err != nil {
					return fmt.Errorf("write price breaks: %w", err)
				}
			}
		}
		// An added part's figures are its row's, which are never
		// overwritten: the history row does not repeat them.
		figures = figures[:0]
		if res.Outcome != Added {
			figures = t.appendFigures(figures, v)
		}
		prov := v.FieldByIndex(t.prov).Interface().(Provenance)
		hist.args = append(hist.args, names[i], prov.Source, formatTime(prov.ImportedAt), string(res.Outcome),
			string(figures), strings.Join(res.Changes, "\n"))
		if err := hist.done(); err != nil {
			return fmt.Errorf("write history: %w", err)
		}
	}
	if err := rows.flush(); err != nil {
		return fmt.Errorf("write %s: %w", t.name, err)
	}
	if err := hist.flush(); err != nil {
		return fmt.Errorf("write history: %w", err)
	}
	if err := breaks.flush(); err != nil {
		return fmt.Errorf("write price breaks: %w", err)
	}
	if kids != nil {
		if err := kids.flush(); err != nil {
			return fmt.Errorf("write %s: %w", t.child.table, err)
		}
	}
	if err := k.flushMatched(); err != nil {
		return fmt.Errorf("write amplifier networks: %w", err)
	}
	return nil
}

// updateOffer is the UPDATE of a part's offer and provenance columns.
func (t *table) updateOffer() string {
	var set []string
	for _, c := range t.cols {
		if !c.figure {
			set = append(set, c.name+" = ?")
		}
	}
	return "UPDATE " + t.name + " SET " + strings.Join(set, ", ") + " WHERE id = ?"
}

func (t *table) offerArgs(v reflect.Value, id int64) []any {
	var args []any
	for i := range t.cols {
		if !t.cols[i].figure {
			args = append(args, columnValue(&t.cols[i], v))
		}
	}
	return append(args, id)
}

// diffFigures lists the figures of new that differ from old, as
// "name old -> new"; known is set when any of them was known in old (not
// a figure nobody gave, or a text left blank).
func diffFigures(t *table, old, new reflect.Value) (out []string, known bool) {
	for i := range t.cols {
		c := &t.cols[i]
		if !c.figure {
			continue
		}
		a, b := columnValue(c, old), columnValue(c, new)
		if a != b {
			out = append(out, c.name+" "+show(a)+" -> "+show(b))
			// A figure nobody gave is NULL; a text figure (technology,
			// package) nobody gave is blank.
			known = known || a != nil && !(c.kind == colString && a == "")
		}
	}
	if t.child != nil {
		a := old.FieldByIndex(t.child.field).Interface().([]float64)
		b := new.FieldByIndex(t.child.field).Interface().([]float64)
		if !slices.Equal(a, b) {
			out = append(out, t.child.name+" "+showFloats(a)+" -> "+showFloats(b))
			known = known || len(a) > 0
		}
	}
	if t.matched != nil {
		a := old.FieldByIndex(t.matched).Interface().(*MatchedNetwork)
		b := new.FieldByIndex(t.matched).Interface().(*MatchedNetwork)
		if !SameFigures(a, b) {
			out = append(out, "network "+showMatched(a)+" -> "+showMatched(b))
			known = known || a != nil
		}
	}
	return out, known
}

// keepGiven sets each figure new leaves unknown (NaN, a blank text, no
// child values, no matched network) to old's.
func keepGiven(t *table, old, new reflect.Value) {
	for i := range t.cols {
		c := &t.cols[i]
		if !c.figure {
			continue
		}
		f := new.FieldByIndex(c.index)
		if c.kind == colFloat && c.unknown && math.IsNaN(f.Float()) || c.kind == colString && f.String() == "" {
			f.Set(old.FieldByIndex(c.index))
		}
	}
	if t.child != nil && new.FieldByIndex(t.child.field).Len() == 0 {
		new.FieldByIndex(t.child.field).Set(old.FieldByIndex(t.child.field))
	}
	if t.matched != nil && new.FieldByIndex(t.matched).IsNil() {
		new.FieldByIndex(t.matched).Set(old.FieldByIndex(t.matched))
	}
}

// replaceFigures writes the figures (and offer) of new over the catalog row
// id, whose figures were old's: every column of the row, and the child
// values and matched network afresh. The history's "added" row, which
// reads its figures from the part, is given old's figures first, so that
// it still says what the part was when it was added.
func (k *kindState) replaceFigures(u *upsertRun, t *table, id int64, old, new reflect.Value) error {
	name := old.FieldByIndex(t.part).String()
	if _, err := u.tx.ExecContext(u.ctx, "UPDATE part_history SET figures = ? WHERE kind = ? AND part = ? AND figures = ''",
		string(t.appendFigures(nil, old)), string(t.kind), name); err != nil {
		return err
	}
	var set []string
	var args []any
	for i := range t.cols {
		set = append(set, t.cols[i].name+" = ?")
		args = append(args, columnValue(&t.cols[i], new))
	}
	if _, err := u.tx.ExecContext(u.ctx, "UPDATE "+t.name+" SET "+strings.Join(set, ", ")+" WHERE id = ?", append(args, id)...); err != nil {
		return err
	}
	if _, err := u.tx.ExecContext(u.ctx, "DELETE FROM price_breaks WHERE kind = '"+string(t.kind)+"' AND part_id = ?", id); err != nil {
		return err
	}
	if t.child != nil {
		if _, err := u.tx.ExecContext(u.ctx, "DELETE FROM "+t.child.table+" WHERE "+t.child.fk+" = ?", id); err != nil {
			return err
		}
		for pos, x := range new.FieldByIndex(t.child.field).Interface().([]float64) {
			k.kids.args = append(k.kids.args, id, pos, x)
			if err := k.kids.done(); err != nil {
				return err
			}
		}
	}
	if t.matched != nil {
		// The elements go with their network (ON DELETE CASCADE).
		if _, err := u.tx.ExecContext(u.ctx, "DELETE FROM amplifier_network_elements WHERE amplifier_id = ?", id); err != nil {
			return err
		}
		if _, err := u.tx.ExecContext(u.ctx, "DELETE FROM amplifier_networks WHERE amplifier_id = ?", id); err != nil {
			return err
		}
		return k.writeMatched(id, new.FieldByIndex(t.matched).Interface().(*MatchedNetwork))
	}
	return nil
}

// diffOffer lists the offer and source changes; a new import time alone is
// not a change.
func diffOffer(t *table, old, new reflect.Value) []string {
	var out []string
	for i := range t.cols {
		c := &t.cols[i]
		if c.figure || c.kind == colTime {
			continue
		}
		a, b := columnValue(c, old), columnValue(c, new)
		if a != b {
			out = append(out, c.name+" "+show(a)+" -> "+show(b))
		}
	}
	a := old.FieldByIndex(t.breaks).Interface().([]PriceBreak)
	b := new.FieldByIndex(t.breaks).Interface().([]PriceBreak)
	if !slices.Equal(a, b) {
		out = append(out, "price_breaks "+FormatBreaks(a)+" -> "+FormatBreaks(b))
	}
	return out
}

func show(v any) string {
	switch x := v.(type) {
	case nil:
		return "unknown"
	case float64:
		return formatFloat(x)
	case int64:
		return strconv.FormatInt(x, 10)
	case string:
		if x == "" {
			return `""`
		}
		return x
	}
	return fmt.Sprint(v)
}

func showFloats(xs []float64) string {
	s := make([]string, len(xs))
	for i, x := range xs {
		s[i] = formatFloat(x)
	}
	return "[" + strings.Join(s, " ") + "]"
}

// FormatBreaks writes a price list as "1=0.1 USD; 10=0.08 USD", the packed
// form used in change reports and the CSV export.
func FormatBreaks(bs []PriceBreak) string {
	s := make([]string, len(bs))
	for i, b := range bs {
		s[i] = strconv.Itoa(b.MinQty) + "=" + formatFloat(b.UnitPrice) + " " + b.Currency
	}
	return strings.Join(s, "; ")
}
