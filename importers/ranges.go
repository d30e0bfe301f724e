package importers

import (
	"fmt"
	"regexp"
	"strings"

	"plumb/catalog"
	"plumb/catalog/units"
)

// ranges reads an amplifier's input common-mode range and output swing as
// headroom from each rail (catalog.Amplifier: the inputs work from
// V- + CMNegV to V+ - CMPosV), from the one-side columns (cm_neg_v, ...),
// a two-sided cell ("input common mode range", "output swing to rail"),
// or, failing both, the rail-to-rail column; with none of them the
// headroom is assumed and the report says so.
func (r *rowReader) ranges(a *catalog.Amplifier) error {
	in, out := false, false
	if s, ok := r.raw(FieldRailToRail); ok {
		var err error
		if in, out, err = railToRail(s); err != nil {
			return r.skip(FieldRailToRail, s, err)
		}
	}
	switch {
	case in && out:
		a.RailToRail = catalog.RailInOut
	case in:
		a.RailToRail = catalog.RailIn
	case out:
		a.RailToRail = catalog.RailOut
	}
	a.CMNegV, a.CMPosV, a.SwingNegV, a.SwingPosV = catalog.Unknown(), catalog.Unknown(), catalog.Unknown(), catalog.Unknown()
	cm, err := r.headroom(FieldCMRange, FieldCMNeg, FieldCMPos, &a.CMNegV, &a.CMPosV)
	if err != nil {
		return err
	}
	sw, err := r.headroom(FieldSwing, FieldSwingNeg, FieldSwingPos, &a.SwingNegV, &a.SwingPosV)
	if err != nil {
		return err
	}
	// A range not given stays unknown: a solve takes it at a stated default
	// (rail-to-rail or not) and lists the assumption.
	if !cm {
		r.unknown = append(r.unknown, "input common-mode range")
	}
	if !sw {
		r.unknown = append(r.unknown, "output swing")
	}
	return nil
}

// headroom reads one range: the two one-side columns, else the two-sided
// cell. given is false when neither is there. A range with one side only
// takes the same headroom for the other, and says so.
func (r *rowReader) headroom(both, negF, posF Field, neg, pos *float64) (given bool, err error) {
	n, nok, _, err := r.value(negF, units.ParseVoltage)
	if err != nil {
		return false, err
	}
	p, pok, _, err := r.value(posF, units.ParseVoltage)
	if err != nil {
		return false, err
	}
	// A signed offset from V+ ("-1.5 V from V+") is the negative of the
	// headroom below it; a signed offset from V- is the headroom above it.
	if i, ok := r.cols[posF]; ok && r.info[i].railSigned {
		p = -p
	}
	switch {
	case nok && pok:
		*neg, *pos = n, p
		return true, nil
	case nok || pok:
		v, have, missing := n, negF, posF
		if pok {
			v, have, missing = p, posF, negF
		}
		*neg, *pos = v, v
		r.note(Doubt, missing, "", fmt.Errorf("no %s: taken equal to %s, %g V; check the datasheet", missing, have, v))
		return true, nil
	}
	s, ok := r.raw(both)
	if !ok {
		return false, nil
	}
	hint := r.unitHint(both)
	if hint == "" {
		hint = "V"
	}
	if *neg, *pos, err = parseHeadroom(s, hint, r.decimalComma); err != nil {
		return false, r.skip(both, s, err)
	}
	return true, nil
}

var (
	// A rail-relative bound: "V-", "(V-)", "Vee", "Vs-", "-Vs" for the
	// negative rail, "V+", "Vcc", "Vdd", "Vs+", "+Vs" for the positive one,
	// then an optional "+ 0.1 V" or "- 1.5 V" (datasheet notation, common
	// practice).
	railTermRE = regexp.MustCompile(`(?i)\(?\s*(v\s*-|v\s*−|vee|vss|vs\s*-|-\s*vs|v\s*\+|vcc|vdd|vs\s*\+|\+\s*vs)\s*\)?\s*(?:([+\-−])\s*([0-9]+(?:[.,][0-9]+)?(?:e[+-]?[0-9]+)?\s*(?:mv|µv|μv|uv|v)?))?`)
	rangeSepRE = regexp.MustCompile(`(?i)\s*(?:/|;|,|\bto\b|\.\.|\band\b)\s*`)
	// With a decimal comma, "0,1 / 1,5": the comma is not a separator.
	rangeSepCommaRE = regexp.MustCompile(`(?i)\s*(?:/|;|\bto\b|\.\.|\band\b)\s*`)
)

// parseHeadroom reads a two-sided range cell into the headroom from the
// negative and from the positive rail, V: "V- - 0.1 V to V+ - 1.5 V"
// (neg -0.1, pos 1.5: a bound below V- is a negative headroom),
// "rail-to-rail" (0, 0), "0.1 / 1.5" (neg, pos) or "50 mV" (both). Bare
// numbers take the unit hint.
func parseHeadroom(s, hint string, decimalComma bool) (neg, pos float64, err error) {
	t := strings.ToLower(cleanCell(s))
	if strings.Contains(t, "rail-to-rail") || strings.Contains(t, "rail to rail") || t == "rrio" || t == "rri" || t == "rro" {
		return 0, 0, nil
	}
	if ms := railTermRE.FindAllStringSubmatch(t, -1); len(ms) > 0 {
		var gotNeg, gotPos bool
		for _, m := range ms {
			rail := strings.Join(strings.Fields(m[1]), "")
			negRail := strings.Contains(rail, "-") || strings.Contains(rail, "−") || rail == "vee" || rail == "vss"
			if strings.HasPrefix(rail, "-") || strings.HasPrefix(rail, "+") {
				negRail = strings.HasPrefix(rail, "-")
			}
			v := 0.0
			if m[3] != "" {
				num := strings.TrimSpace(m[3])
				if v, _, err = readValue(num, hint, decimalComma, units.ParseVoltage); err != nil {
					return 0, 0, fmt.Errorf("%w: range %q: %s", ErrBadValue, s, unitErr(err))
				}
				if m[2] == "-" || m[2] == "−" {
					v = -v
				}
			}
			// Headroom counts inwards from each rail.
			if negRail {
				neg, gotNeg = v, true
			} else {
				pos, gotPos = -v, true
			}
		}
		if !gotNeg || !gotPos {
			return 0, 0, fmt.Errorf("%w: range %q names one rail; give both, like \"V- - 0.1 V to V+ - 1.5 V\"", ErrBadValue, s)
		}
		return neg, pos, nil
	}
	sep := rangeSepRE
	if decimalComma {
		sep = rangeSepCommaRE
	}
	var parts []string
	for _, p := range sep.Split(t, -1) {
		if p = strings.TrimSpace(p); p != "" {
			parts = append(parts, p)
		}
	}
	if len(parts) < 1 || len(parts) > 2 {
		return 0, 0, fmt.Errorf("%w: range %q: give the headroom from each rail, like \"0.1 / 1.5 V\" or \"V- - 0.1 V to V+ - 1.5 V\"", ErrBadValue, s)
	}
	vals := make([]float64, len(parts))
	for i, p := range parts {
		if vals[i], _, err = readValue(p, hint, decimalComma, units.ParseVoltage); err != nil {
			return 0, 0, fmt.Errorf("%w: range %q: %s", ErrBadValue, s, unitErr(err))
		}
	}
	if len(vals) == 1 {
		return vals[0], vals[0], nil
	}
	return vals[0], vals[1], nil
}
