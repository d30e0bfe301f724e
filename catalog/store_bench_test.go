package catalog

import (
	"context"
	"path/filepath"
	"strconv"
	"syscall"
	"testing"
	"time"
)

// cpuTime is the process's user+system CPU time: on a shared machine it
// compares two benchmarks better than wall time does.
func cpuTime() time.Duration {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}

const benchRows = 100_000

// BenchmarkUpsert100k upserts 100,000 new resistors (five price breaks
// each, with history rows) into a fresh catalog file in one batch.
func BenchmarkUpsert100k(b *testing.B) {
	b.ReportAllocs()
	batch := bigBatch(benchRows, "BU")
	ctx := context.Background()
	var cpu time.Duration
	for i := 0; b.Loop(); i++ {
		b.StopTimer()
		s, err := Create(filepath.Join(b.TempDir(), "u"+strconv.Itoa(i)+".db"), false)
		if err != nil {
			b.Fatal(err)
		}
		b.StartTimer()
		c0 := cpuTime()
		if _, err := s.Upsert(ctx, batch, UpsertOptions{Source: "bench", Now: testTime}); err != nil {
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

// BenchmarkPlainInsert100k is the reference Upsert is held to: one prepared
// INSERT per resistor row (no price breaks, no history) in one transaction.
func BenchmarkPlainInsert100k(b *testing.B) {
	b.ReportAllocs()
	batch := bigBatch(benchRows, "BP")
	ctx := context.Background()
	var cpu time.Duration
	for i := 0; b.Loop(); i++ {
		b.StopTimer()
		s, err := Create(filepath.Join(b.TempDir(), "p"+strconv.Itoa(i)+".db"), false)
		if err != nil {
			b.Fatal(err)
		}
		b.StartTimer()
		c0 := cpuTime()
		tx, err := s.db.BeginTx(ctx, nil)
		if err != nil {
			b.Fatal(err)
		}
		st, err := tx.PrepareContext(ctx, `INSERT INTO resistors (part, maker, line, value_ohm, series_part, technology,
			package, tolerance, tcr_ppm, power_w, max_voltage_v, min_order, stock, source, imported_at)
			VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`)
		if err != nil {
			b.Fatal(err)
		}
		for _, r := range batch.Resistors {
			if _, err := st.ExecContext(ctx, r.Part, r.Maker, r.Line, r.ValueOhm, r.SeriesPart, r.Technology,
				r.Package, r.Tolerance, r.TCR, r.PowerW, r.MaxVoltageV, r.MinOrder, r.Stock, "bench",
				formatTime(testTime)); err != nil {
				b.Fatal(err)
			}
		}
		st.Close()
		if err := tx.Commit(); err != nil {
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

// BenchmarkPlainInsertFull100k writes what Upsert writes for 100,000 new
// resistors (the part row, five price-break rows and a history row each)
// with one prepared single-row INSERT per row, in one transaction: the
// like-for-like reference for BenchmarkUpsert100k.
func BenchmarkPlainInsertFull100k(b *testing.B) {
	b.ReportAllocs()
	batch := bigBatch(benchRows, "BF")
	ctx := context.Background()
	var cpu time.Duration
	for i := 0; b.Loop(); i++ {
		b.StopTimer()
		s, err := Create(filepath.Join(b.TempDir(), "f"+strconv.Itoa(i)+".db"), false)
		if err != nil {
			b.Fatal(err)
		}
		b.StartTimer()
		c0 := cpuTime()
		tx, err := s.db.BeginTx(ctx, nil)
		if err != nil {
			b.Fatal(err)
		}
		part, err := tx.PrepareContext(ctx, `INSERT INTO resistors (id, part, maker, line, value_ohm, series_part, technology,
			package, tolerance, tcr_ppm, power_w, max_voltage_v, min_order, stock, source, imported_at)
			VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`)
		if err != nil {
			b.Fatal(err)
		}
		brk, err := tx.PrepareContext(ctx, `INSERT INTO price_breaks (kind, part_id, min_qty, unit_price, currency) VALUES ('resistor', ?, ?, ?, ?)`)
		if err != nil {
			b.Fatal(err)
		}
		hist, err := tx.PrepareContext(ctx, `INSERT INTO part_history (part, kind, source, imported_at, outcome, figures, changes) VALUES (?, 'resistor', ?, ?, 'added', '', '')`)
		if err != nil {
			b.Fatal(err)
		}
		at := formatTime(testTime)
		for j, r := range batch.Resistors {
			id := int64(j + 1)
			if _, err := part.ExecContext(ctx, id, r.Part, r.Maker, r.Line, r.ValueOhm, r.SeriesPart, r.Technology,
				r.Package, r.Tolerance, r.TCR, r.PowerW, r.MaxVoltageV, r.MinOrder, r.Stock, "bench", at); err != nil {
				b.Fatal(err)
			}
			for _, pb := range r.PriceBreaks {
				if _, err := brk.ExecContext(ctx, id, pb.MinQty, pb.UnitPrice, pb.Currency); err != nil {
					b.Fatal(err)
				}
			}
			if _, err := hist.ExecContext(ctx, r.Part, "bench", at); err != nil {
				b.Fatal(err)
			}
		}
		part.Close()
		brk.Close()
		hist.Close()
		if err := tx.Commit(); err != nil {
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
