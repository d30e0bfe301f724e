package catalog

import (
	"io"
)

// SnapshotFormat is the value of the "format" field that marks plumb
// snapshot JSON.
const SnapshotFormat = "plumb-catalog-snapshot"

// Snapshot is a whole catalog (or part of one) in memory, and the JSON
// export and demo format.
type Snapshot struct {
	Format         string           `json:"format"`
	SchemaVersion  int              `json:"schema_version"`
	ResistorSeries []ResistorSeries `json:"resistor_series"`
	Resistors      []Resistor       `json:"resistors"`
	Networks       []Network        `json:"networks"`
	Amplifiers     []Amplifier      `json:"amplifiers"`
}

// ReadSnapshotJSON reads snapshot JSON, checking its format header and
// schema version and refusing unknown fields.
func ReadSnapshotJSON(r io.Reader) (*Snapshot, error) { return readSnapshotJSON(r) }

// ExpandSeries returns every value of rs.ESeries in [rs.MinOhm, rs.MaxOhm]
// as a Resistor carrying the series' grade, offer and provenance, with part
// number rs.PartNumber(value) and SeriesPart rs.Part.
func ExpandSeries(rs ResistorSeries) ([]Resistor, error) { return expandSeries(rs) }
