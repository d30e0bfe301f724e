package importers

import (
	"bytes"
	"context"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"plumb/catalog"
)

// TestFormulaCellsReimport: the catalog's CSV export writes a cell a
// spreadsheet would run as a formula with a leading apostrophe (hardening
// finding 5), and the importer reads it back as it was, so an export still
// imports to the same parts.
func TestFormulaCellsReimport(t *testing.T) {
	ctx := context.Background()
	src, _ := newCatalog(t)
	r := catalog.Resistor{Part: "@R-1", Maker: "=1+2", Line: "+5V rail", ValueOhm: 1000,
		ResistorGrade: catalog.ResistorGrade{Technology: "thin-film", Package: "0603", Tolerance: 0.001, TCR: 25, PowerW: 0.1},
		Offer:         catalog.Offer{Stock: -1, PriceBreaks: []catalog.PriceBreak{{MinQty: 1, UnitPrice: 0.1, Currency: "USD"}}}}
	if _, err := src.Upsert(ctx, &catalog.Snapshot{Resistors: []catalog.Resistor{r}}, catalog.UpsertOptions{Source: "test", Now: testNow}); err != nil {
		t.Fatal(err)
	}
	var b bytes.Buffer
	if err := src.WriteCSV(ctx, &b, catalog.KindResistor); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(b.String(), "'@R-1,'=1+2,'+5V rail,1000,") {
		t.Fatalf("export does not neutralise the formula cells:\n%s", b.String())
	}
	file := filepath.Join(t.TempDir(), "export.csv")
	if err := os.WriteFile(file, b.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	dst, _ := newCatalog(t)
	if _, err := Import(ctx, dst, []string{file}, Options{Now: testNow}); err != nil {
		t.Fatal(err)
	}
	got := snapshot(t, dst)
	if len(got.Resistors) != 1 || got.Resistors[0].Part != r.Part || got.Resistors[0].Maker != r.Maker || got.Resistors[0].Line != r.Line {
		t.Errorf("re-imported %+v", got.Resistors)
	}
}
