package catalog

import (
	"bytes"
	"context"
	"fmt"
	"math"
	"path/filepath"
	"strings"
	"testing"
)

func TestSchema1ZerosBecomeUnknown(t *testing.T) {
	path := filepath.Join(t.TempDir(), "v1.db")
	rawSQLite(t, path,
		fmt.Sprintf("PRAGMA application_id = %d", ApplicationID),
		"PRAGMA foreign_keys = ON",
		migrations[0],
		`INSERT INTO resistors (id, part, maker, value_ohm, technology, package, tolerance, tcr_ppm, power_w, max_voltage_v)
			VALUES (1, 'OLD-R1', 'Orrin Resistive', 1000, 'thin-film', '0603', 0.001, 25, 0.1, 0)`,
		`INSERT INTO networks (id, part, maker, technology, package, tolerance, ratio_tolerance, tcr_ppm, tcr_tracking_ppm, power_w, max_voltage_v)
			VALUES (1, 'OLD-N1', 'Orrin Resistive', 'thin-film', 'SOT-23', 0.001, 0.0005, 25, 2, 0.1, 0)`,
		`INSERT INTO network_elements VALUES (1, 0, 10000), (1, 1, 10000)`,
		`INSERT INTO amplifiers (id, part, maker, type, channels, package, supply_min_v, supply_max_v, cm_neg_v, cm_pos_v,
			swing_neg_v, swing_pos_v, vos_v, vos_drift_v_per_k, ib_a, ios_a, aol_v_per_v, cmrr_db, gbw_hz, slew_v_per_s,
			noise_v_per_rthz, noise_a_per_rthz, iq_a)
			VALUES (1, 'OLD-A1', 'Halden Linear', 'opamp', 1, 'SOIC-8', 3, 36, 0, 1.5, 0.1, 0.1, 1e-4, 0, 2e-9, 0, 1e5, 90, 1e6, 1e6, 0, 0, 0)`,
		`INSERT INTO price_breaks VALUES ('resistor', 1, 1, 0.1, 'USD'), ('network', 1, 1, 1.5, 'USD'), ('amplifier', 1, 1, 0.9, 'USD')`,
		"PRAGMA user_version = 1",
	)
	s, err := Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	snap := mustSnapshot(t, s)
	if len(snap.Resistors) != 1 || len(snap.Networks) != 1 || len(snap.Amplifiers) != 1 {
		t.Fatalf("parts lost: %+v", snap)
	}
	r, n, a := snap.Resistors[0], snap.Networks[0], snap.Amplifiers[0]
	if Known(r.MaxVoltageV) || Known(r.LoadLife) || Known(r.ThermalResistance) || r.TCR != 25 {
		t.Errorf("resistor %+v: schema 1's zeros must read as unknown, given figures kept", r)
	}
	if len(n.Values) != 2 || Known(n.MaxVoltageV) || n.TCRTracking != 2 {
		t.Errorf("network %+v: elements lost or zero kept", n)
	}
	if Known(a.VosDriftVK) || Known(a.IosA) || Known(a.NoiseVHz) || Known(a.IqA) || Known(a.GainErrorMax) || a.IbA != 2e-9 || a.CMNegV != 0 {
		t.Errorf("amplifier %+v: op-amp zeros must read as unknown; a 0 V headroom is a figure", a)
	}
	for _, p := range [][]PriceBreak{r.PriceBreaks, n.PriceBreaks, a.PriceBreaks} {
		if len(p) != 1 {
			t.Errorf("price breaks lost in the migration: %+v", p)
		}
	}
	var bad int
	if err := s.db.Get(&bad, "SELECT COUNT(*) FROM pragma_foreign_key_check"); err != nil || bad != 0 {
		t.Errorf("foreign key check: %d (%v)", bad, err)
	}
	// Deleting a part still takes its prices and elements with it.
	if _, err := s.db.Exec("DELETE FROM networks"); err != nil {
		t.Fatal(err)
	}
	var left int
	if err := s.db.Get(&left, "SELECT (SELECT COUNT(*) FROM network_elements) + (SELECT COUNT(*) FROM price_breaks WHERE kind = 'network')"); err != nil || left != 0 {
		t.Errorf("%d element and price rows left after deleting the network (%v)", left, err)
	}
}

func TestSchema2MigratesToReferences(t *testing.T) {
	// A schema 2 catalog keeps its prices through the rebuild of
	// price_breaks, takes references afterwards, and deleting a part of any
	// kind still deletes its prices.
	path := filepath.Join(t.TempDir(), "v2.db")
	rawSQLite(t, path,
		fmt.Sprintf("PRAGMA application_id = %d", ApplicationID),
		"PRAGMA foreign_keys = ON",
		migrations[0], migrations[1],
		`INSERT INTO resistors (id, part, maker, value_ohm, technology, package, tolerance)
			VALUES (1, 'OLD-R1', 'Orrin Resistive', 1000, 'thin-film', '0603', 0.001)`,
		`INSERT INTO price_breaks VALUES ('resistor', 1, 1, 0.1, 'USD'), ('resistor', 1, 100, 0.05, 'USD')`,
		"PRAGMA user_version = 2",
	)
	s, err := Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	b := sampleBatch()
	mustUpsert(t, s, &Snapshot{References: b.References}, UpsertOptions{Now: testTime})
	snap := mustSnapshot(t, s)
	if len(snap.Resistors) != 1 || len(snap.Resistors[0].PriceBreaks) != 2 {
		t.Fatalf("resistor or its prices lost in the migration: %+v", snap.Resistors)
	}
	if len(snap.References) != 1 || !SameFigures(snap.References[0].Offer, b.References[0].Offer) {
		t.Fatalf("reference not stored with its prices: %+v", snap.References)
	}
	if _, err := s.db.Exec("DELETE FROM resistors; DELETE FROM voltage_references"); err != nil {
		t.Fatal(err)
	}
	var left int
	if err := s.db.Get(&left, "SELECT COUNT(*) FROM price_breaks"); err != nil || left != 0 {
		t.Errorf("%d price rows left after deleting their parts (%v)", left, err)
	}
}

func TestUnknownFiguresRoundTrip(t *testing.T) {
	ctx := context.Background()
	b := sampleBatch()
	b.Resistors[0].LoadLife, b.Resistors[0].TCR = Unknown(), Unknown()
	b.Amplifiers[0].IosA, b.Amplifiers[0].SlewVs, b.Amplifiers[0].SwingPosV = Unknown(), Unknown(), Unknown()
	b.Amplifiers[0].Package = ""
	s := memStore(t)
	mustUpsert(t, s, b, UpsertOptions{Now: testTime})
	got := mustSnapshot(t, s)
	byPart := func(as []Amplifier, part string) Amplifier {
		for _, a := range as {
			if a.Part == part {
				return a
			}
		}
		t.Fatalf("no %s", part)
		return Amplifier{}
	}
	r, a := got.Resistors[0], byPart(got.Amplifiers, "TS-OA1")
	if Known(r.LoadLife) || Known(r.TCR) || Known(a.IosA) || Known(a.SlewVs) || Known(a.SwingPosV) || a.SwingNegV != 0.05 {
		t.Fatalf("unknown figures not kept unknown through the store: %+v %+v", r, a)
	}
	// JSON: absent; read back unknown; a null reads as unknown too.
	var buf bytes.Buffer
	if err := s.WriteJSON(ctx, &buf); err != nil {
		t.Fatal(err)
	}
	for _, bad := range []string{`"slew_v_per_s": 5`, `"swing_pos_v": 0.1`, `NaN`, `null`} {
		if strings.Contains(buf.String(), bad) {
			t.Errorf("JSON: %s written for an unknown figure", bad)
		}
	}
	js := strings.Replace(buf.String(), `"ib_a": 1e-9`, `"ib_a": null`, 1)
	back, err := ReadSnapshotJSON(strings.NewReader(js))
	if err != nil {
		t.Fatal(err)
	}
	ba := byPart(back.Amplifiers, "TS-OA1")
	if Known(ba.IosA) || Known(ba.IbA) || Known(back.Resistors[0].LoadLife) || byPart(back.Amplifiers, "TS-DA1").IbA != 0 || ba.VosV != 25e-6 {
		t.Errorf("JSON read back: %+v", ba)
	}
	// CSV: blank.
	var csvBuf bytes.Buffer
	if err := s.WriteCSV(ctx, &csvBuf, KindAmplifier); err != nil {
		t.Fatal(err)
	}
	if strings.Contains(csvBuf.String(), "NaN") {
		t.Errorf("CSV export writes NaN:\n%s", csvBuf.String())
	}
	if !math.IsNaN(Unknown()) || Known(Unknown()) || !Known(0) {
		t.Error("Unknown and Known disagree")
	}
}
