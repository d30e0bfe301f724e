package report

import (
	"bytes"
	"context"
	"image"
	"image/png"
	"io/fs"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"plumb/data"
	"plumb/optimize/spec"
)

// demoSpecFile is the example spec the demo report is built from.
const demoSpecFile = "logger-channel.yaml"

// buildDemo builds the report of the example data-logger spec against the
// embedded demo catalog, as `plumb report` would.
func buildDemo(t testing.TB) *Report {
	t.Helper()
	r, err := Build(context.Background(), demoInput(t))
	if err != nil {
		t.Fatal(err)
	}
	return r
}

// demoInput is the input of the demo report: the embedded demo catalog
// (through the SQLite store, as the command reads it) and the example spec.
func demoInput(t testing.TB) Input {
	t.Helper()
	st, err := data.Demo()
	if err != nil {
		t.Fatal(err)
	}
	defer st.Close()
	snap, err := st.Snapshot(context.Background())
	if err != nil {
		t.Fatal(err)
	}
	src, err := fs.ReadFile(data.Examples(), demoSpecFile)
	if err != nil {
		t.Fatal(err)
	}
	s, err := spec.Parse(src, demoSpecFile)
	if err != nil {
		t.Fatal(err)
	}
	return Input{Spec: s, Snapshot: snap, Now: fixedNow}
}

// chromium finds the browser or skips (fails under PLUMB_REQUIRE_TOOLS=1).
func chromium(t *testing.T) string {
	t.Helper()
	path, err := exec.LookPath("chromium")
	if err != nil {
		if os.Getenv("PLUMB_REQUIRE_TOOLS") == "1" {
			t.Fatal("chromium not found on PATH and PLUMB_REQUIRE_TOOLS=1")
		}
		t.Skip("chromium not found on PATH; skipping the browser rendering test")
	}
	return path
}

// runChromium runs headless Chromium on url with the flags that keep it
// off the network, plus extra, and returns stdout and stderr.
func runChromium(t *testing.T, bin, url string, extra ...string) (stdout, stderr string) {
	t.Helper()
	ctx, cancel := context.WithTimeout(context.Background(), 120*time.Second)
	defer cancel()
	args := append([]string{"--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
		"--disable-background-networking", "--disable-component-update", "--disable-sync",
		"--user-data-dir=" + t.TempDir(), "--enable-logging=stderr", "--v=0"}, extra...)
	cmd := exec.CommandContext(ctx, bin, append(args, url)...)
	var o, e bytes.Buffer
	cmd.Stdout, cmd.Stderr = &o, &e
	if err := cmd.Run(); err != nil {
		t.Fatalf("chromium %s: %v\n%s", strings.Join(extra, " "), err, e.String())
	}
	return o.String(), e.String()
}

// consoleErrors returns the log lines in which the page reported a
// problem: with --enable-logging=stderr Chromium logs every console
// message as a CONSOLE line, script errors as "Uncaught ...", and every
// fetch the Content-Security-Policy blocks as "Refused to ...". The
// report has no script, so any console line is a fault.
func consoleErrors(stderr string) []string {
	var out []string
	for _, l := range strings.Split(stderr, "\n") {
		if strings.Contains(l, "CONSOLE") || strings.Contains(l, "Uncaught") || strings.Contains(l, "Refused to") {
			out = append(out, l)
		}
	}
	return out
}

// pixelStats counts the distinct colours of img, the fraction of pixels
// that are not white, and the pixels near colour c (within tol per channel).
func pixelStats(img image.Image, c [3]uint8, tol int) (colours int, nonWhite float64, near int) {
	seen := map[[3]uint8]bool{}
	b := img.Bounds()
	nw := 0
	for y := b.Min.Y; y < b.Max.Y; y++ {
		for x := b.Min.X; x < b.Max.X; x++ {
			r, g, bl, _ := img.At(x, y).RGBA()
			p := [3]uint8{uint8(r >> 8), uint8(g >> 8), uint8(bl >> 8)}
			seen[p] = true
			if p != [3]uint8{255, 255, 255} {
				nw++
			}
			if abs(int(p[0])-int(c[0])) <= tol && abs(int(p[1])-int(c[1])) <= tol && abs(int(p[2])-int(c[2])) <= tol {
				near++
			}
		}
	}
	return len(seen), float64(nw) / float64(b.Dx()*b.Dy()), near
}

func abs(x int) int {
	if x < 0 {
		return -x
	}
	return x
}

func decodePNG(t *testing.T, path string) image.Image {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	img, err := png.Decode(f)
	if err != nil {
		t.Fatalf("screenshot %s: %v", path, err)
	}
	return img
}

// TestBrowserRendersDemoReport renders the demo report in headless
// Chromium: the page top and the first design's budget chart must be
// non-blank screenshots, the chart must show the limit line's vermilion
// and the bars' blue, the console must stay silent (no script errors, no
// fetch refused by the page's Content-Security-Policy), and the DOM
// Chromium builds must hold every section and every plot.
func TestBrowserRendersDemoReport(t *testing.T) {
	bin := chromium(t)
	r := buildDemo(t)
	if len(r.Designs) == 0 {
		t.Fatalf("the demo report has no design: %q", r.Infeasible)
	}
	dir := t.TempDir()
	page := filepath.Join(dir, "demo.html")
	f, err := os.Create(page)
	if err != nil {
		t.Fatal(err)
	}
	if err := r.WriteHTML(f); err != nil {
		t.Fatal(err)
	}
	if err := f.Close(); err != nil {
		t.Fatal(err)
	}
	// The first budget chart alone on a page, as the report inlines it, so
	// its pixels fill the screenshot.
	chart := filepath.Join(dir, "chart.html")
	alone := `<!DOCTYPE html><html xmlns="http://www.w3.org/1999/xhtml"><head><meta charset="utf-8"/><title>chart</title></head><body>` +
		string(r.Designs[0].Budgets[0].Plot.SVG) + `</body></html>`
	if err := os.WriteFile(chart, []byte(alone), 0o644); err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		name, page string
		// Okabe–Ito colour that must be on screen, and how many pixels.
		colour [3]uint8
		least  int
		// Least fraction of non-white pixels: the page is mostly text and
		// tables, the lone chart covers the top left of the window.
		ink float64
	}{
		{"page top", page, [3]uint8{0x00, 0x72, 0xB2}, 500, 0.02},             // headings' blue rule
		{"first budget chart", chart, [3]uint8{0xD5, 0x5E, 0x00}, 200, 0.003}, // the limit line
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			shot := filepath.Join(dir, strings.ReplaceAll(c.name, " ", "-")+".png")
			_, stderr := runChromium(t, bin, "file://"+c.page, "--screenshot="+shot, "--window-size=1200,2000")
			if errs := consoleErrors(stderr); len(errs) > 0 {
				t.Errorf("console reported problems:\n%s", strings.Join(errs, "\n"))
			}
			img := decodePNG(t, shot)
			if b := img.Bounds(); b.Dx() != 1200 || b.Dy() != 2000 {
				t.Errorf("screenshot %dx%d, want 1200x2000", b.Dx(), b.Dy())
			}
			colours, nonWhite, near := pixelStats(img, c.colour, 24)
			if colours < 32 || nonWhite < c.ink {
				t.Errorf("screenshot looks blank: %d colours, %.2f %% non-white", colours, 100*nonWhite)
			}
			if near < c.least {
				t.Errorf("%d pixels near #%02X%02X%02X, want at least %d", near, c.colour[0], c.colour[1], c.colour[2], c.least)
			}
			if os.Getenv("PLUMB_KEEP_SCREENSHOTS") != "" {
				data, _ := os.ReadFile(shot)
				os.WriteFile(filepath.Base(shot), data, 0o644)
			}
		})
	}
	t.Run("DOM", func(t *testing.T) {
		dom, stderr := runChromium(t, bin, "file://"+page, "--dump-dom")
		if errs := consoleErrors(stderr); len(errs) > 0 {
			t.Errorf("console reported problems:\n%s", strings.Join(errs, "\n"))
		}
		for _, h := range []string{"Specification", "Ranked designs", "Near misses", "Cautions", "Notes"} {
			if !strings.Contains(dom, ">"+h+"</h2>") {
				t.Errorf("rendered DOM has no %q section", h)
			}
		}
		want := 0
		for _, d := range r.Designs {
			want += len(d.plots())
		}
		if got := strings.Count(dom, "<svg "); got != want {
			t.Errorf("rendered DOM holds %d svg elements, want %d", got, want)
		}
	})
}
