package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/spf13/pflag"
)

// writeConfig writes plumb.yaml into dir/plumb/ and returns its path.
func writeConfig(t *testing.T, dir, text string) string {
	t.Helper()
	p := filepath.Join(dir, "plumb", configFileName)
	if err := os.MkdirAll(filepath.Dir(p), 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

func clearPlumbEnv(t *testing.T) {
	t.Helper()
	for _, k := range append(configKeys, "config") {
		t.Setenv(envPrefix+"_"+strings.ToUpper(k), "")
	}
}

func TestSettingsPrecedence(t *testing.T) {
	type want struct{ value, source string }
	tests := []struct {
		name   string
		file   string            // config file text; "" for none
		env    map[string]string // PLUMB_* variables
		flags  []string          // command-line flags
		expect map[string]want   // per key; "FILE" in a source is the config path
	}{
		{
			name: "defaults only",
			expect: map[string]want{
				keyCatalog: {"", "default"},
				keyFormat:  {"table", "default"},
				keyTop:     {"5", "default"},
				keyColor:   {"auto", "default"},
			},
		},
		{
			name: "config file over default",
			file: "catalog: parts.db\nformat: json\ntop: 9\n",
			expect: map[string]want{
				keyCatalog: {"parts.db", "config file FILE"},
				keyFormat:  {"json", "config file FILE"},
				keyTop:     {"9", "config file FILE"},
				keyColor:   {"auto", "default"},
			},
		},
		{
			name: "env over config file",
			file: "catalog: parts.db\nformat: json\n",
			env:  map[string]string{"PLUMB_CATALOG": "env.db", "PLUMB_TOP": "3"},
			expect: map[string]want{
				keyCatalog: {"env.db", "env PLUMB_CATALOG"},
				keyFormat:  {"json", "config file FILE"},
				keyTop:     {"3", "env PLUMB_TOP"},
			},
		},
		{
			name:  "flag over env and config file",
			file:  "catalog: parts.db\ncolor: always\n",
			env:   map[string]string{"PLUMB_CATALOG": "env.db", "PLUMB_FORMAT": "csv"},
			flags: []string{"--catalog", "flag.db", "--top", "12"},
			expect: map[string]want{
				keyCatalog: {"flag.db", "flag --catalog"},
				keyFormat:  {"csv", "env PLUMB_FORMAT"},
				keyTop:     {"12", "flag --top"},
				keyColor:   {"always", "config file FILE"},
			},
		},
		{
			name:  "flag at its default value still counts as given",
			env:   map[string]string{"PLUMB_TOP": "3"},
			flags: []string{"--top", "5"},
			expect: map[string]want{
				keyTop: {"5", "flag --top"},
			},
		},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			clearPlumbEnv(t)
			for k, v := range tt.env {
				t.Setenv(k, v)
			}
			dir := t.TempDir()
			path := ""
			if tt.file != "" {
				path = writeConfig(t, dir, tt.file)
			}
			fs := pflag.NewFlagSet("test", pflag.ContinueOnError)
			fs.String(keyCatalog, "", "")
			fs.Int(keyTop, 5, "")
			if err := fs.Parse(tt.flags); err != nil {
				t.Fatal(err)
			}
			s, err := loadSettings(configSource{ConfigDir: func() (string, error) { return dir, nil }}, fs)
			if err != nil {
				t.Fatal(err)
			}
			if s.File != path {
				t.Errorf("config file = %q, want %q", s.File, path)
			}
			for k, w := range tt.expect {
				src := strings.ReplaceAll(w.source, "FILE", path)
				if s.Value(k) != w.value || s.Source(k) != src {
					t.Errorf("%s = %q from %q, want %q from %q", k, s.Value(k), s.Source(k), w.value, src)
				}
			}
		})
	}
}

func TestSettingsExplicitConfigFile(t *testing.T) {
	clearPlumbEnv(t)
	dir := t.TempDir()
	// A file in the user config directory that --config must override.
	writeConfig(t, dir, "top: 2\n")
	other := filepath.Join(t.TempDir(), "team.yaml")
	if err := os.WriteFile(other, []byte("top: 7\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		name string
		src  configSource
		env  string
	}{
		{name: "--config flag", src: configSource{Explicit: other}},
		{name: "PLUMB_CONFIG", env: other},
	} {
		t.Run(tc.name, func(t *testing.T) {
			t.Setenv("PLUMB_CONFIG", tc.env)
			tc.src.ConfigDir = func() (string, error) { return dir, nil }
			s, err := loadSettings(tc.src, nil)
			if err != nil {
				t.Fatal(err)
			}
			if s.Top != 7 || s.Source(keyTop) != "config file "+other {
				t.Errorf("top = %d from %q, want 7 from the explicit file", s.Top, s.Source(keyTop))
			}
		})
	}
}

func TestSettingsErrors(t *testing.T) {
	tests := []struct {
		name     string
		file     string
		env      map[string]string
		explicit string
		wantIn   []string // substrings the message must hold
	}{
		{
			name:   "unknown key in the config file",
			file:   "formt: json\n",
			wantIn: []string{"plumb.yaml", `unknown key "formt"`, "catalog, format, top, color"},
		},
		{
			name:   "bad YAML",
			file:   "format: [json\n",
			wantIn: []string{"plumb.yaml", "fix the YAML"},
		},
		{
			name:   "bad format from env names the variable",
			env:    map[string]string{"PLUMB_FORMAT": "xml"},
			wantIn: []string{`format "xml"`, "env PLUMB_FORMAT", "table, json, csv"},
		},
		{
			name:   "bad top from the config file names the file",
			file:   "top: 0\n",
			wantIn: []string{`top "0"`, "config file", "from 1 to 50"},
		},
		{
			name:   "bad colour",
			env:    map[string]string{"PLUMB_COLOR": "sometimes"},
			wantIn: []string{`color "sometimes"`, "auto, always, never"},
		},
		{
			name:     "missing --config file",
			explicit: "no-such.yaml",
			wantIn:   []string{"no-such.yaml", "--config"},
		},
		{
			name:   "missing PLUMB_CONFIG file",
			env:    map[string]string{"PLUMB_CONFIG": "gone.yaml"},
			wantIn: []string{"gone.yaml", "PLUMB_CONFIG"},
		},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			clearPlumbEnv(t)
			for k, v := range tt.env {
				t.Setenv(k, v)
			}
			dir := t.TempDir()
			if tt.file != "" {
				writeConfig(t, dir, tt.file)
			}
			explicit := tt.explicit
			if explicit != "" {
				explicit = filepath.Join(dir, explicit)
			}
			_, err := loadSettings(configSource{Explicit: explicit, ConfigDir: func() (string, error) { return dir, nil }}, nil)
			if err == nil {
				t.Fatal("no error")
			}
			for _, w := range tt.wantIn {
				if !strings.Contains(err.Error(), w) {
					t.Errorf("error %q does not mention %q", err, w)
				}
			}
		})
	}
}
