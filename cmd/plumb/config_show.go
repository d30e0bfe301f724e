package main

import (
	"github.com/spf13/cobra"
)

func newConfigCmd(f *Factory) *cobra.Command {
	cmd := groupCmd("config", "Show plumb's configuration", newConfigShowCmd(f, nil))
	cmd.Example = `  plumb config show`
	return cmd
}

type configShowOptions struct {
	IO       *IOStreams
	Settings func() *Settings
	Format   string
}

func newConfigShowCmd(f *Factory, runF func(*configShowOptions) error) *cobra.Command {
	opts := &configShowOptions{IO: f.IO, Settings: f.Settings}
	cmd := &cobra.Command{
		Use:   "show",
		Short: "Print each effective setting, its value and where it came from",
		Long: `Print each setting plumb uses, its effective value and where that value
came from: a flag, an environment variable (PLUMB_CATALOG, PLUMB_FORMAT,
PLUMB_TOP, PLUMB_COLOR), the config file, or the default.`,
		Example: `  plumb config show
  PLUMB_TOP=3 plumb config show --format json`,
		Args: noArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			var err error
			if opts.Format, err = chooseFormat(cmd, f, opts.Format); err != nil {
				return err
			}
			if runF != nil {
				return runF(opts)
			}
			return runConfigShow(opts)
		},
	}
	addFormatFlag(cmd, &opts.Format)
	return cmd
}

// settingJSON is one line of `plumb config show --format json`.
type settingJSON struct {
	Key    string `json:"key"`
	Value  string `json:"value"`
	Source string `json:"source"`
}

func runConfigShow(opts *configShowOptions) error {
	s := opts.Settings()
	rows := make([]settingJSON, len(configKeys))
	for i, k := range configKeys {
		rows[i] = settingJSON{Key: k, Value: s.Value(k), Source: s.Source(k)}
	}
	switch opts.Format {
	case "json":
		return writeJSON(opts.IO.Out, rows)
	case "csv":
		out := make([][]string, len(rows))
		for i, r := range rows {
			out[i] = []string{r.Key, r.Value, r.Source}
		}
		return writeCSV(opts.IO.Out, []string{"key", "value", "source"}, out)
	}
	t := newTable(opts.IO, "SETTING", "VALUE", "SOURCE")
	for _, r := range rows {
		if r.Key == keyCatalog && r.Value == "" {
			r.Value = "(embedded demo catalog)"
		}
		t.row(r.Key, r.Value, r.Source)
	}
	return t.render(opts.IO.Out)
}
