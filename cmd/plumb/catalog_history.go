package main

import (
	"fmt"
	"strings"

	"github.com/spf13/cobra"
)

type catalogHistoryOptions struct {
	IO      *IOStreams
	Catalog catalogOpener
	Part    string
	Format  string
}

func newCatalogHistoryCmd(f *Factory, runF func(*catalogHistoryOptions) error) *cobra.Command {
	opts := &catalogHistoryOptions{IO: f.IO, Catalog: f.Catalog}
	cmd := &cobra.Command{
		Use:   "history PART",
		Short: "Show where a part's figures came from, import by import",
		Long: `Show every import that added, updated or flagged a part: when, from which
source, the outcome (added, updated, unchanged, spec-changed) and what
changed. A spec-changed entry means a later export gave different figures;
the catalog kept the earlier ones.`,
		Example: `  plumb catalog history IM-JH36
  plumb catalog history AR-TP1 --format json`,
		Args: exactArgs("PART"),
		RunE: func(cmd *cobra.Command, args []string) error {
			opts.Part = args[0]
			var err error
			if opts.Format, err = chooseFormat(cmd, f, opts.Format); err != nil {
				return err
			}
			if runF != nil {
				return runF(opts)
			}
			return runCatalogHistory(cmd, opts)
		},
	}
	addFormatFlag(cmd, &opts.Format)
	return cmd
}

func runCatalogHistory(cmd *cobra.Command, opts *catalogHistoryOptions) error {
	ctx := cmd.Context()
	st, err := opts.Catalog(ctx)
	if err != nil {
		return err
	}
	defer st.Close()
	h, err := st.History(ctx, opts.Part)
	if err != nil {
		return fmt.Errorf("history of %s: %w", opts.Part, err)
	}
	switch opts.Format {
	case "json":
		return writeJSON(opts.IO.Out, h)
	case "csv":
		rows := make([][]string, len(h))
		for i, e := range h {
			rows[i] = []string{e.Part, string(e.Kind), e.ImportedAt.UTC().Format("2006-01-02T15:04:05Z"), e.Source, string(e.Outcome), strings.Join(e.Changes, "; ")}
		}
		return writeCSV(opts.IO.Out, []string{"part", "kind", "imported_at", "source", "outcome", "changes"}, rows)
	}
	if len(h) == 0 {
		fmt.Fprintf(opts.IO.ErrOut, "%s has no import history (it may have been created with the catalog)\n", opts.Part)
		return nil
	}
	t := newTable(opts.IO, "IMPORTED", "SOURCE", "OUTCOME", "CHANGES")
	for _, e := range h {
		t.row(e.ImportedAt.UTC().Format("2006-01-02 15:04"), e.Source, string(e.Outcome), strings.Join(e.Changes, "; "))
	}
	return t.render(opts.IO.Out)
}
