package main

import (
	"fmt"
	"strings"

	"github.com/spf13/cobra"
)

const rootLong = `plumb picks orderable parts for analog signal-conditioning stages (inverting
and non-inverting amplifiers, difference amplifiers, attenuators, current
sense, level shifts into an ADC, three-op-amp instrumentation amplifiers),
proves each choice with an error budget (worst case, RSS, Monte Carlo) and
ranks the designs that meet every limit by cost at the build quantity.

Without --catalog it works on an embedded demo catalog of invented parts.

Configuration: each setting (catalog, format, top, color) is taken from its
flag, else the environment variable PLUMB_<KEY> (PLUMB_CATALOG, ...), else the
config file (--config, PLUMB_CONFIG, or plumb.yaml in the user config
directory under plumb/), else its default. ` + "`plumb config show`" + ` tells which.

Exit codes:
    0  success
    1  error (missing file, bad spec or catalog data, failed import, failed check)
    2  usage error (unknown command or flag, bad flag value, wrong arguments)
    3  the spec is infeasible with the parts in the catalog
  130  interrupted (Ctrl-C); nothing half-written is left behind`

func newRootCmd(f *Factory) *cobra.Command {
	var color string
	cmd := &cobra.Command{
		Use:   "plumb",
		Short: "Choose and prove parts for analog signal-conditioning stages",
		Long:  rootLong,
		Example: `  plumb demo
  plumb solve logger-channel --top 3
  plumb catalog list --kind series --max-tolerance 0.1
  plumb series E96 --from 1k --to 2k`,
		SilenceErrors: true,
		SilenceUsage:  true,
		Args:          noArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			return cmd.Help()
		},
		PersistentPreRunE: func(cmd *cobra.Command, _ []string) error {
			s, err := loadSettings(configSource{Explicit: f.ConfigFile, ConfigDir: f.ConfigDir}, cmd.Flags())
			if err != nil {
				return err
			}
			f.settings = s
			f.IO.SetColorMode(s.Color)
			if f.Quiet && f.Verbose {
				return usagef("--quiet and --verbose cannot be used together")
			}
			if f.Verbose {
				file := s.File
				if file == "" {
					file = "none"
				}
				fmt.Fprintf(f.IO.ErrOut, "catalog: %s (from %s); config file: %s\n", f.CatalogName(), s.Source(keyCatalog), file)
			}
			return nil
		},
	}
	cmd.SetIn(f.IO.In)
	cmd.SetOut(f.IO.Out)
	cmd.SetErr(f.IO.ErrOut)
	cmd.SetFlagErrorFunc(flagError)
	pf := cmd.PersistentFlags()
	pf.String(keyCatalog, "", "catalog database `PATH` (default: the embedded demo catalog)")
	pf.StringVar(&f.ConfigFile, "config", "", "config `FILE` (default: plumb.yaml in the user config directory)")
	pf.StringVar(&color, keyColor, "auto", "colour: auto, always or never")
	pf.BoolVarP(&f.Quiet, "quiet", "q", false, "print only results, no notes")
	pf.BoolVarP(&f.Verbose, "verbose", "v", false, "print more detail (sources, timings)")

	cmd.AddCommand(
		newSeriesCmd(f, nil),
		newCatalogCmd(f),
		newConfigCmd(f),
		newDemoCmd(f, nil),
		newSolveCmd(f, nil),
		newCheckCmd(f, nil),
		newBOMCmd(f, nil),
		newImportCmd(f, nil),
		newReportCmd(f, nil),
		newCompletionCmd(f, nil),
		newManCmd(f, nil),
		newMappingHelpTopic(),
		newFamiliesHelpTopic(),
	)
	cmd.CompletionOptions.DisableDefaultCmd = true
	return cmd
}

// flagError turns a flag parsing error into a usage error.
func flagError(c *cobra.Command, err error) error {
	return &usageError{fmt.Errorf("%w\nrun `%s --help` for usage", err, c.CommandPath())}
}

// noArgs rejects positional arguments as a usage error, naming the unknown
// subcommand when the command has subcommands.
func noArgs(cmd *cobra.Command, args []string) error {
	if len(args) == 0 {
		return nil
	}
	if cmd.HasSubCommands() {
		return usagef("unknown command %q for %q: the commands are %s", args[0], cmd.CommandPath(), subcommandNames(cmd))
	}
	return usagef("%s takes no arguments, got %q", cmd.CommandPath(), strings.Join(args, " "))
}

func subcommandNames(cmd *cobra.Command) string {
	var names []string
	for _, c := range cmd.Commands() {
		if c.IsAvailableCommand() {
			names = append(names, c.Name())
		}
	}
	return strings.Join(names, ", ")
}

// exactArgs requires exactly the named positional arguments.
func exactArgs(names ...string) cobra.PositionalArgs {
	return func(cmd *cobra.Command, args []string) error {
		if len(args) == len(names) {
			return nil
		}
		return usagef("%s needs %d argument(s) (%s), got %d", cmd.CommandPath(), len(names), strings.Join(names, " "), len(args))
	}
}

// rangeArgs requires between lo and hi positional arguments.
func rangeArgs(lo, hi int, names string) cobra.PositionalArgs {
	return func(cmd *cobra.Command, args []string) error {
		if len(args) >= lo && len(args) <= hi {
			return nil
		}
		return usagef("%s takes %s, got %d argument(s)", cmd.CommandPath(), names, len(args))
	}
}

// groupCmd is a command that only holds subcommands.
func groupCmd(use, short string, subs ...*cobra.Command) *cobra.Command {
	cmd := &cobra.Command{
		Use:   use,
		Short: short,
		Args:  noArgs,
		RunE: func(cmd *cobra.Command, args []string) error {
			return cmd.Help()
		},
	}
	cmd.AddCommand(subs...)
	return cmd
}
