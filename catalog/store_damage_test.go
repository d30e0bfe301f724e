package catalog

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"io"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// everyOperation runs each thing a command does with a catalog, turning a
// panic into an error, and returns the first error of each.
func everyOperation(path string) (errs []error) {
	run := func(name string, f func() error) {
		defer func() {
			if r := recover(); r != nil {
				errs = append(errs, fmt.Errorf("PANIC in %s: %v", name, r))
			}
		}()
		if err := f(); err != nil {
			errs = append(errs, fmt.Errorf("%s: %w", name, err))
		}
	}
	var s *Store
	run("open", func() (err error) { s, err = Open(path); return err })
	if s == nil {
		return errs
	}
	defer s.Close()
	ctx := context.Background()
	run("snapshot", func() error { _, err := s.Snapshot(ctx); return err })
	run("list", func() error { _, err := s.List(ctx, Filter{Kind: KindResistor, MaxTolerance: 0.01}); return err })
	run("find", func() error { _, _, err := s.Find(ctx, "TS-SH10"); return err })
	run("history", func() error { _, err := s.History(ctx, "TS-SH10"); return err })
	run("stats", func() error { _, err := s.Stats(ctx); return err })
	run("csv", func() error { return s.WriteCSV(ctx, io.Discard, KindResistor) })
	run("json", func() error { return s.WriteJSON(ctx, io.Discard) })
	run("rows", func() error {
		return s.EachResistor(ctx, ResistorQuery{MaxOhm: 1e6}, func(*ResistorRow) error { return nil })
	})
	run("networks", func() error { _, err := s.Networks(ctx); return err })
	run("amplifiers", func() error { _, err := s.Amplifiers(ctx); return err })
	run("upsert", func() error { _, err := s.Upsert(ctx, sampleBatch(), UpsertOptions{Now: testTime}); return err })
	return errs
}

// sampleCatalog creates a catalog file at path holding sampleBatch.
func sampleCatalog(t *testing.T, path string) {
	t.Helper()
	s, err := Create(path, false)
	if err != nil {
		t.Fatal(err)
	}
	mustUpsert(t, s, sampleBatch(), UpsertOptions{Now: testTime})
	s.Close()
}

// TestDamagedCatalogs is hardening finding 2 (a schema version of -1
// panicked every command with an index out of range) and the rest of the
// damage a file can take: schema versions out of range, tables missing,
// pages of garbage. No operation may panic; each refuses with an error
// that names the file and says it is damaged or not a catalog.
func TestDamagedCatalogs(t *testing.T) {
	dir := t.TempDir()
	good := filepath.Join(dir, "good.db")
	sampleCatalog(t, good)
	data, err := os.ReadFile(good)
	if err != nil {
		t.Fatal(err)
	}
	damage := []struct {
		name  string
		sql   []string
		bytes func([]byte) []byte
		words string // the error must say this
	}{
		{name: "schema version -1", sql: []string{"PRAGMA user_version = -1"}, words: "schema version -1"},
		{name: "schema version most negative", sql: []string{"PRAGMA user_version = -2147483648"}, words: "schema version -2147483648"},
		{name: "schema version newer", sql: []string{fmt.Sprintf("PRAGMA user_version = %d", SchemaVersionCurrent+1)}, words: "upgrade plumb"},
		{name: "truncated", bytes: func(b []byte) []byte { return b[:len(b)/2] }, words: "damaged"},
		{name: "header garbage", bytes: func(b []byte) []byte {
			c := bytes.Clone(b)
			for i := 16; i < 100; i++ {
				c[i] = 0xA5
			}
			return c
		}, words: "good.db"},
	}
	for _, table := range []string{"resistor_series", "resistors", "networks", "network_elements", "amplifiers", "amplifier_gains", "price_breaks", "part_history"} {
		damage = append(damage, struct {
			name  string
			sql   []string
			bytes func([]byte) []byte
			words string
		}{name: "table " + table + " missing", sql: []string{"PRAGMA foreign_keys = OFF", "DROP TABLE " + table}, words: "table " + table + " is missing"})
	}
	for seed := range uint64(12) {
		damage = append(damage, struct {
			name  string
			sql   []string
			bytes func([]byte) []byte
			words string
		}{name: fmt.Sprintf("garbage pages, seed %d", seed), bytes: func(b []byte) []byte {
			c := bytes.Clone(b)
			r := rand.New(rand.NewPCG(seed, 3))
			// Past the 100-byte file header, runs of random bytes
			// anywhere: the schema, the tables' pages, free pages.
			for range 1 + seed {
				start := 100 + r.IntN(len(c)-100)
				for i := start; i < min(len(c), start+1+r.IntN(2000)); i++ {
					c[i] = byte(r.Uint32())
				}
			}
			return c
		}})
	}
	for _, d := range damage {
		t.Run(d.name, func(t *testing.T) {
			path := filepath.Join(t.TempDir(), "good.db")
			if err := os.WriteFile(path, data, 0o644); err != nil {
				t.Fatal(err)
			}
			if d.bytes != nil {
				if err := os.WriteFile(path, d.bytes(data), 0o644); err != nil {
					t.Fatal(err)
				}
			}
			if d.sql != nil {
				rawSQLite(t, path, d.sql...)
			}
			errs := everyOperation(path)
			for _, err := range errs {
				msg := err.Error()
				if strings.Contains(msg, "PANIC") {
					t.Error(msg)
					continue
				}
				if !strings.Contains(msg, "good.db") {
					t.Errorf("the error does not name the file: %v", err)
				}
				if d.words != "" && !strings.Contains(msg, d.words) {
					t.Errorf("the error does not say %q: %v", d.words, err)
				}
			}
			if d.words != "" && len(errs) == 0 {
				t.Errorf("no operation failed on a damaged file")
			}
		})
	}
}

// TestReadOnlyCatalog is hardening finding 6: a catalog in a folder the
// user may not write could not even be read ("not a plumb catalog"). A
// catalog whose file or folder this process may not write opens
// read-only; reads work, and a change is refused with ErrReadOnly. The
// test runs as root in CI, where every file is writable, so it decides
// writability through canWrite; TestReadOnlyCatalogPermissions checks the
// real thing where the test runs unprivileged.
func TestReadOnlyCatalog(t *testing.T) {
	real := canWrite
	defer func() { canWrite = real }()
	mk := func(t *testing.T) string {
		canWrite = real
		path := filepath.Join(t.TempDir(), "shared.db")
		sampleCatalog(t, path)
		return path
	}
	for _, tc := range []struct {
		name     string
		writable func(path, p string) bool
	}{
		{"file read-only", func(path, p string) bool { return p != path }},
		{"folder read-only", func(path, p string) bool { return false }},
	} {
		t.Run(tc.name, func(t *testing.T) {
			path := mk(t)
			canWrite = func(p string) bool { return tc.writable(path, p) }
			s, err := Open(path)
			if err != nil {
				t.Fatal(err)
			}
			defer s.Close()
			if !s.ReadOnly() {
				t.Error("not opened read-only")
			}
			if got := mustSnapshot(t, s); got.Len() != sampleBatch().Len() {
				t.Errorf("read %d parts, want %d", got.Len(), sampleBatch().Len())
			}
			_, err = s.Upsert(context.Background(), sampleBatch(), UpsertOptions{Now: testTime})
			if !errors.Is(err, ErrReadOnly) || !strings.Contains(err.Error(), "shared.db") {
				t.Errorf("upsert into a read-only catalog: %v", err)
			}
		})
	}
	t.Run("changes not merged", func(t *testing.T) {
		path := mk(t)
		if err := os.WriteFile(path+"-wal", nil, 0o644); err != nil {
			t.Fatal(err)
		}
		canWrite = func(string) bool { return false }
		if _, err := Open(path); !errors.Is(err, ErrReadOnly) || !strings.Contains(err.Error(), "shared.db-wal") {
			t.Errorf("read-only folder with a -wal file: %v", err)
		}
	})
	t.Run("older schema", func(t *testing.T) {
		path := filepath.Join(t.TempDir(), "old.db")
		rawSQLite(t, path, fmt.Sprintf("PRAGMA application_id = %d", ApplicationID))
		canWrite = func(string) bool { return false }
		if _, err := Open(path); !errors.Is(err, ErrReadOnly) || !strings.Contains(err.Error(), "ask its owner") {
			t.Errorf("read-only catalog of an older schema: %v", err)
		}
	})
}

// TestReadOnlyCatalogPermissions opens a catalog in a folder without write
// permission, as a user who shares it would; root may write anything, so
// the test needs an unprivileged user.
func TestReadOnlyCatalogPermissions(t *testing.T) {
	if os.Geteuid() == 0 {
		t.Skip("running as root, which may write any file: TestReadOnlyCatalog covers the read-only open")
	}
	dir := filepath.Join(t.TempDir(), "shared")
	if err := os.Mkdir(dir, 0o755); err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(dir, "parts.db")
	sampleCatalog(t, path)
	if err := os.Chmod(path, 0o444); err != nil {
		t.Fatal(err)
	}
	if err := os.Chmod(dir, 0o555); err != nil {
		t.Fatal(err)
	}
	defer os.Chmod(dir, 0o755)
	s, err := Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	if got := mustSnapshot(t, s); got.Len() != sampleBatch().Len() || !s.ReadOnly() {
		t.Errorf("read %d parts, read-only %v", got.Len(), s.ReadOnly())
	}
}
