package main

import (
	"strings"
	"testing"
)

// TestCatalogShowsReferencesAndNetworks prints the demo's references and a
// strappable amplifier's elements through the catalog commands.
func TestCatalogShowsReferencesAndNetworks(t *testing.T) {
	for _, tc := range []struct{ name, line string }{
		{"catalog_list_reference", "catalog list --kind reference"},
		{"catalog_show_reference", "catalog show TP-R25A"},
		{"catalog_show_shunt_reference", "catalog show CV-125S"},
		{"catalog_show_network", "catalog show KA-SX2"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			f, _, _ := testFactory(t)
			out, errOut, code := runPlumb(t, f, tc.line)
			if code != 0 {
				t.Fatalf("exit %d: %s", code, errOut)
			}
			assertGolden(t, tc.name, out)
		})
	}
	f, _, _ := testFactory(t)
	out, errOut, code := runPlumb(t, f, "catalog export --format csv --kind reference")
	if code != 0 || !strings.HasPrefix(out, "part,maker,topology,package,output_v,tolerance,drift_ppm,temp_min_c,temp_max_c,") ||
		!strings.Contains(out, "CV-125S,Corvane Analog,shunt,SC-70,1.25,0.005,50,0,70,2e-05,,,,,,0.015,0.3,,,") {
		t.Errorf("CSV export of references (exit %d, %s):\n%s", code, errOut, out)
	}
}
