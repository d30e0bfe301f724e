package importers

import (
	"context"
	"database/sql"
	"os"
	"path/filepath"
	"runtime"
	"strconv"
	"syscall"
	"testing"
	"time"

	_ "modernc.org/sqlite"

	"plumb/catalog"
)

const benchRows = 100_000

// cpuNow is the process's user+system CPU time: on a machine shared with
// other work it compares two benchmarks better than wall time.
func cpuNow() time.Duration {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}

// benchExport turns on allocation reports and writes the 100,000-row
// export the benchmarks read, with part numbers starting with prefix.
func benchExport(b *testing.B, prefix string) string {
	b.ReportAllocs()
	file := filepath.Join(b.TempDir(), "big.csv")
	writeBigExport(b, file, prefix, benchRows)
	return file
}

// reportRates reports rows per second of wall time and of CPU time.
func reportRates(b *testing.B, cpu time.Duration) {
	b.ReportMetric(float64(benchRows)*float64(b.N)/b.Elapsed().Seconds(), "rows/s")
	b.ReportMetric(float64(benchRows)*float64(b.N)/cpu.Seconds(), "rows/cpu-s")
}

// BenchmarkImport100k imports a generated 100,000-row resistor export
// (three price breaks a row, thousands separators, quoted descriptions)
// into a fresh catalog file: sniffing, mapping, parsing every value,
// validation and the store's one transaction, fed ChunkRows parts at a
// time through a catalog.UpsertSession.
func BenchmarkImport100k(b *testing.B) {
	file := benchExport(b, "BI")
	ctx := context.Background()
	var cpu time.Duration
	for i := 0; b.Loop(); i++ {
		b.StopTimer()
		st, err := catalog.Create(filepath.Join(b.TempDir(), "i"+strconv.Itoa(i)+".db"), false)
		if err != nil {
			b.Fatal(err)
		}
		b.StartTimer()
		c0 := cpuNow()
		rep, err := Import(ctx, st, []string{file}, Options{Now: testNow, Preview: -1})
		if err != nil {
			b.Fatal(err)
		}
		cpu += cpuNow() - c0
		b.StopTimer()
		if rep.Summary.Added != benchRows {
			b.Fatalf("added %d, want %d", rep.Summary.Added, benchRows)
		}
		st.Close()
		b.StartTimer()
	}
	reportRates(b, cpu)
}

// BenchmarkPlainInsert100k is the reference: the same 100,000 resistors
// and their price breaks, already parsed, inserted into the same schema
// with plain prepared statements in one transaction (no parsing, no
// validation, no history, no comparison with existing rows).
func BenchmarkPlainInsert100k(b *testing.B) {
	file := benchExport(b, "BP")
	batch, _, err := Read(context.Background(), []string{file}, Options{Now: testNow, Preview: -1})
	if err != nil || len(batch.Resistors) != benchRows {
		b.Fatalf("reading the rows: %v", err)
	}
	ctx := context.Background()
	now := testNow.Format("2006-01-02T15:04:05Z07:00")
	var cpu time.Duration
	for i := 0; b.Loop(); i++ {
		b.StopTimer()
		path := filepath.Join(b.TempDir(), "p"+strconv.Itoa(i)+".db")
		st, err := catalog.Create(path, false)
		if err != nil {
			b.Fatal(err)
		}
		st.Close()
		db, err := sql.Open("sqlite", path+"?_pragma=synchronous(NORMAL)&_txlock=immediate")
		if err != nil {
			b.Fatal(err)
		}
		b.StartTimer()
		c0 := cpuNow()
		tx, err := db.BeginTx(ctx, nil)
		if err != nil {
			b.Fatal(err)
		}
		ins, err := tx.PrepareContext(ctx, `INSERT INTO resistors (part, maker, line, value_ohm, series_part, technology,
			package, tolerance, tcr_ppm, power_w, max_voltage_v, min_order, stock, source, imported_at)
			VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`)
		if err != nil {
			b.Fatal(err)
		}
		brk, err := tx.PrepareContext(ctx, `INSERT INTO price_breaks (kind, part_id, min_qty, unit_price, currency) VALUES ('resistor', ?, ?, ?, ?)`)
		if err != nil {
			b.Fatal(err)
		}
		for _, r := range batch.Resistors {
			res, err := ins.ExecContext(ctx, r.Part, r.Maker, r.Line, r.ValueOhm, r.SeriesPart, r.Technology,
				r.Package, r.Tolerance, r.TCR, r.PowerW, r.MaxVoltageV, r.MinOrder, r.Stock, r.Source, now)
			if err != nil {
				b.Fatal(err)
			}
			id, err := res.LastInsertId()
			if err != nil {
				b.Fatal(err)
			}
			for _, p := range r.PriceBreaks {
				if _, err := brk.ExecContext(ctx, id, p.MinQty, p.UnitPrice, p.Currency); err != nil {
					b.Fatal(err)
				}
			}
		}
		ins.Close()
		brk.Close()
		if err := tx.Commit(); err != nil {
			b.Fatal(err)
		}
		cpu += cpuNow() - c0
		b.StopTimer()
		db.Close()
		b.StartTimer()
	}
	reportRates(b, cpu)
}

// BenchmarkRead100k measures the row parser alone on the same export.
func BenchmarkRead100k(b *testing.B) {
	file := benchExport(b, "BR")
	fi, err := os.Stat(file)
	if err != nil {
		b.Fatal(err)
	}
	var cpu time.Duration
	var held uint64
	for b.Loop() {
		c0 := cpuNow()
		batch, _, err := Read(context.Background(), []string{file}, Options{Now: testNow, Preview: -1})
		if err != nil {
			b.Fatal(err)
		}
		cpu += cpuNow() - c0
		b.StopTimer()
		// What stays on the heap is the parsed batch Read returns, not the
		// file: the reader streams. Import does not hold the batch at all
		// (BenchmarkImportHeap).
		runtime.GC()
		var ms runtime.MemStats
		runtime.ReadMemStats(&ms)
		held = max(held, ms.HeapAlloc)
		runtime.KeepAlive(batch)
		b.StartTimer()
	}
	reportRates(b, cpu)
	b.ReportMetric(float64(held)/float64(fi.Size()), "heap/file-bytes")
}
