package importers

import (
	"bufio"
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"strings"
	"unicode/utf8"

	"golang.org/x/text/encoding/charmap"
	"golang.org/x/text/encoding/unicode"
	"golang.org/x/text/transform"
)

// Limits against hostile or broken files. A real export has a few dozen
// columns and records of a few hundred bytes (common practice).
const (
	// MaxColumns caps the fields of one record.
	MaxColumns = 4096
	// MaxRecordBytes caps the bytes of one record, quoted newlines
	// included.
	MaxRecordBytes = 1 << 20
	// sniffBytes is how much of the file is looked at to tell its shape.
	sniffBytes = 64 << 10
	// maxPreamble is how many title lines above the header are skipped.
	maxPreamble = 10
	// sniffLines is how many records the separator and decimal-comma
	// guesses look at.
	sniffLines = 50
)

// Shape is what the reader found out about a file before reading it.
type Shape struct {
	// Separator is the field separator: ',', ';', '\t' or '|'.
	Separator rune
	// DecimalComma is true when numbers are written 0,125 (common with ';'
	// files from decimal-comma locales).
	DecimalComma bool
	// Encoding is "UTF-8", "UTF-8 with BOM", "UTF-16" or "Windows-1252".
	Encoding string
	// CROnly is true when lines end with a bare carriage return (old
	// spreadsheet exports); they are read as line ends.
	CROnly bool
}

// Reader streams the records of one export file. It is not safe for
// concurrent use.
type Reader struct {
	name   string
	shape  Shape
	csv    *csv.Reader
	guard  *recordGuard
	header []string
	line   int
	// queue holds records re-read on their own after an unclosed quote
	// ran over them, with their lines; they come before the next record.
	queue []queued
	// Preamble holds the lines of title records skipped above the header.
	Preamble []int
}

// NewReader sniffs the shape of r (named name in errors) and reads its
// header. Errors are *ParseError wrapping ErrNotCSV, ErrEmpty,
// ErrTooManyColumns or ErrRecordTooLong.
func NewReader(name string, r io.Reader) (*Reader, error) { return newReader(name, r, 0) }

// newReader is NewReader with the separator given (sep != 0) instead of
// sniffed.
func newReader(name string, r io.Reader, sep rune) (*Reader, error) {
	fail := func(line int, err error) error { return &ParseError{File: name, Line: line, Err: err} }
	br := bufio.NewReaderSize(r, sniffBytes)
	head, err := br.Peek(sniffBytes)
	if err != nil && !errors.Is(err, io.EOF) && !errors.Is(err, bufio.ErrBufferFull) {
		return nil, fail(0, fmt.Errorf("reading: %w", err))
	}
	var text io.Reader = br
	enc := "UTF-8"
	switch {
	case bytes.HasPrefix(head, []byte{0xEF, 0xBB, 0xBF}):
		_, _ = br.Discard(3)
		head = head[3:]
		enc = "UTF-8 with BOM"
	case bytes.HasPrefix(head, []byte{0xFF, 0xFE}), bytes.HasPrefix(head, []byte{0xFE, 0xFF}):
		// Spreadsheet "Unicode text" exports are UTF-16 with a BOM.
		dec := unicode.UTF16(unicode.LittleEndian, unicode.ExpectBOM).NewDecoder()
		text = transform.NewReader(br, unicode.BOMOverride(dec))
		enc = "UTF-16"
		head, _ = dec.Bytes(head[:len(head)&^1])
	}
	if len(bytes.TrimSpace(head)) == 0 {
		return nil, fail(0, fmt.Errorf("%w: nothing but blank space; export the table again", ErrEmpty))
	}
	if why := notText(head); why != "" {
		return nil, fail(0, fmt.Errorf("%w: %s; export the table as CSV (comma, semicolon or tab separated text)", ErrNotCSV, why))
	}
	if enc == "UTF-8" && !validUTF8Prefix(head, len(head) == sniffBytes) {
		// Not UTF-8 and not binary: the usual other encoding of spreadsheet
		// exports (the ± ° µ signs of a tolerance column).
		text = transform.NewReader(br, charmap.Windows1252.NewDecoder())
		head, _ = charmap.Windows1252.NewDecoder().Bytes(head)
		enc = "Windows-1252"
	}
	crOnly := bytes.IndexByte(head, '\n') < 0 && bytes.IndexByte(head, '\r') >= 0
	if crOnly {
		// Classic Mac line ends: encoding/csv keeps a lone CR inside the
		// field, so the whole file would read as one line.
		text = transform.NewReader(text, crToLF{})
		head = bytes.ReplaceAll(head, []byte{'\r'}, []byte{'\n'})
	}
	shape, bestScore := sniff(head)
	shape.CROnly = crOnly
	if sep != 0 && sep != shape.Separator {
		shape.Separator = sep
		bestScore = -1 // the sniffed field counts are for another separator
	}
	shape.Encoding = enc

	guard := &recordGuard{r: text, sep: byte(shape.Separator)}
	cr := csv.NewReader(guard)
	cr.Comma = shape.Separator
	cr.FieldsPerRecord = -1
	cr.ReuseRecord = true
	rd := &Reader{name: name, shape: shape, csv: cr, guard: guard}
	hdr, line, err := rd.next()
	// Title lines above the header ("Search results, 30 Nov") have one
	// field; the header is the first record with more.
	for err == nil && len(hdr) < 2 && len(rd.Preamble) < maxPreamble && bestScore >= 0 {
		rd.Preamble = append(rd.Preamble, line)
		hdr, line, err = rd.next()
	}
	if errors.Is(err, io.EOF) {
		return nil, fail(0, fmt.Errorf("%w: no header line found", ErrEmpty))
	}
	if err != nil {
		return nil, err
	}
	rd.header = append([]string(nil), hdr...)
	for i := range rd.header {
		rd.header[i] = cleanCell(rd.header[i])
	}
	rd.line = line
	return rd, nil
}

// Name is the file name used in errors.
func (r *Reader) Name() string { return r.name }

// Shape is the sniffed shape of the file.
func (r *Reader) Shape() Shape { return r.shape }

// Header is the header record, cells trimmed.
func (r *Reader) Header() []string { return r.header }

// Read returns the next record and the line it starts on. The slice is
// reused by the next call. Ragged rows are returned as read (compare with
// len(Header())). At the end it returns io.EOF. A malformed record is
// returned as a *ParseError wrapping the csv error, and reading can go on;
// a record over the limits ends the file with a *ParseError.
func (r *Reader) Read() ([]string, int, error) {
	return r.next()
}

func (r *Reader) next() ([]string, int, error) {
	if len(r.queue) > 0 {
		q := r.queue[0]
		r.queue = r.queue[1:]
		return q.rec, q.line, q.err
	}
	if r.guard.err != nil {
		return nil, 0, io.EOF
	}
	rec, err := r.csv.Read()
	line := r.guard.line
	if err == nil && len(rec) > 0 {
		line, _ = r.csv.FieldPos(0)
	}
	if r.guard.err != nil {
		return nil, line, &ParseError{File: r.name, Line: r.guard.line, Err: r.guard.err}
	}
	if err != nil {
		if errors.Is(err, io.EOF) {
			return nil, 0, io.EOF
		}
		var ce *csv.ParseError
		if errors.As(err, &ce) {
			if ce.Line > ce.StartLine {
				return nil, ce.StartLine, r.unclosed(ce.StartLine, ce.Line)
			}
			r.guard.prune(ce.Line)
			return nil, ce.StartLine, &ParseError{File: r.name, Line: ce.StartLine, Err: fmt.Errorf("%w: %w; check the quotes in this row", ErrBadQuotes, ce.Err)}
		}
		return nil, line, &ParseError{File: r.name, Line: line, Err: err}
	}
	if end := recordEnd(r.csv, rec, line); end > line && r.header != nil && len(rec) != len(r.header) {
		// A quote that opened a field and closed on a later line before a
		// separator joined lines into one record of the wrong width: the
		// same unclosed quote, which must not take the next rows with it.
		return nil, line, r.unclosed(line, end)
	}
	r.guard.prune(line)
	if len(rec) > MaxColumns {
		r.guard.err = fmt.Errorf("%w: %d fields, at most %d are read", ErrTooManyColumns, len(rec), MaxColumns)
		return nil, line, &ParseError{File: r.name, Line: line, Err: r.guard.err}
	}
	return rec, line, nil
}

// queued is a record (or its error) waiting in Reader.queue.
type queued struct {
	rec  []string
	line int
	err  error
}

// recordEnd is the line a record read by cr ends on.
func recordEnd(cr *csv.Reader, rec []string, line int) int {
	if len(rec) == 0 {
		return line
	}
	l, _ := cr.FieldPos(len(rec) - 1)
	return l + strings.Count(rec[len(rec)-1], "\n")
}

// unclosed reports the quote opened on line start that ran to line end,
// and queues lines start+1..end to be read on their own, so the rows an
// unclosed quote ran over are read (or reported) instead of lost.
func (r *Reader) unclosed(start, end int) error {
	for l := start + 1; l <= end; l++ {
		raw, ok := r.guard.cont[l]
		if !ok || len(bytes.TrimSpace(raw)) == 0 {
			continue
		}
		cr := csv.NewReader(bytes.NewReader(raw))
		cr.Comma = r.shape.Separator
		cr.FieldsPerRecord = -1
		rec, err := cr.Read()
		var ce *csv.ParseError
		switch {
		case errors.As(err, &ce):
			err = &ParseError{File: r.name, Line: l, Err: fmt.Errorf("%w: %w; check the quotes in this row", ErrBadQuotes, ce.Err)}
		case err != nil:
			err = &ParseError{File: r.name, Line: l, Err: err}
		}
		r.queue = append(r.queue, queued{rec: rec, line: l, err: err})
	}
	r.guard.prune(end + 1)
	return &ParseError{File: r.name, Line: start, Err: fmt.Errorf("%w: a quote opened on this line is not closed where its field ends (it ran on to line %d); this row is left out and the lines after it are read on their own; check the quotes in this row", ErrBadQuotes, end)}
}

// crToLF turns every carriage return into a line feed, for files whose
// lines end with a bare CR.
type crToLF struct{ transform.NopResetter }

func (crToLF) Transform(dst, src []byte, atEOF bool) (nDst, nSrc int, err error) {
	n := copy(dst, src)
	for i := range n {
		if dst[i] == '\r' {
			dst[i] = '\n'
		}
	}
	if n < len(src) {
		return n, n, transform.ErrShortDst
	}
	return n, n, nil
}

// recordGuard passes bytes through while following CSV quoting just enough
// to know where records end, and fails once one record exceeds
// MaxRecordBytes or MaxColumns separators, before encoding/csv has buffered
// it all.
type recordGuard struct {
	r       io.Reader
	sep     byte
	inQuote bool
	atStart bool // at the start of a field
	pending bool // a quote seen inside a quoted field: closing or escaped
	n       int  // bytes of the current record
	fields  int
	line    int
	err     error
	// cont holds the raw text of each line that starts inside a quoted
	// field, by line number, until the reader has passed it: what an
	// unclosed quote ran over, to be read again on its own.
	cont      map[int][]byte
	capturing bool
	capLine   int
	capBuf    []byte
}

// newline ends the captured line, if any, and starts capturing the next one
// when it begins inside a quoted field.
func (g *recordGuard) newline() {
	if g.capturing {
		if g.cont == nil {
			g.cont = map[int][]byte{}
		}
		g.cont[g.capLine] = bytes.TrimRight(g.capBuf, "\r")
		g.capturing, g.capBuf = false, nil
	}
	if g.inQuote && !g.pending {
		g.capturing, g.capLine = true, g.line
	}
}

// prune forgets captured lines before line.
func (g *recordGuard) prune(line int) {
	for l := range g.cont {
		if l < line {
			delete(g.cont, l)
		}
	}
}

func (g *recordGuard) Read(p []byte) (int, error) {
	if g.err != nil {
		return 0, g.err
	}
	if g.line == 0 {
		g.line, g.atStart = 1, true
	}
	n, err := g.r.Read(p)
	for i := 0; i < n; i++ {
		c := p[i]
		g.n++
		if g.capturing && c != '\n' {
			if len(g.capBuf) < MaxRecordBytes {
				g.capBuf = append(g.capBuf, c)
			}
		}
		if g.pending {
			g.pending = false
			if c == '"' { // escaped quote
				continue
			}
			g.inQuote = false
		}
		switch {
		case g.inQuote:
			if c == '"' {
				g.pending = true
			} else if c == '\n' {
				g.line++
				g.newline()
			}
		case c == '"' && g.atStart:
			g.inQuote = true
		case c == g.sep:
			g.fields++
			g.atStart = true
			if g.fields >= MaxColumns {
				g.err = fmt.Errorf("%w: more than %d fields in one record", ErrTooManyColumns, MaxColumns)
				return i, g.err
			}
			continue
		case c == '\n':
			g.line++
			g.n, g.fields = 0, 0
			g.atStart = true
			g.newline()
			continue
		}
		if c != ' ' {
			g.atStart = false
		}
		if g.n > MaxRecordBytes {
			g.err = fmt.Errorf("%w: one record runs past %d bytes (an unclosed quote?)", ErrRecordTooLong, MaxRecordBytes)
			return i, g.err
		}
	}
	return n, err
}

// notText says why head does not look like delimited text, or "".
func notText(head []byte) string {
	ctrl := 0
	for _, c := range head {
		switch {
		case c == 0:
			if utf16NoBOM(head) {
				return "it looks like UTF-16 text without a byte-order mark; save it again as UTF-8 CSV"
			}
			return "it contains NUL bytes (a binary file, or a spreadsheet workbook rather than CSV)"
		case c < 0x20 && c != '\t' && c != '\n' && c != '\r' && c != '\f':
			ctrl++
		}
	}
	if ctrl*100 > len(head) {
		return "it is full of control characters"
	}
	return ""
}

// utf16NoBOM reports text whose every other byte is NUL: ASCII in UTF-16.
func utf16NoBOM(b []byte) bool {
	if len(b) < 8 {
		return false
	}
	even, odd := 0, 0
	for i, c := range b {
		if c == 0 {
			if i%2 == 0 {
				even++
			} else {
				odd++
			}
		}
	}
	half := len(b) / 2
	return even*10 >= half*9 && odd == 0 || odd*10 >= half*9 && even == 0
}

// validUTF8Prefix reports whether b is UTF-8, allowing a rune cut at the
// end when b was cut from a longer file.
func validUTF8Prefix(b []byte, cut bool) bool {
	for len(b) > 0 {
		r, size := utf8.DecodeRune(b)
		if r == utf8.RuneError && size <= 1 {
			return cut && len(b) < utf8.UTFMax && !utf8.FullRune(b)
		}
		b = b[size:]
	}
	return true
}

// sniff picks the separator that splits the first records into the same
// number of fields (quote-aware), and tells whether numbers use a decimal
// comma.
func sniff(head []byte) (Shape, int) {
	lines := splitRecords(head, sniffLines)
	best, bestScore := rune(','), -1
	for _, sep := range []rune{',', ';', '\t', '|'} {
		// The field count most lines share (a title line above the header
		// has fewer), then how many share it, then the count.
		freq := map[int]int{}
		for _, l := range lines {
			if n := countFields(l, byte(sep)); n >= 2 {
				freq[n]++
			}
		}
		for n, same := range freq {
			if score := same*MaxColumns + n; score > bestScore {
				best, bestScore = sep, score
			}
		}
	}
	sh := Shape{Separator: best}
	if best != ',' {
		comma, dot := 0, 0
		for _, l := range lines[1:] {
			for _, f := range splitFields(l, byte(best)) {
				c, d := decimalMarks(f)
				comma += c
				dot += d
			}
		}
		sh.DecimalComma = comma > dot
	}
	return sh, bestScore
}

// decimalMarks counts "digit,digit" and "digit.digit" in a cell, where the
// digit run after the mark is not exactly three long (which could be a
// thousands separator).
func decimalMarks(f string) (comma, dot int) {
	for i := 1; i+1 < len(f); i++ {
		if (f[i] != ',' && f[i] != '.') || !isDigit(f[i-1]) || !isDigit(f[i+1]) {
			continue
		}
		j := i + 1
		for j < len(f) && isDigit(f[j]) {
			j++
		}
		if j-i-1 == 3 {
			continue
		}
		if f[i] == ',' {
			comma++
		} else {
			dot++
		}
	}
	return comma, dot
}

func isDigit(c byte) bool { return c >= '0' && c <= '9' }

// splitRecords cuts head into at most n records, honouring quotes; the last,
// possibly cut, record is dropped when head was cut.
func splitRecords(head []byte, n int) [][]byte {
	var out [][]byte
	in, start := false, 0
	for i, c := range head {
		switch {
		case c == '"':
			in = !in
		case c == '\n' && !in:
			rec := bytes.TrimRight(head[start:i], "\r")
			if len(bytes.TrimSpace(rec)) > 0 {
				out = append(out, rec)
			}
			start = i + 1
			if len(out) == n {
				return out
			}
		}
	}
	if start < len(head) && (len(out) == 0 || len(head) < sniffBytes) {
		out = append(out, head[start:])
	}
	return out
}

func countFields(rec []byte, sep byte) int { return len(splitFields(rec, sep)) }

func splitFields(rec []byte, sep byte) []string {
	var out []string
	in, start := false, 0
	for i, c := range rec {
		switch {
		case c == '"':
			in = !in
		case c == sep && !in:
			out = append(out, string(rec[start:i]))
			start = i + 1
		}
	}
	return append(out, string(rec[start:]))
}
