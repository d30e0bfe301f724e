package importers

import (
	"errors"
	"fmt"
)

// Sentinel errors a caller can branch on with errors.Is.
var (
	// ErrNotCSV is returned for a file that is not delimited text (binary
	// data, control characters).
	ErrNotCSV = errors.New("importers: file is not CSV text")
	// ErrEmpty is returned for an empty file or one with only blank lines.
	ErrEmpty = errors.New("importers: file is empty")
	// ErrNoRows is returned for a file with a header and no data rows.
	ErrNoRows = errors.New("importers: file has a header but no data rows")
	// ErrTooManyColumns is returned when a record has more than MaxColumns
	// fields.
	ErrTooManyColumns = errors.New("importers: too many columns")
	// ErrRecordTooLong is returned when one record is longer than
	// MaxRecordBytes.
	ErrRecordTooLong = errors.New("importers: record too long")
	// ErrBadQuotes marks a record whose quotes do not pair up.
	ErrBadQuotes = errors.New("importers: malformed quotes")
	// ErrRagged marks a row whose field count differs from the header's.
	ErrRagged = errors.New("importers: row has a different number of fields than the header")
	// ErrUnknownKind is returned when the kind of part cannot be told from
	// the header.
	ErrUnknownKind = errors.New("importers: cannot tell which kind of part the file holds")
	// ErrMissingColumn is returned when a column the kind needs is absent.
	ErrMissingColumn = errors.New("importers: required column missing")
	// ErrBadValue marks a cell whose text cannot be read as the field's
	// quantity.
	ErrBadValue = errors.New("importers: value cannot be read")
	// ErrMissingValue marks a row where a required value is blank.
	ErrMissingValue = errors.New("importers: required value missing")
	// ErrDuplicate marks a part number seen twice in one import.
	ErrDuplicate = errors.New("importers: part number repeated")
	// ErrNoCurrency is returned for a file whose prices carry no currency
	// in their cells, headers or mapping when no --currency is given.
	ErrNoCurrency = errors.New("importers: prices carry no currency")
	// ErrUnusual marks a figure outside what the trade makes (a unit slip).
	ErrUnusual = errors.New("importers: value outside what the trade makes")
	// ErrNothingImported: every row of the files was skipped.
	ErrNothingImported = errors.New("importers: nothing imported")
	// ErrRowsSkipped is returned under Options.Strict when any row was
	// skipped; nothing is written, and the report lists every problem.
	ErrRowsSkipped = errors.New("importers: rows skipped under --strict")
	// ErrKnownFigures is returned when an import that fills unknown
	// figures (catalog.FillUnknown) meets a part whose known figures
	// differ; nothing is written.
	ErrKnownFigures = errors.New("importers: known figures differ")
	// ErrMapping is returned for a mapping file that cannot be used.
	ErrMapping = errors.New("importers: invalid mapping")
)

// ParseError is a problem at one place of an export file. Line is the
// 1-based line where the record starts (0 for the file as a whole); Column
// is the header text of the column concerned ("" for the whole row); Raw is
// the cell or row text as read.
type ParseError struct {
	File   string
	Line   int
	Column string
	Raw    string
	Err    error
}

func (e *ParseError) Error() string {
	s := e.File
	if e.Line > 0 {
		s += fmt.Sprintf(":%d", e.Line)
	}
	if e.Column != "" {
		s += fmt.Sprintf(": column %q", e.Column)
	}
	if e.Raw != "" {
		s += fmt.Sprintf(": %q", clip(e.Raw, 80))
	}
	return s + ": " + e.Err.Error()
}

func (e *ParseError) Unwrap() error { return e.Err }

// Severity grades a Problem.
type Severity string

// Severities, from worst to mildest.
const (
	// Skip: the row was not imported.
	Skip Severity = "skip"
	// Doubt: the row was imported but a value was guessed or is suspect;
	// check it.
	Doubt Severity = "doubt"
	// Info: the row was imported; something was read in a way worth knowing
	// (a value taken from the description, a grouping).
	Info Severity = "info"
)

// Problem is one line of the row report: a ParseError with a severity and
// the part number concerned, where one is known.
type Problem struct {
	ParseError
	Severity Severity
	Part     string
	// Reason is the error text without the location, for the report.
	Reason string
}

func newProblem(sev Severity, pe *ParseError, part string) Problem {
	return Problem{ParseError: *pe, Severity: sev, Part: part, Reason: pe.Err.Error()}
}

func clip(s string, n int) string {
	r := []rune(s)
	if len(r) <= n {
		return s
	}
	return string(r[:n]) + "…"
}
