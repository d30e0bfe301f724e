package main

import (
	"context"
	"errors"
	"fmt"
	"io/fs"
	"os"

	"plumb/catalog"
	"plumb/data"
)

// openConfigured opens the configured catalog: the file named by --catalog,
// PLUMB_CATALOG or the config file, or the embedded demo catalog when none
// is configured. The caller closes the store.
func (f *Factory) openConfigured(ctx context.Context) (*catalog.Store, error) {
	s := f.Settings()
	if s.Catalog == "" {
		st, err := data.Demo()
		if err != nil {
			return nil, fmt.Errorf("opening the embedded demo catalog: %w", err)
		}
		return st, nil
	}
	if _, err := os.Stat(s.Catalog); errors.Is(err, fs.ErrNotExist) {
		return nil, fmt.Errorf("catalog %s (from %s) not found: create it with `plumb catalog init %s` or leave --catalog unset to use the demo catalog",
			s.Catalog, s.Source(keyCatalog), s.Catalog)
	}
	st, err := catalog.Open(s.Catalog)
	if err != nil {
		return nil, fmt.Errorf("opening catalog %s (from %s): %w", s.Catalog, s.Source(keyCatalog), err)
	}
	return st, nil
}

// CatalogName names the catalog in use for messages.
func (f *Factory) CatalogName() string {
	if c := f.Settings().Catalog; c != "" {
		return c
	}
	return "the embedded demo catalog"
}

// catalogOpener opens the catalog a command works on; the caller closes it.
type catalogOpener func(context.Context) (*catalog.Store, error)
