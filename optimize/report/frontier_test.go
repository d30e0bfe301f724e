package report

import (
	"context"
	"strings"
	"testing"
)

// TestFrontierPlot: asked for, the report draws the cost-versus-margin
// frontier as an SVG with the limit line at a margin of 1, one point per
// frontier design, in the HTML and as a file beside the Markdown.
func TestFrontierPlot(t *testing.T) {
	in := Input{Spec: loadSpec(t, "testdata/channel.yaml"), Snapshot: loadSnapshot(t, "testdata/catalog.json"), Now: fixedNow, Trials: 1000, Frontier: true}
	r, err := Build(context.Background(), in)
	if err != nil {
		t.Fatal(err)
	}
	if r.Frontier == nil {
		t.Fatal("no frontier plot")
	}
	svg := string(r.Frontier.SVG)
	if !strings.Contains(svg, LimitStroke) || r.Frontier.LimitLines != 1 {
		t.Errorf("the frontier plot has no limit line")
	}
	if !strings.Contains(string(htmlOf(t, r)), `id="frontier"`) {
		t.Error("the HTML report does not show the frontier")
	}
	files, err := r.MarkdownFiles("r.md")
	if err != nil {
		t.Fatal(err)
	}
	found := false
	for _, f := range files {
		found = found || f.Name == "r-frontier.svg"
	}
	if !found {
		t.Error("the Markdown report has no frontier file")
	}
	in.Frontier = false
	if r2, err := Build(context.Background(), in); err != nil || r2.Frontier != nil {
		t.Errorf("frontier plot without the option: %v", err)
	}
}
