package report

import (
	_ "embed"
	"fmt"
	"html/template"
	"io"
)

//go:embed report.html.tmpl
var htmlSource string

// classed is a table with its CSS class, for the "table" template.
type classed struct {
	T     Table
	Class string
}

var htmlTemplate = template.Must(template.New("report").Funcs(template.FuncMap{
	"tbl": func(t Table, class string) classed { return classed{t, class} },
	// svg marks a plot as trusted markup: it is drawn here by vgsvg, which
	// escapes every text it writes (html.EscapeString).
	"svg": func(b []byte) template.HTML { return template.HTML(b) },
}).Parse(htmlSource))

// WriteHTML writes the report as one self-contained XHTML-clean HTML file:
// inline CSS and SVG, no scripts, no external resources.
func (r *Report) WriteHTML(w io.Writer) error {
	if err := htmlTemplate.Execute(w, r); err != nil {
		return fmt.Errorf("report: writing HTML: %w", err)
	}
	return nil
}
