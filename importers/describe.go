package importers

import (
	"regexp"
	"strings"

	"plumb/catalog/units"
)

// fromDescription holds what a free-text description says about a
// resistor, as distributors write it: "RES 4.99K OHM 0.1% 1/10W 25PPM 0603".
type fromDescription struct {
	resistance, tolerance, tcr, power float64
	pkg, tech                         string
	has                               map[Field]string // field -> the words it was read from
}

var (
	resMarkRE  = regexp.MustCompile(`(?i)^[0-9.,]+\s*(k|m|g|r|ω|ohm|ohms|kohm|mohm|kω|mω)?[0-9]*(ω|ohm|ohms)?$`)
	sizeCodeRE = regexp.MustCompile(`^(01005|0201|0402|0603|0805|1008|1206|1210|1812|2010|2512|2816|4527)$`)
)

// describe reads resistance, tolerance, tempco, power and size code from a
// description. A token is taken only when its unit mark makes its meaning
// plain: "4K99", "10R", "4.99K OHM", "0.1%", "25PPM", "1/10W", "0603"; a
// bare number is never read as ohms.
func describe(desc string, decimalComma bool) fromDescription {
	d := fromDescription{has: map[Field]string{}}
	low := strings.ToLower(desc)
	for _, w := range []string{"thin film", "thin-film", "thick film", "thick-film", "metal film", "metal-film", "metal foil", "foil",
		"wirewound", "wire wound", "metal strip", "metal-strip", "carbon film"} {
		if strings.Contains(low, w) {
			d.tech, d.has[FieldTechnology] = normaliseTechnology(w), w
			break
		}
	}
	toks := strings.FieldsFunc(desc, func(r rune) bool { return r == ' ' || r == ',' && !decimalComma || r == ';' || r == '\t' || r == '\n' })
	for i := 0; i < len(toks); i++ {
		t := toks[i]
		if decimalComma {
			t = withDecimalComma(t)
		}
		low := strings.ToLower(t)
		next := ""
		if i+1 < len(toks) {
			next = strings.ToLower(toks[i+1])
		}
		switch {
		case strings.Contains(low, "ppm"):
			if _, ok := d.has[FieldTCR]; !ok {
				if v, err := units.ParsePPM(t); err == nil {
					d.tcr, d.has[FieldTCR] = v, toks[i]
				}
			}
		case strings.HasSuffix(low, "%"):
			if _, ok := d.has[FieldTolerance]; !ok {
				if v, err := units.ParsePercent(t); err == nil {
					d.tolerance, d.has[FieldTolerance] = v, toks[i]
				}
			}
		case strings.HasSuffix(low, "w") && strings.IndexAny(low, "0123456789") == 0:
			if _, ok := d.has[FieldPower]; !ok {
				if v, err := units.ParsePower(t); err == nil {
					d.power, d.has[FieldPower] = v, toks[i]
				}
			}
		case sizeCodeRE.MatchString(low):
			if d.pkg == "" {
				d.pkg, d.has[FieldPackage] = t, toks[i]
			}
		default:
			if _, ok := d.has[FieldResistance]; ok || !resMarkRE.MatchString(low) {
				continue
			}
			words := toks[i]
			cand := t
			if next == "ohm" || next == "ohms" || next == "ω" {
				cand, words = t+" ohm", toks[i]+" "+toks[i+1]
			} else if !strings.ContainsAny(low, "kmgrω") && !strings.Contains(low, "ohm") {
				continue // a bare number: could be anything
			}
			if v, err := units.ParseResistance(cand); err == nil && v > 0 {
				d.resistance, d.has[FieldResistance] = v, words
			}
		}
	}
	return d
}
