package importers

import (
	"fmt"
	"math"
	"strings"

	"plumb/catalog"
	"plumb/catalog/units"
)

// Bounds of what the trade sells as a voltage reference (common practice):
// beyond them a figure is far more likely a unit slip than a real part.
const (
	// maxRefTolerance: the loosest references sold (shunt parts in their
	// widest grade) are about ±2 %; ±5 % is a plain zener, not a reference.
	maxRefTolerance = 0.05
	// maxRefDriftPPM: a plain zener reaches several hundred ppm/K; a
	// thousand is a unit slip (%/K or ppm/mK).
	maxRefDriftPPM = 1000
	// minRefV, maxRefV: references are made from about 0.6 V (sub-bandgap)
	// to a few tens of volts (buried-zener 10 V parts, precision 20 V).
	minRefV, maxRefV = 0.5, 50
)

// reference reads a voltage reference. Only the output voltage and the
// initial accuracy are required; every other figure may be left out and is
// then unknown.
func (r *rowReader) reference(part string, o catalog.Offer) (*catalog.Reference, error) {
	ref := &catalog.Reference{Part: part, Maker: r.intern(r.text(FieldMaker)),
		Package: r.intern(r.text(FieldPackage)), Offer: o, Provenance: r.prov}
	// Each figure is read even when an earlier one failed, so a row's
	// problems are reported together; the first failure is returned.
	var failed error
	keep := func(err error) bool {
		if err != nil && failed == nil {
			failed = err
		}
		return err == nil
	}
	opt := func(f Field, q quantity, what string) float64 {
		v, ok, _, err := r.value(f, q)
		if !keep(err) {
			return catalog.Unknown()
		}
		if !ok {
			r.unknown = append(r.unknown, what)
			return catalog.Unknown()
		}
		return math.Abs(v)
	}
	var err error
	ref.OutputV, err = r.need(FieldOutputV, units.ParseVoltage, "output voltage")
	keep(err)
	ref.Tolerance = r.refTolerance(keep)
	ref.DriftPPM = opt(FieldDrift, units.ParsePPM, "drift")
	keep(r.refTemperatures(ref))
	ref.NoisePPV = opt(FieldNoisePP, parsePeakToPeak, "0.1-10 Hz noise")
	ref.NoiseVHz = opt(FieldNoiseV, units.ParseVoltageNoise, "noise density")
	keep(r.refSupply(ref))
	ref.DropoutV = opt(FieldDropout, units.ParseVoltage, "dropout")
	ref.LoadSourceA = opt(FieldLoadSource, units.ParseCurrent, "source current")
	ref.LoadSinkA = opt(FieldLoadSink, units.ParseCurrent, "sink current")
	ref.OutputOhm = opt(FieldOutputR, func(s string) (float64, error) { return parseLoadRegulation(s, ref.OutputV) }, "output resistance")
	ref.LongTermPPM = opt(FieldLongTerm, parseLongTerm, "long-term drift")
	ref.IqA = opt(FieldIq, units.ParseCurrent, "quiescent current")
	if s, ok := r.raw(FieldTopology); ok {
		switch t := strings.ToLower(s); {
		case strings.Contains(t, "series"):
			ref.Topology = catalog.RefSeries
		case strings.Contains(t, "shunt"):
			ref.Topology = catalog.RefShunt
		default:
			keep(r.skip(FieldTopology, s, fmt.Errorf("%w: reference type %q: use series or shunt", ErrBadValue, s)))
		}
	}
	if ref.Package == "" {
		r.unknown = append(r.unknown, "package")
	}
	if failed != nil {
		return nil, failed
	}
	keep(r.plausibleReference(ref))
	return ref, failed
}

// refTolerance reads a reference's initial accuracy ("±0.05%", "0.1 %",
// "A" grade letters as for resistors). A bare number is ambiguous (0.05:
// % or a fraction?) unless the header or the mapping names the unit, as
// for resistors.
func (r *rowReader) refTolerance(keep func(error) bool) float64 {
	v, ok, err := r.markedTolerance(FieldTolerance, "accuracy")
	if !keep(err) {
		return 0
	}
	if !ok {
		s, _ := r.raw(FieldTolerance)
		keep(r.skip(FieldTolerance, s, fmt.Errorf("%w: no initial accuracy; fill the column or set a fixed value in the mapping", ErrMissingValue)))
	}
	return v
}

// markedTolerance reads a tolerance-like figure of field f as a fraction
// in (0, 1): "±0.05%", "500 ppm", or a bare number only where the header,
// the mapping or the catalog's own export says how to read it (a bare
// 0.05 could be % or a fraction). ok is false for a blank cell.
func (r *rowReader) markedTolerance(f Field, what string) (v float64, ok bool, err error) {
	s, present := r.raw(f)
	if !present {
		return 0, false, nil
	}
	if !r.si && bareNumber(s, r.decimalComma) {
		switch r.unitHint(f) {
		case "%":
		case unitFraction:
			v, err := parseNumber(strings.TrimLeft(strings.TrimSpace(s), "±"), r.decimalComma)
			if err != nil {
				return 0, false, r.skip(f, s, fmt.Errorf("%w: %v", ErrBadValue, err))
			}
			return r.fractionIn(f, s, what, math.Abs(v))
		default:
			return 0, false, r.skip(f, s, fmt.Errorf("%w: a bare %s %s is ambiguous (%s %% or a fraction, %g %%?); write it with %%, name the unit in the header (\"%s (%%)\"), or say in the mapping: units: {%s: \"%%\"} or {%s: fraction}",
				ErrBadValue, what, s, s, 100*mustFloat(s, r.decimalComma), what, f, f))
		}
	}
	v, _, _, err = r.value(f, parseTolerance)
	if err != nil {
		return 0, false, err
	}
	return r.fractionIn(f, s, what, math.Abs(v))
}

// fractionIn refuses a tolerance outside (0, 1).
func (r *rowReader) fractionIn(f Field, s, what string, v float64) (float64, bool, error) {
	if !(v > 0 && v < 1) {
		return 0, false, r.skip(f, s, fmt.Errorf("%w: %s %g %% is not between 0 and 100 %%", ErrBadValue, what, 100*v))
	}
	return v, true, nil
}

// matchedNetwork reads the matched resistors inside an amplifier from their
// text form (catalog.ParseMatchedNetwork) and their tolerances from
// columns of their own; nil when the row gives no network.
func (r *rowReader) matchedNetwork() (*catalog.MatchedNetwork, error) {
	s, ok := r.raw(FieldNetwork)
	if !ok {
		return nil, nil
	}
	n, err := catalog.ParseMatchedNetwork(s)
	if err != nil {
		return nil, r.skip(FieldNetwork, s, fmt.Errorf("%w: %v; write the elements as NAME VALUE A~B, then amp INV NONINV OUT and pins P1 P2 ..., separated by ; (plumb help mapping)", ErrBadValue, err))
	}
	if err := n.Check(); err != nil {
		return nil, r.skip(FieldNetwork, s, fmt.Errorf("%w: %s", ErrBadValue, strings.TrimPrefix(err.Error(), catalog.ErrInvalid.Error()+": ")))
	}
	for _, f := range []struct {
		field Field
		dst   *float64
		what  string
	}{{FieldNetworkTol, &n.Tolerance, "network tolerance"}, {FieldNetworkRatio, &n.RatioTolerance, "network ratio tolerance"}} {
		v, ok, err := r.markedTolerance(f.field, f.what)
		if err != nil {
			return nil, err
		}
		if ok {
			*f.dst = v
		} else {
			r.unknown = append(r.unknown, f.what)
		}
	}
	v, ok, _, err := r.value(FieldNetworkTracking, units.ParsePPM)
	if err != nil {
		return nil, err
	}
	if ok {
		n.RatioDriftPPM = math.Abs(v)
	} else {
		r.unknown = append(r.unknown, "network ratio tracking")
	}
	return n, nil
}

// refTemperatures reads the range the drift is rated over: one cell
// ("-40 to 125 °C", "-40°C ~ 125°C") or two columns.
func (r *rowReader) refTemperatures(ref *catalog.Reference) error {
	ref.TempMinC, ref.TempMaxC = catalog.Unknown(), catalog.Unknown()
	if s, ok := r.raw(FieldTempRange); ok {
		lo, hi, err := units.ParseTemperatureRange(rangeWords(s))
		if err != nil {
			return r.skip(FieldTempRange, s, fmt.Errorf("%w: %s", ErrBadValue, unitErr(err)))
		}
		ref.TempMinC, ref.TempMaxC = lo, hi
	} else {
		for _, f := range []struct {
			field Field
			dst   *float64
		}{{FieldTempMin, &ref.TempMinC}, {FieldTempMax, &ref.TempMaxC}} {
			v, ok, _, err := r.value(f.field, units.ParseTemperature)
			if err != nil {
				return err
			}
			if ok {
				*f.dst = v
			}
		}
	}
	if !catalog.Known(ref.TempMinC) && !catalog.Known(ref.TempMaxC) {
		r.unknown = append(r.unknown, "drift's temperature range")
	}
	return nil
}

// refSupply reads the input voltage range of a series reference: one cell
// ("2.7 V to 18 V") or two columns.
func (r *rowReader) refSupply(ref *catalog.Reference) error {
	given, err := r.supplyRange(&ref.SupplyMinV, &ref.SupplyMaxV)
	if err == nil && !given {
		r.unknown = append(r.unknown, "supply range")
	}
	return err
}

// plausibleReference refuses (or with --allow-unusual flags) a reference
// whose figures lie outside what the trade sells.
func (r *rowReader) plausibleReference(ref *catalog.Reference) error {
	if ref.Tolerance > maxRefTolerance {
		s, _ := r.raw(FieldTolerance)
		if err := r.unusual(FieldTolerance, s, fmt.Sprintf("an initial accuracy of %g %%, looser than any voltage reference sold (at most %g %%)", 100*ref.Tolerance, 100*maxRefTolerance)); err != nil {
			return err
		}
	}
	if ref.DriftPPM > maxRefDriftPPM {
		s, _ := r.raw(FieldDrift)
		if err := r.unusual(FieldDrift, s, fmt.Sprintf("a drift of %g ppm/K, beyond the %g ppm/K of any voltage reference", ref.DriftPPM, float64(maxRefDriftPPM))); err != nil {
			return err
		}
	}
	if ref.OutputV < minRefV || ref.OutputV > maxRefV {
		s, _ := r.raw(FieldOutputV)
		if err := r.unusual(FieldOutputV, s, fmt.Sprintf("an output of %g V, outside the %g V to %g V references are made for", ref.OutputV, minRefV, float64(maxRefV))); err != nil {
			return err
		}
	}
	return nil
}

// rangeWords rewrites the range marks of distributor exports ("-40°C ~
// 125°C", "-40 … +85 °C", "0 – 70 °C" with an en dash) as the units
// parser's "to".
func rangeWords(s string) string {
	return rangeMarks.Replace(s)
}

var rangeMarks = strings.NewReplacer("~", " to ", "...", " to ", "–", " to ", "—", " to ")

// peakToPeak are the marks of a peak-to-peak figure, longest first.
var peakToPeak = []string{"peak-to-peak", "peak to peak", "(p-p)", "pk-pk", "p-p", "pp"}

// parsePeakToPeak reads a low-frequency noise figure, "10 µVp-p",
// "3 uV p-p", "1.5µVpp": a voltage with the peak-to-peak mark dropped. An
// RMS figure ("µVrms") is refused, since converting it needs the
// distribution's crest factor.
func parsePeakToPeak(s string) (float64, error) {
	t := strings.TrimSpace(s)
	low := strings.ToLower(t)
	if strings.Contains(low, "rms") {
		return 0, fmt.Errorf("%q is an RMS figure: give the 0.1-10 Hz noise peak to peak, as datasheets do", s)
	}
	for _, m := range peakToPeak {
		if strings.HasSuffix(low, m) {
			t = strings.TrimSpace(t[:len(t)-len(m)])
			break
		}
	}
	return units.ParseVoltage(t)
}

// parseLoadRegulation reads an output resistance ("0.05 Ω", "50 mΩ") or a
// load regulation per output current, turned into ohms: "20 ppm/mA" is
// 20·10^-6·Vout per 10^-3 A, "50 µV/mA" is 50·10^-6 V per 10^-3 A (V/A
// is ohm; the definition of load regulation, common practice). A ppm or %
// figure needs the output voltage.
func parseLoadRegulation(s string, vout float64) (float64, error) {
	num, den, ok := strings.Cut(strings.TrimSpace(s), "/")
	if !ok {
		return units.ParseResistance(s)
	}
	amps, err := units.ParseCurrent("1 " + strings.TrimSpace(den))
	if err != nil || !(amps > 0) {
		return 0, fmt.Errorf("%q: the load regulation must be per current (/mA, /µA or /A)", s)
	}
	n := strings.ToLower(strings.TrimSpace(num))
	if strings.HasSuffix(n, "ppm") || strings.HasSuffix(n, "%") {
		frac, err := units.ParseFraction(num)
		if err != nil {
			return 0, err
		}
		if !(vout > 0) {
			return 0, fmt.Errorf("%q: a load regulation in ppm or %% needs the output voltage", s)
		}
		return frac * vout / amps, nil
	}
	v, err := units.ParseVoltage(num)
	if err != nil {
		return 0, err
	}
	return v / amps, nil
}

// parseLongTerm reads a long-term drift in ppm over the first 1000 h:
// "25 ppm/1000h", "25 ppm/1000 hr", "25 ppm" (taken as per 1000 h, as
// datasheets state it).
func parseLongTerm(s string) (float64, error) {
	num, den, _ := strings.Cut(s, "/")
	d := strings.ToLower(strings.Join(strings.Fields(den), ""))
	switch d {
	case "", "1000h", "1000hr", "1000hrs", "1000hours", "khr", "kh":
	default:
		return 0, fmt.Errorf("%q: give the long-term drift in ppm over 1000 h", s)
	}
	return units.ParsePPM(num)
}
