package importers

import (
	"bufio"
	"bytes"
	"fmt"
	"io"
	"reflect"

	"plumb/catalog"
)

// looksJSON reports whether the text ahead of br starts, after a byte-order
// mark and white space, with '{': the catalog's own JSON export rather than
// a CSV file.
func looksJSON(br *bufio.Reader) bool {
	head, _ := br.Peek(512)
	head = bytes.TrimPrefix(head, []byte{0xEF, 0xBB, 0xBF})
	head = bytes.TrimLeft(head, " \t\r\n")
	return len(head) > 0 && head[0] == '{'
}

// snapshot reads the catalog's own JSON export (catalog.ReadSnapshotJSON,
// which checks its format, schema and every part) and hands its parts
// over as they are, with this import's provenance.
func (sc *scan) snapshot(name string, in io.Reader) error {
	snap, err := catalog.ReadSnapshotJSON(in)
	if err != nil {
		return &ParseError{File: name, Err: fmt.Errorf("%w; give a file written by `plumb catalog export --format json`", err)}
	}
	source := sc.opt.Source
	if source == "" {
		source = baseName(name)
	}
	prov := catalog.Provenance{Source: source, ImportedAt: sc.opt.Now}
	fr := FileReport{File: name, Kind: "snapshot", Rows: snap.Len()}
	sc.rows += snap.Len()
	seen := func(kind catalog.Kind, part string) bool {
		key := string(kind) + "|" + part
		if first, dup := sc.seen[key]; dup {
			sc.rep.Problems = append(sc.rep.Problems, newProblem(Skip, &ParseError{File: name, Line: 1, Raw: part,
				Err: fmt.Errorf("%w: already read at %s:%d; this part is left out", ErrDuplicate, first.file, first.line)}, part))
			return true
		}
		sc.seen[key] = origin{name, 1}
		return false
	}
	if err := addParts(sc, snap.ResistorSeries, &sc.chunk.Series, catalog.KindSeries, prov, seen); err != nil {
		return err
	}
	if err := addParts(sc, snap.Resistors, &sc.chunk.Resistors, catalog.KindResistor, prov, seen); err != nil {
		return err
	}
	if err := addParts(sc, snap.Networks, &sc.chunk.Networks, catalog.KindNetwork, prov, seen); err != nil {
		return err
	}
	if err := addParts(sc, snap.Amplifiers, &sc.chunk.Amplifiers, catalog.KindAmplifier, prov, seen); err != nil {
		return err
	}
	if err := addParts(sc, snap.References, &sc.chunk.References, catalog.KindReference, prov, seen); err != nil {
		return err
	}
	if snap.Len() == 0 {
		return &ParseError{File: name, Err: fmt.Errorf("%w: the snapshot holds no parts", ErrNoRows)}
	}
	sc.rep.Files = append(sc.rep.Files, fr)
	return sc.flush()
}

// addParts appends the parts not seen before to the chunk's list dst,
// stamped with prov, flushing full chunks.
func addParts[T any](sc *scan, parts []T, dst *[]T, kind catalog.Kind, prov catalog.Provenance, seen func(catalog.Kind, string) bool) error {
	for _, p := range parts {
		v := reflect.ValueOf(&p).Elem()
		if !seen(kind, v.FieldByName("Part").String()) {
			v.FieldByName("Provenance").Set(reflect.ValueOf(prov))
			*dst = append(*dst, p)
		}
		if sc.chunk.Len()+len(sc.chunk.Series) >= ChunkRows {
			if err := sc.flush(); err != nil {
				return err
			}
		}
	}
	return nil
}
