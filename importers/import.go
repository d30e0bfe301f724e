package importers

import (
	"context"
	"fmt"
	"sort"
	"strings"

	"plumb/catalog"
)

// Store is the part of the catalog store an import writes through
// (*catalog.Store has it): one session is one transaction, fed in chunks.
type Store interface {
	BeginUpsert(ctx context.Context, opt catalog.UpsertOptions) (*catalog.UpsertSession, error)
}

// Import reads the files (see Read) and upserts every part they hold into
// the store in ONE transaction, so the catalog gets all of it or none of
// it. It streams: rows are handed to the store ChunkRows at a time (at the
// end of a run of alike resistor rows, so series grouping sees whole runs)
// and only the report is kept, so memory does not grow with the files.
// With opt.DryRun the store computes the outcomes and rolls back. The
// report counts added, updated, unchanged and spec-changed parts; a spec
// change is reported, never written over the catalog's figures. Report.Results
// keeps only the spec-changed parts' results, not one per part.
func Import(ctx context.Context, st Store, files []string, opt Options) (*Report, error) {
	var us *catalog.UpsertSession
	var sc *scan
	written := 0
	emit := func(c *Batch) error {
		if us == nil {
			s, err := st.BeginUpsert(ctx, catalog.UpsertOptions{Source: opt.Source, Now: opt.Now, DryRun: opt.DryRun, Figures: opt.Figures})
			if err != nil {
				return fmt.Errorf("importers: writing to the catalog (nothing was written): %w", err)
			}
			us = s
		}
		res, err := us.Add(ctx, &catalog.Batch{ResistorSeries: c.Series, Resistors: c.Resistors, Networks: c.Networks, Amplifiers: c.Amplifiers,
			References: c.References})
		if err != nil {
			return fmt.Errorf("importers: writing %d parts to the catalog (nothing was written): %w", written+c.Len()+len(c.Series), err)
		}
		written += c.Len() + len(c.Series)
		if written == c.Len()+len(c.Series) && opt.BeforeWrite != nil {
			opt.BeforeWrite(written)
		}
		sc.tally(res, c.origin)
		return nil
	}
	sc, err := newScan(ctx, files, &opt, emit)
	if err != nil {
		return nil, err
	}
	defer func() {
		if us != nil {
			us.Rollback() // after Commit, a no-op
		}
	}()
	if err := sc.files(files); err != nil {
		return nil, err
	}
	if opt.Strict {
		sc.finish()
		if n := sc.rep.Summary.Skipped; n > 0 {
			sc.rep.Summary.DryRun = opt.DryRun
			sc.refuse()
			return sc.rep, fmt.Errorf("%w: %d row(s) skipped, so nothing was written; fix them (see the report) or import without --strict", ErrRowsSkipped, n)
		}
	}
	if opt.Figures == catalog.FillUnknown {
		// Filling unknown figures is all or nothing: a known figure that
		// differs needs the explicit ReplaceFigures.
		if n := sc.rep.Summary.SpecChanged; n > 0 {
			sc.rep.Summary.DryRun = opt.DryRun
			sc.finish()
			sc.refuse()
			return sc.rep, fmt.Errorf("%w: %d part(s) have known figures that differ from the file's (listed above), so nothing was written; check them against the datasheet, then confirm the change or import without filling",
				ErrKnownFigures, n)
		}
	}
	if us != nil {
		if err := us.Commit(); err != nil {
			return nil, fmt.Errorf("importers: writing %d parts to the catalog (nothing was written): %w", written, err)
		}
	}
	sc.rep.Summary.DryRun = opt.DryRun
	sc.finish()
	return sc.rep, nil
}

// tally counts the store's outcomes for one chunk and keeps what the report
// needs of them: spec changes and parts repeated from an earlier chunk.
func (sc *scan) tally(res []catalog.UpsertResult, where map[string]origin) {
	rep := sc.rep
	for _, r := range res {
		o := where[string(r.Kind)+"|"+r.Part]
		switch r.Outcome {
		case catalog.Added:
			rep.Summary.Added++
		case catalog.Updated:
			rep.Summary.Updated++
		case catalog.Unchanged:
			rep.Summary.Unchanged++
		case catalog.SpecChanged:
			rep.Summary.SpecChanged++
			rep.Results = append(rep.Results, r)
			rep.Problems = append(rep.Problems, Problem{ParseError: ParseError{File: o.file, Line: o.line, Err: errSpecChange}, Severity: Doubt, Part: r.Part,
				Reason: fmt.Sprintf("figures differ from the catalog's, which are kept: %v; check the datasheet and update the part deliberately (--fill-unknown, with --overwrite-known for known figures)", r.Changes)})
		case catalog.FiguresUpdated:
			rep.Summary.FiguresUpdated++
			rep.Results = append(rep.Results, r)
			rep.Problems = append(rep.Problems, Problem{ParseError: ParseError{File: o.file, Line: o.line, Err: errFiguresUpdated}, Severity: Info, Part: r.Part,
				Reason: figuresUpdated + strings.Join(r.Changes, "; ")})
		case catalog.Repeated:
			// Read earlier in this import, in an earlier chunk.
			rep.Summary.Parts--
			if r.Kind == catalog.KindSeries && o.line == 0 {
				rep.Summary.Series-- // a grouped series (an exported one has its line)
			}
			rep.Problems = append(rep.Problems, newProblem(Skip, &ParseError{File: o.file, Line: o.line, Raw: r.Part,
				Err: fmt.Errorf("%w: already read earlier in this import; this row is left out", ErrDuplicate)}, r.Part))
			continue
		}
		rep.Summary.Imported++
	}
}

// refuse marks the report of an import refused as a whole: nothing was
// written, so the figures each part would have had updated are reported as
// such, not as updated.
func (sc *scan) refuse() {
	sc.rep.Summary.Refused = true
	for i, p := range sc.rep.Problems {
		if p.Err == errFiguresUpdated {
			sc.rep.Problems[i].Reason = "figures would be updated (not written: the import was refused): " + strings.TrimPrefix(p.Reason, figuresUpdated)
		}
	}
}

// figuresUpdated begins the reason of a part whose figures were written.
const figuresUpdated = "figures updated: "

var (
	errSpecChange     = fmt.Errorf("importers: figures differ from the catalog")
	errFiguresUpdated = fmt.Errorf("importers: figures updated")
)

// sortProblems orders the report by file and line, keeping the order of
// problems on one line.
func sortProblems(p []Problem) {
	sort.SliceStable(p, func(i, j int) bool {
		if p[i].File != p[j].File {
			return p[i].File < p[j].File
		}
		return p[i].Line < p[j].Line
	})
}
