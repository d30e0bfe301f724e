package main

import (
	"fmt"
	"strconv"
	"strings"

	"github.com/spf13/cobra"

	"plumb/catalog/eseries"
	"plumb/catalog/units"
)

// Default range of `plumb series`: one decade, 1 Ω to 10 Ω, so that the
// list is the series' mantissas.
const (
	seriesDefaultFrom = "1"
	seriesDefaultTo   = "10"
)

type seriesOptions struct {
	IO     *IOStreams
	Name   string
	From   string
	To     string
	Format string
}

func newSeriesCmd(f *Factory, runF func(*seriesOptions) error) *cobra.Command {
	opts := &seriesOptions{IO: f.IO}
	cmd := &cobra.Command{
		Use:   "series NAME",
		Short: "List the values of an IEC 60063 series (E3 to E192) over a range",
		Long: `List the preferred values of an IEC 60063 series (E3, E6, E12, E24, E48,
E96 or E192) from --from to --to inclusive, one value a line in engineering
notation. Values may be written 4.99k, 4k99, 4K99, 10R, 1M or 4990.

The default range is one decade, 1 to 10 ohm, which lists the series'
mantissas.`,
		Example: `  plumb series E24
  plumb series E192 --from 9 --to 10
  plumb series E96 --from 4k7 --to 10k --format json`,
		Args: exactArgs("NAME"),
		RunE: func(cmd *cobra.Command, args []string) error {
			opts.Name = args[0]
			var err error
			if opts.Format, err = chooseFormat(cmd, f, opts.Format); err != nil {
				return err
			}
			if runF != nil {
				return runF(opts)
			}
			return runSeries(opts)
		},
	}
	cmd.Flags().StringVar(&opts.From, "from", seriesDefaultFrom, "lowest value, `OHMS`")
	cmd.Flags().StringVar(&opts.To, "to", seriesDefaultTo, "highest value, `OHMS`")
	addFormatFlag(cmd, &opts.Format)
	return cmd
}

// seriesJSON is the JSON form of `plumb series`.
type seriesJSON struct {
	Series    string    `json:"series"`
	FromOhm   float64   `json:"from_ohm"`
	ToOhm     float64   `json:"to_ohm"`
	ValuesOhm []float64 `json:"values_ohm"`
}

func runSeries(opts *seriesOptions) error {
	s, err := eseries.ByName(opts.Name)
	if err != nil {
		return usagef("%v", err)
	}
	from, err := units.ParseResistance(opts.From)
	if err != nil {
		return usagef("--from: %v", err)
	}
	to, err := units.ParseResistance(opts.To)
	if err != nil {
		return usagef("--to: %v", err)
	}
	if from <= 0 || to < from {
		return usagef("range --from %s --to %s is empty: --from must be above 0 and not above --to", opts.From, opts.To)
	}
	values := s.Values(from, to)
	if len(values) == 0 {
		return fmt.Errorf("%s has no value between %s and %s ohm: widen the range", s.Name, units.FormatOhms(from), units.FormatOhms(to))
	}
	switch opts.Format {
	case "json":
		return writeJSON(opts.IO.Out, seriesJSON{Series: s.Name, FromOhm: from, ToOhm: to, ValuesOhm: values})
	case "csv":
		rows := make([][]string, len(values))
		for i, v := range values {
			rows[i] = []string{s.Name, strconv.FormatFloat(v, 'g', -1, 64), formatSeriesValue(v, seriesFigures(s))}
		}
		return writeCSV(opts.IO.Out, []string{"series", "value_ohm", "value"}, rows)
	}
	for _, v := range values {
		if _, err := fmt.Fprintln(opts.IO.Out, formatSeriesValue(v, seriesFigures(s))); err != nil {
			return err
		}
	}
	return nil
}

// seriesFigures is the number of significant figures of a series' values:
// two for E3 to E24, three for E48 to E192 (IEC 60063).
func seriesFigures(s *eseries.Series) int {
	if s.N >= 48 {
		return 3
	}
	return 2
}

// formatSeriesValue writes a series value in engineering notation keeping
// the series' significant figures where a decimal point shows them: E192's
// 9.2 ohm is "9.20", 1.1 kohm in E96 is "1.10k"; values without a decimal
// point ("10", "100", "1k") are left as they are.
func formatSeriesValue(v float64, figures int) string {
	s := units.FormatOhms(v)
	dot := strings.IndexByte(s, '.')
	if dot < 0 {
		return s
	}
	end := len(s)
	for end > 0 && (s[end-1] < '0' || s[end-1] > '9') {
		end--
	}
	num, suffix := s[:end], s[end:]
	digits := 0
	for i, c := range num {
		if c >= '0' && c <= '9' && (digits > 0 || c != '0' || i > dot) {
			if digits > 0 || c != '0' {
				digits++
			}
		}
	}
	for ; digits < figures; digits++ {
		num += "0"
	}
	return num + suffix
}
