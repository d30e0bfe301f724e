package main

import (
	"github.com/spf13/cobra"
)

func newCatalogCmd(f *Factory) *cobra.Command {
	cmd := groupCmd("catalog", "Create, list, inspect and export the component catalog",
		newCatalogInitCmd(f, nil),
		newCatalogListCmd(f, nil),
		newCatalogShowCmd(f, nil),
		newCatalogStatsCmd(f, nil),
		newCatalogExportCmd(f, nil),
		newCatalogHistoryCmd(f, nil),
	)
	cmd.Long = `Work with the component catalog: a SQLite file of resistor series, single
resistors, matched networks and amplifiers with their price breaks and stock.
Without --catalog (or PLUMB_CATALOG, or catalog: in the config file) the
commands read the embedded demo catalog of invented parts.`
	cmd.Example = `  plumb catalog stats
  plumb catalog list --kind amplifier`
	return cmd
}
