package importers

import (
	"fmt"
	"slices"
	"sort"
	"strings"

	"plumb/catalog"
)

// Unused is a column of a file that an import does not read, and why. An
// import names every column it leaves out (FileReport.Unused) instead of
// dropping it without a word.
type Unused struct {
	Column string
	Index  int
	Why    string
}

// oneCurrency keeps the price-break columns in the currency most of them
// name (on a tie, the currency of the leftmost column): a part's price
// list is in one currency. The others are returned as unused. A break
// column whose header names no currency ("Unit Price @100" beside
// "Price (EUR) 1pc") takes the one its neighbours name; its cells may
// still name their own.
func oneCurrency(header []string, breaks []breakCol) ([]breakCol, []Unused) {
	count := map[string]int{}
	first, firstCol := "", len(header)
	for _, b := range breaks {
		if b.curr == "" {
			continue
		}
		count[b.curr]++
		if b.col < firstCol {
			first, firstCol = b.curr, b.col
		}
	}
	if len(count) == 0 {
		return breaks, nil
	}
	keep := first
	for c, n := range count {
		if n > count[keep] {
			keep = c
		}
	}
	var kept []breakCol
	var dropped []Unused
	for _, b := range breaks {
		if b.curr == "" || b.curr == keep {
			b.curr = keep
			kept = append(kept, b)
			continue
		}
		dropped = append(dropped, Unused{Column: header[b.col], Index: b.col,
			Why: fmt.Sprintf("price break from %d in %s beside the %s price breaks: a part's price list is in one currency, so the %s prices are read", b.minQty, b.curr, keep, keep)})
	}
	return kept, dropped
}

// unusedColumns lists every column of the header that neither a field
// (cols) nor a price break reads, with the reason, in header order; extra
// are columns already set aside with their reason.
func unusedColumns(header []string, infos []headerInfo, kind catalog.Kind, cols map[Field]int, breaks []breakCol, extra []Unused) []Unused {
	used := map[int]bool{}
	for _, i := range cols {
		used[i] = true
	}
	for _, b := range breaks {
		used[b.col] = true
	}
	out := slices.Clone(extra)
	for _, u := range extra {
		used[u.Index] = true
	}
	for i, h := range header {
		if !used[i] {
			out = append(out, Unused{Column: h, Index: i, Why: whyUnused(infos[i], kind, cols, header)})
		}
	}
	sort.SliceStable(out, func(a, b int) bool { return out[a].Index < out[b].Index })
	return out
}

// whyUnused says why a column is not read: what it reads as, and why that
// is not taken from it.
func whyUnused(hi headerInfo, kind catalog.Kind, cols map[Field]int, header []string) string {
	if strings.TrimSpace(hi.text) == "" {
		return "no header text"
	}
	if _, own := exportKind(header); own && slices.Contains(exportProvenance, hi.text) {
		return "the provenance the catalog export wrote: this import records its own (--source, else the file's name, and the time of this import), kept in catalog history"
	}
	best := func(cs []candidate) (candidate, bool) {
		if len(cs) == 0 {
			return candidate{}, false
		}
		b := cs[0]
		for _, c := range cs[1:] {
			if c.conf > b.conf {
				b = c
			}
		}
		return b, true
	}
	if c, ok := best(candidates([]headerInfo{hi}, kind)); ok {
		switch i, taken := cols[c.field]; {
		case c.field == fieldIgnore:
			return "a distributor's own code, link or status, not a catalog figure"
		case taken:
			return fmt.Sprintf("also reads as %s, which is read from column %q", c.field, header[i])
		default:
			return fmt.Sprintf("reads as %s, which the mapping does not name; add it under columns to read it", c.field)
		}
	}
	if c, ok := best(candidates([]headerInfo{hi}, "")); ok {
		if fieldOfKind(c.field, kind) {
			// The word is one another kind uses for the field; for this
			// kind it could name another figure ("Noise" of a reference:
			// a density or a 0.1-10 Hz peak to peak).
			return fmt.Sprintf("could read as %s, which %ss have too, but for a %s the header does not say so clearly enough: if it holds that figure, name it in a mapping under columns: %s", c.field, kind, kind, c.field)
		}
		return fmt.Sprintf("reads as %s, which the catalog keeps for %s only, not for %ss", c.field, kindsOf(c.field), kind)
	}
	return "no field plumb knows; if it holds one, name it in a mapping under columns (plumb help mapping)"
}

// fieldOfKind reports whether parts of kind k have field f.
func fieldOfKind(f Field, k catalog.Kind) bool {
	for _, fi := range fieldTable {
		if fi.field == f && (fi.kinds == nil || slices.Contains(fi.kinds, k)) {
			return true
		}
	}
	return false
}

// kindsOf names the kinds of part that have field f.
func kindsOf(f Field) string {
	var ks []string
	for _, fi := range fieldTable {
		if fi.field != f {
			continue
		}
		for _, k := range fi.kinds {
			if !slices.Contains(ks, string(k)) {
				ks = append(ks, string(k)+"s")
			}
		}
	}
	return strings.Join(ks, " and ")
}
