package spec

import (
	"fmt"

	"plumb/catalog"
)

// SnapshotLookup returns a Lookup over an in-memory catalog: individual
// resistors, every value of every resistor series (by the series' value
// part numbers), networks and amplifiers.
func SnapshotLookup(snap *catalog.Snapshot) (Lookup, error) {
	type entry struct {
		kind catalog.Kind
		v    any
	}
	m := map[string]entry{}
	for i := range snap.Resistors {
		m[snap.Resistors[i].Part] = entry{catalog.KindResistor, &snap.Resistors[i]}
	}
	for _, rs := range snap.ResistorSeries {
		values, err := catalog.ExpandSeries(rs)
		if err != nil {
			return nil, fmt.Errorf("spec: series %s: %w", rs.Part, err)
		}
		for i := range values {
			m[values[i].Part] = entry{catalog.KindResistor, &values[i]}
		}
	}
	for i := range snap.Networks {
		m[snap.Networks[i].Part] = entry{catalog.KindNetwork, &snap.Networks[i]}
	}
	for i := range snap.Amplifiers {
		m[snap.Amplifiers[i].Part] = entry{catalog.KindAmplifier, &snap.Amplifiers[i]}
	}
	for i := range snap.References {
		m[snap.References[i].Part] = entry{catalog.KindReference, &snap.References[i]}
	}
	return func(part string) (catalog.Kind, any, error) {
		e, ok := m[part]
		if !ok {
			return "", nil, fmt.Errorf("%q: %w", part, catalog.ErrNotFound)
		}
		return e.kind, e.v, nil
	}, nil
}
