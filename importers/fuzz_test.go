package importers

import (
	"bytes"
	"context"
	"encoding/csv"
	"errors"
	"io"
	"os"
	"reflect"
	"testing"

	"plumb/catalog"
)

func addFixtureSeeds(f *testing.F) {
	for _, name := range append(fourShapes, "testdata/networks.csv", "testdata/amplifiers.csv", "testdata/bad_rows.csv", "testdata/binary.csv") {
		b, err := os.ReadFile(name)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(b)
	}
}

// FuzzReadRecords reads any input as an export, writes the records back
// with encoding/csv and reads them again: the same records must come back
// (the round trip encoding/csv's own fuzz test makes), and nothing panics
// or runs past the limits.
func FuzzReadRecords(f *testing.F) {
	addFixtureSeeds(f)
	f.Fuzz(func(t *testing.T, data []byte) {
		first, sep, ok := readAll(t, data, 0)
		if !ok {
			return
		}
		// csv writes a lone empty field as a blank line, which readers skip.
		first = dropBlank(first)
		allBlank := true
		for _, r := range first {
			allBlank = allBlank && blankRecord(r)
		}
		if allBlank {
			return // a file of blank fields reads as empty
		}
		// Written back as plumb writes every CSV (catalog.SpreadsheetSafe
		// per cell), whose leading apostrophe the reader drops again: a
		// cell read as two apostrophes is written as three.
		safe := make([][]string, len(first))
		for i, r := range first {
			safe[i] = make([]string, len(r))
			for j, c := range r {
				safe[i][j] = catalog.SpreadsheetSafe(c)
			}
		}
		var buf bytes.Buffer
		w := csv.NewWriter(&buf)
		w.Comma = sep
		if err := w.WriteAll(safe); err != nil {
			return // not representable (a separator that csv cannot write)
		}
		if notText(buf.Bytes()) != "" {
			return // the control-character share is a heuristic and can tip over
		}
		second, _, ok := readAll(t, buf.Bytes(), sep)
		if !ok {
			t.Fatalf("records written back cannot be read: %q", buf.Bytes())
		}
		if second = dropBlank(second); !reflect.DeepEqual(first, second) {
			t.Fatalf("round trip changed the records:\n%q\n%q", first, second)
		}
	})
}

func readAll(t *testing.T, data []byte, sep rune) ([][]string, rune, bool) {
	r, err := newReader("fuzz.csv", bytes.NewReader(data), sep)
	if err != nil {
		var pe *ParseError
		if !errors.As(err, &pe) || pe.File != "fuzz.csv" {
			t.Fatalf("error without the file: %v", err)
		}
		return nil, 0, false
	}
	recs := [][]string{append([]string(nil), r.Header()...)}
	for n := 0; ; n++ {
		rec, _, err := r.Read()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			return nil, 0, false
		}
		if len(rec) > MaxColumns {
			t.Fatalf("record of %d fields passed the cap", len(rec))
		}
		recs = append(recs, append([]string(nil), rec...))
	}
	// Header cells are trimmed; compare like with like.
	for i := range recs[1:] {
		for j := range recs[i+1] {
			recs[i+1][j] = cleanCell(recs[i+1][j])
		}
	}
	return recs, r.Shape().Separator, r.Shape().Encoding == "UTF-8"
}

// FuzzImportRows runs the whole row parser (mapping guess, units, prices,
// grouping) on any input: no panic, and every problem names the file.
func FuzzImportRows(f *testing.F) {
	addFixtureSeeds(f)
	f.Fuzz(func(t *testing.T, data []byte) {
		b := &Batch{}
		opt := Options{Preview: -1}
		sc, err := newScan(context.Background(), []string{"fuzz.csv"}, &opt, func(c *Batch) error {
			b.Resistors = append(b.Resistors, c.Resistors...)
			return nil
		})
		if err != nil {
			t.Fatal(err)
		}
		rep := sc.rep
		err = sc.stream("fuzz.csv", bytes.NewReader(data))
		var pe *ParseError
		if err != nil && (!errors.As(err, &pe) || pe.File != "fuzz.csv") {
			t.Fatalf("error without the file: %v", err)
		}
		for _, p := range rep.Problems {
			if p.File != "fuzz.csv" || p.Reason == "" {
				t.Fatalf("problem without file or reason: %+v", p)
			}
		}
		for _, r := range b.Resistors {
			if !(r.ValueOhm > 0) || !(r.Tolerance > 0) {
				t.Fatalf("resistor with impossible figures kept: %+v", r)
			}
		}
	})
}

func dropBlank(recs [][]string) [][]string {
	out := recs[:0]
	for _, r := range recs {
		if len(r) != 1 || r[0] != "" {
			out = append(out, r)
		}
	}
	return out
}
