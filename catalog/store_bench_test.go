package catalog

import (
	"context"
	"database/sql"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strconv"
	"strings"
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

// bareInserter writes resistors with one prepared single-row INSERT per
// row of each table (the part, its price breaks, a history row, as Upsert
// writes them) in one transaction: the bare reference of an import.
type bareInserter struct {
	tx              *sql.Tx
	part, brk, hist *sql.Stmt
	id              int64
}

func newBareInserter(ctx context.Context, s *Store) (*bareInserter, error) {
	tx, err := s.db.BeginTx(ctx, nil)
	if err != nil {
		return nil, err
	}
	bi := &bareInserter{tx: tx}
	for _, p := range []struct {
		st **sql.Stmt
		q  string
	}{
		{&bi.part, `INSERT INTO resistors (id, part, maker, line, value_ohm, series_part, technology, package, tolerance,
			tcr_ppm, power_w, max_voltage_v, thermal_resistance_k_per_w, load_life, min_order, stock, source, imported_at)
			VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`},
		{&bi.brk, `INSERT INTO price_breaks (kind, part_id, min_qty, unit_price, currency) VALUES ('resistor', ?, ?, ?, ?)`},
		{&bi.hist, `INSERT INTO part_history (part, kind, source, imported_at, outcome, figures, changes)
			VALUES (?, 'resistor', ?, ?, 'added', '', '')`},
	} {
		if *p.st, err = tx.PrepareContext(ctx, p.q); err != nil {
			tx.Rollback()
			return nil, err
		}
	}
	return bi, nil
}

func (bi *bareInserter) add(ctx context.Context, b *Snapshot) error {
	at := formatTime(testTime)
	for _, r := range b.Resistors {
		bi.id++
		if _, err := bi.part.ExecContext(ctx, bi.id, r.Part, r.Maker, r.Line, r.ValueOhm, r.SeriesPart, r.Technology, r.Package,
			r.Tolerance, r.TCR, r.PowerW, r.MaxVoltageV, r.ThermalResistance, r.LoadLife, r.MinOrder, r.Stock, "bench", at); err != nil {
			return err
		}
		for _, pb := range r.PriceBreaks {
			if _, err := bi.brk.ExecContext(ctx, bi.id, pb.MinQty, pb.UnitPrice, pb.Currency); err != nil {
				return err
			}
		}
		if _, err := bi.hist.ExecContext(ctx, r.Part, "bench", at); err != nil {
			return err
		}
	}
	return nil
}

// scaleChunk is chunk i of a generated per-part-priced export: rows with
// random values, grades and prices (every part its own four breaks and
// stock), part numbers in no particular order, as exports come.
func scaleChunk(i, n int) *Snapshot {
	r := rand.New(rand.NewPCG(uint64(i), 5))
	rs := make([]Resistor, n)
	for j := range rs {
		p := 0.002 + r.Float64()
		var pbs []PriceBreak
		for _, q := range []int{1, 10, 100, 1000} {
			pbs = append(pbs, PriceBreak{MinQty: q, UnitPrice: p, Currency: "USD"})
			p *= 0.7
		}
		rs[j] = Resistor{
			Part: fmt.Sprintf("GX-%08x", r.Uint32()) + strconv.Itoa(i*n+j), Maker: "Bulkmaker",
			ValueOhm: math.Round(10*math.Pow(10, 5*r.Float64())*100) / 100,
			ResistorGrade: ResistorGrade{Technology: []string{"thick-film", "thin-film", "foil"}[r.IntN(3)],
				Package: []string{"0402", "0603", "0805", "1206"}[r.IntN(4)], Tolerance: []float64{0.01, 0.001, 0.0001}[r.IntN(3)],
				TCR: []float64{100, 25, 2}[r.IntN(3)], PowerW: 0.1, MaxVoltageV: 75},
			Offer: Offer{PriceBreaks: pbs, Stock: r.IntN(100000)},
		}
	}
	return &Snapshot{Resistors: rs}
}

// importChunk is the number of parts an importer hands the store at a
// time (as importers.ChunkRows does).
const importChunk = 10_000

// BenchmarkImportScale imports 10k and 1M generated resistors, every part
// its own price breaks, through one UpsertSession fed importChunk parts at
// a time (one transaction: all or nothing), and inserts the same rows with
// bare prepared statements (part, price breaks, history) in one
// transaction into the same schema, in the same run. It reports each one's
// wall and CPU ns per row, their rate ratios (upsert/bare, target at least
// 0.5) and the
// peak resident memory of the upsert. Compare ns/row of 1M with 10k for
// linearity (target within 1.2x). PLUMB_IMPORT_ROWS (for example
// 10000,100000) picks other sizes.
func BenchmarkImportScale(b *testing.B) {
	sizes := []int{10_000, 1_000_000}
	if env := os.Getenv("PLUMB_IMPORT_ROWS"); env != "" {
		sizes = nil
		for _, f := range strings.Split(env, ",") {
			n, err := strconv.Atoi(strings.TrimSpace(f))
			if err != nil {
				b.Fatal(err)
			}
			sizes = append(sizes, n)
		}
	}
	ctx := context.Background()
	for _, n := range sizes {
		b.Run(fmt.Sprintf("rows=%d", n), func(b *testing.B) {
			b.ReportAllocs()
			// CPU time of the process (cpuTime) compares the two better
			// than wall time on a shared machine; both are reported.
			var up, bare, upCPU, bareCPU time.Duration
			var peak float64
			for i := 0; b.Loop(); i++ {
				dir := b.TempDir()
				// The upsert, chunk by chunk; generating a chunk is not timed.
				s, err := Create(filepath.Join(dir, "u.db"), false)
				if err != nil {
					b.Fatal(err)
				}
				us, err := s.BeginUpsert(ctx, UpsertOptions{Source: "bench", Now: testTime})
				if err != nil {
					b.Fatal(err)
				}
				for c := 0; c*importChunk < n; c++ {
					b.StopTimer()
					chunk := scaleChunk(c, min(importChunk, n-c*importChunk))
					b.StartTimer()
					t0, c0 := time.Now(), cpuTime()
					if _, err := us.Add(ctx, chunk); err != nil {
						b.Fatal(err)
					}
					up, upCPU = up+time.Since(t0), upCPU+cpuTime()-c0
					peak = max(peak, rssMB())
				}
				t0, c0 := time.Now(), cpuTime()
				if err := us.Commit(); err != nil {
					b.Fatal(err)
				}
				up, upCPU = up+time.Since(t0), upCPU+cpuTime()-c0
				s.Close()
				// The bare insert of the same rows.
				b.StopTimer()
				s, err = Create(filepath.Join(dir, "b.db"), false)
				if err != nil {
					b.Fatal(err)
				}
				bi, err := newBareInserter(ctx, s)
				if err != nil {
					b.Fatal(err)
				}
				for c := 0; c*importChunk < n; c++ {
					chunk := scaleChunk(c, min(importChunk, n-c*importChunk))
					t0, c0 := time.Now(), cpuTime()
					if err := bi.add(ctx, chunk); err != nil {
						b.Fatal(err)
					}
					bare, bareCPU = bare+time.Since(t0), bareCPU+cpuTime()-c0
				}
				t0, c0 = time.Now(), cpuTime()
				if err := bi.tx.Commit(); err != nil {
					b.Fatal(err)
				}
				bare, bareCPU = bare+time.Since(t0), bareCPU+cpuTime()-c0
				s.Close()
				b.StartTimer()
			}
			rows := float64(n) * float64(b.N)
			b.ReportMetric(float64(up.Nanoseconds())/rows, "upsert-ns/row")
			b.ReportMetric(float64(bare.Nanoseconds())/rows, "bare-ns/row")
			b.ReportMetric(float64(bare)/float64(up), "upsert/bare-rate")
			b.ReportMetric(float64(upCPU.Nanoseconds())/rows, "upsert-cpu-ns/row")
			b.ReportMetric(float64(bareCPU.Nanoseconds())/rows, "bare-cpu-ns/row")
			b.ReportMetric(float64(bareCPU)/float64(upCPU), "upsert/bare-cpu-rate")
			b.ReportMetric(peak, "peak-MB")
		})
	}
}

// rssMB returns the process's resident set in MB (0 where /proc is
// missing).
func rssMB() float64 {
	raw, err := os.ReadFile("/proc/self/statm")
	if err != nil {
		return 0
	}
	f := strings.Fields(string(raw))
	if len(f) < 2 {
		return 0
	}
	pages, _ := strconv.ParseFloat(f[1], 64)
	return pages * float64(os.Getpagesize()) / 1e6
}
