package importers

import (
	"fmt"
	"io"
	"slices"
	"strconv"

	"plumb/catalog"
)

// Report is what an import did: a summary, one entry per file, and one
// Problem per row skipped or in doubt (and notes worth knowing).
type Report struct {
	Summary  Summary
	Files    []FileReport
	Problems []Problem
	// Results are the store's per-part outcomes (empty for Read).
	Results []catalog.UpsertResult
}

// Summary counts the rows and parts of an import.
type Summary struct {
	Rows        int // data rows read
	Parts       int // rows that became parts
	Series      int // resistor series grouped from runs of rows
	Skipped     int // rows left out
	Imported    int // parts written (or that would be, in a dry run)
	Added       int
	Updated     int // prices or stock changed
	Unchanged   int
	SpecChanged int // figures differ from the catalog's: reported, never silently overwritten
	// FiguresUpdated counts parts whose figures were written over the
	// catalog's as Options.Figures allowed, each listed in Problems.
	FiguresUpdated int
	DryRun         bool
	// Refused is set when the import was refused as a whole (--strict with
	// a skipped row, or filling unknown figures where known ones differ):
	// nothing was written, and the counts are what would have been.
	Refused bool
}

// FileReport is what was found in one file.
type FileReport struct {
	File    string
	Kind    catalog.Kind
	Shape   Shape
	Rows    int
	Mapping *Mapping
	Groups  []Group
	// Unused names every column of the file that was not read, and why.
	Unused []Unused
	// Preview holds the first parts as parsed, of whichever kind the file
	// holds, for a dry run to show.
	Preview catalog.Snapshot
}

// Count returns the number of problems of one severity.
func (r *Report) Count(s Severity) int {
	n := 0
	for _, p := range r.Problems {
		if p.Severity == s {
			n++
		}
	}
	return n
}

// WriteCSV writes the row report: one line per problem with file, line,
// column, part, severity, raw text and reason, after a header line.
func (r *Report) WriteCSV(w io.Writer) error {
	cw := catalog.NewCSVWriter(w)
	if err := cw.Write([]string{"file", "line", "column", "part", "severity", "raw", "reason"}); err != nil {
		return fmt.Errorf("importers: writing report: %w", err)
	}
	for _, p := range r.Problems {
		line := ""
		if p.Line > 0 {
			line = strconv.Itoa(p.Line)
		}
		if err := cw.Write([]string{p.File, line, p.Column, p.Part, string(p.Severity), p.Raw, p.Reason}); err != nil {
			return fmt.Errorf("importers: writing report: %w", err)
		}
	}
	if err := cw.Flush(); err != nil {
		return fmt.Errorf("importers: writing report: %w", err)
	}
	return nil
}

// SkippedRow is one row left out of an import with every problem that
// refused it, in the order they were found.
type SkippedRow struct {
	File     string
	Line     int
	Part     string
	Problems []Problem
}

// SkippedRows groups the report's skip problems by row, so that a row with
// several problems is named once with all of them.
func (r *Report) SkippedRows() []SkippedRow {
	var out []SkippedRow
	at := map[string]int{}
	for _, p := range r.Problems {
		if p.Severity != Skip || p.Line <= 0 {
			continue
		}
		key := p.File + "\x00" + strconv.Itoa(p.Line)
		i, ok := at[key]
		if !ok {
			i = len(out)
			at[key] = i
			out = append(out, SkippedRow{File: p.File, Line: p.Line})
		}
		if out[i].Part == "" {
			out[i].Part = p.Part
		}
		out[i].Problems = append(out[i].Problems, p)
	}
	return out
}

// Columns names the columns of the row's problems, each once, in order
// ("row" for a problem of the whole row).
func (s SkippedRow) Columns() []string {
	var cols []string
	for _, p := range s.Problems {
		c := p.Column
		if c == "" {
			c = "row"
		}
		if !slices.Contains(cols, c) {
			cols = append(cols, c)
		}
	}
	return cols
}
