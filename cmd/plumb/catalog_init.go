package main

import (
	"context"
	"errors"
	"fmt"
	"os"
	"path/filepath"

	"github.com/spf13/cobra"

	"plumb/catalog"
	"plumb/data"
)

type catalogInitOptions struct {
	IO *IOStreams
	// Path is the catalog file to create.
	Path  string
	Force bool
	// Demo fills the new catalog with the embedded demo parts.
	Demo  bool
	Quiet bool
}

// defaultCatalogPath is where `plumb catalog init` puts the catalog without
// a path: plumb/catalog.db in the user data directory.
func defaultCatalogPath(f *Factory) (string, error) {
	dir, err := f.DataDir()
	if err != nil {
		return "", fmt.Errorf("finding the user data directory: %w: give the catalog path, `plumb catalog init PATH`", err)
	}
	return filepath.Join(dir, "plumb", "catalog.db"), nil
}

func newCatalogInitCmd(f *Factory, runF func(*catalogInitOptions) error) *cobra.Command {
	opts := &catalogInitOptions{IO: f.IO}
	cmd := &cobra.Command{
		Use:   "init [PATH]",
		Short: "Create a new catalog file",
		Long: `Create a new catalog file at PATH, else at the configured catalog (--catalog,
PLUMB_CATALOG or the config file), else at plumb/catalog.db in the user data
directory. An existing file is never replaced without --force. With --demo
the new catalog starts with the demo parts; otherwise it is empty and filled
with ` + "`plumb import`" + `.`,
		Example: `  plumb catalog init parts.db --demo
  plumb --catalog parts.db catalog stats`,
		Args: rangeArgs(0, 1, "at most one PATH"),
		RunE: func(cmd *cobra.Command, args []string) error {
			switch {
			case len(args) == 1:
				opts.Path = args[0]
			case f.Settings().Catalog != "":
				opts.Path = f.Settings().Catalog
			default:
				p, err := defaultCatalogPath(f)
				if err != nil {
					return err
				}
				opts.Path = p
			}
			opts.Quiet = f.Quiet
			if runF != nil {
				return runF(opts)
			}
			return runCatalogInit(cmd.Context(), opts)
		},
	}
	cmd.Flags().BoolVar(&opts.Force, "force", false, "replace an existing catalog file (its parts are lost)")
	cmd.Flags().BoolVar(&opts.Demo, "demo", false, "fill the new catalog with the demo parts")
	return cmd
}

func runCatalogInit(ctx context.Context, opts *catalogInitOptions) error {
	if err := replaceable(opts.Path, opts.Force); errors.Is(err, errFileExists) {
		return fmt.Errorf("catalog %s already exists: use it with --catalog %s, or add --force to replace it (its parts are lost)", opts.Path, opts.Path)
	} else if err != nil {
		return fmt.Errorf("catalog: %w", err)
	}
	if err := os.MkdirAll(filepath.Dir(opts.Path), 0o755); err != nil {
		return fmt.Errorf("creating the directory for catalog %s: %w", opts.Path, err)
	}
	if !opts.Demo {
		st, err := catalog.Create(opts.Path, opts.Force)
		if err != nil {
			return initError(opts.Path, err)
		}
		if err := st.Close(); err != nil {
			return fmt.Errorf("closing catalog %s: %w", opts.Path, err)
		}
		if !opts.Quiet {
			fmt.Fprintf(opts.IO.ErrOut, "created empty catalog %s: add parts with `plumb --catalog %s import FILE`; %s\n", opts.Path, opts.Path, useHint(opts.Path))
		}
		return nil
	}
	n, err := createDemoCatalog(ctx, opts.Path)
	if err != nil {
		return err
	}
	if !opts.Quiet {
		fmt.Fprintf(opts.IO.ErrOut, "created catalog %s with %d demo parts; %s\n", opts.Path, n, useHint(opts.Path))
	}
	return nil
}

// createDemoCatalog builds a catalog holding the demo parts beside path and
// renames it over path only once it is complete, so a failure leaves
// nothing behind. It returns the number of parts written.
func createDemoCatalog(ctx context.Context, path string) (int, error) {
	demo, err := data.Demo()
	if err != nil {
		return 0, fmt.Errorf("opening the embedded demo catalog: %w", err)
	}
	defer demo.Close()
	snap, err := demo.Snapshot(ctx)
	if err != nil {
		return 0, fmt.Errorf("reading the embedded demo catalog: %w", err)
	}
	tmp := filepath.Join(filepath.Dir(path), "."+filepath.Base(path)+".new")
	os.Remove(tmp)
	defer os.Remove(tmp)
	st, err := catalog.Create(tmp, true)
	if err != nil {
		return 0, initError(path, err)
	}
	res, err := st.Upsert(ctx, snap, catalog.UpsertOptions{Source: "plumb demo catalog"})
	if cerr := st.Close(); err == nil && cerr != nil {
		err = cerr
	}
	if err != nil {
		return 0, fmt.Errorf("filling catalog %s with the demo parts: %w (nothing was written)", path, err)
	}
	if err := os.Rename(tmp, path); err != nil {
		return 0, fmt.Errorf("creating catalog %s: %w (nothing was written)", path, err)
	}
	return len(res), nil
}

func initError(path string, err error) error {
	if errors.Is(err, catalog.ErrExists) {
		return fmt.Errorf("catalog %s already exists: add --force to replace it (its parts are lost): %w", path, err)
	}
	return fmt.Errorf("creating catalog %s: %w", path, err)
}

// useHint says how to make plumb use a catalog file by default.
func useHint(path string) string {
	return fmt.Sprintf("to use it without --catalog, set PLUMB_CATALOG=%s or put `catalog: %s` in plumb.yaml", path, path)
}
