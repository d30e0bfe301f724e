package main

import (
	"errors"
	"io"
	"path/filepath"
	"reflect"
	"testing"

	"github.com/spf13/cobra"

	"plumb/catalog"
)

// parseOnly runs a command built with a capturing runF on args, as the root
// command would parse them, and returns the error.
func parseOnly(t *testing.T, cmd *cobra.Command, args []string) error {
	t.Helper()
	if args == nil {
		args = []string{} // cobra reads os.Args for nil
	}
	cmd.SetArgs(args)
	cmd.SetOut(io.Discard)
	cmd.SetErr(io.Discard)
	cmd.SilenceErrors = true
	cmd.SilenceUsage = true
	cmd.SetFlagErrorFunc(flagError)
	return cmd.Execute()
}

// checkParse compares the captured options with want, or checks that a
// usage error came back when wantUsage is set.
func checkParse(t *testing.T, err error, wantUsage bool, got, want any) {
	t.Helper()
	if wantUsage {
		var ue *usageError
		if !errors.As(err, &ue) {
			t.Fatalf("error = %v, want a usage error", err)
		}
		return
	}
	if err != nil {
		t.Fatalf("unexpected error: %v", err)
	}
	if !reflect.DeepEqual(got, want) {
		t.Errorf("options = %+v\nwant      %+v", got, want)
	}
}

func TestSeriesFlags(t *testing.T) {
	tests := []struct {
		name      string
		args      []string
		want      seriesOptions
		wantUsage bool
	}{
		{name: "defaults", args: []string{"E24"}, want: seriesOptions{Name: "E24", From: "1", To: "10", Format: "table"}},
		{name: "range", args: []string{"E192", "--from", "9", "--to", "10"}, want: seriesOptions{Name: "E192", From: "9", To: "10", Format: "table"}},
		{name: "json", args: []string{"E96", "--from", "4k7", "--format", "json"}, want: seriesOptions{Name: "E96", From: "4k7", To: "10", Format: "json"}},
		{name: "no name", args: nil, wantUsage: true},
		{name: "two names", args: []string{"E24", "E96"}, wantUsage: true},
		{name: "unknown format", args: []string{"E24", "--format", "xml"}, wantUsage: true},
		{name: "unknown flag", args: []string{"E24", "--step", "2"}, wantUsage: true},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			f, _, _ := testFactory(t)
			var got *seriesOptions
			err := parseOnly(t, newSeriesCmd(f, func(o *seriesOptions) error { got = o; return nil }), tt.args)
			if got != nil {
				got.IO = nil
			}
			checkParse(t, err, tt.wantUsage, derefOr(got), tt.want)
		})
	}
}

func derefOr[T any](p *T) T {
	var zero T
	if p == nil {
		return zero
	}
	return *p
}

func TestCatalogListFlags(t *testing.T) {
	tests := []struct {
		name      string
		args      []string
		want      catalog.Filter
		format    string
		wantUsage bool
	}{
		{name: "no filter", want: catalog.Filter{}, format: "table"},
		{
			name: "every filter",
			args: []string{"--kind", "Series", "--min", "1k", "--max", "4M7", "--max-tolerance", "0.1",
				"--max-tcr", "±25ppm/°C", "--technology", "thin-film", "--package", "0603", "--maker", "Ostrava", "--part", "TF*", "--format", "csv"},
			// 0.1 read as percent is a fraction of 0.001; 4M7 is 4.7 MΩ (trade notation, common practice).
			want: catalog.Filter{Kind: catalog.KindSeries, MinOhm: 1000, MaxOhm: 4.7e6, MaxTolerance: 0.001, MaxTCR: 25,
				Technology: "thin-film", Package: "0603", Maker: "Ostrava", PartLike: "TF*"},
			format: "csv",
		},
		{name: "tolerance with a percent sign", args: []string{"--max-tolerance", "1%"}, want: catalog.Filter{MaxTolerance: 0.01}, format: "table"},
		{name: "unknown kind", args: []string{"--kind", "capacitor"}, wantUsage: true},
		{name: "bad value", args: []string{"--min", "4x99"}, wantUsage: true},
		{name: "min above max", args: []string{"--min", "10k", "--max", "1k"}, wantUsage: true},
		{name: "negative tolerance", args: []string{"--max-tolerance", "-1"}, wantUsage: true},
		{name: "stray argument", args: []string{"resistors"}, wantUsage: true},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			f, _, _ := testFactory(t)
			var got *catalogListOptions
			err := parseOnly(t, newCatalogListCmd(f, func(o *catalogListOptions) error { got = o; return nil }), tt.args)
			if tt.wantUsage {
				checkParse(t, err, true, nil, nil)
				return
			}
			if got == nil {
				t.Fatalf("run not reached: %v", err)
			}
			checkParse(t, err, false, got.Filter, tt.want)
			if got.Format != tt.format {
				t.Errorf("format = %q, want %q", got.Format, tt.format)
			}
		})
	}
}

func TestCatalogExportFlags(t *testing.T) {
	tests := []struct {
		name      string
		args      []string
		want      catalogExportOptions
		wantUsage bool
	}{
		{name: "json by default", want: catalogExportOptions{Format: "json"}},
		{name: "csv of one kind to a file", args: []string{"--format", "csv", "--kind", "network", "-o", "n.csv", "--force"},
			want: catalogExportOptions{Format: "csv", Kind: catalog.KindNetwork, Output: "n.csv", Force: true}},
		{name: "csv needs a kind", args: []string{"--format", "csv"}, wantUsage: true},
		{name: "json takes no kind", args: []string{"--kind", "resistor"}, wantUsage: true},
		{name: "table is not an export format", args: []string{"--format", "table"}, wantUsage: true},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			f, _, _ := testFactory(t)
			var got *catalogExportOptions
			err := parseOnly(t, newCatalogExportCmd(f, func(o *catalogExportOptions) error { got = o; return nil }), tt.args)
			if got != nil {
				got.IO, got.Catalog = nil, nil
			}
			checkParse(t, err, tt.wantUsage, derefOr(got), tt.want)
		})
	}
}

func TestCatalogInitFlags(t *testing.T) {
	tests := []struct {
		name      string
		args      []string
		want      catalogInitOptions // Path "DATA" stands for the default path
		wantUsage bool
	}{
		{name: "path given", args: []string{"parts.db"}, want: catalogInitOptions{Path: "parts.db"}},
		{name: "default path", want: catalogInitOptions{Path: "DATA"}},
		{name: "force and demo", args: []string{"x.db", "--force", "--demo"}, want: catalogInitOptions{Path: "x.db", Force: true, Demo: true}},
		{name: "two paths", args: []string{"a.db", "b.db"}, wantUsage: true},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			f, _, _ := testFactory(t)
			if tt.want.Path == "DATA" {
				dir, _ := f.DataDir()
				tt.want.Path = filepath.Join(dir, "plumb", "catalog.db")
			}
			var got *catalogInitOptions
			err := parseOnly(t, newCatalogInitCmd(f, func(o *catalogInitOptions) error { got = o; return nil }), tt.args)
			if got != nil {
				got.IO = nil
			}
			checkParse(t, err, tt.wantUsage, derefOr(got), tt.want)
		})
	}
}

func TestPartArgumentFlags(t *testing.T) {
	tests := []struct {
		name      string
		build     func(f *Factory, got *string) *cobra.Command
		args      []string
		want      string
		wantUsage bool
	}{
		{name: "show", args: []string{"TF0603-1K00"}, want: "TF0603-1K00/table", build: func(f *Factory, got *string) *cobra.Command {
			return newCatalogShowCmd(f, func(o *catalogShowOptions) error { *got = o.Part + "/" + o.Format; return nil })
		}},
		{name: "show json", args: []string{"X", "--format", "json"}, want: "X/json", build: func(f *Factory, got *string) *cobra.Command {
			return newCatalogShowCmd(f, func(o *catalogShowOptions) error { *got = o.Part + "/" + o.Format; return nil })
		}},
		{name: "show needs a part", wantUsage: true, build: func(f *Factory, got *string) *cobra.Command {
			return newCatalogShowCmd(f, func(o *catalogShowOptions) error { return nil })
		}},
		{name: "history", args: []string{"Y", "--format", "csv"}, want: "Y/csv", build: func(f *Factory, got *string) *cobra.Command {
			return newCatalogHistoryCmd(f, func(o *catalogHistoryOptions) error { *got = o.Part + "/" + o.Format; return nil })
		}},
		{name: "stats", want: "table", build: func(f *Factory, got *string) *cobra.Command {
			return newCatalogStatsCmd(f, func(o *catalogStatsOptions) error { *got = o.Format; return nil })
		}},
		{name: "config show", args: []string{"--format", "json"}, want: "json", build: func(f *Factory, got *string) *cobra.Command {
			return newConfigShowCmd(f, func(o *configShowOptions) error { *got = o.Format; return nil })
		}},
		{name: "completion", args: []string{"zsh"}, want: "zsh", build: func(f *Factory, got *string) *cobra.Command {
			return newCompletionCmd(f, func(o *completionOptions) error { *got = o.Shell; return nil })
		}},
		{name: "man", args: []string{"out"}, want: "out", build: func(f *Factory, got *string) *cobra.Command {
			return newManCmd(f, func(o *manOptions) error { *got = o.Dir; return nil })
		}},
		{name: "man needs a directory", wantUsage: true, build: func(f *Factory, got *string) *cobra.Command {
			return newManCmd(f, func(o *manOptions) error { return nil })
		}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			f, _, _ := testFactory(t)
			var got string
			err := parseOnly(t, tt.build(f, &got), tt.args)
			checkParse(t, err, tt.wantUsage, got, tt.want)
		})
	}
}
