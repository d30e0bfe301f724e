package importers

import (
	"bufio"
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"time"

	"plumb/catalog"
)

// Options steer an import. The zero value guesses everything and writes.
type Options struct {
	// Kind is the kind of part in the files; "" or "auto" guesses it from
	// each file's header.
	Kind catalog.Kind
	// Mapping, when set, is used instead of guessing the columns.
	Mapping *Mapping
	// DryRun reads, checks and compares with the catalog but writes
	// nothing.
	DryRun bool
	// Source labels where the rows came from; "" uses each file's base
	// name.
	Source string
	// Now is the import time stamped on each row; zero means time.Now().
	Now time.Time
	// Progress, when set, is called with the number of rows read so far,
	// every ProgressEvery rows and at the end of each file.
	Progress func(rows int)
	// BeforeWrite, when set, is called by Import once, when the first
	// chunk of parts has been written inside the one write transaction,
	// with the number of parts in it.
	BeforeWrite func(parts int)
	// Preview is how many parsed rows per file the report keeps (default
	// 5; negative keeps none).
	Preview int
	// Currency is the ISO 4217 code of prices that carry none in their
	// cells, headers or mapping (--currency, else import.currency in the
	// config). With none anywhere, a file with prices is refused before
	// its rows are read.
	Currency string
	// AllowUnusual keeps rows whose figures lie outside what the trade
	// makes (see plausibleGrade), flagged as doubtful, instead of
	// skipping them.
	AllowUnusual bool
	// Strict makes Import write nothing and return ErrRowsSkipped (with
	// the full report) when any row is skipped.
	Strict bool
	// Figures says what Import does with a part already in the catalog
	// whose figures differ from the file's: catalog.KeepFigures (the zero
	// value) reports it spec-changed; catalog.FillUnknown writes the
	// figures the catalog holds as unknown, and writes nothing at all
	// (ErrKnownFigures) when any part's known figures differ;
	// catalog.ReplaceFigures writes every differing figure.
	Figures catalog.FigurePolicy
}

// ProgressEvery is how often Options.Progress is called, in rows.
const ProgressEvery = 1000

// Batch is what the files held, ready for the store.
type Batch struct {
	Series     []catalog.ResistorSeries
	Resistors  []catalog.Resistor
	Networks   []catalog.Network
	Amplifiers []catalog.Amplifier
	References []catalog.Reference

	origin map[string]origin // kind|part -> where it was read
}

type origin struct {
	file string
	line int
}

// Len is the number of parts in the batch (series not counted).
func (b *Batch) Len() int {
	return len(b.Resistors) + len(b.Networks) + len(b.Amplifiers) + len(b.References)
}

func (b *Batch) reset() {
	b.Series, b.Resistors, b.Networks, b.Amplifiers = b.Series[:0], b.Resistors[:0], b.Networks[:0], b.Amplifiers[:0]
	b.References = b.References[:0]
}

// ChunkRows is how many parts an import reads before handing them to the
// store, so that its memory does not grow with the file. A run of alike
// resistor rows (a possible series) is not cut unless it reaches
// maxRunRows.
const ChunkRows = 4096

// maxRunRows bounds a run of rows held whole for series grouping. No
// series is that long: E192 over fifteen decades is 2880 values.
const maxRunRows = 4 * ChunkRows

// scan is the state of reading a set of files chunk by chunk.
type scan struct {
	ctx context.Context
	opt Options
	rep *Report
	// seen maps kind|part to where it was read. Read keeps every row's, to
	// find a part number repeated anywhere; Import only the current
	// chunk's (the store reports a part repeated across chunks).
	seen     map[string]origin
	keepSeen bool
	// emit hands a chunk over; the chunk's slices are reused afterwards.
	emit  func(*Batch) error
	chunk Batch
	rows  int
}

// flush hands the chunk over.
func (sc *scan) flush() error {
	if sc.chunk.Len()+len(sc.chunk.Series) == 0 {
		return nil
	}
	sc.rep.Summary.Parts += sc.chunk.Len() + len(sc.chunk.Series)
	sc.chunk.origin = sc.seen
	if err := sc.emit(&sc.chunk); err != nil {
		return err
	}
	sc.chunk.reset()
	if !sc.keepSeen {
		clear(sc.seen)
	}
	return nil
}

// Read reads and checks the files without touching a catalog: the parts,
// and the report of every row skipped or in doubt. It fails, for all files,
// only on a file it cannot read at all (missing, binary, empty, no column
// for the part number...); a bad row is skipped and reported. Read holds
// every part in memory; Import streams.
func Read(ctx context.Context, files []string, opt Options) (*Batch, *Report, error) {
	b := &Batch{}
	sc, err := newScan(ctx, files, &opt, func(c *Batch) error {
		b.Series = append(b.Series, c.Series...)
		b.Resistors = append(b.Resistors, c.Resistors...)
		b.Networks = append(b.Networks, c.Networks...)
		b.Amplifiers = append(b.Amplifiers, c.Amplifiers...)
		b.References = append(b.References, c.References...)
		return nil
	})
	if err != nil {
		return nil, nil, err
	}
	sc.keepSeen = true
	if err := sc.files(files); err != nil {
		return nil, nil, err
	}
	b.origin = sc.seen
	sc.finish()
	return b, sc.rep, nil
}

// newScan checks the options and sets up reading files into emit.
func newScan(ctx context.Context, files []string, opt *Options, emit func(*Batch) error) (*scan, error) {
	if len(files) == 0 {
		return nil, errors.New("importers: no file to import")
	}
	switch opt.Kind {
	case "", "auto", catalog.KindResistor, catalog.KindNetwork, catalog.KindAmplifier, catalog.KindReference:
	default:
		return nil, fmt.Errorf("%w: kind %q: use resistor, network, amplifier, reference or auto", ErrUnknownKind, opt.Kind)
	}
	if opt.Now.IsZero() {
		opt.Now = time.Now().UTC()
	}
	if opt.Preview == 0 {
		opt.Preview = 5
	}
	return &scan{ctx: ctx, opt: *opt, rep: &Report{}, seen: map[string]origin{}, emit: emit}, nil
}

func (sc *scan) files(files []string) error {
	for _, name := range files {
		if err := sc.file(name); err != nil {
			return err
		}
	}
	return nil
}

// finish sorts the problems and counts the skipped rows.
func (sc *scan) finish() {
	rep := sc.rep
	sortProblems(rep.Problems)
	rep.Summary.Rows = sc.rows
	rep.Summary.Skipped = 0
	// A row may have several problems: it is skipped once.
	type place struct {
		file string
		line int
	}
	skipped := map[place]bool{}
	for _, p := range rep.Problems {
		if p.Severity == Skip && p.Line > 0 && !skipped[place{p.File, p.Line}] {
			skipped[place{p.File, p.Line}] = true
			rep.Summary.Skipped++
		}
	}
}

func (sc *scan) file(name string) error {
	f, err := os.Open(name)
	if err != nil {
		return &ParseError{File: name, Err: fmt.Errorf("opening: %w", err)}
	}
	defer f.Close()
	br := bufio.NewReaderSize(f, sniffBytes)
	if looksJSON(br) {
		return sc.snapshot(name, br)
	}
	return sc.stream(name, br)
}

func baseName(name string) string { return filepath.Base(name) }

func (sc *scan) stream(name string, in io.Reader) error {
	ctx, opt, rep := sc.ctx, sc.opt, sc.rep
	rd, err := NewReader(name, in)
	if err != nil {
		return err
	}
	m := opt.Mapping
	kind := opt.Kind
	if kind == "auto" {
		kind = ""
	}
	if m != nil && m.Kind != "" && kind == "" {
		kind = m.Kind
	}
	if m == nil {
		if m, err = GuessMapping(rd.Header(), kind); err != nil {
			return &ParseError{File: name, Line: rd.line, Err: err}
		}
	} else {
		m = m.forFile(rd.Header())
	}
	if kind == "" {
		kind = m.Kind
	}
	if kind == "" {
		return &ParseError{File: name, Line: 1, Err: fmt.Errorf("%w: the mapping names no kind; pass --kind", ErrUnknownKind)}
	}
	cols, breaks, err := m.resolve(name, rd.Header())
	if err != nil {
		return err
	}
	breaks, otherCurrency := oneCurrency(rd.Header(), breaks)
	for _, u := range otherCurrency {
		m.Guesses = slices.DeleteFunc(m.Guesses, func(g Guess) bool { return g.Index == u.Index })
		m.PriceBreaks = slices.DeleteFunc(m.PriceBreaks, func(b BreakColumn) bool { return b.Column == u.Column })
	}
	if _, ok := cols[FieldPart]; !ok {
		return &ParseError{File: name, Line: 1, Err: fmt.Errorf("%w: no column reads as the part number (header: %s); name it in a mapping under columns: part",
			ErrMissingColumn, headerList(rd.Header()))}
	}
	if kind == catalog.KindReference {
		if _, ok := cols[FieldOutputV]; !ok && m.Fixed[FieldOutputV] == "" {
			return &ParseError{File: name, Line: 1, Err: fmt.Errorf("%w: no column reads as the output voltage (header: %s); name it in a mapping under columns: output_voltage",
				ErrMissingColumn, headerList(rd.Header()))}
		}
	}
	if kind != catalog.KindAmplifier && kind != catalog.KindSeries && kind != catalog.KindReference {
		if _, ok := cols[FieldResistance]; !ok && m.Fixed[FieldResistance] == "" {
			if _, d := cols[FieldDescription]; !d || kind == catalog.KindNetwork {
				return &ParseError{File: name, Line: 1, Err: fmt.Errorf("%w: no column reads as the resistance (header: %s); name it in a mapping under columns: resistance",
					ErrMissingColumn, headerList(rd.Header()))}
			}
		}
	}
	if kind == catalog.KindResistor || kind == catalog.KindSeries || kind == catalog.KindNetwork {
		// Every resistor needs its tolerance: without a column, a fixed
		// value or a description to find it in, every row would be skipped
		// for it, one problem per row.
		_, col := cols[FieldTolerance]
		_, desc := cols[FieldDescription]
		if !col && !desc && isBlank(m.Fixed[FieldTolerance]) {
			return &ParseError{File: name, Line: 1, Err: fmt.Errorf("%w: no column reads as the tolerance, which every %s needs (header: %s); name its column in a mapping under columns: tolerance, or give one for every row under fixed: tolerance (plumb help mapping)",
				ErrMissingColumn, kind, headerList(rd.Header()))}
		}
	}
	shape := rd.Shape()
	if m.DecimalComma != nil {
		shape.DecimalComma = *m.DecimalComma
	}
	source := opt.Source
	if source == "" {
		source = filepath.Base(name)
	}
	rr := &rowReader{file: name, header: rd.Header(), kind: kind, cols: cols, breaks: breaks, fixed: m.Fixed,
		decimalComma: shape.DecimalComma, prov: catalog.Provenance{Source: source, ImportedAt: opt.Now}}
	// The catalog's own export: figures in SI, and its single resistors
	// stay single (its series are exported on their own).
	_, rr.si = exportKind(rd.Header())
	rr.info = make([]headerInfo, len(rr.header))
	for i, h := range rr.header {
		rr.info[i] = analyseHeader(h)
	}
	if c := currencyOf(m.Fixed[FieldCurrency]); c != "" {
		rr.currency = c
	} else if c := m.Fixed[FieldCurrency]; len(c) == 3 {
		rr.currency = strings.ToUpper(c)
	} else if opt.Currency != "" {
		rr.currency = opt.Currency
	}
	rr.allowUnusual, rr.units = opt.AllowUnusual, m.Units
	// Prices with no currency anywhere: refuse the file before its rows,
	// once, instead of every row (checked on the first priced row).
	rr.checkCurrency = rr.currency == "" && !rr.si && rr.pricesLackCurrency(cols, breaks)
	fr := FileReport{File: name, Kind: kind, Shape: shape, Mapping: m,
		Unused: unusedColumns(rr.header, rr.info, kind, cols, breaks, otherCurrency)}
	if len(rd.Preamble) > 0 {
		rep.Problems = append(rep.Problems, newProblem(Info, &ParseError{File: name, Line: rd.Preamble[0],
			Err: fmt.Errorf("%d title line(s) above the header skipped; the header is line %d", len(rd.Preamble), rd.line)}, ""))
	}
	if shape.Encoding == "Windows-1252" {
		rep.Problems = append(rep.Problems, newProblem(Info, &ParseError{File: name,
			Err: errors.New("the file is not UTF-8: read as Windows-1252, the usual spreadsheet encoding; check the ± ° µ Ω signs")}, ""))
	}
	// res is the pending run of resistor rows, grouped into series when
	// it is handed over.
	var res []parsed
	group := func() error {
		if len(res) == 0 {
			return nil
		}
		series, singles, groups, notes := groupSeries(name, res)
		sc.chunk.Series = append(sc.chunk.Series, series...)
		sc.chunk.Resistors = append(sc.chunk.Resistors, singles...)
		fr.Groups = append(fr.Groups, groups...)
		rep.Summary.Series += len(series)
		rep.Problems = append(rep.Problems, notes...)
		for _, s := range series {
			sc.seen[string(catalog.KindSeries)+"|"+s.Part] = origin{name, 0}
		}
		clear(res)
		res = res[:0]
		return sc.flush()
	}
	fileRows := 0
	for {
		rec, line, err := rd.Read()
		if errors.Is(err, io.EOF) {
			break
		}
		var pe *ParseError
		if errors.As(err, &pe) {
			if errors.Is(err, ErrRecordTooLong) || errors.Is(err, ErrTooManyColumns) {
				return err
			}
			rep.Problems = append(rep.Problems, newProblem(Skip, pe, ""))
			fileRows++
			sc.rows++
			continue
		}
		if err != nil {
			return &ParseError{File: name, Line: line, Err: err}
		}
		if blankRecord(rec) {
			continue
		}
		fileRows++
		sc.rows++
		if sc.rows%ProgressEvery == 0 {
			if err := ctx.Err(); err != nil {
				return fmt.Errorf("importers: %s: %w", name, err)
			}
			if opt.Progress != nil {
				opt.Progress(sc.rows)
			}
		}
		if rr.checkCurrency {
			if err := rr.currencyInCells(rec, line, cols, breaks); err != nil {
				return err
			}
		}
		p, err := rr.read(rec, line)
		rep.Problems = append(rep.Problems, rr.problems...)
		rr.problems = rr.problems[:0]
		if err != nil {
			continue
		}
		key := string(kind) + "|" + p.key()
		if first, dup := sc.seen[key]; dup {
			rep.Problems = append(rep.Problems, newProblem(Skip, &ParseError{File: name, Line: line, Column: rr.header[cols[FieldPart]],
				Raw: p.key(), Err: fmt.Errorf("%w: already read at %s:%d; this row is left out", ErrDuplicate, first.file, first.line)}, p.key()))
			continue
		}
		if fr.Preview.Len() < opt.Preview {
			p.addTo(&fr.Preview)
		}
		switch kind {
		case catalog.KindSeries:
			sc.chunk.Series = append(sc.chunk.Series, *p.series)
		case catalog.KindResistor:
			if rr.si {
				sc.chunk.Resistors = append(sc.chunk.Resistors, *p.resistor)
				break
			}
			// Hand the rows over at the end of a run of alike rows, so a
			// series is never cut.
			if n := len(res); n >= ChunkRows && (n >= maxRunRows || !sameGroup(res[n-1].resistor, p.resistor)) {
				if err := group(); err != nil {
					return err
				}
			}
			res = append(res, p)
		case catalog.KindNetwork:
			sc.chunk.Networks = append(sc.chunk.Networks, *p.network)
		case catalog.KindReference:
			sc.chunk.References = append(sc.chunk.References, *p.reference)
		default:
			sc.chunk.Amplifiers = append(sc.chunk.Amplifiers, *p.amplifier)
		}
		// After a flush, so the chunk's origins hold only its own rows.
		sc.seen[key] = origin{name, line}
		if sc.chunk.Len()+len(sc.chunk.Series) >= ChunkRows {
			if err := sc.flush(); err != nil {
				return err
			}
		}
	}
	if opt.Progress != nil {
		opt.Progress(sc.rows)
	}
	if fileRows == 0 {
		return &ParseError{File: name, Err: fmt.Errorf("%w: export the table again with its rows", ErrNoRows)}
	}
	if err := group(); err != nil {
		return err
	}
	if err := sc.flush(); err != nil {
		return err
	}
	if p, ok := rr.unknownNote(); ok {
		rep.Problems = append(rep.Problems, p)
	}
	fr.Rows = fileRows
	rep.Files = append(rep.Files, fr)
	return nil
}

func blankRecord(rec []string) bool {
	for _, c := range rec {
		if strings.TrimSpace(c) != "" {
			return false
		}
	}
	return true
}

// addTo appends the part to the snapshot's list of its kind.
func (p parsed) addTo(s *catalog.Snapshot) {
	switch {
	case p.series != nil:
		s.ResistorSeries = append(s.ResistorSeries, *p.series)
	case p.resistor != nil:
		s.Resistors = append(s.Resistors, *p.resistor)
	case p.network != nil:
		s.Networks = append(s.Networks, *p.network)
	case p.reference != nil:
		s.References = append(s.References, *p.reference)
	default:
		s.Amplifiers = append(s.Amplifiers, *p.amplifier)
	}
}
