package assume

import (
	"slices"

	"plumb/catalog"
)

// Snapshot returns a copy of snap whose unknown figures are filled with
// their defaults, and the assumptions made, by part (a series' by its
// stem). snap itself is not changed.
func Snapshot(snap *catalog.Snapshot) (*catalog.Snapshot, Set) {
	out := *snap
	set := Set{}
	out.ResistorSeries = slices.Clone(snap.ResistorSeries)
	for i := range out.ResistorSeries {
		set.Add(Grade(out.ResistorSeries[i].Part, &out.ResistorSeries[i].ResistorGrade))
	}
	out.Resistors = slices.Clone(snap.Resistors)
	for i := range out.Resistors {
		set.Add(Grade(out.Resistors[i].Part, &out.Resistors[i].ResistorGrade))
	}
	out.Networks = slices.Clone(snap.Networks)
	for i := range out.Networks {
		set.Add(Network(&out.Networks[i]))
	}
	out.Amplifiers = slices.Clone(snap.Amplifiers)
	for i := range out.Amplifiers {
		set.Add(Amplifier(&out.Amplifiers[i]))
	}
	return &out, set
}

// Part returns a copy of a part a lookup found (a catalog part type or a
// pointer to one) with its unknown figures filled, and the assumptions
// made. Other values are returned as they are.
func Part(v any) (any, []Assumption) {
	switch p := v.(type) {
	case *catalog.Resistor:
		return Part(*p)
	case catalog.Resistor:
		as := Grade(p.Part, &p.ResistorGrade)
		return &p, as
	case *catalog.Network:
		return Part(*p)
	case catalog.Network:
		as := Network(&p)
		return &p, as
	case *catalog.Amplifier:
		return Part(*p)
	case catalog.Amplifier:
		as := Amplifier(&p)
		return &p, as
	}
	return v, nil
}
