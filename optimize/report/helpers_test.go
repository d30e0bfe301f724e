package report

import (
	"context"
	"os"
	"testing"
	"time"

	"plumb/catalog"
	"plumb/optimize/spec"
)

// loggerSpec is the data-logger example spec the project ships.
const loggerSpec = "../../data/examples/logger-channel.yaml"

// fixedNow is the injected clock of every test report.
func fixedNow() time.Time { return time.Date(2026, 3, 14, 9, 26, 0, 0, time.UTC) }

func loadSnapshot(t testing.TB, path string) *catalog.Snapshot {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	snap, err := catalog.ReadSnapshotJSON(f)
	if err != nil {
		t.Fatal(err)
	}
	return snap
}

func loadSpec(t testing.TB, path string) *spec.Spec {
	t.Helper()
	s, err := spec.Load(path)
	if err != nil {
		t.Fatal(err)
	}
	return s
}

// buildFixture builds the report of a spec against the fixture catalog.
func buildFixture(t testing.TB, specPath string) *Report {
	t.Helper()
	r, err := Build(context.Background(), Input{Spec: loadSpec(t, specPath), Snapshot: loadSnapshot(t, "testdata/catalog.json"), Now: fixedNow, Trials: 1000})
	if err != nil {
		t.Fatal(err)
	}
	return r
}
