package main

import (
	"encoding/json"
	"fmt"
	"io"
	"slices"
	"strings"

	"github.com/spf13/cobra"

	"plumb/catalog"
)

// addFormatFlag adds --format to a command that prints data. The default
// shown is the configured format; allowed lists what the command can print.
func addFormatFlag(cmd *cobra.Command, p *string, allowed ...string) {
	if len(allowed) == 0 {
		allowed = formats
	}
	cmd.Flags().StringVar(p, keyFormat, "", "output format: "+strings.Join(allowed, ", ")+" (default: the configured format, else "+allowed[0]+")")
}

// chooseFormat returns the format a command prints: the --format flag if
// given, else the configured format if the command can print it, else the
// command's first format. A flag value the command cannot print is a usage
// error.
func chooseFormat(cmd *cobra.Command, f *Factory, flagValue string, allowed ...string) (string, error) {
	if len(allowed) == 0 {
		allowed = formats
	}
	if cmd.Flags().Changed(keyFormat) {
		v := strings.ToLower(strings.TrimSpace(flagValue))
		if !slices.Contains(allowed, v) {
			return "", usagef("--format %q: %s prints %s", flagValue, cmd.CommandPath(), strings.Join(allowed, ", "))
		}
		return v, nil
	}
	if v := f.Settings().Format; slices.Contains(allowed, v) {
		return v, nil
	}
	return allowed[0], nil
}

// writeJSON writes v as indented JSON with a final newline.
func writeJSON(w io.Writer, v any) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	enc.SetEscapeHTML(false)
	if err := enc.Encode(v); err != nil {
		return fmt.Errorf("writing JSON: %w", err)
	}
	return nil
}

// writeCSV writes a header and rows as RFC 4180 CSV, no-break spaces
// (kept for table wrapping) written as plain spaces.
func writeCSV(w io.Writer, header []string, rows [][]string) error {
	for _, r := range rows {
		for i, c := range r {
			r[i] = strings.ReplaceAll(c, nbsp, " ")
		}
	}
	cw := catalog.NewCSVWriter(w)
	for _, r := range append([][]string{header}, rows...) {
		if err := cw.Write(r); err != nil {
			return fmt.Errorf("writing CSV: %w", err)
		}
	}
	if err := cw.Flush(); err != nil {
		return fmt.Errorf("writing CSV: %w", err)
	}
	return nil
}
