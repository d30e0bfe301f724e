package report

import (
	"bytes"
	"fmt"
	"slices"
	"strings"
)

// mdEscaper escapes the characters Markdown would read as markup.
var mdEscaper = strings.NewReplacer(`\`, `\\`, "|", `\|`, "*", `\*`, "_", `\_`, "`", "\\`", "<", "&lt;", ">", "&gt;", "[", `\[`, "]", `\]`, "#", `\#`, "\n", " ")

func md(s string) string { return mdEscaper.Replace(s) }

// mdTable writes a GitHub-flavoured Markdown table.
func mdTable(b *bytes.Buffer, t Table) {
	if len(t.Header) == 0 {
		return
	}
	row := func(cells []string) {
		b.WriteString("|")
		for _, c := range cells {
			b.WriteString(" " + md(c) + " |")
		}
		b.WriteString("\n")
	}
	h := t.Header
	if h[0] == "" {
		h = append([]string{" "}, h[1:]...)
	}
	row(h)
	b.WriteString("|" + strings.Repeat(" --- |", len(t.Header)) + "\n")
	for _, r := range t.Rows {
		var cells []string
		for _, c := range r {
			text := c.Text
			if strings.Contains(c.Class, "binding") || strings.Contains(c.Class, "fail") {
				text = "**" + md(text) + "**"
				cells = append(cells, text)
				continue
			}
			cells = append(cells, md(text))
		}
		// Cells are escaped already.
		b.WriteString("| " + strings.Join(cells, " | ") + " |\n")
	}
	b.WriteString("\n")
}

func mdRows(b *bytes.Buffer, rows []Row) {
	t := Table{Header: []string{"", ""}}
	for _, r := range rows {
		t.Rows = append(t.Rows, []Cell{{Text: r.Name}, {Text: r.Value}})
	}
	mdTable(b, t)
}

// mdList writes a bulleted list under an optional heading, each item
// escaped and wrapped in mark (e.g. "**"); nothing for an empty list.
func mdList(b *bytes.Buffer, heading string, items []string, mark string) {
	if len(items) == 0 {
		return
	}
	if heading != "" {
		b.WriteString(heading + "\n\n")
	}
	for _, s := range items {
		b.WriteString("- " + mark + md(s) + mark + "\n")
	}
	b.WriteString("\n")
}

// File is one file of a report: a plain file name and its content.
type File struct {
	Name string
	Data []byte
}

// MarkdownFiles returns the report as Markdown: the plots as NAME-PLOT.svg
// files, then NAME.md linking them by relative path. The Markdown ends
// with a comment that lists the plot files (see Sidecars), so that a later
// report of the same name knows which files beside it are its own. The
// caller writes the files; nothing here touches the file system.
func (r *Report) MarkdownFiles(name string) ([]File, error) {
	name = strings.TrimSuffix(name, ".md")
	if name == "" || strings.ContainsAny(name, `/\`) {
		return nil, fmt.Errorf("%w: Markdown report name %q: give a plain file name without directories", ErrInput, name)
	}
	var files []File
	put := func(file string, data []byte) { files = append(files, File{file, data}) }
	var b bytes.Buffer
	fig := func(p *Plot) {
		file := name + "-" + p.Name + ".svg"
		put(file, p.SVG)
		fmt.Fprintf(&b, "![%s](%s)\n\n*%s*\n\n", md(p.Title), file, md(p.Caption))
	}
	fmt.Fprintf(&b, "# %s\n\n", md(r.Title))
	spec := "Spec " + r.SpecName
	if r.SpecFile != "" {
		spec += " (" + r.SpecFile + ")"
	}
	fmt.Fprintf(&b, "%s: %s. Analysis method: %s. Generated %s.\n\n", md(spec), md(r.SpecAbout), md(r.Method), md(r.Generated))
	if len(r.Safety) > 0 {
		b.WriteString("> **Safety caution**\n>\n")
		for _, s := range r.Safety {
			fmt.Fprintf(&b, "> **%s**\n>\n", md(s))
		}
		fmt.Fprintf(&b, "> *%s*\n\n", md(SafetyDeferral))
	}
	b.WriteString("## Specification\n\n")
	mdRows(&b, r.Spec)
	b.WriteString("## Ranked designs\n\n")
	for _, s := range r.Infeasible {
		fmt.Fprintf(&b, "**%s**\n\n", md(s))
	}
	mdTable(&b, r.Compare)
	if r.Frontier != nil {
		fig(r.Frontier)
	}
	for _, d := range r.Designs {
		fmt.Fprintf(&b, "## Design %d: %s\n\n", d.Rank, md(d.Title))
		verdict := "Meets every limit."
		if !d.Pass {
			verdict = "**Fails the exact budget.**"
		}
		fmt.Fprintf(&b, "Family %s; %s per stage, %s for the build; binding limit: **%s**. %s\n\n", md(d.Family), md(d.UnitCost), md(d.TotalCost), md(d.Binding), verdict)
		mdList(&b, "", d.Reasons, "")
		b.WriteString("### Limits and margins\n\n")
		mdTable(&b, d.Limits)
		if d.WorstCorner != "" {
			fmt.Fprintf(&b, "Worst gain-error corner: %s.\n\n", md(d.WorstCorner))
		}
		b.WriteString("### Error budget\n\n")
		for i := range d.Budgets {
			fig(&d.Budgets[i].Plot)
			mdTable(&b, d.Budgets[i].Table)
		}
		b.WriteString("### Monte Carlo\n\n")
		if d.MonteCarlo != nil {
			mdRows(&b, d.MonteCarlo.Summary)
			for i := range d.MonteCarlo.Plots {
				fig(&d.MonteCarlo.Plots[i])
			}
		}
		b.WriteString("### Gain error against temperature\n\n")
		if d.Temperature != nil {
			fig(d.Temperature)
		}
		b.WriteString("### Parts list\n\n")
		mdTable(&b, d.Parts)
		mdRows(&b, d.PartsTotals)
		mdList(&b, "### Cautions for this design", d.Cautions, "")
		mdList(&b, "### Budget notes", d.Notes, "")
	}
	b.WriteString("## Near misses\n\n")
	if len(r.NearMisses) == 0 {
		b.WriteString("No cheaper design came close.\n\n")
	} else {
		t := Table{Header: []string{"design", "per stage", "fails", "fix"}}
		for _, nm := range r.NearMisses {
			t.Rows = append(t.Rows, []Cell{{Text: nm.Parts}, {Text: nm.UnitCost}, {Text: strings.Join(nm.Fails, "; ")}, {Text: nm.Fix}})
		}
		mdTable(&b, t)
	}
	b.WriteString("## Cautions\n\n")
	if len(r.Safety)+len(r.Cautions) == 0 {
		b.WriteString("None raised.\n\n")
	}
	mdList(&b, "", r.Safety, "**")
	mdList(&b, "", r.Cautions, "")
	mdList(&b, "## Notes", append(slices.Clip(r.Notes), fixedNotes...), "")
	fmt.Fprintf(&b, "*%s*\n", md(r.Disclaimer))
	var plots []string
	for _, f := range files {
		plots = append(plots, f.Name)
	}
	fmt.Fprintf(&b, "\n%s %s -->\n", sidecarMark, strings.Join(plots, " "))
	put(name+".md", b.Bytes())
	return files, nil
}

// sidecarMark starts the comment at the end of a Markdown report that
// lists its plot files.
const sidecarMark = "<!-- plumb report files:"

// Sidecars returns the plot files that the Markdown report md lists as its
// own: plain .svg file names, nothing else (a file that is no plumb report,
// or a name with a directory in it, gives none).
func Sidecars(md []byte) []string {
	i := bytes.LastIndex(md, []byte(sidecarMark))
	if i < 0 {
		return nil
	}
	rest, _, ok := strings.Cut(string(md[i+len(sidecarMark):]), "-->")
	if !ok {
		return nil
	}
	var out []string
	for _, f := range strings.Fields(rest) {
		if strings.HasSuffix(f, ".svg") && !strings.ContainsAny(f, `/\`) && !strings.HasPrefix(f, ".") {
			out = append(out, f)
		}
	}
	return out
}
