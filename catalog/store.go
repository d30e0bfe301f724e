package catalog

import (
	"context"
	"errors"
	"io"
	"time"

	"github.com/jmoiron/sqlx"
)

// Sentinel errors of the store. Callers branch on them with errors.Is; the
// wrapped message names the catalog path and the next step.
var (
	// ErrNotCatalog: the file is not SQLite, or SQLite without plumb's
	// application_id.
	ErrNotCatalog = errors.New("catalog: not a plumb catalog")
	// ErrNewerSchema: the file was written by a newer plumb.
	ErrNewerSchema = errors.New("catalog: schema is newer than this plumb")
	// ErrExists: Create was asked to make a catalog where a file exists.
	ErrExists = errors.New("catalog: file exists")
	// ErrMissing: Open was asked to open a file that does not exist.
	ErrMissing = errors.New("catalog: no catalog file")
	// ErrDamaged: the file is a plumb catalog whose content SQLite or plumb
	// cannot read: a schema version out of range, a table missing, pages
	// of garbage.
	ErrDamaged = errors.New("catalog: the catalog file is damaged")
	// ErrReadOnly: a change was asked of a catalog opened read-only (a
	// file, or a directory, this process may not write).
	ErrReadOnly = errors.New("catalog: the catalog is read-only")
	// ErrInvalid: a part in a batch or snapshot fails validation.
	ErrInvalid = errors.New("catalog: invalid part")
)

// KindSeries is the kind of a resistor series row (a product line offering a
// range of E-series values). Price breaks and history rows of series carry
// it; Find returns it for a series stem.
const KindSeries Kind = "series"

// Store is an open plumb catalog: a SQLite file (or an in-memory database)
// holding resistor series, resistors, networks and amplifiers with their
// price breaks and import history (schema in schema.go, every column's unit
// in its SQL comment). A Store is safe for concurrent use; two processes
// writing one file serialise on SQLite's write lock: the file is in WAL
// mode, writes run in BEGIN IMMEDIATE transactions and wait up to
// BusyTimeout for another writer.
type Store struct {
	db       *sqlx.DB
	path     string
	label    string // names the catalog in messages instead of its path
	version  int
	readOnly bool
}

// SetLabel names the catalog in messages ("the embedded demo catalog")
// instead of its path, for a catalog the user did not open by a path.
func (s *Store) SetLabel(label string) { s.label = label }

// ReadOnly reports whether the catalog was opened read-only: Open does so
// when this process may not write the file or its directory, and every
// change is then refused with ErrReadOnly.
func (s *Store) ReadOnly() bool { return s.readOnly }

// Path returns the catalog file path ("" for an in-memory catalog).
func (s *Store) Path() string { return s.path }

// SchemaVersion returns the schema version of the open catalog (after any
// forward migration, so always SchemaVersionCurrent).
func (s *Store) SchemaVersion() int { return s.version }

// Close closes the catalog.
func (s *Store) Close() error { return s.db.Close() }

// Filter selects parts for List. Zero fields do not filter. MinOhm, MaxOhm,
// MaxTolerance, MaxTCR and Technology are resistive criteria: when any is
// set, amplifiers are left out. A series is included when its value range
// overlaps [MinOhm, MaxOhm]; a network when any element value lies in it.
// Technology, Package and Maker match whole words ignoring case. PartLike
// matches part numbers ignoring case: a pattern with * (any run) or ?
// (one character), otherwise a substring.
type Filter struct {
	Kind         Kind // "" for every kind; KindSeries for series only
	MinOhm       float64
	MaxOhm       float64
	MaxTolerance float64 // fraction
	MaxTCR       float64 // ppm/K
	Technology   string
	Package      string
	Maker        string
	PartLike     string
}

// HistoryEntry is one import event of one part: where its figures came from,
// what they were as imported, and what the import changed.
type HistoryEntry struct {
	Part       string    `json:"part"`
	Kind       Kind      `json:"kind"`
	Source     string    `json:"source"`
	ImportedAt time.Time `json:"imported_at"`
	Outcome    Outcome   `json:"outcome"`
	// Figures is a JSON object of the part's figures as imported (the
	// snapshot JSON names, without offer and provenance, which Changes and
	// Source record). For an "added" row they are read from the part
	// itself: a part's figures are never overwritten, so the catalog does
	// not store them twice.
	Figures string `json:"figures"`
	// Changes lists what differed from the catalog ("tolerance 0.001 -> 0.0005").
	Changes []string `json:"changes,omitempty"`
}

// Stats summarises a catalog.
type Stats struct {
	Series       int `json:"series"`
	SeriesValues int `json:"series_values"` // orderable values the series cover
	Resistors    int `json:"resistors"`
	Networks     int `json:"networks"`
	Amplifiers   int `json:"amplifiers"`
	References   int `json:"references"`
	PriceBreaks  int `json:"price_breaks"`
	// NoStock counts parts whose stock is 0 (unknown stock, -1, is not counted).
	NoStock    int      `json:"no_stock"`
	Makers     []string `json:"makers"`
	Currencies []string `json:"currencies"`
	Sources    []string `json:"sources"`
}

// Outcome says what Upsert did with one part.
type Outcome string

// Upsert outcomes.
const (
	// Added: the part was new.
	Added Outcome = "added"
	// Updated: price breaks, stock, minimum order or source changed; the
	// figures were the same.
	Updated Outcome = "updated"
	// Unchanged: nothing differed (a new import time alone is not a change).
	Unchanged Outcome = "unchanged"
	// SpecChanged: the figures differ from the catalog's. The catalog is NOT
	// overwritten; the difference is reported and recorded in the history.
	SpecChanged Outcome = "spec-changed"
	// FiguresUpdated: the figures differed and UpsertOptions.Figures let
	// the import write them; Changes lists each, and the history keeps the
	// figures as they were.
	FiguresUpdated Outcome = "figures-updated"
)

// FigurePolicy says what an upsert does with a part already in the
// catalog whose figures differ from the import's.
type FigurePolicy int

// Figure policies.
const (
	// KeepFigures, the zero value: the part is SpecChanged and nothing of
	// it is written.
	KeepFigures FigurePolicy = iota
	// FillUnknown writes the figures the catalog holds as unknown when no
	// known figure differs; a part whose known figures differ is still
	// SpecChanged and nothing of it is written.
	FillUnknown
	// ReplaceFigures writes every figure that differs, known or unknown.
	ReplaceFigures
)

// UpsertOptions control Upsert.
type UpsertOptions struct {
	// Source labels the import ("distributor export 2026-11"); it is used
	// for parts whose own Provenance.Source is empty.
	Source string
	// Now is the import time for parts without their own ImportedAt; zero
	// means time.Now().
	Now time.Time
	// DryRun computes the outcomes and rolls back.
	DryRun bool
	// Figures says whether differing figures of a part already in the
	// catalog are written (see FigurePolicy); the zero value keeps them.
	Figures FigurePolicy
}

// UpsertResult is the outcome of one part of a batch.
type UpsertResult struct {
	Part    string   `json:"part"`
	Kind    Kind     `json:"kind"`
	Outcome Outcome  `json:"outcome"`
	Changes []string `json:"changes,omitempty"`
}

// Batch is a set of parts to upsert; it has the Snapshot's shape.
type Batch = Snapshot

// Create makes a new, empty catalog file at path. An existing file is an
// error wrapping ErrExists unless force is set, in which case it is replaced
// (atomically: the new catalog is built beside it and renamed over it).
func Create(path string, force bool) (*Store, error) { return create(path, force) }

// Open opens an existing catalog file, migrating an older schema forward.
// A missing file wraps ErrMissing, a file that is not a plumb catalog wraps
// ErrNotCatalog, a newer schema wraps ErrNewerSchema, a damaged file
// (schema version out of range, a table missing, pages SQLite cannot read)
// wraps ErrDamaged. A file or directory this process may not write is
// opened read-only (see ReadOnly).
func Open(path string) (*Store, error) { return open(path) }

// OpenMemory returns a fresh, empty in-memory catalog.
func OpenMemory() (*Store, error) { return openMemory() }

// Snapshot returns the whole catalog with price breaks, ordered by part
// number within each kind. It runs one query per table in one read
// transaction.
func (s *Store) Snapshot(ctx context.Context) (*Snapshot, error) { return s.load(ctx, Filter{}) }

// List returns the parts matching f, in Snapshot order.
func (s *Store) List(ctx context.Context, f Filter) (*Snapshot, error) { return s.load(ctx, f) }

// Find looks up a part number of any kind, including a series value part
// number (see ResistorSeries.PartNumber), returned as an expanded
// *Resistor. v is *ResistorSeries, *Resistor, *Network, *Amplifier or
// *Reference. An
// unknown part wraps ErrNotFound and names close part numbers.
func (s *Store) Find(ctx context.Context, part string) (kind Kind, v any, err error) {
	return s.find(ctx, part)
}

// History returns the import history of a part, oldest first.
func (s *Store) History(ctx context.Context, part string) ([]HistoryEntry, error) {
	return s.history(ctx, part)
}

// Stats summarises the catalog.
func (s *Store) Stats(ctx context.Context) (Stats, error) { return s.stats(ctx) }

// Upsert adds or updates the parts of b in ONE transaction: all or nothing.
// Any invalid part, a part number twice in the batch, a database error or a
// cancelled ctx rolls the whole batch back. Figures of an existing part are
// never overwritten: a part whose figures differ is reported SpecChanged.
// Every added, updated or spec-changed part gets a part_history row.
// Results are in batch order: series, resistors, networks, amplifiers,
// references.
// Validation sorts each part's price breaks by quantity in b.
func (s *Store) Upsert(ctx context.Context, b *Batch, opt UpsertOptions) ([]UpsertResult, error) {
	return s.upsert(ctx, b, opt)
}

// WriteCSV writes every part of one kind as CSV with a header row, values in
// SI units, price breaks packed in one column as "qty=price CUR; ...".
func (s *Store) WriteCSV(ctx context.Context, w io.Writer, kind Kind) error {
	return s.writeCSV(ctx, w, kind)
}

// WriteJSON writes the whole catalog as snapshot JSON (the export and demo
// format), in stable order.
func (s *Store) WriteJSON(ctx context.Context, w io.Writer) error { return s.writeJSON(ctx, w) }
