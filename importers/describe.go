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
	// The words each figure was read from ("" = not found).
	resWords, tolWords, tcrWords, powWords, pkgWords, techWords string
}

// words returns the words a field was read from, and whether it was.
func (d *fromDescription) words(f Field) (string, bool) {
	var w string
	switch f {
	case FieldResistance:
		w = d.resWords
	case FieldTolerance:
		w = d.tolWords
	case FieldTCR:
		w = d.tcrWords
	case FieldPower:
		w = d.powWords
	case FieldPackage:
		w = d.pkgWords
	case FieldTechnology:
		w = d.techWords
	}
	return w, w != ""
}

var (
	resMarkRE = regexp.MustCompile(`(?i)^r?[0-9.,]+\s*(k|m|g|r|ω|ohm|ohms|kohm|mohm|kω|mω)?[0-9]*(ω|ohm|ohms)?$`)
)

// describe reads resistance, tolerance, tempco, power and size code from a
// description. A token is taken only when its unit mark makes its meaning
// plain: "4K99", "10R", "4.99K OHM", "0.1%", "25PPM", "1/10W", "0603"; a
// bare number is never read as ohms.
func describe(desc string, decimalComma bool) fromDescription {
	d := fromDescription{}
	if desc == "" {
		return d
	}
	low := strings.ToLower(desc)
	for _, t := range technologyWords {
		if strings.Contains(low, t.phrase) {
			d.tech, d.techWords = t.word, t.phrase
			break
		}
	}
	toks := strings.FieldsFunc(desc, func(r rune) bool { return r == ' ' || r == ',' && !decimalComma || r == ';' || r == '\t' || r == '\n' })
	for i, tok := range toks {
		if tok == "" || !isDigit(tok[0]) && tok[0] != '\xc2' && tok[0] != '+' && tok[0] != 'R' {
			continue // every figure starts with a digit, "±" or the R of "R47"
		}
		t := tok
		if decimalComma && strings.IndexByte(t, ',') >= 0 {
			t = units.FromDecimalComma(t)
		}
		last := t[len(t)-1] | 0x20
		hasTCR, hasTol, hasPow, hasRes := d.tcrWords != "", d.tolWords != "", d.powWords != "", d.resWords != ""
		switch {
		case containsFold(t, "ppm"):
			if !hasTCR {
				if v, err := units.ParsePPM(t); err == nil {
					d.tcr, d.tcrWords = v, tok
				}
			}
		case last == '%':
			if !hasTol {
				if v, err := units.ParsePercent(t); err == nil {
					d.tolerance, d.tolWords = v, tok
				}
			}
		case last == 'w':
			if !hasPow && isDigit(t[0]) {
				if v, err := units.ParsePower(t); err == nil {
					d.power, d.powWords = v, tok
				}
			}
		case sizeCodes[t]:
			if d.pkg == "" {
				d.pkg, d.pkgWords = t, tok
			}
		default:
			if hasRes || !resMarkRE.MatchString(t) {
				continue
			}
			words, cand := tok, t
			next := ""
			if i+1 < len(toks) {
				next = toks[i+1]
			}
			if strings.EqualFold(next, "ohm") || strings.EqualFold(next, "ohms") || next == "Ω" {
				cand, words = t+" ohm", tok+" "+next
			} else if !strings.ContainsAny(t, "kKmMgGrRΩ") && !containsFold(t, "ohm") {
				continue // a bare number: could be anything
			}
			if v, err := units.ParseResistance(cand); err == nil && v > 0 {
				d.resistance, d.resWords = v, words
			}
		}
	}
	return d
}

var sizeCodes = map[string]bool{"01005": true, "0201": true, "0402": true, "0603": true, "0805": true, "1008": true, "1206": true,
	"1210": true, "1812": true, "2010": true, "2512": true, "2816": true, "4527": true}

// containsFold reports whether s contains the lower-case ASCII word w in
// any case.
func containsFold(s, w string) bool {
	for i := 0; i+len(w) <= len(s); i++ {
		if strings.EqualFold(s[i:i+len(w)], w) {
			return true
		}
	}
	return false
}
