package importers

import (
	"fmt"
	"slices"
	"strings"

	"plumb/catalog"
)

// technologyPhrases maps the phrases distributors write for a resistor's
// technology, as lower-case words, to the catalog's trade words (common
// practice). A cell is read only when, with the filler words below taken
// out, it is one of these phrases: "thin film chip" is thin-film, but
// "metal glaze", "MF" or "thik film" are not guessed at.
var technologyPhrases = map[string]string{
	"thin film": "thin-film", "thinfilm": "thin-film",
	"thick film": "thick-film", "thickfilm": "thick-film",
	"metal film": "metal-film", "metalfilm": "metal-film",
	"foil": "foil", "metal foil": "foil", "bulk metal foil": "foil",
	"wirewound": "wirewound", "wire wound": "wirewound",
	"metal strip": "metal-strip", "metal element": "metal-strip", "shunt": "metal-strip", "current sense shunt": "metal-strip",
	"carbon film": "carbon-film",
}

// technologyFillers are words that say nothing about the technology.
var technologyFillers = map[string]bool{"chip": true, "smd": true, "smt": true, "precision": true, "resistor": true,
	"resistors": true, "fixed": true, "type": true, "network": true, "array": true, "high": true, "stability": true,
	"through": true, "hole": true, "tht": true, "surface": true, "mount": true}

// technologyWords are the phrases a description is searched for, each
// with the trade word it stands for (worked out once, not per row).
var technologyWords = func() []struct{ phrase, word string } {
	var out []struct{ phrase, word string }
	for _, p := range []string{"thin film", "thin-film", "thick film", "thick-film", "metal film", "metal-film", "metal foil", "foil",
		"wirewound", "wire wound", "metal strip", "metal-strip", "carbon film"} {
		w, _ := normaliseTechnology(p)
		out = append(out, struct{ phrase, word string }{p, w})
	}
	return out
}()

// normaliseTechnology reads a technology cell as one of the catalog's
// trade words; ok is false for words it does not know.
func normaliseTechnology(s string) (word string, ok bool) {
	var keep []string
	for _, w := range words(s) {
		if !technologyFillers[w] {
			keep = append(keep, w)
		}
	}
	word, ok = technologyPhrases[strings.Join(keep, " ")]
	return word, ok
}

// unknownTechnology is the warning for a technology cell plumb does not
// know, with the nearest known phrase when one is a slip away.
func unknownTechnology(s string) error {
	hint := ""
	low := strings.Join(words(s), " ")
	best, bestD := "", 3
	for p := range technologyPhrases {
		if d := catalog.EditDistance(low, p); d < bestD || d == bestD && p < best {
			best, bestD = p, d
		}
	}
	if best != "" {
		hint = fmt.Sprintf(" (a slip for %q?)", best)
	}
	known := slices.Sorted(func(yield func(string) bool) {
		seen := map[string]bool{}
		for _, w := range technologyPhrases {
			if !seen[w] {
				seen[w] = true
				if !yield(w) {
					return
				}
			}
		}
	})
	return fmt.Errorf("technology %q is not a word plumb knows%s, so it is stored as unknown; write one of %s, or set a fixed technology in the mapping",
		s, hint, strings.Join(known, ", "))
}
