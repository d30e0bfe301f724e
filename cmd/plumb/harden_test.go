package main

import (
	"database/sql"
	"path/filepath"
	"strings"
	"testing"
)

// TestDamagedCatalogCommands: a catalog whose schema version reads -1 once
// panicked every command (index out of range, exit 2: documented as a
// usage error). Each command now refuses it with exit 1 and a message
// naming the file.
func TestDamagedCatalogCommands(t *testing.T) {
	clearPlumbEnv(t)
	path := filepath.Join(t.TempDir(), "parts.db")
	f, _, _ := testFactory(t)
	if _, errOut, code := runPlumb(t, f, "catalog init "+path); code != exitOK {
		t.Fatalf("init: exit %d: %s", code, errOut)
	}
	db, err := sql.Open("sqlite", path)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := db.Exec("PRAGMA user_version = -1"); err != nil {
		t.Fatal(err)
	}
	db.Close()
	for _, line := range []string{"catalog list", "catalog stats", "solve logger-channel", "catalog export --format json", "check logger-channel --design logger-design"} {
		f, _, _ := testFactory(t)
		_, errOut, code := runPlumb(t, f, line+" --catalog "+path)
		if code != exitError || !strings.Contains(errOut, "schema version -1") || !strings.Contains(errOut, "parts.db") {
			t.Errorf("%s: exit %d: %s", line, code, errOut)
		}
	}
}
