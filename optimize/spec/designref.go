package spec

import (
	"fmt"
	"math"
	"strings"

	"plumb/catalog"
	"plumb/optimize/assume"
)

// DesignReference is the reference part a design uses when its spec has
// the search pick one (reference.part: auto): the part number and, once
// resolved, its figures.
type DesignReference struct {
	Part      string  `json:"part"`
	V         float64 `json:"v"`
	Tolerance float64 `json:"tolerance"`   // fraction
	Drift     float64 `json:"drift_per_k"` // fraction per K
	Resolved  bool    `json:"-"`
}

type rawDesignRef struct {
	Part string `yaml:"part,omitempty"`
}

// parseDesignRef reads a design's reference block.
func parseDesignRef(p *problems, r *rawDesignRef) *DesignReference {
	if r == nil {
		return nil
	}
	part := strings.TrimSpace(r.Part)
	if part == "" {
		p.add("reference.part", "missing; name the catalog reference the design uses, e.g. {part: VR-4096-A}")
		return nil
	}
	return &DesignReference{Part: part}
}

// ReferenceFigures returns the reference the spec's stage and ADC see with
// design d: the spec's own when it gives the figures, or, when the search
// picks the part (reference.part: auto), the design's resolved part's. A
// design naming a reference its spec does not pick, one missing where the
// spec picks, or one of another voltage, is an error.
func ReferenceFigures(s *Spec, d *Design) (*Reference, error) {
	switch {
	case d.Reference != nil && !s.Reference.Auto():
		return nil, fmt.Errorf("%w: design %s: reference.part %s: spec %s gives its reference by its figures; remove the design's reference, or write reference.part: auto in the spec",
			ErrInvalid, d.SourceFile, d.Reference.Part, s.Name)
	case !s.Reference.Auto():
		return s.Reference, nil
	case d.Reference == nil:
		return nil, fmt.Errorf("%w: design %s: reference: missing; spec %s picks its reference from the catalog (part: auto), so the design names the part it uses, e.g. reference: {part: VR-4096-A}",
			ErrInvalid, d.SourceFile, s.Name)
	case !d.Reference.Resolved:
		return nil, fmt.Errorf("%w: design %s: reference.part %s has not been looked up in the catalog", ErrInvalid, d.SourceFile, d.Reference.Part)
	case math.Abs(d.Reference.V-s.Reference.V) > RefVoltageMatch*s.Reference.V:
		return nil, fmt.Errorf("%w: design %s: reference.part %s is a %g V reference; spec %s wants %g V", ErrInvalid, d.SourceFile, d.Reference.Part, d.Reference.V, s.Name, s.Reference.V)
	}
	r := *s.Reference
	r.Part, r.Tolerance, r.Drift = "", d.Reference.Tolerance, d.Reference.Drift
	return &r, nil
}

// RefVoltageMatch is how close, relative, a catalog reference's voltage
// must come to the spec's for the search to pick it: the same nominal
// voltage, written to any number of digits.
const RefVoltageMatch = 1e-4

// resolveReference looks the design's reference part up; its unknown
// figures are taken at their defaults (assume.Reference) and returned.
func resolveReference(p *problems, d *Design, lookup Lookup) (*DesignReference, []assume.Assumption) {
	r := d.Reference
	if r == nil || r.Resolved {
		return r, nil
	}
	kind, v, err := lookup(r.Part)
	switch {
	case err != nil:
		p.add("reference.part", "%s: %v", r.Part, err)
		return r, nil
	case kind != catalog.KindReference:
		p.add("reference.part", "%s is a %s, not a reference", r.Part, kind)
		return r, nil
	}
	ref := deref[catalog.Reference](v)
	tol, ppm := ref.Tolerance, ref.DriftPPM
	as := assume.Reference(r.Part, &tol, &ppm)
	return &DesignReference{Part: r.Part, V: ref.OutputV, Tolerance: tol, Drift: ppm * 1e-6, Resolved: true}, as
}
