package importers

import (
	"context"
	"fmt"
	"sort"
	"time"

	"plumb/catalog"
)

// Store is the part of the catalog store an import writes through
// (*catalog.Store has it): one Upsert is one transaction.
type Store interface {
	Upsert(ctx context.Context, b *catalog.Batch, opt catalog.UpsertOptions) ([]catalog.UpsertResult, error)
}

// Import reads the files (see Read) and upserts every part they hold into
// the store in one transaction, so the catalog gets all of it or none of
// it. With opt.DryRun the store computes the outcomes and rolls back. The
// report counts added, updated, unchanged and spec-changed parts; a spec
// change is reported, never written over the catalog's figures.
func Import(ctx context.Context, st Store, files []string, opt Options) (*Report, error) {
	if opt.Now.IsZero() {
		opt.Now = time.Now().UTC()
	}
	b, rep, err := Read(ctx, files, opt)
	if err != nil {
		return nil, err
	}
	if opt.BeforeWrite != nil {
		opt.BeforeWrite(b.Len())
	}
	batch := &catalog.Batch{ResistorSeries: b.Series, Resistors: b.Resistors, Networks: b.Networks, Amplifiers: b.Amplifiers}
	res, err := st.Upsert(ctx, batch, catalog.UpsertOptions{Source: opt.Source, Now: opt.Now, DryRun: opt.DryRun})
	if err != nil {
		return rep, fmt.Errorf("importers: writing %d parts to the catalog (nothing was written): %w", b.Len()+len(b.Series), err)
	}
	rep.Results = res
	rep.Summary.DryRun = opt.DryRun
	for _, r := range res {
		rep.Summary.Imported++
		switch r.Outcome {
		case catalog.Added:
			rep.Summary.Added++
		case catalog.Updated:
			rep.Summary.Updated++
		case catalog.Unchanged:
			rep.Summary.Unchanged++
		case catalog.SpecChanged:
			rep.Summary.SpecChanged++
			o := b.origin[string(r.Kind)+"|"+r.Part]
			rep.Problems = append(rep.Problems, Problem{ParseError: ParseError{File: o.file, Line: o.line, Err: errSpecChange}, Severity: Doubt, Part: r.Part,
				Reason: fmt.Sprintf("figures differ from the catalog's, which are kept: %v; check the datasheet and update the part deliberately", r.Changes)})
		}
	}
	sortProblems(rep.Problems)
	return rep, nil
}

var errSpecChange = fmt.Errorf("importers: figures differ from the catalog")

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
