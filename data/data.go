package data

import (
	"bytes"
	"context"
	"embed"
	"fmt"
	"io/fs"
	"time"

	"plumb/catalog"
)

// DemoSource is the source label of every demo catalog part.
const DemoSource = "demo catalog"

// DemoDate is the import time recorded for the demo catalog, fixed so that
// output built from it is reproducible.
var DemoDate = time.Date(2026, 11, 1, 0, 0, 0, 0, time.UTC)

//go:embed demo.json
var demoJSON []byte

//go:embed examples
var examples embed.FS

// DemoSnapshot returns the demo catalog as read from its embedded JSON.
func DemoSnapshot() (*catalog.Snapshot, error) {
	snap, err := catalog.ReadSnapshotJSON(bytes.NewReader(demoJSON))
	if err != nil {
		return nil, fmt.Errorf("data: embedded demo catalog: %w", err)
	}
	return snap, nil
}

// Demo opens a fresh in-memory catalog holding the demo parts (source
// DemoSource, imported at DemoDate). The caller closes it.
func Demo() (*catalog.Store, error) {
	snap, err := DemoSnapshot()
	if err != nil {
		return nil, err
	}
	st, err := catalog.OpenMemory()
	if err != nil {
		return nil, fmt.Errorf("data: demo catalog: %w", err)
	}
	st.SetLabel("the embedded demo catalog")
	if _, err := st.Upsert(context.Background(), snap, catalog.UpsertOptions{Source: DemoSource, Now: DemoDate}); err != nil {
		st.Close()
		return nil, fmt.Errorf("data: demo catalog: %w", err)
	}
	return st, nil
}

// Examples returns the example spec and design files (*.yaml, with a
// README.md), rooted at the examples directory.
func Examples() fs.FS {
	sub, err := fs.Sub(examples, "examples")
	if err != nil {
		panic("data: embedded examples: " + err.Error()) // the embed pattern guarantees the directory
	}
	return sub
}
