package main

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"runtime"
	"time"
)

// Factory holds what commands share: the streams, the configuration once it
// is loaded, and how to open the catalog. Tests replace its fields.
type Factory struct {
	IO *IOStreams
	// ConfigDir returns the user's configuration directory.
	ConfigDir func() (string, error)
	// DataDir returns the user's data directory (where `plumb catalog
	// init` puts the catalog by default).
	DataDir func() (string, error)
	// Now is the clock (injected for tests).
	Now func() time.Time
	// Catalog opens the catalog commands work on: by default the
	// configured file or the embedded demo catalog (openConfigured).
	Catalog catalogOpener

	// Quiet and Verbose are the global flags.
	Quiet, Verbose bool
	// ConfigFile is the --config flag.
	ConfigFile string

	settings *Settings
}

func newFactory(ios *IOStreams) *Factory {
	f := &Factory{
		IO:        ios,
		ConfigDir: os.UserConfigDir,
		DataDir:   userDataDir,
		Now:       time.Now,
	}
	f.Catalog = f.openConfigured
	return f
}

// Settings returns the effective configuration: what the root command
// loaded, or the defaults when a command runs on its own (in tests).
func (f *Factory) Settings() *Settings {
	if f.settings == nil {
		return defaultSettings()
	}
	return f.settings
}

// Notef prints a note on stderr unless --quiet.
func (f *Factory) Notef(format string, a ...any) {
	if f.Quiet {
		return
	}
	fmt.Fprintf(f.IO.ErrOut, format+"\n", a...)
}

// userDataDir returns the directory for user data: $XDG_DATA_HOME or
// ~/.local/share on Unix (XDG Base Directory specification), Application
// Support on macOS, %LocalAppData% on Windows.
func userDataDir() (string, error) {
	switch runtime.GOOS {
	case "windows":
		if d := os.Getenv("LocalAppData"); d != "" {
			return d, nil
		}
		return "", errors.New("%LocalAppData% is not set")
	case "darwin", "ios":
		home, err := os.UserHomeDir()
		if err != nil {
			return "", err
		}
		return filepath.Join(home, "Library", "Application Support"), nil
	}
	if d := os.Getenv("XDG_DATA_HOME"); d != "" && filepath.IsAbs(d) {
		return d, nil
	}
	home, err := os.UserHomeDir()
	if err != nil {
		return "", err
	}
	return filepath.Join(home, ".local", "share"), nil
}
