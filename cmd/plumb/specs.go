package main

import (
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path"
	"sort"
	"strings"

	"plumb/data"
	"plumb/optimize/spec"
)

// loadSpecArg reads a spec from a file, or, when no file of that name
// exists, from the embedded example of that name ("logger-channel" or
// "logger-channel.yaml"), so that every example in the help works without
// files.
func loadSpecArg(name string) (*spec.Spec, error) {
	return loadArg(name, "spec", spec.Load, spec.Parse)
}

// loadDesignArg reads a design from a file or an embedded example.
func loadDesignArg(name string) (*spec.Design, error) {
	return loadArg(name, "design", spec.LoadDesign, spec.ParseDesign)
}

func loadArg[T any](name, what string, load func(string) (T, error), parse func([]byte, string) (T, error)) (T, error) {
	var zero T
	if _, err := os.Stat(name); err == nil {
		v, err := load(name)
		if err != nil {
			return zero, fmt.Errorf("%w: fix the file and run again", err)
		}
		return v, nil
	} else if !errors.Is(err, fs.ErrNotExist) {
		return zero, fmt.Errorf("%s %s: %w", what, name, err)
	}
	b, file, err := readExample(name)
	if err != nil {
		return zero, err
	}
	v, err := parse(b, "example "+file)
	if err != nil {
		return zero, fmt.Errorf("embedded example %s: %w", file, err)
	}
	return v, nil
}

// readExample returns an embedded example file by name, with or without
// its .yaml suffix.
func readExample(name string) ([]byte, string, error) {
	ex := data.Examples()
	base := strings.TrimSuffix(path.Base(name), ".yaml")
	for _, p := range []string{base + ".yaml", "examples/" + base + ".yaml"} {
		if b, err := fs.ReadFile(ex, p); err == nil {
			return b, path.Base(p), nil
		}
	}
	return nil, "", fmt.Errorf("file %s not found, and no embedded example has that name: give a spec or design file, or one of the examples: %s",
		name, strings.Join(exampleNames(), ", "))
}

// exampleNames lists the embedded examples without their suffix.
func exampleNames() []string {
	var names []string
	_ = fs.WalkDir(data.Examples(), ".", func(p string, d fs.DirEntry, err error) error {
		if err == nil && !d.IsDir() && strings.HasSuffix(p, ".yaml") {
			names = append(names, strings.TrimSuffix(path.Base(p), ".yaml"))
		}
		return nil
	})
	sort.Strings(names)
	return names
}
