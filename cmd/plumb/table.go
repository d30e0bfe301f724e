package main

import (
	"fmt"
	"io"
	"strings"
	"unicode/utf8"
)

// table prints rows as aligned columns. On a terminal the table is fitted to
// the stream's width by wrapping the widest columns at spaces; elsewhere it
// keeps every cell on one line so that scripts can read it.
type table struct {
	header []string
	rows   [][]string
	right  map[int]bool
	// wrap lists the columns narrowed first to fit the width (default:
	// the last column, which holds free text).
	wrap  []int
	width int // 0: no limit
}

// nbsp is a no-break space: table cells use it to keep a value and its unit
// on one line; it is printed as a plain space.
const nbsp = "\u00a0"

// keep joins the words of s with no-break spaces.
func keep(s string) string { return strings.ReplaceAll(s, " ", nbsp) }

// columnGap is the space between two columns.
const columnGap = 2

// minWrapWidth is the narrowest a column is wrapped to.
const minWrapWidth = 8

// minTextWidth is the narrowest a free-text column is wrapped to before
// other columns are narrowed.
const minTextWidth = 20

func newTable(io *IOStreams, header ...string) *table {
	t := &table{header: header, right: map[int]bool{}}
	if io.IsStdoutTTY() {
		t.width = io.width
	}
	return t
}

// newPageTable is newTable fitted to the page (fitPage).
func newPageTable(io *IOStreams, header ...string) *table {
	return newTable(io, header...).fitPage(io)
}

// fitPage fits the table to the page even when stdout is not a terminal
// (the terminal's width where known, else 100 columns): the results of
// solve and check are read by people, and scripts read their CSV or JSON.
func (t *table) fitPage(io *IOStreams) *table {
	t.width = io.width
	return t
}

// wrapColumns names the columns to narrow first when the table is too wide.
func (t *table) wrapColumns(cols ...int) *table {
	t.wrap = cols
	return t
}

// alignRight right-aligns the given columns (numbers).
func (t *table) alignRight(cols ...int) *table {
	for _, c := range cols {
		t.right[c] = true
	}
	return t
}

// row adds a row; missing cells are blank, extra cells are a programming
// error.
func (t *table) row(cells ...string) {
	if len(cells) > len(t.header) {
		panic(fmt.Sprintf("plumb: table row has %d cells for %d columns", len(cells), len(t.header)))
	}
	r := make([]string, len(t.header))
	for i, c := range cells {
		// A cell is one line of text: even a line end is escaped.
		r[i] = escapeText(c, "")
	}
	t.rows = append(t.rows, r)
}

// render writes the table.
func (t *table) render(w io.Writer) error {
	n := len(t.header)
	widths := make([]int, n)
	for i, h := range t.header {
		widths[i] = textWidth(h)
	}
	for _, r := range t.rows {
		for i, c := range r {
			widths[i] = max(widths[i], textWidth(c))
		}
	}
	if t.width > 0 {
		wrap := t.wrap
		if wrap == nil {
			wrap = []int{n - 1}
		}
		fitWidths(widths, t.header, t.width, wrap)
	}
	var b strings.Builder
	t.writeRow(&b, t.header, widths)
	for _, r := range t.rows {
		t.writeRow(&b, r, widths)
	}
	_, err := io.WriteString(w, b.String())
	return err
}

// fitWidths narrows columns until the table fits in limit columns: first
// the widest of the wrap columns down to minTextWidth, then the widest of
// any column down to its header's longest word or minWrapWidth.
func fitWidths(widths []int, header []string, limit int, wrap []int) {
	floor := make([]int, len(widths))
	for i, h := range header {
		floor[i] = minWrapWidth
		for _, word := range strings.Fields(h) {
			floor[i] = max(floor[i], textWidth(word))
		}
		floor[i] = min(floor[i], widths[i])
	}
	textFloor := make([]int, len(widths))
	copy(textFloor, widths)
	for _, c := range wrap {
		textFloor[c] = min(widths[c], max(floor[c], minTextWidth))
	}
	shrink(widths, textFloor, limit)
	shrink(widths, floor, limit)
}

// shrink narrows the widest column above its floor until the total fits.
func shrink(widths, floor []int, limit int) {
	for {
		total := columnGap * (len(widths) - 1)
		for _, w := range widths {
			total += w
		}
		if total <= limit {
			return
		}
		widest := -1
		for i, w := range widths {
			if w > floor[i] && (widest < 0 || w > widths[widest]) {
				widest = i
			}
		}
		if widest < 0 {
			return
		}
		// Narrow the widest column no further than the next widest, so
		// that the shrinking is shared.
		next := 0
		for i, w := range widths {
			if i != widest && w > floor[i] {
				next = max(next, w)
			}
		}
		step := min(total-limit, widths[widest]-floor[widest])
		if next > 0 && widths[widest]-next > 0 {
			step = min(step, widths[widest]-next)
		} else if next > 0 {
			step = 1
		}
		widths[widest] -= step
	}
}

func (t *table) writeRow(b *strings.Builder, cells []string, widths []int) {
	wrapped := make([][]string, len(cells))
	lines := 1
	for i, c := range cells {
		wrapped[i] = wrapText(c, widths[i])
		lines = max(lines, len(wrapped[i]))
	}
	for l := 0; l < lines; l++ {
		var line strings.Builder
		for i := range cells {
			text := ""
			if l < len(wrapped[i]) {
				text = strings.ReplaceAll(wrapped[i][l], nbsp, " ")
			}
			pad := widths[i] - textWidth(text)
			if i > 0 {
				line.WriteString(strings.Repeat(" ", columnGap))
			}
			if t.right[i] {
				line.WriteString(strings.Repeat(" ", max(pad, 0)))
				line.WriteString(text)
			} else {
				line.WriteString(text)
				if i < len(cells)-1 {
					line.WriteString(strings.Repeat(" ", max(pad, 0)))
				}
			}
		}
		b.WriteString(strings.TrimRight(line.String(), " "))
		b.WriteByte('\n')
	}
}

// wrapText breaks s into lines of at most width display columns, at spaces
// where it can and inside a word only when the word alone is too long.
func wrapText(s string, width int) []string {
	if textWidth(s) <= width || width <= 0 {
		return []string{s}
	}
	var lines []string
	cur := ""
	// Words break at ASCII spaces only: a no-break space (nbsp) keeps a
	// number and its unit together.
	for _, word := range strings.FieldsFunc(s, func(r rune) bool { return r == ' ' }) {
		for textWidth(word) > width {
			if cur != "" {
				lines = append(lines, cur)
				cur = ""
			}
			head, tail := splitAtWidth(word, width)
			lines = append(lines, head)
			word = tail
		}
		switch {
		case cur == "":
			cur = word
		case textWidth(cur)+1+textWidth(word) <= width:
			cur += " " + word
		default:
			lines = append(lines, cur)
			cur = word
		}
	}
	if cur != "" {
		lines = append(lines, cur)
	}
	return lines
}

func splitAtWidth(s string, width int) (string, string) {
	n := 0
	for i := range s {
		if n == width {
			return s[:i], s[i:]
		}
		n++
	}
	return s, ""
}

// textWidth is the number of display columns of s: runes, not counting ANSI
// escape sequences. Every character plumb prints (Ω, ±, µ, °) is one column
// wide.
func textWidth(s string) int {
	n := 0
	for i := 0; i < len(s); {
		if s[i] == 0x1b && i+1 < len(s) && s[i+1] == '[' {
			j := i + 2
			for j < len(s) && (s[j] < 0x40 || s[j] > 0x7e) {
				j++
			}
			i = j + 1
			continue
		}
		_, size := utf8.DecodeRuneInString(s[i:])
		i += size
		n++
	}
	return n
}
