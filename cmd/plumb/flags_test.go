package main

import (
	"errors"
	"fmt"
	"io"
	"path/filepath"
	"reflect"
	"strings"
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

func TestSearchCommandFlags(t *testing.T) {
	tests := []struct {
		name      string
		env       map[string]string
		build     func(f *Factory, got *string) *cobra.Command
		args      []string
		want      string
		wantUsage bool
	}{
		{name: "solve defaults", args: []string{"s.yaml"}, want: "s.yaml top=5 combos=false explain=0 bom= format=table", build: solveProbe},
		{name: "solve every flag", args: []string{"s.yaml", "--top", "3", "--combos", "--explain", "2", "--bom", "b.csv", "--format", "csv"},
			want: "s.yaml top=3 combos=true explain=2 bom=b.csv format=csv", build: solveProbe},
		{name: "solve explain beyond top", args: []string{"s.yaml", "--top", "2", "--explain", "3"}, wantUsage: true, build: solveProbe},
		{name: "solve top 0", args: []string{"s.yaml", "--top", "0"}, wantUsage: true, build: solveProbe},
		{name: "solve top beyond the bound", args: []string{"s.yaml", "--top", "51"}, wantUsage: true, build: solveProbe},
		{name: "report top beyond the bound", args: []string{"s.yaml", "-o", "r.md", "--top", "1000000000"}, wantUsage: true, build: reportProbe},
		{name: "solve top not a number", args: []string{"s.yaml", "--top", "many"}, wantUsage: true, build: solveProbe},
		{name: "solve needs a spec", wantUsage: true, build: solveProbe},
		{name: "check", args: []string{"s.yaml", "--design", "d.yaml", "--format", "json"}, want: "s.yaml d.yaml json", build: func(f *Factory, got *string) *cobra.Command {
			return newCheckCmd(f, func(o *checkOptions) error { *got = o.Spec + " " + o.Design + " " + o.Format; return nil })
		}},
		{name: "check needs --design", args: []string{"s.yaml"}, wantUsage: true, build: func(f *Factory, got *string) *cobra.Command {
			return newCheckCmd(f, func(o *checkOptions) error { return nil })
		}},
		{name: "bom", args: []string{"d.yaml", "--spec", "s.yaml", "-o", "b.csv", "--format", "csv"}, want: "d.yaml s.yaml b.csv csv", build: func(f *Factory, got *string) *cobra.Command {
			return newBOMCmd(f, func(o *bomOptions) error {
				*got = o.Design + " " + o.Spec + " " + o.Output + " " + o.Format
				return nil
			})
		}},
		{name: "import", args: []string{"a.csv", "b.csv", "--kind", "network", "--mapping", "m", "--save-mapping", "n", "--dry-run", "--source", "list", "--report", "r.csv"},
			want: "[a.csv b.csv] network m n true list r.csv", build: importProbe},
		{name: "import auto kind", args: []string{"a.csv"}, want: "[a.csv]    false", build: importProbe},
		{name: "import needs a file", wantUsage: true, build: importProbe},
		{name: "import unknown kind", args: []string{"a.csv", "--kind", "capacitor"}, wantUsage: true, build: importProbe},
		{name: "report", args: []string{"s.yaml", "-o", "r.html", "--top", "2"}, want: "s.yaml r.html 2", build: reportProbe},
		{name: "report takes the configured top, at most 3", env: map[string]string{"PLUMB_TOP": "8"}, args: []string{"s.yaml", "-o", "r.md"}, want: "s.yaml r.md 3", build: reportProbe},
		{name: "report needs -o", args: []string{"s.yaml"}, wantUsage: true, build: reportProbe},
		{name: "demo json", args: []string{"--format", "json"}, want: "json", build: func(f *Factory, got *string) *cobra.Command {
			return newDemoCmd(f, func(o *demoOptions) error { *got = o.Format; return nil })
		}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			clearPlumbEnv(t)
			for k, v := range tt.env {
				t.Setenv(k, v)
			}
			f, _, _ := testFactory(t)
			if len(tt.env) > 0 {
				s, err := loadSettings(configSource{ConfigDir: f.ConfigDir}, nil)
				if err != nil {
					t.Fatal(err)
				}
				f.settings = s
			}
			var got string
			err := parseOnly(t, tt.build(f, &got), tt.args)
			checkParse(t, err, tt.wantUsage, got, tt.want)
		})
	}
}

func solveProbe(f *Factory, got *string) *cobra.Command {
	return newSolveCmd(f, func(o *solveOptions) error {
		*got = fmt.Sprintf("%s top=%d combos=%v explain=%d bom=%s format=%s", o.Spec, o.Top, o.Combos, o.Explain, o.BOM, o.Format)
		return nil
	})
}

func importProbe(f *Factory, got *string) *cobra.Command {
	return newImportCmd(f, func(o *importOptions) error {
		*got = strings.TrimSpace(fmt.Sprintf("%v %s %s %s %v %s %s", o.Files, o.Kind, o.Mapping, o.SaveMapping, o.DryRun, o.Source, o.Report))
		return nil
	})
}

func reportProbe(f *Factory, got *string) *cobra.Command {
	return newReportCmd(f, func(o *reportOptions) error {
		*got = fmt.Sprintf("%s %s %d", o.Spec, o.Output, o.Top)
		return nil
	})
}
