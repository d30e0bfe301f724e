package main

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"slices"

	"plumb/optimize/report"
)

// errFileExists is returned when an output file exists and --force is not
// given.
var errFileExists = errors.New("output file exists")

// errNotRegular is returned when --force is asked to replace something
// that is not a regular file.
var errNotRegular = errors.New("not a regular file")

// replaceable checks that an output may be written at path: nothing is
// there, or, with force, a regular file is. A symbolic link (even to a
// regular file), a directory, a device, a FIFO or a socket is never
// replaced: renaming a file over it would destroy it, or write somewhere
// the user did not name.
func replaceable(path string, force bool) error {
	fi, err := os.Lstat(path)
	switch {
	case errors.Is(err, fs.ErrNotExist):
		return nil
	case err != nil:
		return fmt.Errorf("output file %s: %w", path, err)
	case !force:
		return fmt.Errorf("%w: %s: choose another name or add --force to replace it", errFileExists, path)
	case !fi.Mode().IsRegular():
		return fmt.Errorf("%w: %s is %s: --force replaces only regular files; choose another name, or remove it first if that is what you mean",
			errNotRegular, path, fileKind(fi.Mode()))
	}
	return nil
}

// fileKind names what a file mode is, for a message.
func fileKind(m fs.FileMode) string {
	switch {
	case m&fs.ModeSymlink != 0:
		return "a symbolic link"
	case m.IsDir():
		return "a directory"
	case m&fs.ModeNamedPipe != 0:
		return "a FIFO"
	case m&fs.ModeSocket != 0:
		return "a socket"
	case m&fs.ModeDevice != 0:
		return "a device"
	}
	return "not a regular file"
}

// stage writes content through write to a new temporary file beside path
// and returns its name; the caller renames it into place or removes it.
func stage(path string, write func(io.Writer) error) (string, error) {
	tmp, err := os.CreateTemp(filepath.Dir(path), "."+filepath.Base(path)+".*.tmp")
	if err != nil {
		return "", fmt.Errorf("output file %s: %w: check that the directory exists and is writable", path, err)
	}
	bw := bufio.NewWriter(tmp)
	err = write(bw)
	if err == nil {
		err = bw.Flush()
	}
	if cerr := tmp.Close(); err == nil {
		err = cerr
	}
	if err == nil {
		err = os.Chmod(tmp.Name(), 0o644)
	}
	if err != nil {
		os.Remove(tmp.Name())
		return "", fmt.Errorf("writing %s: %w (nothing was written)", path, err)
	}
	return tmp.Name(), nil
}

// writeFileAtomic writes path through write, all or nothing: the content
// goes to a temporary file beside path which is renamed over it only when
// write succeeds. An existing path is refused unless force is set, and
// then replaced only if it is a regular file (see replaceable).
func writeFileAtomic(path string, force bool, write func(io.Writer) error) error {
	if err := replaceable(path, force); err != nil {
		return err
	}
	tmp, err := stage(path, write)
	if err != nil {
		return err
	}
	if err := os.Rename(tmp, path); err != nil {
		os.Remove(tmp)
		return fmt.Errorf("writing %s: %w (nothing was written)", path, err)
	}
	return nil
}

// writeFilesAtomic writes several files into dir as writeFileAtomic writes
// one: every file is checked, then staged, and only when all are staged
// are they renamed into place.
func writeFilesAtomic(dir string, files []report.File, force bool) error {
	for _, f := range files {
		if err := replaceable(filepath.Join(dir, f.Name), force); err != nil {
			return err
		}
	}
	var tmps []string
	defer func() {
		for _, t := range tmps {
			os.Remove(t) // no-op once renamed
		}
	}()
	for _, f := range files {
		tmp, err := stage(filepath.Join(dir, f.Name), func(w io.Writer) error { _, err := w.Write(f.Data); return err })
		if err != nil {
			return err
		}
		tmps = append(tmps, tmp)
	}
	for i, f := range files {
		if err := os.Rename(tmps[i], filepath.Join(dir, f.Name)); err != nil {
			return fmt.Errorf("writing %s: %w", filepath.Join(dir, f.Name), err)
		}
	}
	return nil
}

// writeMarkdownReport writes a Markdown report's files into dir. Its plot
// files count as outputs: none is replaced without force. The plot files
// an earlier report of the same name listed as its own (report.Sidecars)
// and this one no longer writes are removed, regular files only; a file
// the earlier report did not list is never touched.
func writeMarkdownReport(dir string, files []report.File, force bool) error {
	md := filepath.Join(dir, files[len(files)-1].Name)
	var owned []string
	if err := replaceable(md, force); err != nil {
		return err
	}
	if old, err := os.ReadFile(md); err == nil {
		owned = report.Sidecars(old)
	}
	if err := writeFilesAtomic(dir, files, force); err != nil {
		return err
	}
	for _, name := range owned {
		if slices.ContainsFunc(files, func(f report.File) bool { return f.Name == name }) {
			continue
		}
		p := filepath.Join(dir, name)
		if fi, err := os.Lstat(p); err == nil && fi.Mode().IsRegular() {
			if err := os.Remove(p); err != nil {
				return fmt.Errorf("removing %s, a plot of the report it replaces: %w", p, err)
			}
		}
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
