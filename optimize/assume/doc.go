// Package assume is the one place where a figure the catalog does not know
// is given a value: where catalog parts enter optimize (the search loading
// a snapshot, a design resolving its part numbers), Part replaces each
// unknown figure (NaN, see catalog.Unknown) with a conservative default of
// the trade and returns the list of what it assumed, so every result can
// say which assumptions it rests on. Each default is documented beside its
// value and in the README, with its source or "common practice".
package assume
