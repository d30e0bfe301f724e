package importers

import "plumb/catalog"

// Field names a catalog figure a column can hold. The names are the keys
// of a mapping file.
type Field string

// Fields common to every kind.
const (
	FieldPart        Field = "part"
	FieldMaker       Field = "maker"
	FieldPackage     Field = "package"
	FieldStock       Field = "stock"
	FieldPrice       Field = "price" // one unit price, or a packed list of breaks
	FieldMinOrder    Field = "min_order"
	FieldCurrency    Field = "currency"
	FieldDescription Field = "description"
	FieldLine        Field = "line"
	FieldTechnology  Field = "technology"
	// fieldIgnore holds columns that look like a part number but are not
	// the maker's (a distributor's own order code), so they are never
	// taken for one.
	fieldIgnore Field = "-"
)

// Resistor and network fields.
const (
	FieldResistance     Field = "resistance"
	FieldTolerance      Field = "tolerance"
	FieldTCR            Field = "tcr"
	FieldPower          Field = "power"
	FieldMaxVoltage     Field = "max_voltage"
	FieldElements       Field = "elements"
	FieldRatioTolerance Field = "ratio_tolerance"
	FieldTCRTracking    Field = "tcr_tracking"
	FieldSeriesPart     Field = "series_part"        // the series a single resistor belongs to
	FieldThermalRes     Field = "thermal_resistance" // K/W to ambient
	FieldLoadLife       Field = "load_life"          // stability over rated life, a tolerance
)

// Resistor series fields (the catalog's own series export).
const (
	FieldESeries Field = "e_series"
	FieldMinOhm  Field = "min_ohm"
	FieldMaxOhm  Field = "max_ohm"
)

// Amplifier fields.
const (
	FieldChannels   Field = "channels"
	FieldSupplyMin  Field = "supply_min"
	FieldSupplyMax  Field = "supply_max"
	FieldVos        Field = "vos"
	FieldVosDrift   Field = "vos_drift"
	FieldIb         Field = "ib"
	FieldIos        Field = "ios"
	FieldGBW        Field = "gbw"
	FieldSlew       Field = "slew"
	FieldNoiseV     Field = "noise_v"
	FieldNoiseI     Field = "noise_i"
	FieldCMRR       Field = "cmrr"
	FieldAol        Field = "aol"
	FieldRailToRail Field = "rail_to_rail"
	FieldIq         Field = "iq"
	// Amplifiers with matched resistors inside (difference and
	// instrumentation amplifiers with fixed gains).
	FieldGains     Field = "gains"
	FieldGainError Field = "gain_error"
	FieldGainDrift Field = "gain_drift"
	// Input and output ranges as headroom from each rail, V (a negative
	// headroom is beyond the rail). CMRange and Swing hold both sides in
	// one cell: "V- - 0.1 V to V+ - 1.5 V", "0.1 / 1.5", or one figure
	// for both rails.
	FieldCMNeg    Field = "cm_neg"
	FieldCMPos    Field = "cm_pos"
	FieldCMRange  Field = "cm_range"
	FieldSwingNeg Field = "swing_neg"
	FieldSwingPos Field = "swing_pos"
	FieldSwing    Field = "swing"
	// The input range of an amplifier with matched resistors, as headroom
	// from each rail, and its internal resistor value.
	FieldInNeg       Field = "in_neg"
	FieldInPos       Field = "in_pos"
	FieldInternalR   Field = "internal_resistance"
	FieldTypicalOnly Field = "typical_only" // catalog names of figures given as typical only
	FieldAmpType     Field = "amp_type"     // opamp or matched
	// The matched resistors inside such an amplifier, in the text form of
	// catalog.ParseMatchedNetwork, and their tolerances.
	FieldNetwork         Field = "network"
	FieldNetworkTol      Field = "network_tolerance"
	FieldNetworkRatio    Field = "network_ratio_tolerance"
	FieldNetworkTracking Field = "network_tracking"
)

// Voltage reference fields. A reference's initial accuracy is
// FieldTolerance, its supply range FieldSupplyMin and FieldSupplyMax (or
// both in one cell), its noise density FieldNoiseV and its quiescent
// current FieldIq.
const (
	FieldOutputV     Field = "output_voltage"
	FieldDrift       Field = "drift"        // ppm/K, box method
	FieldTempRange   Field = "temp_range"   // the range the drift is rated over, "-40 to 125 °C"
	FieldTempMin     Field = "temp_min"     // °C
	FieldTempMax     Field = "temp_max"     // °C
	FieldNoisePP     Field = "noise_pp"     // 0.1 Hz to 10 Hz, peak to peak
	FieldSupplyRange Field = "supply_range" // "2.7 V to 18 V", "±1.35 V ~ ±18 V" (amplifiers too)
	FieldDropout     Field = "dropout"
	FieldLoadSource  Field = "load_source"
	FieldLoadSink    Field = "load_sink"
	FieldOutputR     Field = "output_resistance" // ohm, or load regulation (ppm/mA, µV/mA)
	FieldLongTerm    Field = "long_term"         // ppm over 1000 h
	FieldTopology    Field = "topology"          // series or shunt
)

// fieldInfo holds the trade words for a field and the kinds it belongs to.
type fieldInfo struct {
	field    Field
	kinds    []catalog.Kind // nil: every kind
	synonyms []string
}

var (
	res  = []catalog.Kind{catalog.KindResistor}
	ser  = []catalog.Kind{catalog.KindSeries}
	rn   = []catalog.Kind{catalog.KindResistor, catalog.KindNetwork}
	net  = []catalog.Kind{catalog.KindNetwork}
	amp  = []catalog.Kind{catalog.KindAmplifier}
	ref  = []catalog.Kind{catalog.KindReference}
	part = []catalog.Kind{catalog.KindResistor, catalog.KindNetwork, catalog.KindAmplifier, catalog.KindReference}
)

// fieldTable lists the usual header words of distributor exports and
// approved-parts lists (common practice), already normalised: lower case,
// punctuation as spaces.
var fieldTable = []fieldInfo{
	{FieldPart, part, []string{"part number", "mpn", "mfr part number", "mfr part", "mfr pn", "mfg part number",
		"manufacturer part number", "manufacturer part no", "manufacturer part", "part no", "part", "pn",
		"order code", "mfr part no", "manufacturer pn", "model", "part num", "manufacturer product number",
		"mfr product number", "product number", "mfr no", "mfr number", "manufacturer number", "mfg part no", "mfg pn"}},
	{fieldIgnore, part, []string{"supplier part number", "distributor part number", "vendor part number",
		"internal part number", "stock code", "order number", "sku", "supplier part", "distributor part",
		"customer part number", "cpn", "datasheet", "url", "link", "image", "rohs", "lead free", "status", "part status"}},
	{FieldMaker, part, []string{"manufacturer", "mfr", "mfg", "brand", "maker", "make", "manufacturer name", "mfr name"}},
	{FieldPackage, part, []string{"package", "case", "size", "package case", "case size", "footprint", "case code",
		"package type", "size code", "case package", "supplier device package", "package size"}},
	{FieldStock, part, []string{"stock", "quantity available", "qty on hand", "qty available", "available", "in stock",
		"stock qty", "on hand", "inventory", "availability", "quantity in stock", "stock quantity", "available quantity"}},
	{FieldPrice, part, []string{"unit price", "price", "pricing", "price breaks", "cost", "unit cost", "price list", "prices"}},
	{FieldMinOrder, part, []string{"minimum order quantity", "moq", "min order", "minimum quantity", "min qty",
		"min order qty", "minimum order"}},
	{FieldCurrency, part, []string{"currency", "curr", "currency code"}},
	{FieldDescription, part, []string{"description", "desc", "product description", "detailed description",
		"item description", "part description"}},
	{FieldLine, rn, []string{"series", "product line", "family", "product series", "line", "product family"}},
	{FieldTechnology, rn, []string{"technology", "composition", "resistor type", "film type", "construction",
		"material", "type", "resistor technology"}},

	{FieldResistance, rn, []string{"resistance", "value", "ohms", "resistance value", "nominal resistance",
		"resistance ohms", "r", "resistor value", "resistance per element", "element value"}},
	{FieldTolerance, rn, []string{"tolerance", "tol", "resistance tolerance", "absolute tolerance", "initial tolerance"}},
	{FieldTCR, rn, []string{"temperature coefficient", "tcr", "tempco", "temp coefficient", "temp co", "tc",
		"temperature coefficient of resistance", "absolute tcr"}},
	{FieldPower, rn, []string{"power", "wattage", "power rating", "rated power", "power watts",
		"power per element", "power element"}},
	{FieldMaxVoltage, rn, []string{"voltage rating", "max working voltage", "working voltage",
		"maximum working voltage", "rated voltage", "max voltage", "limiting element voltage", "voltage"}},
	{FieldElements, net, []string{"number of resistors", "resistors", "elements", "number of elements",
		"no of resistors", "resistor count", "element count", "resistors per package"}},
	{FieldRatioTolerance, net, []string{"ratio tolerance", "matching", "ratio match", "tolerance matching",
		"ratio tol", "resistance ratio tolerance", "ratio matching", "matching tolerance"}},
	{FieldTCRTracking, net, []string{"tcr tracking", "tracking", "tempco tracking", "temperature coefficient tracking",
		"ratio tempco", "tcr ratio", "ratio tcr", "tracking tcr"}},

	{FieldChannels, amp, []string{"channels", "number of channels", "amplifiers", "number of circuits", "circuits",
		"amps per package", "channel count"}},
	{FieldSupplyMin, amp, []string{"supply voltage min", "min supply voltage", "vs min", "supply min",
		"minimum supply voltage", "voltage supply span min", "supply voltage span min", "supply span min"}},
	{FieldSupplyMax, amp, []string{"supply voltage max", "max supply voltage", "vs max", "supply max",
		"maximum supply voltage", "voltage supply span max", "supply voltage span max", "supply span max"}},
	{FieldSupplyRange, amp, []string{"supply voltage range", "supply range", "supply voltage", "operating voltage",
		"operating supply voltage", "operating voltage range", "voltage supply span", "supply voltage span", "supply span",
		"vs range", "power supply range", "voltage supply", "vs"}},
	{FieldVos, amp, []string{"input offset voltage", "vos", "offset voltage", "voltage input offset", "vio",
		"input offset", "offset"}},
	{FieldVosDrift, amp, []string{"offset drift", "vos drift", "input offset voltage drift", "offset voltage drift",
		"tcvos", "drift", "vos tc", "offset voltage tempco"}},
	{FieldIb, amp, []string{"input bias current", "ib", "bias current", "current input bias", "iib"}},
	{FieldIos, amp, []string{"input offset current", "ios", "offset current", "iio"}},
	{FieldGBW, amp, []string{"gbw", "gain bandwidth product", "gain bandwidth", "gbp", "gbwp", "gain bandwidth prod"}},
	{FieldSlew, amp, []string{"slew rate", "sr", "slew"}},
	{FieldNoiseV, amp, []string{"voltage noise density", "voltage noise", "en", "noise density",
		"input voltage noise density", "input voltage noise", "e n", "noise"}},
	{FieldNoiseI, amp, []string{"current noise density", "current noise", "input current noise density",
		"input current noise", "i n"}},
	{FieldCMRR, amp, []string{"cmrr", "common mode rejection ratio", "common mode rejection"}},
	{FieldAol, amp, []string{"open loop gain", "aol", "avol", "large signal voltage gain", "open loop voltage gain",
		"gain open loop", "avo"}},
	{FieldRailToRail, amp, []string{"rail to rail", "rrio", "rail to rail io", "output type", "rail rail", "rail to rail type"}},
	{FieldGains, amp, []string{"gain", "gains", "fixed gain", "fixed gains", "gain options", "gain settings", "available gains"}},
	{FieldGainError, amp, []string{"gain error", "gain error max", "gain accuracy", "gain tolerance"}},
	{FieldGainDrift, amp, []string{"gain drift", "gain tempco", "gain error drift", "gain temperature coefficient"}},
	{FieldCMNeg, amp, []string{"cm neg v", "cm neg", "common mode headroom negative", "input headroom negative rail",
		"vicm headroom negative", "common mode headroom to negative rail", "input headroom to v"}},
	{FieldCMPos, amp, []string{"cm pos v", "cm pos", "common mode headroom positive", "input headroom positive rail",
		"vicm headroom positive", "common mode headroom to positive rail", "input headroom to v plus"}},
	{FieldCMRange, amp, []string{"input common mode range", "common mode range", "vicm", "cmvr", "vcm range",
		"input common mode voltage range", "common mode input range", "common mode voltage range", "input voltage range cm",
		"vicm range", "icmr"}},
	{FieldSwingNeg, amp, []string{"swing neg v", "swing neg", "output swing to negative rail", "output headroom negative",
		"vol headroom", "swing from negative rail"}},
	{FieldSwingPos, amp, []string{"swing pos v", "swing pos", "output swing to positive rail", "output headroom positive",
		"voh headroom", "swing from positive rail"}},
	{FieldSwing, amp, []string{"output swing to rail", "output swing", "output voltage swing", "swing to rail",
		"output headroom", "output swing from rail", "vo swing", "output voltage swing from rail"}},
	{FieldInNeg, amp, []string{"in neg v", "input range headroom negative", "input voltage headroom negative"}},
	{FieldInPos, amp, []string{"in pos v", "input range headroom positive", "input voltage headroom positive"}},
	{FieldInternalR, amp, []string{"internal ohm", "internal resistance", "internal resistor", "resistor value internal",
		"internal resistor value", "feedback resistor"}},
	{FieldTypicalOnly, amp, []string{"typical only", "typical figures"}},
	{FieldAmpType, amp, []string{"amplifier type", "amp type"}},
	{FieldESeries, ser, []string{"e series", "eseries"}},
	{FieldMinOhm, ser, []string{"min ohm", "minimum resistance"}},
	{FieldMaxOhm, ser, []string{"max ohm", "maximum resistance"}},
	{FieldSeriesPart, res, []string{"series part", "series stem"}},
	{FieldThermalRes, rn, []string{"thermal resistance", "thermal resistance k per w", "rth", "rthja", "theta ja"}},
	{FieldLoadLife, rn, []string{"load life", "load life stability", "stability", "long term stability"}},
	{FieldIq, amp, []string{"quiescent current", "iq", "supply current", "supply current per channel", "current supply",
		"quiescent current per channel", "iq per channel"}},
	{FieldNetwork, amp, []string{"network", "internal network", "resistor network", "internal resistors", "netlist",
		"elements", "element list", "matched network"}},
	{FieldNetworkTol, amp, []string{"network tolerance", "element tolerance", "absolute tolerance", "resistor tolerance"}},
	{FieldNetworkRatio, amp, []string{"network ratio tolerance", "ratio tolerance", "ratio matching", "matching",
		"resistor matching", "ratio match"}},
	{FieldNetworkTracking, amp, []string{"network ratio drift ppm", "ratio tracking", "tcr tracking", "ratio drift",
		"tracking", "ratio tempco"}},

	{FieldOutputV, ref, []string{"output voltage", "vout", "reference voltage", "vref", "voltage output",
		"nominal output voltage", "output voltage nominal", "vo", "output v", "voltage reference"}},
	{FieldTolerance, ref, []string{"initial accuracy", "accuracy", "initial tolerance", "tolerance", "initial error",
		"output voltage tolerance", "output voltage accuracy", "voltage tolerance", "tol"}},
	{FieldDrift, ref, []string{"temperature coefficient", "tempco", "tc", "drift", "temperature drift",
		"output voltage drift", "vout tempco", "output voltage temperature coefficient", "tcvout", "temp coefficient",
		"drift ppm"}},
	{FieldTempRange, ref, []string{"operating temperature", "temperature range", "operating temperature range",
		"temp range", "specified temperature range", "rated temperature range", "operating temp", "operating temp range",
		"temperature", "temp", "operating range", "ambient temperature range", "drift temperature range"}},
	{FieldTempMin, ref, []string{"temp min c", "temperature min", "min temperature", "operating temperature min"}},
	{FieldTempMax, ref, []string{"temp max c", "temperature max", "max temperature", "operating temperature max"}},
	{FieldNoisePP, ref, []string{"noise pp v", "noise 0 1 10 hz", "noise 0 1 hz to 10 hz", "low frequency noise",
		"noise peak to peak", "noise p p", "output noise 0 1 10 hz", "noise 0 1hz 10hz", "noise 0 1 10hz", "output noise 0 1 10hz",
		"1 f noise", "noise lf", "noise 0 1 to 10 hz"}},
	{FieldNoiseV, ref, []string{"noise density", "output noise density", "wideband noise", "noise v per rthz",
		"voltage noise density", "en"}},
	{FieldSupplyMin, ref, []string{"input voltage min", "vin min", "supply voltage min", "min input voltage",
		"minimum input voltage", "supply min v"}},
	{FieldSupplyMax, ref, []string{"input voltage max", "vin max", "supply voltage max", "max input voltage",
		"maximum input voltage", "supply max v"}},
	{FieldSupplyRange, ref, []string{"input voltage range", "supply voltage range", "vin range", "input voltage",
		"supply voltage", "voltage input", "vin", "supply range"}},
	{FieldDropout, ref, []string{"dropout voltage", "dropout", "vdo", "dropout v"}},
	{FieldLoadSource, ref, []string{"output current source", "source current", "max output current", "output current",
		"load current", "iout", "load current source", "load source a"}},
	{FieldLoadSink, ref, []string{"output current sink", "sink current", "load current sink", "load sink a",
		"operating current max", "cathode current max"}},
	{FieldOutputR, ref, []string{"output resistance", "output impedance", "load regulation", "zout", "rout", "output ohm"}},
	{FieldLongTerm, ref, []string{"long term stability", "long term drift", "long term", "long term ppm", "ltd"}},
	{FieldIq, ref, []string{"quiescent current", "iq", "supply current", "ground current", "iq a"}},
	{FieldTopology, ref, []string{"topology", "reference type", "type", "configuration"}},
}

// kindFields lists the fields that tell one kind from another.
var kindFields = map[catalog.Kind][]Field{
	catalog.KindResistor:  {FieldResistance, FieldPower, FieldTolerance, FieldTCR},
	catalog.KindNetwork:   {FieldElements, FieldRatioTolerance, FieldTCRTracking},
	catalog.KindAmplifier: {FieldVos, FieldVosDrift, FieldIb, FieldGBW, FieldSlew, FieldCMRR, FieldAol, FieldSupplyMax, FieldIq, FieldNoiseV},
	catalog.KindReference: {FieldOutputV, FieldNoisePP, FieldDropout, FieldTempRange},
}

func (fi fieldInfo) has(k catalog.Kind) bool {
	if fi.kinds == nil {
		return true
	}
	for _, x := range fi.kinds {
		if x == k {
			return true
		}
	}
	return false
}
