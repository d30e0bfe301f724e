package search

import "plumb/optimize/family"

// The circuits and builds the tests name, from the family registry.
var (
	Difference   = Circuit(family.Difference.Name)
	NonInverting = Circuit(family.NonInverting.Name)
	Inverting    = Circuit(family.Inverting.Name)
	Divider      = Circuit(family.Divider.Name)
	CurrentSense = Circuit(family.CurrentSense.Name)
	InAmp        = Circuit(family.InAmp.Name)
	LevelShift   = Circuit(family.LevelShift.Name)

	DiscreteDifference   = variant(family.Difference, buildDiscrete)
	NetworkDifference    = variant(family.Difference, buildNetwork)
	MatchedDifference    = variant(family.Difference, family.Matched.Name)
	DiscreteNonInverting = variant(family.NonInverting, buildDiscrete)
	DiscreteInverting    = variant(family.Inverting, buildDiscrete)
	DiscreteDivider      = variant(family.Divider, buildDiscrete)
	DiscreteInAmp        = variant(family.InAmp, buildDiscrete)
	NetworkInAmp         = variant(family.InAmp, buildNetwork)
	DiscreteLevelShift   = variant(family.LevelShift, buildDiscrete)
)
