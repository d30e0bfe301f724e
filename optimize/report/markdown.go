package report

import (
	"bytes"
	"errors"
	"fmt"
	"os"
	"path/filepath"
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

// WriteMarkdown writes the report as dir/name.md with every plot as
// dir/name-PLOT.svg beside it, linked by relative paths. All files are
// written under temporary names first and renamed at the end, so a failure
// leaves no partial report behind.
func (r *Report) WriteMarkdown(dir, name string) (err error) {
	name = strings.TrimSuffix(name, ".md")
	if name == "" || strings.ContainsAny(name, `/\`) {
		return fmt.Errorf("%w: Markdown report name %q: give a plain file name without directories", ErrInput, name)
	}
	files := map[string][]byte{}
	var order []string
	put := func(file string, data []byte) {
		files[file] = data
		order = append(order, file)
	}
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
	put(name+".md", b.Bytes())
	return writeAll(dir, order, files)
}

// writeAll writes every file under a temporary name in dir, then renames
// them into place; on any failure the temporary files are removed.
func writeAll(dir string, order []string, files map[string][]byte) (err error) {
	var tmps []string
	defer func() {
		if err != nil {
			for _, t := range tmps {
				os.Remove(t)
			}
		}
	}()
	for _, f := range order {
		tf, err := os.CreateTemp(dir, "."+f+".*.tmp")
		if err != nil {
			return fmt.Errorf("report: writing Markdown report in %s: %w", dir, err)
		}
		tmps = append(tmps, tf.Name())
		merr := tf.Chmod(0o644)
		_, werr := tf.Write(files[f])
		cerr := tf.Close()
		if err := errors.Join(merr, werr, cerr); err != nil {
			return fmt.Errorf("report: writing %s: %w", filepath.Join(dir, f), err)
		}
	}
	for i, f := range order {
		if err := os.Rename(tmps[i], filepath.Join(dir, f)); err != nil {
			return fmt.Errorf("report: writing %s: %w", filepath.Join(dir, f), err)
		}
	}
	return nil
}
