package units

import "strings"

// FromDecimalComma rewrites the numbers in s from decimal-comma notation,
// as files from locales that write one use, to the point form the parsers
// read: "4,99 kΩ" is "4.99 kΩ", "1.234,5" is "1234.5", "1,000" is "1.000"
// and "12.345" (dots splitting digits into groups of three, no comma) is
// "12345", but "0.125" (integer part 0 or a leading zero, never a
// thousands group) keeps its point. A number is a run of digits with single dots or commas between
// digits, so "1,5..2,5V" becomes "1.5..2.5V". A number that is not well
// formed in that notation (two commas, dots not in groups of three before
// the comma) is left as written for the parser to refuse. Text other than
// numbers is kept; s is returned as is when it has no comma or dot.
func FromDecimalComma(s string) string {
	if strings.IndexAny(s, ",.") < 0 {
		return s
	}
	var b strings.Builder
	b.Grow(len(s))
	for i := 0; i < len(s); {
		if !isDigit(s[i]) {
			b.WriteByte(s[i])
			i++
			continue
		}
		j := i + 1
		for j < len(s) && (isDigit(s[j]) || (s[j] == '.' || s[j] == ',') && j+1 < len(s) && isDigit(s[j+1]) && isDigit(s[j-1])) {
			j++
		}
		b.WriteString(commaNumber(s[i:j]))
		i = j
	}
	return b.String()
}

// commaNumber rewrites one number token of FromDecimalComma.
func commaNumber(tok string) string {
	whole, frac, hasComma := strings.Cut(tok, ",")
	if hasComma && strings.ContainsAny(frac, ",.") {
		return tok
	}
	if strings.IndexByte(whole, '.') >= 0 {
		groups := strings.Split(whole, ".")
		if len(groups[0]) > 3 || groups[0][0] == '0' {
			return tok // "0.125" is a fraction: a leading group never starts with 0
		}
		for _, g := range groups[1:] {
			if len(g) != 3 {
				return tok // "1.5" keeps its point: not thousands
			}
		}
		whole = strings.Join(groups, "")
	}
	if hasComma {
		return whole + "." + frac
	}
	return whole
}
