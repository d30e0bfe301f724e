package importers

import (
	"context"
	"os"
	"path/filepath"
	"runtime"
	"strconv"
	"testing"
)

// liveHeapPeak imports a generated export of n rows into a fresh catalog
// file and returns the largest live heap (runtime.MemStats.HeapAlloc right
// after a forced collection) seen at the Progress calls, sampled every
// 5000 rows and at the end, with the file's size.
func liveHeapPeak(tb testing.TB, n int) (peak uint64, fileBytes int64, rep *Report) {
	tb.Helper()
	dir := tb.TempDir()
	file := filepath.Join(dir, "heap.csv")
	writeBigExport(tb, file, "HP", n)
	fi, err := os.Stat(file)
	if err != nil {
		tb.Fatal(err)
	}
	st, _ := newCatalog(tb)
	sample := func() {
		runtime.GC()
		var ms runtime.MemStats
		runtime.ReadMemStats(&ms)
		peak = max(peak, ms.HeapAlloc)
	}
	rep, err = Import(context.Background(), st, []string{file}, Options{Now: testNow, Preview: -1, Progress: func(rows int) {
		if rows%5000 == 0 || rows == n {
			sample()
		}
	}})
	if err != nil {
		tb.Fatal(err)
	}
	return peak, fi.Size(), rep
}

// TestImportHeapIsFlat checks that an import's memory does not grow with
// the file: ten times the rows may not double the peak live heap (the
// importer streams chunks of ChunkRows into one transaction).
func TestImportHeapIsFlat(t *testing.T) {
	if testing.Short() {
		t.Skip("imports 220,000 generated rows")
	}
	small, _, repS := liveHeapPeak(t, 20_000)
	big, _, repB := liveHeapPeak(t, 200_000)
	if repS.Summary.Added != 20_000 || repB.Summary.Added != 200_000 {
		t.Fatalf("added %d and %d, want 20000 and 200000", repS.Summary.Added, repB.Summary.Added)
	}
	t.Logf("peak live heap: %.1f MB for 20,000 rows, %.1f MB for 200,000", float64(small)/1e6, float64(big)/1e6)
	if ratio := float64(big) / float64(small); ratio >= 2 {
		t.Errorf("peak live heap grew %.2fx for 10x the rows (%d -> %d bytes), want < 2x", ratio, small, big)
	}
}

// BenchmarkImportHeap reports the peak live heap of an import of 20,000
// and of 200,000 rows (see liveHeapPeak), in MB and per file byte: flat in
// the rows, where holding the whole file's parts cost about 2.9 bytes of
// heap per file byte.
func BenchmarkImportHeap(b *testing.B) {
	for _, n := range []int{20_000, 200_000} {
		b.Run(strconv.Itoa(n)+"rows", func(b *testing.B) {
			b.ReportAllocs()
			var peak uint64
			var size int64
			for b.Loop() {
				p, s, _ := liveHeapPeak(b, n)
				peak, size = max(peak, p), s
			}
			b.ReportMetric(float64(peak)/1e6, "peak-heap-MB")
			b.ReportMetric(float64(peak)/float64(size), "heap/file-bytes")
		})
	}
}
