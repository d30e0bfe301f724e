package catalog

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"time"

	"github.com/jmoiron/sqlx"
	"modernc.org/sqlite" // registers the "sqlite" driver
	sqlite3 "modernc.org/sqlite/lib"
)

// BusyTimeout is how long a writer waits for another writer's lock before
// giving up with "database is locked". An import streams its file inside
// one write transaction, so the lock is held while the file is parsed
// (about 8 s for 200,000 rows on a small machine); the wait is long enough
// for a second import of a large export to queue behind the first.
const BusyTimeout = 2 * time.Minute

// maxFileConns bounds the connection pool of a file catalog; SQLite allows
// one writer at a time, readers run beside it in WAL mode.
const maxFileConns = 4

// sqliteMagic starts every SQLite 3 database file.
var sqliteMagic = []byte("SQLite format 3\x00")

// dsn returns the modernc.org/sqlite data source name for path: writes in
// BEGIN IMMEDIATE transactions (so concurrent writers queue on the busy
// timeout instead of failing on lock upgrade), foreign keys on. Temporary
// storage is a file (SQLite's default): the statement journals of an
// import's multi-row INSERTs held in memory were freed page by page through
// the allocator, and that cost per row grew with the catalog (twice the CPU
// per row at 100k rows than at 10k; BenchmarkImportScale).
func dsn(path string) string {
	return path + "?_pragma=busy_timeout(" + strconv.Itoa(int(BusyTimeout/time.Millisecond)) + ")" +
		"&_pragma=cache_size(-65536)&_pragma=temp_store(FILE)&_pragma=foreign_keys(1)&_pragma=synchronous(NORMAL)&_txlock=immediate"
}

// readOnlyDSN is the data source name of a catalog opened read-only: a
// file: URI with mode=ro. In a directory this process cannot write, SQLite
// cannot make the WAL index (-shm) a WAL-mode reader needs, so the file is
// opened immutable as well, which needs no lock or index file; that is
// safe only while no -wal file holds changes not yet in the catalog, and
// open refuses the catalog when one does.
func readOnlyDSN(path string, immutable bool) string {
	uri := "file:" + strings.ReplaceAll(path, "%", "%25") + "?mode=ro"
	if immutable {
		uri += "&immutable=1"
	}
	return uri + "&_pragma=busy_timeout(" + strconv.Itoa(int(BusyTimeout/time.Millisecond)) + ")&_pragma=foreign_keys(1)"
}

func checkPath(path string) error {
	if path == "" {
		return errors.New("catalog: empty catalog path: give a file name such as parts.db")
	}
	if strings.ContainsAny(path, "?#") {
		return fmt.Errorf("catalog: path %q contains ? or #: choose a file name without them", path)
	}
	return nil
}

func create(path string, force bool) (*Store, error) {
	if err := checkPath(path); err != nil {
		return nil, err
	}
	if fi, err := os.Lstat(path); err == nil {
		if fi.IsDir() {
			return nil, fmt.Errorf("%w: %s is a directory: give a file name for the catalog", ErrExists, path)
		}
		if !force {
			return nil, fmt.Errorf("%w: %s already exists: open it, or use --force to replace it with an empty catalog", ErrExists, path)
		}
		if !fi.Mode().IsRegular() {
			// Renaming the new catalog over a link, a device or a FIFO
			// would destroy it or leave the catalog somewhere unnamed.
			return nil, fmt.Errorf("%w: %s is not a regular file (a link, a device or a FIFO): only a regular file is replaced", ErrExists, path)
		}
	}
	// Build the new catalog beside the target and rename it into place, so
	// a failure leaves any existing file untouched.
	tmp := fmt.Sprintf("%s.new-%d-%d", path, os.Getpid(), time.Now().UnixNano())
	f, err := os.OpenFile(tmp, os.O_CREATE|os.O_EXCL|os.O_WRONLY, 0o644)
	if err != nil {
		// Name the catalog, not the temporary file beside it.
		var pe *fs.PathError
		if errors.As(err, &pe) {
			err = pe.Err
		}
		return nil, fmt.Errorf("catalog: cannot create catalog %s: %w: check that directory %s exists and is writable",
			path, err, filepath.Dir(path))
	}
	f.Close()
	cleanup := func() {
		for _, p := range []string{tmp, tmp + "-wal", tmp + "-shm", tmp + "-journal"} {
			os.Remove(p)
		}
	}
	db, err := sqlx.Open("sqlite", dsn(tmp))
	if err != nil {
		cleanup()
		return nil, fmt.Errorf("catalog: create %s: %w", path, err)
	}
	err = initSchema(db, path)
	if cerr := db.Close(); err == nil && cerr != nil {
		err = fmt.Errorf("catalog: create %s: %w", path, cerr)
	}
	if err != nil {
		cleanup()
		return nil, err
	}
	for _, p := range []string{path + "-wal", path + "-shm"} {
		os.Remove(p)
	}
	if err := os.Rename(tmp, path); err != nil {
		cleanup()
		return nil, fmt.Errorf("catalog: cannot create catalog %s: %w: check that the directory is writable", path, err)
	}
	return open(path)
}

// initSchema marks a new, empty database as a plumb catalog and applies
// every migration.
func initSchema(db *sqlx.DB, path string) error {
	ctx := context.Background()
	// Larger pages mean fewer page writes for a large import.
	if _, err := db.ExecContext(ctx, "PRAGMA page_size=16384"); err != nil {
		return fmt.Errorf("catalog: create %s: set page size: %w", path, err)
	}
	if _, err := db.ExecContext(ctx, "PRAGMA journal_mode=WAL"); err != nil {
		return fmt.Errorf("catalog: create %s: set WAL mode: %w", path, err)
	}
	if _, err := db.ExecContext(ctx, "PRAGMA application_id="+strconv.Itoa(ApplicationID)); err != nil {
		return fmt.Errorf("catalog: create %s: %w", path, err)
	}
	return migrate(ctx, db, path, 0)
}

func open(path string) (*Store, error) {
	if err := checkPath(path); err != nil {
		return nil, err
	}
	fi, err := os.Stat(path)
	if errors.Is(err, os.ErrNotExist) {
		return nil, fmt.Errorf("%w: %s does not exist: run plumb catalog init %s to create it", ErrMissing, path, path)
	}
	if err != nil {
		return nil, fmt.Errorf("catalog: open %s: %w", path, err)
	}
	if fi.IsDir() {
		return nil, fmt.Errorf("%w: %s is a directory: give the catalog file", ErrNotCatalog, path)
	}
	if err := checkMagic(path); err != nil {
		return nil, err
	}
	// A catalog this process may not write (a shared one) is opened
	// read-only: every command that only reads works on it.
	source, readOnly := dsn(path), false
	if dirOK := canWrite(filepath.Dir(path)); !dirOK || !canWrite(path) {
		readOnly = true
		immutable := !dirOK
		if _, err := os.Stat(path + "-wal"); immutable && err == nil {
			return nil, fmt.Errorf("%w: %s is read-only here and its %s-wal file holds changes not yet written into it: ask its owner to run any plumb command on it (that merges them), or copy the catalog to a folder you can write",
				ErrReadOnly, path, filepath.Base(path))
		}
		source = readOnlyDSN(path, immutable)
	}
	db, err := sqlx.Open("sqlite", source)
	if err != nil {
		return nil, fmt.Errorf("catalog: open %s: %w", path, err)
	}
	db.SetMaxOpenConns(maxFileConns)
	version, err := checkCatalog(db, path, readOnly)
	if err != nil {
		db.Close()
		return nil, err
	}
	return &Store{db: db, path: path, version: version, readOnly: readOnly}, nil
}

// checkMagic refuses a file that is not SQLite before the driver touches it.
func checkMagic(path string) error {
	f, err := os.Open(path)
	if err != nil {
		return fmt.Errorf("catalog: open %s: %w", path, err)
	}
	defer f.Close()
	head := make([]byte, len(sqliteMagic))
	if _, err := io.ReadFull(f, head); err != nil || !bytes.Equal(head, sqliteMagic) {
		return fmt.Errorf("%w: %s is not a plumb catalog (not an SQLite file): check the path, or run plumb catalog init PATH for a new one", ErrNotCatalog, path)
	}
	return nil
}

// checkCatalog checks the application_id and schema version, migrating an
// older catalog forward, and returns the version.
func checkCatalog(db *sqlx.DB, path string, readOnly bool) (int, error) {
	ctx := context.Background()
	var appID, version int
	if err := db.GetContext(ctx, &appID, "PRAGMA application_id"); err != nil {
		if d := damaged(path, err); d != err {
			return 0, d
		}
		return 0, fmt.Errorf("%w: %s is not a plumb catalog (%v)", ErrNotCatalog, path, err)
	}
	if appID != ApplicationID {
		return 0, fmt.Errorf("%w: %s is not a plumb catalog (an SQLite file of another program): check the path", ErrNotCatalog, path)
	}
	if err := db.GetContext(ctx, &version, "PRAGMA user_version"); err != nil {
		return 0, fmt.Errorf("catalog: open %s: read schema version: %w", path, err)
	}
	if version > SchemaVersionCurrent {
		return 0, fmt.Errorf("%w: catalog %s has schema version %d, this plumb knows up to %d: upgrade plumb",
			ErrNewerSchema, path, version, SchemaVersionCurrent)
	}
	if version < 0 {
		return 0, fmt.Errorf("%w: %s has schema version %d, which no plumb writes: %s", ErrDamaged, path, version, restoreAdvice)
	}
	if version < SchemaVersionCurrent && readOnly {
		return 0, fmt.Errorf("%w: %s has schema version %d, and this plumb reads version %d: it cannot upgrade a catalog it may not write; ask its owner to open it once with this plumb",
			ErrReadOnly, path, version, SchemaVersionCurrent)
	}
	if version < SchemaVersionCurrent {
		if err := migrate(ctx, db, path, version); err != nil {
			return 0, damaged(path, err)
		}
	}
	if err := checkTables(ctx, db, path); err != nil {
		return 0, err
	}
	return SchemaVersionCurrent, nil
}

// restoreAdvice ends the message of a damaged catalog.
const restoreAdvice = "restore it from a backup, or make a new one with plumb catalog init and import the parts again"

// tableRE finds the tables the migrations create, drop and rename.
var tableRE = regexp.MustCompile(`(?i)CREATE TABLE (?:IF NOT EXISTS )?(\w+)|DROP TABLE (?:IF EXISTS )?(\w+)|ALTER TABLE (\w+) RENAME TO (\w+)`)

// schemaTables lists the tables the migrations leave, in order of creation.
func schemaTables() []string {
	var out []string
	for _, m := range migrations {
		for _, t := range tableRE.FindAllStringSubmatch(m, -1) {
			switch {
			case t[1] != "":
				out = append(out, t[1])
			case t[2] != "":
				out = slices.DeleteFunc(out, func(n string) bool { return n == t[2] })
			default:
				if i := slices.Index(out, t[3]); i >= 0 {
					out[i] = t[4]
				}
			}
		}
	}
	return out
}

// checkTables refuses a catalog that lacks a table its schema creates, so
// that a damaged file is named as such once, on open, not as an SQL error
// in whatever command reads the table first.
func checkTables(ctx context.Context, db *sqlx.DB, path string) error {
	var have []string
	if err := db.SelectContext(ctx, &have, "SELECT name FROM sqlite_master WHERE type = 'table'"); err != nil {
		return damaged(path, fmt.Errorf("catalog: open %s: list tables: %w", path, err))
	}
	for _, t := range schemaTables() {
		if !slices.Contains(have, t) {
			return fmt.Errorf("%w: %s: table %s is missing: %s", ErrDamaged, path, t, restoreAdvice)
		}
	}
	return nil
}

// damaged turns an SQLite error saying the file is corrupt (SQLITE_CORRUPT,
// SQLITE_NOTADB) into one wrapping ErrDamaged that names the catalog at
// path and says what to do; other errors come back as they are.
func damaged(path string, err error) error {
	var se *sqlite.Error
	if err == nil || errors.Is(err, ErrDamaged) || !errors.As(err, &se) {
		return err
	}
	switch se.Code() & 0xff {
	case sqlite3.SQLITE_CORRUPT, sqlite3.SQLITE_NOTADB:
		return fmt.Errorf("%w: %s (%w): %s; plumb catalog export may still read the parts that are intact", ErrDamaged, path, err, restoreAdvice)
	}
	return err
}

// migrate applies migrations[from:], each step in its own BEGIN IMMEDIATE
// transaction with the user_version bump. The version is re-read inside the
// transaction, so two processes opening an old catalog at once apply each
// step once.
func migrate(ctx context.Context, db *sqlx.DB, path string, from int) error {
	for step := from; step < len(migrations); step++ {
		tx, err := db.BeginTxx(ctx, nil)
		if err != nil {
			return fmt.Errorf("catalog: migrate %s to schema %d: %w", path, step+1, err)
		}
		var v int
		if err := tx.GetContext(ctx, &v, "PRAGMA user_version"); err != nil {
			tx.Rollback()
			return fmt.Errorf("catalog: migrate %s: read schema version: %w", path, err)
		}
		if v > step {
			tx.Rollback()
			step = v - 1
			continue
		}
		if _, err := tx.ExecContext(ctx, migrations[step]); err != nil {
			tx.Rollback()
			return fmt.Errorf("catalog: migrate %s to schema %d: %w", path, step+1, err)
		}
		if _, err := tx.ExecContext(ctx, "PRAGMA user_version="+strconv.Itoa(step+1)); err != nil {
			tx.Rollback()
			return fmt.Errorf("catalog: migrate %s to schema %d: %w", path, step+1, err)
		}
		if err := tx.Commit(); err != nil {
			return fmt.Errorf("catalog: migrate %s to schema %d: %w", path, step+1, err)
		}
	}
	return nil
}

func openMemory() (*Store, error) {
	db, err := sqlx.Open("sqlite", ":memory:?_pragma=foreign_keys(1)&_txlock=immediate")
	if err != nil {
		return nil, fmt.Errorf("catalog: in-memory catalog: %w", err)
	}
	// Every connection to :memory: is a separate database: keep exactly one.
	db.SetMaxOpenConns(1)
	db.SetMaxIdleConns(1)
	db.SetConnMaxLifetime(0)
	db.SetConnMaxIdleTime(0)
	ctx := context.Background()
	if _, err := db.ExecContext(ctx, "PRAGMA application_id="+strconv.Itoa(ApplicationID)); err != nil {
		db.Close()
		return nil, fmt.Errorf("catalog: in-memory catalog: %w", err)
	}
	if err := migrate(ctx, db, ":memory:", 0); err != nil {
		db.Close()
		return nil, err
	}
	return &Store{db: db, version: SchemaVersionCurrent}, nil
}
