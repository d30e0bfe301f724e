package importers

import (
	"context"
	"errors"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"plumb/catalog"
)

func TestGuessMapping(t *testing.T) {
	tests := []struct {
		name   string
		header []string
		kind   catalog.Kind
		want   map[Field]string
		conf   map[Field]Confidence // minimum confidence expected
	}{
		{
			name:   "distributor words",
			header: []string{"Mfr Part #", "Manufacturer", "Resistance (Ohms)", "Tolerance", "Temperature Coefficient", "Power (Watts)", "Quantity Available", "Unit Price (USD)"},
			kind:   catalog.KindResistor,
			want: map[Field]string{FieldPart: "Mfr Part #", FieldMaker: "Manufacturer", FieldResistance: "Resistance (Ohms)",
				FieldTolerance: "Tolerance", FieldTCR: "Temperature Coefficient", FieldPower: "Power (Watts)",
				FieldStock: "Quantity Available", FieldPrice: "Unit Price (USD)"},
			conf: map[Field]Confidence{FieldPart: ConfExact, FieldTCR: ConfExact},
		},
		{
			name:   "case and punctuation ignored",
			header: []string{"MANUFACTURER_PART_NUMBER", "mfr.", "VALUE", "tol.", "t.c.r.", "qty-on-hand"},
			kind:   catalog.KindResistor,
			want: map[Field]string{FieldPart: "MANUFACTURER_PART_NUMBER", FieldMaker: "mfr.", FieldResistance: "VALUE",
				FieldTolerance: "tol.", FieldStock: "qty-on-hand"},
		},
		{
			name:   "distributor's own code is not the part number",
			header: []string{"Distributor Part Number", "Manufacturer Part Number", "Resistance", "Tolerance"},
			kind:   catalog.KindResistor,
			want:   map[Field]string{FieldPart: "Manufacturer Part Number", FieldResistance: "Resistance", FieldTolerance: "Tolerance"},
		},
		{
			name: "catalogue words",
			header: []string{"Manufacturer Product Number", "Mfr.", "Resistance Value", "Tolerance (±%)", "Temp. Coefficient (±ppm/°C)",
				"Power Rating (W)", "Case Code (Imperial)", "Stock Qty", "Unit Price (EUR)", "Product Series", "Operating Temperature", "Lead Time"},
			kind: catalog.KindResistor,
			want: map[Field]string{FieldPart: "Manufacturer Product Number", FieldMaker: "Mfr.", FieldResistance: "Resistance Value",
				FieldTolerance: "Tolerance (±%)", FieldTCR: "Temp. Coefficient (±ppm/°C)", FieldPower: "Power Rating (W)",
				FieldPackage: "Case Code (Imperial)", FieldStock: "Stock Qty", FieldPrice: "Unit Price (EUR)", FieldLine: "Product Series"},
		},
		{
			name:   "network words",
			header: []string{"Part Number", "Number of Resistors", "Resistance", "Ratio Tolerance", "TCR Tracking", "TCR"},
			kind:   catalog.KindNetwork,
			want: map[Field]string{FieldPart: "Part Number", FieldElements: "Number of Resistors", FieldResistance: "Resistance",
				FieldRatioTolerance: "Ratio Tolerance", FieldTCRTracking: "TCR Tracking", FieldTCR: "TCR"},
		},
		{
			name:   "amplifier words",
			header: []string{"Part", "Input Offset Voltage", "Vos Drift", "GBW", "Slew Rate", "CMRR", "Voltage - Supply Span (Min)", "Voltage - Supply Span (Max)", "Rail-to-Rail", "Current - Supply"},
			kind:   catalog.KindAmplifier,
			want: map[Field]string{FieldPart: "Part", FieldVos: "Input Offset Voltage", FieldVosDrift: "Vos Drift", FieldGBW: "GBW",
				FieldSlew: "Slew Rate", FieldCMRR: "CMRR", FieldSupplyMin: "Voltage - Supply Span (Min)",
				FieldSupplyMax: "Voltage - Supply Span (Max)", FieldRailToRail: "Rail-to-Rail", FieldIq: "Current - Supply"},
		},
		{
			name:   "max preferred over typ",
			header: []string{"Part Number", "Vos typ (µV)", "Vos max (µV)", "Supply Max"},
			kind:   catalog.KindAmplifier,
			want:   map[Field]string{FieldPart: "Part Number", FieldVos: "Vos max (µV)", FieldSupplyMax: "Supply Max"},
		},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			m, err := GuessMapping(tc.header, "")
			if err != nil {
				t.Fatal(err)
			}
			if m.Kind != tc.kind {
				t.Errorf("kind %q, want %q", m.Kind, tc.kind)
			}
			if !reflect.DeepEqual(m.Columns, tc.want) {
				t.Errorf("columns\n got %v\nwant %v", m.Columns, tc.want)
			}
			for f, c := range tc.conf {
				for _, g := range m.Guesses {
					if g.Field == f && g.Confidence < c {
						t.Errorf("%s: confidence %.2f, want at least %.2f", f, g.Confidence, c)
					}
				}
			}
		})
	}
}

func TestGuessMappingUnknownKind(t *testing.T) {
	_, err := GuessMapping([]string{"Name", "Colour", "Weight"}, "")
	if !errors.Is(err, ErrUnknownKind) {
		t.Fatalf("err = %v, want ErrUnknownKind", err)
	}
}

func TestBreakColumns(t *testing.T) {
	tests := []struct {
		header string
		qty    int
		curr   string
	}{
		{"Price @ 1000", 1000, ""},
		{"1000+", 1000, ""},
		{"Unit Price (1,000)", 1000, ""},
		{"Price 100-999", 100, ""},
		{"Price for 1k (EUR)", 1000, "EUR"},
		{"10+ (USD)", 10, "USD"},
		{"Unit Price (USD)", 0, "USD"}, // a single price, not a break
		{"Power (1/8W)", 0, ""},
		// Thousands separators (common practice); a break is whole
		// pieces, so one dot splits thousands.
		{"Preis ab 1.000", 1000, ""},
		{"Price @ 10 000", 10000, ""},
		{"Price @ 2.5k", 0, ""}, // not whole pieces written in digits: no break
	}
	for _, tc := range tests {
		t.Run(tc.header, func(t *testing.T) {
			hi := analyseHeader(tc.header)
			if hi.breakQ != tc.qty || hi.curr != tc.curr {
				t.Errorf("analyseHeader(%q): qty %d currency %q, want %d %q", tc.header, hi.breakQ, hi.curr, tc.qty, tc.curr)
			}
		})
	}
}

func TestMappingSaveLoadAndUse(t *testing.T) {
	dir := t.TempDir()
	f := filepath.Join(dir, "odd.csv")
	// Headers no guess would place: a saved mapping does.
	csv := "Code;Ohmic value;Grade;Drift;Lager;Notes\nOD-1;4,99k;0,1;25;1.200;x\nOD-2;10k;0,1;25;7;y\n"
	if err := os.WriteFile(f, []byte(csv), 0o644); err != nil {
		t.Fatal(err)
	}
	m := &Mapping{Kind: catalog.KindResistor,
		Columns: map[Field]string{FieldPart: "code", FieldResistance: "OHMIC VALUE", FieldTolerance: "Grade", FieldTCR: "Drift", FieldStock: "Lager"},
		Fixed: map[Field]string{FieldMaker: "Orrin Resistive", FieldTechnology: "thin film", FieldCurrency: "EUR", FieldPrice: "0.30",
			FieldPackage: "0603", FieldPower: "0.1W"},
		// The Grade column's bare numbers are percent.
		Units: map[Field]string{FieldTolerance: "%"},
	}
	path, err := SaveMapping(dir, "odd-export", m)
	if err != nil {
		t.Fatal(err)
	}
	if filepath.Dir(path) != dir {
		t.Errorf("saved to %s, want in %s", path, dir)
	}
	for _, name := range []string{"odd-export", path} {
		got, err := LoadMapping(dir, name)
		if err != nil {
			t.Fatal(err)
		}
		if !reflect.DeepEqual(got.Columns, m.Columns) || !reflect.DeepEqual(got.Fixed, m.Fixed) || !reflect.DeepEqual(got.Units, m.Units) || got.Kind != m.Kind {
			t.Fatalf("LoadMapping(%s) = %+v, want %+v", name, got, m)
		}
		b, rep, err := Read(context.Background(), []string{f}, Options{Mapping: got})
		if err != nil {
			t.Fatal(err)
		}
		if len(b.Resistors) != 2 {
			t.Fatalf("%d resistors: %s", len(b.Resistors), problemText(rep))
		}
		r := b.Resistors[0]
		// "0,1" under a percent column is 0.1 % (decimal comma, bare number
		// read as percent); "1.200" pieces is 1200 in decimal-comma locales.
		if r.ValueOhm != 4990 || r.Tolerance != 0.001 || r.Maker != "Orrin Resistive" || r.Stock != 1200 ||
			len(r.PriceBreaks) != 1 || r.PriceBreaks[0].Currency != "EUR" || r.PriceBreaks[0].UnitPrice != 0.30 {
			t.Errorf("got %+v", r)
		}
	}
}

func TestBadMappings(t *testing.T) {
	dir := t.TempDir()
	write := func(name, text string) string {
		p := filepath.Join(dir, name+".yaml")
		if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
		return name
	}
	tests := []struct {
		name, yaml, want string
	}{
		{"unknown field", "columns:\n  resistence: Value\n", "unknown field \"resistence\""},
		{"unknown key", "colums:\n  part: Code\n", "colums"},
		{"bad kind", "kind: capacitor\n", "capacitor"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			_, err := LoadMapping(dir, write(strings.ReplaceAll(tc.name, " ", "-"), tc.yaml))
			if !errors.Is(err, ErrMapping) || !strings.Contains(err.Error(), tc.want) {
				t.Errorf("err = %v, want ErrMapping mentioning %q", err, tc.want)
			}
		})
	}
	if _, err := LoadMapping(dir, "absent"); !errors.Is(err, ErrMapping) {
		t.Errorf("missing mapping: %v", err)
	}
	if _, err := SaveMapping(dir, "../escape", &Mapping{}); !errors.Is(err, ErrMapping) {
		t.Errorf("a name with a path must be refused: %v", err)
	}
	// A mapping naming a column the file lacks says which.
	m := &Mapping{Kind: catalog.KindResistor, Columns: map[Field]string{FieldPart: "Order Code"}}
	_, _, err := Read(context.Background(), []string{"testdata/resistors_a.csv"}, Options{Mapping: m})
	if !errors.Is(err, ErrMapping) || !strings.Contains(err.Error(), "Order Code") {
		t.Errorf("err = %v", err)
	}
}
