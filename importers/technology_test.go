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

// TestTechnologyWords: a technology cell is read when, with filler words
// taken out, it is a phrase of the trade; any other word (a maker's own
// name for a process, an abbreviation, a typo) is kept unknown and named
// per row, with its column and the word, as a doubt.
func TestTechnologyWords(t *testing.T) {
	b, rep, err := Read(context.Background(), []string{"testdata/exports/res_technology_words.csv"}, Options{})
	if err != nil {
		t.Fatal(err)
	}
	want := map[string]string{"MW-1K00": "thin-film", "MW-1K10": "thick-film", "MW-1K20": "", "MW-1K30": "", "MW-1K40": "",
		"MW-1K50": "wirewound", "MW-1K60": ""}
	if len(b.Resistors) != len(want) {
		t.Fatalf("%d resistors, want %d:\n%s", len(b.Resistors), len(want), problemText(rep))
	}
	for part, tech := range want {
		if got := findResistor(t, b, part).Technology; got != tech {
			t.Errorf("%s technology %q, want %q", part, got, tech)
		}
	}
	warned := map[string]string{}
	for _, p := range rep.Problems {
		if p.Column == "Technology" {
			if p.Severity != Doubt {
				t.Errorf("%s: severity %s, want doubt", p.Part, p.Severity)
			}
			warned[p.Part] = p.Raw + ": " + p.Reason
		}
	}
	for part, word := range map[string]string{"MW-1K20": "metal glaze", "MW-1K30": "MF", "MW-1K40": "thik film"} {
		if !strings.Contains(warned[part], word) {
			t.Errorf("%s: warning %q, want one naming %q", part, warned[part], word)
		}
	}
	if !strings.Contains(warned["MW-1K40"], `slip for "thick film"`) {
		t.Errorf("the typo gets no suggestion: %q", warned["MW-1K40"])
	}
	if len(warned) != 3 {
		t.Errorf("warnings %q, want 3", warned)
	}
}

// TestOwnExportKeepsTechnology: the catalog's own CSV export re-imports a
// technology word as the catalog has it, even one the header reader would
// not take from a distributor's export.
func TestOwnExportKeepsTechnology(t *testing.T) {
	ctx := context.Background()
	src, _ := newCatalog(t)
	r := catalog.Resistor{Part: "MW-2K00", Maker: "Marrow Resistive", ValueOhm: 2000,
		ResistorGrade: catalog.ResistorGrade{Technology: "metal glaze", Tolerance: 0.01, TCR: 100, PowerW: 0.25,
			MaxVoltageV: catalog.Unknown(), ThermalResistance: catalog.Unknown(), LoadLife: catalog.Unknown()},
		Offer: catalog.Offer{Stock: -1, PriceBreaks: []catalog.PriceBreak{{MinQty: 1, UnitPrice: 0.05, Currency: "EUR"}}}}
	if _, err := src.Upsert(ctx, &catalog.Batch{Resistors: []catalog.Resistor{r}}, catalog.UpsertOptions{Source: "t", Now: testNow}); err != nil {
		t.Fatal(err)
	}
	file := filepath.Join(t.TempDir(), "export.csv")
	var buf bytes.Buffer
	if err := src.WriteCSV(ctx, &buf, catalog.KindResistor); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(file, buf.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	b, rep, err := Read(ctx, []string{file}, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if got := findResistor(t, b, "MW-2K00").Technology; got != "metal glaze" || rep.Count(Doubt) != 0 {
		t.Errorf("technology %q, %d doubts; want \"metal glaze\" and none:\n%s", got, rep.Count(Doubt), problemText(rep))
	}
}
