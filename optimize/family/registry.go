package family

import (
	"fmt"
	"strings"
)

// registry lists every family, in the order specs and listings show them.
// Adding a family is one file in this package and one line here.
var registry = []*Family{
	Inverting,
	NonInverting,
	Difference,
	Divider,
	CurrentSense,
	LevelShift,
	InAmp,
	Matched,
	Strapped,
	StrappedSingle,
}

// All returns every family in registry order.
func All() []*Family { return append([]*Family(nil), registry...) }

// Names returns every family's name in registry order.
func Names() []string {
	out := make([]string, len(registry))
	for i, f := range registry {
		out[i] = f.Name
	}
	return out
}

// Lookup returns the family named name, or nil.
func Lookup(name string) *Family {
	for _, f := range registry {
		if f.Name == name {
			return f
		}
	}
	return nil
}

// Parse returns the family named s (case and surrounding space are
// ignored). An unknown name gives an error wrapping ErrUnknown that lists
// the valid names.
func Parse(s string) (*Family, error) {
	if f := Lookup(strings.ToLower(strings.TrimSpace(s))); f != nil {
		return f, nil
	}
	return nil, fmt.Errorf("%w %q: use one of %s", ErrUnknown, s, strings.Join(Names(), ", "))
}
