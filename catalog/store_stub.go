package catalog

import (
	"context"
	"errors"
	"io"
)

var errTODO = errors.New("catalog: store not implemented yet")

func create(path string, force bool) (*Store, error)                   { return nil, errTODO }
func open(path string) (*Store, error)                                 { return nil, errTODO }
func openMemory() (*Store, error)                                      { return nil, errTODO }
func (s *Store) load(ctx context.Context, f Filter) (*Snapshot, error) { return nil, errTODO }
func (s *Store) find(ctx context.Context, part string) (Kind, any, error) {
	return "", nil, errTODO
}
func (s *Store) history(ctx context.Context, part string) ([]HistoryEntry, error) {
	return nil, errTODO
}
func (s *Store) stats(ctx context.Context) (Stats, error) { return Stats{}, errTODO }
func (s *Store) upsert(ctx context.Context, b *Batch, opt UpsertOptions) ([]UpsertResult, error) {
	return nil, errTODO
}
func (s *Store) writeCSV(ctx context.Context, w io.Writer, kind Kind) error { return errTODO }
func (s *Store) writeJSON(ctx context.Context, w io.Writer) error           { return errTODO }
func readSnapshotJSON(r io.Reader) (*Snapshot, error)                       { return nil, errTODO }
func expandSeries(rs ResistorSeries) ([]Resistor, error)                    { return nil, errTODO }

// PartNumber returns the part number of one value of the series.
func (rs ResistorSeries) PartNumber(valueOhm float64) string {
	return rs.Part + "-" + ValueCode(valueOhm)
}

// ValueCode returns the R-notation code of a value.
func ValueCode(v float64) string { return "" }
