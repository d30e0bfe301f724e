package main

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
)

// errFileExists is returned when an output file exists and --force is not
// given.
var errFileExists = errors.New("output file exists")

// writeFileAtomic writes path through write, all or nothing: the content
// goes to a temporary file beside path which is renamed over it only when
// write succeeds. An existing path is refused unless force is set.
func writeFileAtomic(path string, force bool, write func(io.Writer) error) error {
	if _, err := os.Stat(path); err == nil && !force {
		return fmt.Errorf("%w: %s: choose another name or add --force to replace it", errFileExists, path)
	} else if err != nil && !errors.Is(err, fs.ErrNotExist) {
		return fmt.Errorf("output file %s: %w", path, err)
	}
	dir := filepath.Dir(path)
	tmp, err := os.CreateTemp(dir, "."+filepath.Base(path)+".*.tmp")
	if err != nil {
		return fmt.Errorf("output file %s: %w: check that the directory exists and is writable", path, err)
	}
	defer os.Remove(tmp.Name()) // no-op once renamed
	bw := bufio.NewWriter(tmp)
	if err := write(bw); err != nil {
		tmp.Close()
		return fmt.Errorf("writing %s: %w (nothing was written)", path, err)
	}
	if err := bw.Flush(); err != nil {
		tmp.Close()
		return fmt.Errorf("writing %s: %w (nothing was written)", path, err)
	}
	if err := tmp.Close(); err != nil {
		return fmt.Errorf("writing %s: %w (nothing was written)", path, err)
	}
	if err := os.Chmod(tmp.Name(), 0o644); err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	if err := os.Rename(tmp.Name(), path); err != nil {
		return fmt.Errorf("writing %s: %w (nothing was written)", path, err)
	}
	return nil
}

// writeOutput writes through write to stdout, or, when path is set (and
// not "-"), to that file all or nothing, with a note on stderr.
func writeOutput(ios *IOStreams, path string, force, quiet bool, write func(io.Writer) error) error {
	if path == "" || path == "-" {
		return write(ios.Out)
	}
	if err := writeFileAtomic(path, force, write); err != nil {
		return err
	}
	if !quiet {
		fmt.Fprintf(ios.ErrOut, "wrote %s\n", path)
	}
	return nil
}
