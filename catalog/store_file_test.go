package catalog

import (
	"context"
	"database/sql"
	"errors"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"sync"
	"testing"
)

func TestCreateAndReopen(t *testing.T) {
	path := filepath.Join(t.TempDir(), "parts.db")
	s, err := Create(path, false)
	if err != nil {
		t.Fatal(err)
	}
	mustUpsert(t, s, sampleBatch(), UpsertOptions{Now: testTime})
	if s.Path() != path || s.SchemaVersion() != SchemaVersionCurrent {
		t.Errorf("path %q version %d", s.Path(), s.SchemaVersion())
	}
	want := normalise(mustSnapshot(t, s))
	if err := s.Close(); err != nil {
		t.Fatal(err)
	}
	s, err = Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	if got := normalise(mustSnapshot(t, s)); got.Len() != 6 || got.Resistors[0].Part != want.Resistors[0].Part {
		t.Errorf("reopened catalog has %d parts", got.Len())
	}
	var mode string
	if err := s.db.Get(&mode, "PRAGMA journal_mode"); err != nil || mode != "wal" {
		t.Errorf("journal mode %q (%v), want wal", mode, err)
	}
	var fk int
	if err := s.db.Get(&fk, "PRAGMA foreign_keys"); err != nil || fk != 1 {
		t.Errorf("foreign_keys %d (%v), want 1", fk, err)
	}
}

// writeFile writes data to a new file in dir and returns its path.
func writeFile(t *testing.T, dir, name string, data []byte) string {
	t.Helper()
	p := filepath.Join(dir, name)
	if err := os.WriteFile(p, data, 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

// rawSQLite makes an SQLite file by hand with the given statements.
func rawSQLite(t *testing.T, path string, stmts ...string) {
	t.Helper()
	db, err := sql.Open("sqlite", path)
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	for _, s := range stmts {
		if _, err := db.Exec(s); err != nil {
			t.Fatal(err)
		}
	}
}

func TestOpenErrors(t *testing.T) {
	dir := t.TempDir()
	garbage := writeFile(t, dir, "garbage.db", []byte("part,value\nR1,10k\n"))
	empty := writeFile(t, dir, "empty.db", nil)
	foreign := filepath.Join(dir, "foreign.db")
	rawSQLite(t, foreign, "CREATE TABLE notes (body TEXT)", "INSERT INTO notes VALUES ('hello')")
	newer := filepath.Join(dir, "newer.db")
	s, err := Create(newer, false)
	if err != nil {
		t.Fatal(err)
	}
	s.Close()
	rawSQLite(t, newer, fmt.Sprintf("PRAGMA user_version = %d", SchemaVersionCurrent+3))

	tests := []struct {
		name    string
		path    string
		wantErr error
		words   []string
	}{
		{"missing file", filepath.Join(dir, "none.db"), ErrMissing, []string{"none.db", "run plumb catalog init"}},
		{"garbage file", garbage, ErrNotCatalog, []string{"garbage.db is not a plumb catalog"}},
		{"empty file", empty, ErrNotCatalog, []string{"empty.db is not a plumb catalog"}},
		{"SQLite of another program", foreign, ErrNotCatalog, []string{"foreign.db is not a plumb catalog"}},
		{"newer schema", newer, ErrNewerSchema, []string{
			fmt.Sprintf("catalog %s has schema version %d, this plumb knows up to %d: upgrade plumb", newer, SchemaVersionCurrent+3, SchemaVersionCurrent)}},
		{"directory", dir, ErrNotCatalog, []string{"is a directory"}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s, err := Open(tc.path)
			if err == nil {
				s.Close()
				t.Fatal("no error")
			}
			if !errors.Is(err, tc.wantErr) {
				t.Fatalf("error %v, want %v", err, tc.wantErr)
			}
			for _, w := range tc.words {
				if !strings.Contains(err.Error(), w) {
					t.Errorf("error %q does not say %q", err, w)
				}
			}
		})
	}
	// Opening the foreign file must not have changed it (no WAL switch).
	var mode string
	db, _ := sql.Open("sqlite", foreign)
	defer db.Close()
	if err := db.QueryRow("PRAGMA journal_mode").Scan(&mode); err != nil || mode != "delete" {
		t.Errorf("foreign file journal mode %q (%v): Open changed a file that is not ours", mode, err)
	}
}

func TestOpenMigratesOlderSchema(t *testing.T) {
	// A catalog marked as ours at schema version 0 (no tables yet) is
	// migrated forward on Open.
	path := filepath.Join(t.TempDir(), "old.db")
	rawSQLite(t, path, fmt.Sprintf("PRAGMA application_id = %d", ApplicationID), "PRAGMA journal_mode = WAL")
	s, err := Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	var v int
	if err := s.db.Get(&v, "PRAGMA user_version"); err != nil || v != SchemaVersionCurrent {
		t.Errorf("user_version %d (%v), want %d", v, err, SchemaVersionCurrent)
	}
	mustUpsert(t, s, sampleBatch(), UpsertOptions{})
}

func TestOpenMigratesOnceUnderConcurrency(t *testing.T) {
	// Two writers opening one old catalog at once: each step runs once
	// (the version is re-read inside the write transaction), both succeed.
	path := filepath.Join(t.TempDir(), "old.db")
	rawSQLite(t, path, fmt.Sprintf("PRAGMA application_id = %d", ApplicationID), "PRAGMA journal_mode = WAL")
	var wg sync.WaitGroup
	errs := make([]error, 4)
	for i := range errs {
		wg.Add(1)
		go func() {
			defer wg.Done()
			s, err := Open(path)
			if err == nil {
				err = s.Close()
			}
			errs[i] = err
		}()
	}
	wg.Wait()
	for i, err := range errs {
		if err != nil {
			t.Errorf("opener %d: %v", i, err)
		}
	}
	checkCount(t, path, 0)
}

func TestCreateErrors(t *testing.T) {
	dir := t.TempDir()
	existing := filepath.Join(dir, "existing.db")
	s, err := Create(existing, false)
	if err != nil {
		t.Fatal(err)
	}
	mustUpsert(t, s, sampleBatch(), UpsertOptions{})
	s.Close()
	notADir := writeFile(t, dir, "file.txt", []byte("x"))

	t.Run("existing file without force", func(t *testing.T) {
		_, err := Create(existing, false)
		if !errors.Is(err, ErrExists) || !strings.Contains(err.Error(), "existing.db") || !strings.Contains(err.Error(), "--force") {
			t.Errorf("error %v, want ErrExists naming the path and --force", err)
		}
		s, err := Open(existing)
		if err != nil {
			t.Fatal(err)
		}
		defer s.Close()
		if n := mustSnapshot(t, s).Len(); n != 6 {
			t.Errorf("refused Create changed the catalog: %d parts", n)
		}
	})
	t.Run("existing file with force", func(t *testing.T) {
		s, err := Create(existing, true)
		if err != nil {
			t.Fatal(err)
		}
		defer s.Close()
		if n := mustSnapshot(t, s).Len(); n != 0 {
			t.Errorf("forced Create kept %d parts", n)
		}
	})
	t.Run("directory that is a file", func(t *testing.T) {
		// Runs as root too, where a read-only directory would not stop us.
		_, err := Create(filepath.Join(notADir, "x.db"), false)
		if err == nil || !strings.Contains(err.Error(), "cannot create catalog") || !strings.Contains(err.Error(), "writable") {
			t.Errorf("error %v, want a clear cannot-create error", err)
		}
	})
	t.Run("read-only directory", func(t *testing.T) {
		ro := filepath.Join(dir, "ro")
		if err := os.Mkdir(ro, 0o555); err != nil {
			t.Fatal(err)
		}
		if f, err := os.Create(filepath.Join(ro, "probe")); err == nil {
			f.Close()
			t.Skip("permission checks are bypassed (running as root); the file-as-directory case covers this")
		}
		_, err := Create(filepath.Join(ro, "x.db"), false)
		if err == nil || !strings.Contains(err.Error(), "writable") {
			t.Errorf("error %v, want a clear cannot-create error", err)
		}
	})
	t.Run("no temporary file left", func(t *testing.T) {
		left, _ := filepath.Glob(filepath.Join(dir, "*.new-*"))
		if len(left) > 0 {
			t.Errorf("temporary files left: %q", left)
		}
	})
}

func TestConcurrentWritersGoroutines(t *testing.T) {
	path := filepath.Join(t.TempDir(), "shared.db")
	s, err := Create(path, false)
	if err != nil {
		t.Fatal(err)
	}
	s.Close()
	const writers, batches, rows = 2, 4, 500
	var wg sync.WaitGroup
	errs := make(chan error, writers)
	for w := range writers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			// Each writer has its own Store, as two commands would.
			s, err := Open(path)
			if err != nil {
				errs <- err
				return
			}
			defer s.Close()
			for b := range batches {
				if _, err := s.Upsert(context.Background(), bigBatch(rows, fmt.Sprintf("G%d%d", w, b)), UpsertOptions{}); err != nil {
					errs <- err
					return
				}
			}
		}()
	}
	wg.Wait()
	close(errs)
	for err := range errs {
		t.Error(err)
	}
	checkCount(t, path, writers*batches*rows)
}

func checkCount(t *testing.T, path string, want int) {
	t.Helper()
	s, err := Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	st, err := s.Stats(context.Background())
	if err != nil {
		t.Fatal(err)
	}
	if st.Resistors != want || st.PriceBreaks != 5*want {
		t.Errorf("%d resistors and %d breaks, want %d and %d", st.Resistors, st.PriceBreaks, want, 5*want)
	}
}

// childEnv names the catalog a re-executed test binary writes to.
const childEnv = "PLUMB_CATALOG_TEST_CHILD"

// TestHelperWriter is not a test: it is the child process of
// TestConcurrentWritersProcesses, and does nothing unless childEnv is set.
func TestHelperWriter(t *testing.T) {
	path := os.Getenv(childEnv)
	if path == "" {
		t.Skip("helper process for TestConcurrentWritersProcesses")
	}
	prefix := os.Getenv(childEnv + "_PREFIX")
	s, err := Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	for b := range 4 {
		if _, err := s.Upsert(context.Background(), bigBatch(1000, fmt.Sprintf("%s%d", prefix, b)), UpsertOptions{}); err != nil {
			t.Fatal(err)
		}
	}
}

func TestConcurrentWritersProcesses(t *testing.T) {
	if os.Getenv(childEnv) != "" {
		t.Skip("in the helper process")
	}
	path := filepath.Join(t.TempDir(), "shared.db")
	s, err := Create(path, false)
	if err != nil {
		t.Fatal(err)
	}
	s.Close()
	self, err := os.Executable()
	if err != nil {
		t.Fatal(err)
	}
	var cmds []*exec.Cmd
	var outs []*strings.Builder
	for _, prefix := range []string{"PA", "PB"} {
		cmd := exec.Command(self, "-test.run=^TestHelperWriter$", "-test.count=1")
		cmd.Env = append(os.Environ(), childEnv+"="+path, childEnv+"_PREFIX="+prefix)
		out := &strings.Builder{}
		cmd.Stdout, cmd.Stderr = out, out
		if err := cmd.Start(); err != nil {
			t.Fatal(err)
		}
		cmds = append(cmds, cmd)
		outs = append(outs, out)
	}
	for i, cmd := range cmds {
		if err := cmd.Wait(); err != nil {
			t.Errorf("writer process %d: %v\n%s", i, err, outs[i])
		}
	}
	checkCount(t, path, 2*4*1000)
}
