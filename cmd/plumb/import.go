package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"path/filepath"
	"strconv"
	"strings"
	"time"

	"github.com/spf13/cobra"

	"plumb/catalog"
	"plumb/importers"
)

var importKinds = []string{"auto", string(catalog.KindResistor), string(catalog.KindNetwork), string(catalog.KindAmplifier),
	string(catalog.KindReference)}

type importOptions struct {
	IO          *IOStreams
	Catalog     catalogOpener
	CatalogPath string // "" when the demo catalog is configured
	MappingDir  string
	Now         func() time.Time
	Files       []string
	Kind        catalog.Kind
	Mapping     string
	SaveMapping string
	DryRun      bool
	Source      string
	Report      string
	Force       bool
	Format      string
	Quiet       bool
	// Currency is --currency, else import.currency from the config.
	Currency     string
	AllowUnusual bool
	// Strict makes a skipped row fail the import (exit 1).
	Strict bool
	// FillUnknown writes figures the catalog holds as unknown;
	// OverwriteKnown (with it) also changes known figures that differ.
	FillUnknown    bool
	OverwriteKnown bool
}

func newImportCmd(f *Factory, runF func(*importOptions) error) *cobra.Command {
	opts := &importOptions{IO: f.IO, Catalog: f.Catalog, Now: f.Now}
	var kind string
	cmd := &cobra.Command{
		Use:   "import FILE...",
		Short: "Import distributor exports or approved-parts lists into the catalog",
		Long: `Read CSV exports (any separator, decimal comma, BOM, UTF-16 or Windows-1252
text), guess which column holds which field from the header (or use a saved
mapping), parse every value and write the parts to the catalog in one
transaction: all of the files' parts or none. Rows that cannot be used, or
whose reading is in doubt, are reported with file, line and column.

A part whose figures differ from the catalog's is reported as spec-changed
and its catalog figures are kept. --fill-unknown writes the figures the
catalog holds as unknown (all or nothing: when any part's known figures
differ, nothing is written and they are listed); with --overwrite-known it
also changes the known ones. Each change is listed and kept in the part's
history (plumb catalog history PART). --dry-run reads and compares without
writing, and works on the demo catalog too; it shows how each column was
read. The catalog's own JSON and CSV exports import back unchanged.

Prices take their currency from the cells ("0,38 €", "0.12 USD"), the
header ("Price (EUR)"), the mapping, --currency or import.currency in the
config, in that order; with none, the file is refused before its rows.
A figure a row does not give is stored as unknown. Rows with figures
outside what the trade makes are refused unless --allow-unusual. Every
problem of every row is reported; the exit status is 1 when no row was
imported (or, with --dry-run, importable), and with --strict when any row
was skipped. The mapping file: plumb help mapping.`,
		Example: `  plumb catalog export --format csv --kind resistor -o export.csv
  plumb catalog init parts.db
  plumb --catalog parts.db import export.csv --dry-run
  plumb --catalog parts.db import export.csv --save-mapping mydist --report rows.csv
  plumb --catalog parts.db import export.csv --mapping mydist --source approved-list-2026`,
		Args: func(cmd *cobra.Command, args []string) error {
			if len(args) == 0 {
				return usagef("%s needs at least one FILE", cmd.CommandPath())
			}
			return nil
		},
		RunE: func(cmd *cobra.Command, args []string) error {
			opts.Files = args
			k, err := parseKind(kind, importKinds)
			if err != nil {
				return err
			}
			if k != "auto" {
				opts.Kind = k
			}
			if opts.Format, err = chooseFormat(cmd, f, opts.Format); err != nil {
				return err
			}
			opts.CatalogPath = f.Settings().Catalog
			if dir, err := f.ConfigDir(); err == nil {
				opts.MappingDir = filepath.Join(dir, "plumb", "mappings")
			}
			opts.Quiet = f.Quiet
			if opts.Currency == "" {
				opts.Currency = f.Settings().ImportCurrency
			}
			opts.Currency = strings.ToUpper(strings.TrimSpace(opts.Currency))
			if opts.Currency != "" && !catalog.IsCurrencyCode(opts.Currency) {
				return usagef("--currency %q: give a three-letter ISO 4217 code such as EUR or USD", opts.Currency)
			}
			if opts.OverwriteKnown && !opts.FillUnknown {
				return usagef("--overwrite-known confirms changing known figures and goes with --fill-unknown")
			}
			if runF != nil {
				return runF(opts)
			}
			return runImport(cmd.Context(), opts)
		},
	}
	fl := cmd.Flags()
	fl.StringVar(&kind, "kind", "auto", "kind of part in the files: "+strings.Join(importKinds, ", "))
	fl.StringVar(&opts.Mapping, "mapping", "", "use the saved mapping `NAME`, or a mapping FILE.yaml, instead of guessing columns")
	fl.StringVar(&opts.SaveMapping, "save-mapping", "", "save the mapping used as `NAME` for later imports")
	fl.BoolVar(&opts.DryRun, "dry-run", false, "read, check and compare with the catalog, write nothing")
	fl.StringVar(&opts.Source, "source", "", "provenance `LABEL` for the rows (default: each file's name)")
	fl.StringVar(&opts.Report, "report", "", "write the row report (every skipped or doubtful row) to `FILE`.csv")
	fl.BoolVar(&opts.Force, "force", false, "replace an existing --report file")
	fl.StringVar(&opts.Currency, "currency", "", "ISO 4217 `CODE` of prices that name no currency in their cells, headers or mapping (default: import.currency from the config)")
	fl.BoolVar(&opts.AllowUnusual, "allow-unusual", false, "keep rows with figures outside what the trade makes (flagged), instead of skipping them")
	fl.BoolVar(&opts.Strict, "strict", false, "fail (exit 1) when any row is skipped; nothing is written")
	fl.BoolVar(&opts.FillUnknown, "fill-unknown", false, "write figures the catalog holds as unknown; nothing is written when a known figure differs")
	fl.BoolVar(&opts.OverwriteKnown, "overwrite-known", false, "with --fill-unknown: also change known figures that differ (checked against the datasheet)")
	addFormatFlag(cmd, &opts.Format)
	return cmd
}

func runImport(ctx context.Context, opts *importOptions) error {
	if opts.CatalogPath == "" && !opts.DryRun {
		return fmt.Errorf("import writes to a catalog file, and none is configured (the demo catalog is read-only): create one with `plumb catalog init parts.db` and import with `plumb --catalog parts.db import ...`, or add --dry-run")
	}
	io := importers.Options{Kind: opts.Kind, DryRun: opts.DryRun, Source: opts.Source, Now: opts.Now(),
		Currency: opts.Currency, AllowUnusual: opts.AllowUnusual, Strict: opts.Strict}
	switch {
	case opts.OverwriteKnown:
		io.Figures = catalog.ReplaceFigures
	case opts.FillUnknown:
		io.Figures = catalog.FillUnknown
	}
	if opts.Mapping != "" {
		m, err := importers.LoadMapping(opts.MappingDir, opts.Mapping)
		if err != nil {
			return err
		}
		io.Mapping = m
	}
	st, err := opts.Catalog(ctx)
	if err != nil {
		return err
	}
	defer st.Close()
	rep, err := importers.Import(ctx, st, opts.Files, io)
	if (errors.Is(err, importers.ErrRowsSkipped) || errors.Is(err, importers.ErrKnownFigures)) && rep != nil {
		// Every problem still goes to the user, then the refusal.
		switch {
		case opts.Format == "table" && opts.Quiet:
			writeImportSummary(opts.IO.Out, rep)
		case opts.Format == "table":
			_ = writeImportTable(opts.IO.Out, opts.IO, rep)
		case opts.Format == "json":
			_ = writeJSON(opts.IO.Out, importView(rep))
		}
		return err
	}
	if err != nil {
		return err
	}
	if opts.Report != "" {
		if err := writeFileAtomic(opts.Report, opts.Force, rep.WriteCSV); err != nil {
			return err
		}
		if !opts.Quiet {
			fmt.Fprintf(opts.IO.ErrOut, "wrote the row report to %s\n", opts.Report)
		}
	}
	if opts.SaveMapping != "" {
		if err := saveImportMapping(opts, rep); err != nil {
			return err
		}
	}
	switch opts.Format {
	case "json":
		err = writeJSON(opts.IO.Out, importView(rep))
	case "csv":
		err = rep.WriteCSV(opts.IO.Out)
	default:
		if opts.Quiet {
			writeImportSummary(opts.IO.Out, rep)
		} else {
			err = writeImportTable(opts.IO.Out, opts.IO, rep)
		}
	}
	if err != nil {
		return err
	}
	return importOutcome(rep)
}

// importOutcome is the import's error for the exit status: none when a
// row was imported (or the files held no rows to import), else one saying
// why nothing was.
func importOutcome(rep *importers.Report) error {
	s := rep.Summary
	if s.Rows > 0 && s.Imported == 0 && s.Parts == 0 {
		what := "imported"
		if s.DryRun {
			what = "importable (dry run)"
		}
		return fmt.Errorf("%w: no row of %d was %s: see the reasons above, fix the file or pass --mapping", importers.ErrNothingImported, s.Rows, what)
	}
	return nil
}

// writeImportSummary prints the one summary line of an import (-q).
func writeImportSummary(w io.Writer, rep *importers.Report) {
	s := rep.Summary
	verb := "imported"
	switch {
	case s.Refused:
		verb = "refused, nothing written: would have imported"
	case s.DryRun:
		verb = "would import (dry run, nothing written)"
	}
	figures := ""
	if s.FiguresUpdated > 0 {
		figures = fmt.Sprintf(", %d with figures updated", s.FiguresUpdated)
	}
	fmt.Fprintf(w, "%s %d part(s) from %d row(s): %d added, %d updated, %d unchanged, %d spec-changed%s; %d row(s) skipped\n",
		verb, s.Imported, s.Rows, s.Added, s.Updated, s.Unchanged, s.SpecChanged, figures, s.Skipped)
}

func saveImportMapping(opts *importOptions, rep *importers.Report) error {
	var m *importers.Mapping
	for _, fr := range rep.Files {
		if fr.Mapping != nil {
			m = fr.Mapping
			break
		}
	}
	if m == nil {
		return fmt.Errorf("--save-mapping %s: no file had a mapping to save", opts.SaveMapping)
	}
	path, err := importers.SaveMapping(opts.MappingDir, opts.SaveMapping, m)
	if err != nil {
		return fmt.Errorf("--save-mapping: %w", err)
	}
	if !opts.Quiet {
		fmt.Fprintf(opts.IO.ErrOut, "saved the mapping of %s as %q (%s): reuse it with --mapping %s\n", rep.Files[0].File, opts.SaveMapping, path, opts.SaveMapping)
	}
	return nil
}

// importJSON is the JSON form of an import report, snake_case like the
// catalog's own JSON.
type importJSON struct {
	DryRun bool `json:"dry_run"`
	// Refused: the import was refused as a whole and wrote nothing.
	Refused     bool `json:"refused"`
	Rows        int  `json:"rows"`
	Parts       int  `json:"parts"`
	Series      int  `json:"series"`
	Skipped     int  `json:"skipped"`
	Imported    int  `json:"imported"`
	Added       int  `json:"added"`
	Updated     int  `json:"updated"`
	Unchanged   int  `json:"unchanged"`
	SpecChanged int  `json:"spec_changed"`
	// FiguresUpdated counts parts whose figures --fill-unknown wrote.
	FiguresUpdated int                 `json:"figures_updated"`
	Files          []importFileJSON    `json:"files"`
	Problems       []importProblemJSON `json:"problems"`
	// SkippedRows names each skipped row once, with all its problems.
	SkippedRows []importSkippedJSON    `json:"skipped_rows"`
	Results     []catalog.UpsertResult `json:"results"`
}

type importFileJSON struct {
	File     string       `json:"file"`
	Kind     catalog.Kind `json:"kind"`
	Rows     int          `json:"rows"`
	Encoding string       `json:"encoding"`
	// Unused names every column not read, and why.
	Unused []importUnusedJSON `json:"unused_columns"`
}

type importUnusedJSON struct {
	Column string `json:"column"`
	Why    string `json:"why"`
}

type importSkippedJSON struct {
	File     string              `json:"file"`
	Line     int                 `json:"line"`
	Part     string              `json:"part,omitempty"`
	Problems []importProblemJSON `json:"problems"`
}

type importProblemJSON struct {
	File     string `json:"file"`
	Line     int    `json:"line"`
	Column   string `json:"column,omitempty"`
	Part     string `json:"part,omitempty"`
	Severity string `json:"severity"`
	Raw      string `json:"raw,omitempty"`
	Reason   string `json:"reason"`
}

func importView(rep *importers.Report) importJSON {
	s := rep.Summary
	v := importJSON{DryRun: s.DryRun, Refused: s.Refused, Rows: s.Rows, Parts: s.Parts, Series: s.Series, Skipped: s.Skipped, Imported: s.Imported,
		Added: s.Added, Updated: s.Updated, Unchanged: s.Unchanged, SpecChanged: s.SpecChanged, FiguresUpdated: s.FiguresUpdated,
		Files: []importFileJSON{}, Problems: []importProblemJSON{}, Results: rep.Results}
	for _, f := range rep.Files {
		fj := importFileJSON{File: f.File, Kind: f.Kind, Rows: f.Rows, Encoding: f.Shape.Encoding, Unused: []importUnusedJSON{}}
		for _, u := range f.Unused {
			fj.Unused = append(fj.Unused, importUnusedJSON{Column: u.Column, Why: u.Why})
		}
		v.Files = append(v.Files, fj)
	}
	problem := func(p importers.Problem) importProblemJSON {
		return importProblemJSON{File: p.File, Line: p.Line, Column: p.Column, Part: p.Part, Severity: string(p.Severity), Raw: p.Raw, Reason: p.Reason}
	}
	for _, p := range rep.Problems {
		v.Problems = append(v.Problems, problem(p))
	}
	v.SkippedRows = []importSkippedJSON{}
	for _, r := range rep.SkippedRows() {
		sr := importSkippedJSON{File: r.File, Line: r.Line, Part: r.Part}
		for _, p := range r.Problems {
			sr.Problems = append(sr.Problems, problem(p))
		}
		v.SkippedRows = append(v.SkippedRows, sr)
	}
	if v.Results == nil {
		v.Results = []catalog.UpsertResult{}
	}
	return v
}

func writeImportTable(w io.Writer, ios *IOStreams, rep *importers.Report) error {
	s := rep.Summary
	writeImportSummary(w, rep)
	if s.Series > 0 {
		fmt.Fprintf(w, "%d resistor series grouped from runs of rows\n", s.Series)
	}
	for _, f := range rep.Files {
		fmt.Fprintf(w, "  %s: %d row(s) of %s, %s\n", f.File, f.Rows, f.Kind, f.Shape.Encoding)
		for _, u := range f.Unused {
			fmt.Fprintf(w, "    column %q not read: %s\n", u.Column, u.Why)
		}
	}
	writeSkippedRows(w, ios, rep)
	if s.DryRun {
		for _, f := range rep.Files {
			if err := writeDryRunFile(w, ios, f); err != nil {
				return err
			}
		}
	}
	if len(rep.Problems) == 0 {
		return nil
	}
	fmt.Fprintf(w, "\n%s\n", ios.Bold("Rows to look at:"))
	t := newTable(ios, "WHERE", "COLUMN", "PART", "SEVERITY", "REASON")
	for _, p := range rep.Problems {
		where := p.File
		if p.Line > 0 {
			where += ":" + strconv.Itoa(p.Line)
		}
		sev := string(p.Severity)
		if p.Severity == importers.Skip {
			sev = ios.Red(sev)
		} else if p.Severity == importers.Doubt {
			sev = ios.Yellow(sev)
		}
		t.row(where, p.Column, p.Part, sev, p.Reason)
	}
	return t.render(w)
}

// mostSkippedRows is how many skipped rows the summary names; the row
// table and --report name every one.
const mostSkippedRows = 20

// writeSkippedRows names each skipped row in the summary with the columns
// of all its problems, not only the first.
func writeSkippedRows(w io.Writer, ios *IOStreams, rep *importers.Report) {
	rows := rep.SkippedRows()
	for i, r := range rows {
		if i == mostSkippedRows {
			fmt.Fprintf(w, "  ... and %d more skipped row(s): see the rows below or --report\n", len(rows)-i)
			break
		}
		part := ""
		if r.Part != "" {
			part = " " + r.Part
		}
		what := strings.Join(r.Columns(), ", ")
		if n := len(r.Problems); n > 1 {
			what += fmt.Sprintf(" (%d problems)", n)
		}
		writeHanging(w, ios, "  ", "      ", fmt.Sprintf("skipped %s:%d%s: %s", r.File, r.Line, part, what))
	}
}

// writeDryRunFile shows what a dry run of one file would use: the column
// each field was taken from with the confidence of the guess, and the
// first parts as parsed.
func writeDryRunFile(w io.Writer, ios *IOStreams, f importers.FileReport) error {
	if f.Mapping != nil && len(f.Mapping.Guesses)+len(f.Unused) > 0 {
		fmt.Fprintf(w, "\n%s\n", ios.Bold("Columns of "+f.File+":"))
		t := newTable(ios, "COLUMN", "FIELD", "CONFIDENCE", "HOW").alignRight(2)
		for _, g := range f.Mapping.Guesses {
			t.row(g.Column, string(g.Field), strconv.FormatFloat(float64(g.Confidence), 'f', 2, 64), g.How)
		}
		for _, u := range f.Unused {
			t.row(u.Column, "-", "", "not read: "+u.Why)
		}
		if err := t.render(w); err != nil {
			return err
		}
	}
	if f.Preview.Len() == 0 {
		return nil
	}
	fmt.Fprintf(w, "\n%s\n", ios.Bold(fmt.Sprintf("First %d part(s) of %s as read:", f.Preview.Len(), f.File)))
	t := newTable(ios, partTableHeader...)
	for _, r := range partRows(&f.Preview) {
		t.row(r.table()...)
	}
	return t.render(w)
}
