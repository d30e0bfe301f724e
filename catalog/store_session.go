package catalog

import (
	"context"
	"database/sql"
	"errors"
	"fmt"
	"strings"
	"time"

	"github.com/jmoiron/sqlx"
)

// ErrSessionDone is returned by an UpsertSession used after Commit,
// Rollback or a failed Add (which rolls the session back).
var ErrSessionDone = errors.New("catalog: upsert session already ended")

// Repeated is the outcome of a part an UpsertSession had already met in
// an earlier chunk (added, updated, unchanged or spec-changed): the copy is
// left out and nothing is written for it.
const Repeated Outcome = "repeated"

// UpsertSession is one write transaction fed in chunks: an importer that
// streams a large file hands the store a few thousand parts at a time and
// holds only that chunk in memory, while the catalog still gets all of the
// file or none of it. The prepared statements of each table are reused
// from chunk to chunk. A session is not safe for concurrent use.
//
// Within a session a part number is written once: a part already added,
// updated or compared by an earlier Add is reported Repeated and left out.
type UpsertSession struct {
	s     *Store
	where string
	u     *upsertRun
	kinds map[*table]*kindState
	ended bool
	// rebuild holds the CREATE INDEX statements of the indexes the session
	// dropped (deferIndexes), run at Commit.
	rebuild []string
}

// kindState is what a session keeps per table between chunks.
type kindState struct {
	rows, kids, breaks, hist *bulk
	nets, elems              *bulk // an amplifier's matched network
	update                   *sql.Stmt
	dropBreaks               *sql.Stmt
	// baseID is the largest id before the session: rows above it were
	// added by the session. lastID is the largest id so far.
	baseID, lastID int64
	// touched marks the ids up to baseID that the session has already
	// met, one bit each: 1 bit per catalog row, not per imported row.
	touched []uint64
}

// seen reports whether id was already met by the session and marks it.
func (k *kindState) seen(id int64) bool {
	if id > k.baseID {
		return true
	}
	w, bit := id/64, uint64(1)<<(id%64)
	if int(w) >= len(k.touched) {
		k.touched = append(k.touched, make([]uint64, int(w)+1-len(k.touched))...)
	}
	if k.touched[w]&bit != 0 {
		return true
	}
	k.touched[w] |= bit
	return false
}

// BeginUpsert starts a chunked upsert: one transaction, which Add fills
// and Commit ends. Upsert is BeginUpsert, one Add and Commit. The caller
// must end the session with Commit or Rollback (Rollback after Commit is a
// no-op, so a deferred Rollback is safe).
func (s *Store) BeginUpsert(ctx context.Context, opt UpsertOptions) (*UpsertSession, error) {
	where := s.title()
	if s.readOnly {
		return nil, fmt.Errorf("%w: %s: this process may not write the file or its folder; import into a catalog you can write, or ask its owner", ErrReadOnly, s.name())
	}
	u := &upsertRun{opt: opt, now: opt.Now.UTC()}
	if opt.Now.IsZero() {
		u.now = time.Now().UTC()
	}
	tx, err := s.db.BeginTxx(ctx, nil)
	if err != nil {
		return nil, fmt.Errorf("catalog: upsert into %s: begin: %w: if another plumb is writing to it, try again when it has finished", where, err)
	}
	u.tx = tx
	// Child rows may be flushed before their parents' chunk: check the
	// foreign keys at commit.
	if _, err := tx.ExecContext(ctx, "PRAGMA defer_foreign_keys = ON"); err != nil {
		tx.Rollback()
		return nil, fmt.Errorf("catalog: upsert into %s: %w: nothing was written", where, err)
	}
	us := &UpsertSession{s: s, where: where, u: u, kinds: map[*table]*kindState{}}
	if err := us.deferIndexes(ctx); err != nil {
		tx.Rollback()
		return nil, fmt.Errorf("catalog: upsert into %s: %w: nothing was written", where, err)
	}
	return us, nil
}

// deferIndexes drops the secondary indexes (resistor values, part
// history) of tables that are empty when the session begins, and Commit
// builds them again inside the same transaction: one index built from the
// finished table costs less than one grown by a million inserts in random
// key order, and a rollback restores a dropped index with everything else,
// so the import stays all or nothing. A table that already holds parts
// keeps its indexes (rebuilding them for a small import would cost more).
func (us *UpsertSession) deferIndexes(ctx context.Context) error {
	var xs []struct {
		Name  string `db:"name"`
		Table string `db:"tbl_name"`
		SQL   string `db:"sql"`
	}
	tx := us.u.tx
	if err := tx.SelectContext(ctx, &xs, `SELECT name, tbl_name, sql FROM sqlite_master
		WHERE type = 'index' AND sql IS NOT NULL AND tbl_name IN ('resistors', 'part_history') ORDER BY name`); err != nil {
		return fmt.Errorf("read the indexes: %w", err)
	}
	for _, x := range xs {
		var empty bool
		if err := tx.GetContext(ctx, &empty, "SELECT NOT EXISTS (SELECT 1 FROM "+x.Table+")"); err != nil {
			return fmt.Errorf("look at %s: %w", x.Table, err)
		}
		if !empty {
			continue
		}
		if _, err := tx.ExecContext(ctx, "DROP INDEX "+x.Name); err != nil {
			return fmt.Errorf("defer index %s: %w", x.Name, err)
		}
		us.rebuild = append(us.rebuild, x.SQL)
	}
	return nil
}

// Add validates b and writes its parts in the session's transaction,
// returning one result per part in batch order (series, resistors,
// networks, amplifiers, references). An invalid part, a part number twice in b, a
// database error or a cancelled ctx rolls the WHOLE session back, earlier
// chunks included, and ends it. Validation sorts each part's price breaks
// by quantity in b.
func (us *UpsertSession) Add(ctx context.Context, b *Batch) (_ []UpsertResult, err error) {
	if us.ended {
		return nil, ErrSessionDone
	}
	if b == nil {
		return nil, nil
	}
	if err := b.Validate(); err != nil {
		us.end()
		return nil, fmt.Errorf("%w: nothing was written to %s; fix the part and import again", err, us.where)
	}
	defer func() {
		if err != nil {
			us.end()
			err = us.fail(err)
		}
	}()
	u := us.u
	u.ctx = ctx
	u.results = make([]UpsertResult, 0, b.Len())
	if err := upsertKind(us, seriesTable, b.ResistorSeries); err != nil {
		return nil, err
	}
	if err := upsertKind(us, resistorTable, b.Resistors); err != nil {
		return nil, err
	}
	if err := upsertKind(us, networkTable, b.Networks); err != nil {
		return nil, err
	}
	if err := upsertKind(us, amplifierTable, b.Amplifiers); err != nil {
		return nil, err
	}
	if err := upsertKind(us, referenceTable, b.References); err != nil {
		return nil, err
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	res := u.results
	u.results = nil
	return res, nil
}

// Commit ends the session, writing every chunk added; with
// UpsertOptions.DryRun it rolls back instead.
func (us *UpsertSession) Commit() (err error) {
	if us.ended {
		return ErrSessionDone
	}
	if us.u.opt.DryRun {
		us.end()
		return nil
	}
	us.closeStatements()
	us.ended = true
	for _, q := range us.rebuild {
		if _, err := us.u.tx.Exec(q); err != nil {
			us.u.tx.Rollback()
			return us.fail(fmt.Errorf("build index: %w", err))
		}
	}
	if err := us.u.tx.Commit(); err != nil {
		us.u.tx.Rollback()
		return us.fail(fmt.Errorf("commit: %w", err))
	}
	return nil
}

// Rollback ends the session writing nothing. After Commit, or after a
// failed Add, it does nothing and returns nil.
func (us *UpsertSession) Rollback() error {
	if us.ended {
		return nil
	}
	us.end()
	return nil
}

func (us *UpsertSession) end() {
	us.closeStatements()
	us.ended = true
	us.u.tx.Rollback()
}

func (us *UpsertSession) closeStatements() {
	for _, k := range us.kinds {
		for _, b := range []*bulk{k.rows, k.kids, k.breaks, k.hist, k.nets, k.elems} {
			if b != nil {
				b.close()
			}
		}
		for _, st := range []*sql.Stmt{k.update, k.dropBreaks} {
			if st != nil {
				st.Close()
			}
		}
	}
	clear(us.kinds)
}

// fail wraps an error of a rolled-back session, with a hint when another
// writer held the lock.
func (us *UpsertSession) fail(err error) error {
	hint := ""
	if msg := err.Error(); strings.Contains(msg, "database is locked") || strings.Contains(msg, "SQLITE_BUSY") {
		hint = fmt.Sprintf("; another process held the catalog's write lock for over %s: try again when it has finished", BusyTimeout)
	}
	return fmt.Errorf("catalog: upsert into %s: %w: nothing was written%s", us.where, err, hint)
}

// state returns the table's statements and ids, preparing them on first
// use.
func (us *UpsertSession) state(t *table) (*kindState, error) {
	if k := us.kinds[t]; k != nil {
		return k, nil
	}
	u := us.u
	k := &kindState{}
	if err := u.tx.GetContext(u.ctx, &k.baseID, "SELECT COALESCE(MAX(id), 0) FROM "+t.name); err != nil {
		return nil, err
	}
	k.lastID = k.baseID
	k.rows = newBulk(u.tx, t.name, strings.Split(t.columnList(), ", "), t.kind)
	if t.child != nil {
		k.kids = newBulk(u.tx, t.child.table, []string{t.child.fk, "position", t.child.col}, t.kind)
	}
	k.breaks = newBulk(u.tx, "price_breaks", []string{"kind", "part_id", "min_qty", "unit_price", "currency"}, t.kind)
	if t.matched != nil {
		k.nets = newBulk(u.tx, "amplifier_networks", matchedColumns, t.kind)
		k.elems = newBulk(u.tx, "amplifier_network_elements", matchedElementColumns, t.kind)
	}
	k.hist = newBulk(u.tx, "part_history", []string{"part", "kind", "source", "imported_at", "outcome", "figures", "changes"}, t.kind)
	us.kinds[t] = k
	return k, nil
}

// prepare returns *st, preparing query into it on first use.
func prepare(ctx context.Context, tx *sqlx.Tx, st **sql.Stmt, query string) (*sql.Stmt, error) {
	if *st == nil {
		p, err := tx.PrepareContext(ctx, query)
		if err != nil {
			return nil, err
		}
		*st = p
	}
	return *st, nil
}
