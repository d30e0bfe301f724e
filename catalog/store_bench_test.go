package catalog

import (
	"context"
	"database/sql"
	"path/filepath"
	"strconv"
	"syscall"
	"testing"
	"time"
)

const benchRows = 100_000

// cpuTime is the process's user+system CPU time: on a shared machine it
// compares two benchmarks better than wall time does.
func cpuTime() time.Duration {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}

// benchWrites times write on a fresh catalog file per iteration and
// reports rows/s (resistors per second) and CPU ns/op beside wall ns/op.
func benchWrites(b *testing.B, prefix string, write func(ctx context.Context, s *Store, batch *Snapshot) error) {
	b.ReportAllocs()
	batch := bigBatch(benchRows, prefix)
	ctx := context.Background()
	var cpu time.Duration
	for i := 0; b.Loop(); i++ {
		b.StopTimer()
		s, err := Create(filepath.Join(b.TempDir(), prefix+strconv.Itoa(i)+".db"), false)
		if err != nil {
			b.Fatal(err)
		}
		b.StartTimer()
		c0 := cpuTime()
		if err := write(ctx, s, batch); err != nil {
			b.Fatal(err)
		}
		cpu += cpuTime() - c0
		b.StopTimer()
		s.Close()
		b.StartTimer()
	}
	b.ReportMetric(float64(benchRows)*float64(b.N)/b.Elapsed().Seconds(), "rows/s")
	b.ReportMetric(float64(cpu.Nanoseconds())/float64(b.N), "cpu-ns/op")
}

// BenchmarkUpsert100k upserts 100,000 new resistors (five price breaks
// each, with history rows) into a fresh catalog file in one batch.
func BenchmarkUpsert100k(b *testing.B) {
	benchWrites(b, "BU", func(ctx context.Context, s *Store, batch *Snapshot) error {
		_, err := s.Upsert(ctx, batch, UpsertOptions{Source: "bench", Now: testTime})
		return err
	})
}

// plainInsert writes the resistors of batch with one prepared single-row
// INSERT per row in one transaction; with full it also writes each part's
// price breaks and a history row, as Upsert does.
func plainInsert(ctx context.Context, s *Store, batch *Snapshot, full bool) error {
	tx, err := s.db.BeginTx(ctx, nil)
	if err != nil {
		return err
	}
	defer tx.Rollback()
	prepare := func(q string) *sql.Stmt {
		if err != nil {
			return nil
		}
		var st *sql.Stmt
		st, err = tx.PrepareContext(ctx, q)
		return st
	}
	part := prepare(`INSERT INTO resistors (id, part, maker, line, value_ohm, series_part, technology,
		package, tolerance, tcr_ppm, power_w, max_voltage_v, min_order, stock, source, imported_at)
		VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`)
	brk := prepare(`INSERT INTO price_breaks (kind, part_id, min_qty, unit_price, currency) VALUES ('resistor', ?, ?, ?, ?)`)
	hist := prepare(`INSERT INTO part_history (part, kind, source, imported_at, outcome, figures, changes)
		VALUES (?, 'resistor', ?, ?, 'added', '', '')`)
	if err != nil {
		return err
	}
	at := formatTime(testTime)
	for j, r := range batch.Resistors {
		id := int64(j + 1)
		if _, err := part.ExecContext(ctx, id, r.Part, r.Maker, r.Line, r.ValueOhm, r.SeriesPart, r.Technology,
			r.Package, r.Tolerance, r.TCR, r.PowerW, r.MaxVoltageV, r.MinOrder, r.Stock, "bench", at); err != nil {
			return err
		}
		if !full {
			continue
		}
		for _, pb := range r.PriceBreaks {
			if _, err := brk.ExecContext(ctx, id, pb.MinQty, pb.UnitPrice, pb.Currency); err != nil {
				return err
			}
		}
		if _, err := hist.ExecContext(ctx, r.Part, "bench", at); err != nil {
			return err
		}
	}
	return tx.Commit()
}

// BenchmarkPlainInsert100k is the bare reference: one prepared INSERT per
// resistor row (no price breaks, no history) in one transaction.
func BenchmarkPlainInsert100k(b *testing.B) {
	benchWrites(b, "BP", func(ctx context.Context, s *Store, batch *Snapshot) error {
		return plainInsert(ctx, s, batch, false)
	})
}

// BenchmarkPlainInsertFull100k writes what Upsert writes for 100,000 new
// resistors (the part row, five price-break rows and a history row each)
// with one prepared single-row INSERT per row, in one transaction: the
// like-for-like reference for BenchmarkUpsert100k.
func BenchmarkPlainInsertFull100k(b *testing.B) {
	benchWrites(b, "BF", func(ctx context.Context, s *Store, batch *Snapshot) error {
		return plainInsert(ctx, s, batch, true)
	})
}

// BenchmarkSnapshot100k loads a catalog of 100,000 resistors with five
// price breaks each.
func BenchmarkSnapshot100k(b *testing.B) {
	b.ReportAllocs()
	ctx := context.Background()
	s, err := Create(filepath.Join(b.TempDir(), "s.db"), false)
	if err != nil {
		b.Fatal(err)
	}
	defer s.Close()
	if _, err := s.Upsert(ctx, bigBatch(benchRows, "BS"), UpsertOptions{Source: "bench", Now: testTime}); err != nil {
		b.Fatal(err)
	}
	for b.Loop() {
		snap, err := s.Snapshot(ctx)
		if err != nil {
			b.Fatal(err)
		}
		if len(snap.Resistors) != benchRows {
			b.Fatalf("got %d resistors, want %d", len(snap.Resistors), benchRows)
		}
	}
	b.ReportMetric(float64(benchRows)*float64(b.N)/b.Elapsed().Seconds(), "rows/s")
}
