package importers

import (
	"slices"

	"plumb/catalog"
)

// The catalog's own CSV export (catalog.Store.WriteCSV) names its columns
// by the catalog's JSON names and writes every figure as a bare SI number
// (ohm, V, A, Hz, fractions for tolerances, ppm/K for tempcos), in the
// shortest form that reads back exactly. A file with that header is read
// by those names and in those units, so an export re-imports unchanged.

// exportColumns maps the export's column names to fields.
var exportColumns = map[string]Field{
	"part": FieldPart, "maker": FieldMaker, "line": FieldLine, "package": FieldPackage,
	"technology": FieldTechnology, "tolerance": FieldTolerance, "tcr_ppm": FieldTCR, "power_w": FieldPower,
	"max_voltage_v": FieldMaxVoltage, "thermal_resistance_k_per_w": FieldThermalRes, "load_life": FieldLoadLife,
	"min_order": FieldMinOrder, "stock": FieldStock, "price_breaks": FieldPrice,
	"value_ohm": FieldResistance, "values_ohm": FieldResistance, "series_part": FieldSeriesPart,
	"e_series": FieldESeries, "min_ohm": FieldMinOhm, "max_ohm": FieldMaxOhm,
	"ratio_tolerance": FieldRatioTolerance, "tcr_tracking_ppm": FieldTCRTracking,
	"type": FieldAmpType, "channels": FieldChannels, "supply_min_v": FieldSupplyMin, "supply_max_v": FieldSupplyMax,
	"cm_neg_v": FieldCMNeg, "cm_pos_v": FieldCMPos, "swing_neg_v": FieldSwingNeg, "swing_pos_v": FieldSwingPos,
	"vos_v": FieldVos, "vos_drift_v_per_k": FieldVosDrift, "ib_a": FieldIb, "ios_a": FieldIos,
	"aol_v_per_v": FieldAol, "cmrr_db": FieldCMRR, "gbw_hz": FieldGBW, "slew_v_per_s": FieldSlew,
	"noise_v_per_rthz": FieldNoiseV, "noise_a_per_rthz": FieldNoiseI, "iq_a": FieldIq,
	"typical_only": FieldTypicalOnly, "gains": FieldGains, "gain_error_max": FieldGainError,
	"gain_drift_ppm": FieldGainDrift, "in_neg_v": FieldInNeg, "in_pos_v": FieldInPos, "internal_ohm": FieldInternalR,
	"network": FieldNetwork, "network_tolerance": FieldNetworkTol, "network_ratio_tolerance": FieldNetworkRatio,
	"network_ratio_drift_ppm": FieldNetworkTracking,
	"topology":                FieldTopology, "output_v": FieldOutputV, "drift_ppm": FieldDrift, "temp_min_c": FieldTempMin,
	"temp_max_c": FieldTempMax, "noise_pp_v": FieldNoisePP, "dropout_v": FieldDropout, "load_source_a": FieldLoadSource,
	"load_sink_a": FieldLoadSink, "output_ohm": FieldOutputR, "long_term_ppm": FieldLongTerm,
}

// exportProvenance are the export's columns of where and when each part was
// imported before: an import records its own provenance, so they are not
// read back.
var exportProvenance = []string{"source", "imported_at"}

// exportKinds tells the kind of an export by a column only that kind has.
var exportKinds = []struct {
	column string
	kind   catalog.Kind
}{
	{"e_series", catalog.KindSeries},
	{"values_ohm", catalog.KindNetwork},
	{"vos_v", catalog.KindAmplifier},
	{"output_v", catalog.KindReference},
	{"value_ohm", catalog.KindResistor},
}

// exportKind reports whether header is the catalog's own export and of
// which kind: it has the part, price_breaks and imported_at columns under
// those exact names, and one column only one kind has.
func exportKind(header []string) (catalog.Kind, bool) {
	for _, c := range []string{"part", "price_breaks", "imported_at"} {
		if !slices.Contains(header, c) {
			return "", false
		}
	}
	for _, k := range exportKinds {
		if slices.Contains(header, k.column) {
			return k.kind, true
		}
	}
	return "", false
}

// exportMapping returns the mapping of a catalog export, or nil when
// header is not one (or is one of another kind than the kind asked for).
func exportMapping(header []string, kind catalog.Kind) *Mapping {
	k, ok := exportKind(header)
	if !ok || kind != "" && kind != "auto" && kind != k {
		return nil
	}
	m := &Mapping{Kind: k, Columns: map[Field]string{}}
	for i, h := range header {
		f, ok := exportColumns[h]
		if !ok {
			continue
		}
		m.Columns[f] = h
		m.Guesses = append(m.Guesses, Guess{Field: f, Column: h, Index: i, Confidence: ConfExact, How: "catalog export"})
	}
	return m
}
