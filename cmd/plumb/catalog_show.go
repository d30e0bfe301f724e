package main

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"github.com/spf13/cobra"

	"plumb/catalog"
	"plumb/catalog/units"
)

type catalogShowOptions struct {
	IO      *IOStreams
	Catalog catalogOpener
	Part    string
	Format  string
}

func newCatalogShowCmd(f *Factory, runF func(*catalogShowOptions) error) *cobra.Command {
	opts := &catalogShowOptions{IO: f.IO, Catalog: f.Catalog}
	cmd := &cobra.Command{
		Use:   "show PART",
		Short: "Show every figure of one part",
		Long: `Show every figure of one catalog part: a resistor (a single part, or one value
of a series by its full part number), a series, a network, an amplifier
(with the matched resistors inside, when the catalog has them) or a voltage reference,
with its price breaks, stock and where it came from.`,
		Example: `  plumb catalog show IM-JH36
  plumb catalog show AR-TP1-54K9 --format json
  plumb catalog show AR-TP1`,
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
			return runCatalogShow(cmd, opts)
		},
	}
	addFormatFlag(cmd, &opts.Format)
	return cmd
}

// field is one line of a part's description.
type field struct{ Name, Value string }

func runCatalogShow(cmd *cobra.Command, opts *catalogShowOptions) error {
	ctx := cmd.Context()
	st, err := opts.Catalog(ctx)
	if err != nil {
		return err
	}
	defer st.Close()
	kind, v, err := st.Find(ctx, opts.Part)
	if err != nil {
		return err
	}
	if opts.Format == "json" {
		return writeJSON(opts.IO.Out, v)
	}
	return writeFields(opts.IO, opts.Format, "FIELD", "VALUE", partFields(kind, v))
}

// writeFields prints name/value pairs as CSV or as a two-column table.
func writeFields(ios *IOStreams, format, nameHeader, valueHeader string, fields []field) error {
	if format == "csv" {
		rows := make([][]string, len(fields))
		for i, f := range fields {
			rows[i] = []string{f.Name, f.Value}
		}
		return writeCSV(ios.Out, []string{strings.ToLower(nameHeader), strings.ToLower(valueHeader)}, rows)
	}
	t := newTable(ios, nameHeader, valueHeader)
	for _, f := range fields {
		t.row(f.Name, f.Value)
	}
	return t.render(ios.Out)
}

// partFields describes a part found in the catalog, figures in engineering
// notation.
func partFields(kind catalog.Kind, v any) []field {
	var fs []field
	add := func(name, value string) {
		if value != "" {
			fs = append(fs, field{name, value})
		}
	}
	grade := func(g catalog.ResistorGrade) {
		add("technology", g.Technology)
		add("package", g.Package)
		add("tolerance", "±"+units.FormatPercent(g.Tolerance))
		add("tcr", orUnknown(g.TCR, func(x float64) string { return "±" + units.FormatPPM(x) }))
		add("power", orUnknown(g.PowerW, formatPower))
		if !(g.MaxVoltageV <= 0) {
			add("max voltage", orUnknown(g.MaxVoltageV, func(x float64) string { return units.Format(x, "V") }))
		}
		if !(g.ThermalResistance <= 0) {
			add("thermal resistance", orUnknown(g.ThermalResistance, func(x float64) string { return strconv.FormatFloat(x, 'g', 4, 64) + " K/W" }))
		}
		if !(g.LoadLife <= 0) {
			add("load life", orUnknown(g.LoadLife, units.FormatPercent))
		}
	}
	offer := func(o catalog.Offer, p catalog.Provenance) {
		for _, b := range o.PriceBreaks {
			add(fmt.Sprintf("price from %d", b.MinQty), formatMoney(b.UnitPrice, b.Currency))
		}
		if o.MinOrder > 1 {
			add("minimum order", strconv.Itoa(o.MinOrder))
		}
		add("stock", formatStock(o.Stock))
		add("source", p.Source)
		if !p.ImportedAt.IsZero() {
			add("imported", p.ImportedAt.UTC().Format("2006-01-02 15:04 UTC"))
		}
	}
	add("kind", string(kind))
	switch p := v.(type) {
	case *catalog.ResistorSeries:
		add("part", p.Part)
		add("maker", p.Maker)
		add("line", p.Line)
		add("series", p.ESeries)
		add("range", units.FormatOhms(p.MinOhm)+" to "+units.FormatOhms(p.MaxOhm)+" ohm")
		grade(p.ResistorGrade)
		offer(p.Offer, p.Provenance)
	case *catalog.Resistor:
		add("part", p.Part)
		add("maker", p.Maker)
		add("line", p.Line)
		add("value", units.FormatOhms(p.ValueOhm)+" ohm")
		add("series part", p.SeriesPart)
		grade(p.ResistorGrade)
		offer(p.Offer, p.Provenance)
	case *catalog.Network:
		add("part", p.Part)
		add("maker", p.Maker)
		vals := make([]string, len(p.Values))
		for i, x := range p.Values {
			vals[i] = units.FormatOhms(x)
		}
		add("values", strings.Join(vals, ", ")+" ohm")
		add("technology", p.Technology)
		add("package", p.Package)
		add("tolerance", "±"+units.FormatPercent(p.Tolerance))
		add("ratio tolerance", "±"+units.FormatPercent(p.RatioTolerance))
		add("tcr", orUnknown(p.TCR, func(x float64) string { return "±" + units.FormatPPM(x) }))
		add("tcr tracking", orUnknown(p.TCRTracking, func(x float64) string { return "±" + units.FormatPPM(x) }))
		add("power per element", orUnknown(p.PowerW, formatPower))
		if !(p.MaxVoltageV <= 0) {
			add("max voltage", orUnknown(p.MaxVoltageV, func(x float64) string { return units.Format(x, "V") }))
		}
		offer(p.Offer, p.Provenance)
	case *catalog.Amplifier:
		amplifierFields(add, p)
		offer(p.Offer, p.Provenance)
	case *catalog.Reference:
		referenceFields(add, p)
		offer(p.Offer, p.Provenance)
	default:
		add("figures", fmt.Sprintf("%+v", v))
	}
	return fs
}

func amplifierFields(add func(string, string), a *catalog.Amplifier) {
	typical := map[string]bool{}
	for _, t := range a.TypicalOnly {
		typical[t] = true
	}
	num := func(name, jsonName string, v float64, unit string) {
		if v == 0 {
			return
		}
		s := orUnknown(v, func(x float64) string {
			if unit == "V/s" {
				return units.FormatSlewRate(x)
			}
			return units.Format(x, unit)
		})
		if typical[jsonName] {
			s += " (typical only)"
		}
		add(name, s)
	}
	add("part", a.Part)
	add("maker", a.Maker)
	add("type", string(a.Type))
	add("channels", strconv.Itoa(a.Channels))
	add("package", a.Package)
	add("supply span", units.Format(a.SupplyMinV, "V")+" to "+units.Format(a.SupplyMaxV, "V"))
	add("input common mode", railRange(a.CMNegV, a.CMPosV))
	add("output swing", railRange(a.SwingNegV, a.SwingPosV))
	add("rail-to-rail", a.RailToRail)
	num("offset voltage", "vos_v", a.VosV, "V")
	num("offset drift", "vos_drift_v_per_k", a.VosDriftVK, "V/K")
	num("bias current", "ib_a", a.IbA, "A")
	num("offset current", "ios_a", a.IosA, "A")
	num("open-loop gain", "aol_v_per_v", a.AolVV, "V/V")
	if a.CMRRdB != 0 {
		add("CMRR", orUnknown(a.CMRRdB, func(x float64) string { return strconv.FormatFloat(x, 'g', 4, 64) + " dB" }))
	}
	num("gain-bandwidth", "gbw_hz", a.GBWHz, "Hz")
	num("slew rate", "slew_v_per_s", a.SlewVs, "V/s")
	num("voltage noise", "noise_v_per_rthz", a.NoiseVHz, "V/√Hz")
	num("current noise", "noise_a_per_rthz", a.NoiseAHz, "A/√Hz")
	num("quiescent current", "iq_a", a.IqA, "A")
	if a.Type == catalog.MatchedAmp {
		gains := make([]string, len(a.Gains))
		for i, g := range a.Gains {
			gains[i] = strconv.FormatFloat(g, 'g', 6, 64)
		}
		add("gains", strings.Join(gains, ", "))
		if !(a.GainErrorMax <= 0) {
			add("gain error", orUnknown(a.GainErrorMax, func(x float64) string { return "±" + units.FormatPercent(x) }))
		}
		if !(a.GainDriftPPM <= 0) {
			add("gain drift", orUnknown(a.GainDriftPPM, func(x float64) string { return "±" + units.FormatPPM(x) }))
		}
		add("input range", railRange(a.InNegV, a.InPosV))
		if !(a.InternalOhm <= 0) {
			add("internal resistors", orUnknown(a.InternalOhm, func(x float64) string { return units.FormatOhms(x) + " ohm" }))
		}
		matchedFields(add, a.Network)
	}
}

// matchedFields describes the matched resistors inside an amplifier: one
// line per element, the op-amp's nodes, the pins and the tolerances.
func matchedFields(add func(string, string), n *catalog.MatchedNetwork) {
	if n == nil {
		add("network", "not given (only the gains are known)")
		return
	}
	for _, e := range n.Elements {
		add("element "+e.Name, units.FormatOhms(e.Ohms)+" ohm, "+e.A+" to "+e.B)
	}
	add("op-amp nodes", "inverting "+n.OpAmpInv+", non-inverting "+n.OpAmpNonInv+", output "+n.OpAmpOut)
	add("pins", strings.Join(n.Pins, " "))
	add("element tolerance", orUnknown(n.Tolerance, func(x float64) string { return "±" + units.FormatPercent(x) }))
	add("ratio tolerance", orUnknown(n.RatioTolerance, func(x float64) string { return "±" + units.FormatPercent(x) }))
	add("ratio tracking", orUnknown(n.RatioDriftPPM, func(x float64) string { return "±" + units.FormatPPM(x) }))
}

// referenceFields describes a voltage reference; a figure nobody gave
// prints as unknown.
func referenceFields(add func(string, string), r *catalog.Reference) {
	volts := func(x float64) string { return units.Format(x, "V") }
	add("part", r.Part)
	add("maker", r.Maker)
	add("topology", r.Topology)
	add("package", r.Package)
	add("output", units.Format(r.OutputV, "V"))
	add("initial accuracy", "±"+units.FormatPercent(r.Tolerance))
	drift := orUnknown(r.DriftPPM, func(x float64) string { return "±" + units.FormatPPM(x) })
	if catalog.Known(r.TempMinC) {
		drift += fmt.Sprintf(" (box, %g to %g °C)", r.TempMinC, r.TempMaxC)
	}
	add("drift", drift)
	add("noise 0.1-10 Hz", orUnknown(r.NoisePPV, func(x float64) string { return units.Format(x, "V") + " p-p" }))
	add("noise density", orUnknown(r.NoiseVHz, func(x float64) string { return units.Format(x, "V/√Hz") }))
	if r.Topology != catalog.RefShunt || catalog.Known(r.SupplyMinV) {
		add("supply", orUnknown(r.SupplyMinV, volts)+" to "+orUnknown(r.SupplyMaxV, volts))
		add("dropout", orUnknown(r.DropoutV, volts))
	}
	add("load current", "source "+orUnknown(r.LoadSourceA, func(x float64) string { return units.Format(x, "A") })+
		", sink "+orUnknown(r.LoadSinkA, func(x float64) string { return units.Format(x, "A") }))
	add("output resistance", orUnknown(r.OutputOhm, func(x float64) string { return units.FormatOhms(x) + " ohm" }))
	add("long-term drift", orUnknown(r.LongTermPPM, func(x float64) string { return strconv.FormatFloat(x, 'g', 4, 64) + " ppm/1000 h" }))
	add("quiescent current", orUnknown(r.IqA, func(x float64) string { return units.Format(x, "A") }))
}

// orUnknown formats a figure, or "-" when it is unknown (NaN).
func orUnknown(v float64, format func(float64) string) string {
	if math.IsNaN(v) {
		return "-"
	}
	return format(v)
}

// railRange writes a range given as headroom from each rail, "-" for a side
// that is unknown.
func railRange(neg, pos float64) string {
	side := func(v float64) string {
		if math.IsNaN(v) {
			return "-"
		}
		return fmt.Sprintf("%+g V", v)
	}
	if math.IsNaN(neg) && math.IsNaN(pos) {
		return "-"
	}
	return "V- " + side(neg) + " to V+ " + side(-pos)
}
