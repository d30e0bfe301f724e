package report

import (
	"context"
	"errors"
	"fmt"
	"path/filepath"
	"strings"
	"time"

	"plumb/catalog"
	"plumb/optimize/budget"
	"plumb/optimize/cost"
	"plumb/optimize/search"
	"plumb/optimize/spec"
)

// ErrInput is wrapped by every error about what Build was given.
var ErrInput = errors.New("report: invalid input")

// Defaults for the zero values of Input's fields.
const (
	// DefaultTop is the number of designs searched for when Input holds
	// neither a search result nor a design.
	DefaultTop = 3
	// DefaultTrials is the number of Monte Carlo trials run for the
	// histograms when the spec's own method is not Monte Carlo and the
	// spec does not ask for fewer.
	DefaultTrials = 4000
	// DefaultTempPoints is the number of temperatures solved for the gain
	// error against temperature plot.
	DefaultTempPoints = 41
	// maxBars is the number of contributors drawn per budget chart; the
	// rest are lumped into one bar (summed under worst case, root-sum-
	// squared under the statistical methods).
	maxBars = 10
	// histBins is the number of histogram bins.
	histBins = 40
)

// Input is what a report is built from. Spec is required. Designs come
// from, in order of preference: Search (a result already computed),
// Design (one design, e.g. from a design file), or a search of Snapshot
// for the Top cheapest designs.
type Input struct {
	Spec *spec.Spec
	// Snapshot is the catalog: searched when Search and Design are nil, and
	// used to price parts and resolve a design's part numbers.
	Snapshot *catalog.Snapshot
	// Lookup, when Snapshot is nil, finds the part numbers instead (for
	// example a catalog file's Find), so a large catalog need not be read
	// whole.
	Lookup spec.Lookup
	Search *search.Result
	Design *spec.Design
	// Top is the number of designs to search for (default DefaultTop).
	Top int
	// Combos is passed to the search (search.Options.Combos): two values in
	// series or parallel at a position. Off by default, as in the search.
	Combos bool
	// Rates are passed to the search (search.Options.Rates): exchange
	// rates into the spec's build currency.
	Rates cost.Rates
	// Trials is the Monte Carlo trial count for the histograms when the
	// spec's method is not Monte Carlo (default: the spec's trials, at most
	// DefaultTrials).
	Trials int
	// TempPoints is the number of temperatures solved for the temperature
	// plot (default DefaultTempPoints).
	TempPoints int
	// Frontier asks the search for the cost-versus-margin frontier and
	// draws it (search.Options.Frontier).
	Frontier bool
	// Now stamps the report (default time.Now); tests inject a fixed clock.
	Now func() time.Time
}

// Report is a built design report, ready to write.
type Report struct {
	Title     string
	Generated string
	SpecName  string
	SpecAbout string
	SpecFile  string
	Method    string
	// Spec lists every spec field in engineering notation.
	Spec []Row
	// Frontier is the cost-versus-margin plot (nil: not asked for).
	Frontier *Plot
	// Safety holds the hazardous-voltage cautions, shown first and boxed.
	Safety []string
	// Cautions holds the other cautions (ratings, headroom, stock).
	Cautions []string
	Notes    []string
	// Compare is the side-by-side table of the designs.
	Compare    Table
	Designs    []*Design
	NearMisses []NearMiss
	// Infeasible explains why no design meets the spec ("" when some do).
	Infeasible []string
	// Disclaimer is printed on every report.
	Disclaimer string
}

// Row is one labelled value.
type Row struct {
	Name  string
	Value string
}

// Table is a table of text with a header row.
type Table struct {
	Header []string
	Rows   [][]Cell
}

// Cell is one table cell; Class marks passing, failing and binding cells.
type Cell struct {
	Text  string
	Class string
}

// Design is one design's part of the report.
type Design struct {
	Rank   int
	ID     string // anchor and file-name stem: d1, d2, ...
	Title  string
	Family string
	// Pass is the exact budget's verdict.
	Pass      bool
	Binding   string
	UnitCost  string
	TotalCost string
	Reasons   []string
	Limits    Table
	// Budgets hold one chart and contributor table per limit that has
	// contributors.
	Budgets     []Budget
	MonteCarlo  *MonteCarlo
	Temperature *Plot
	Parts       Table
	PartsTotals []Row
	Cautions    []string
	Notes       []string
	WorstCorner string

	result *budget.Result
}

// Budget is the error budget of one limit: its chart and its contributors.
type Budget struct {
	Limit string
	Plot  Plot
	Table Table
}

// MonteCarlo is a design's Monte Carlo summary.
type MonteCarlo struct {
	Summary []Row
	Plots   []Plot
}

// Plot is one SVG figure.
type Plot struct {
	// Name is the file-name part: budget-gain-error, hist-cmrr, temperature.
	Name    string
	Title   string
	Caption string
	// SVG is the figure without its XML prolog.
	SVG []byte
	// LimitLines is the number of limit lines drawn.
	LimitLines int
}

// NearMiss is a cheaper design that fails, and its fix.
type NearMiss struct {
	Parts    string
	UnitCost string
	Fails    []string
	Fix      string
}

// Build computes the report. It runs the search when in holds neither a
// search result nor a design, the exact budget of every design, a Monte
// Carlo run for the histograms and the temperature sweep.
func Build(ctx context.Context, in Input) (*Report, error) {
	s := in.Spec
	if s == nil {
		return nil, fmt.Errorf("%w: no spec given; load one with spec.Load", ErrInput)
	}
	now := time.Now
	if in.Now != nil {
		now = in.Now
	}
	r := &Report{
		Title:     "Design report: " + s.Name,
		Generated: now().UTC().Format("2006-01-02 15:04 UTC"),
		SpecName:  s.Name, SpecAbout: s.About, Method: s.Analysis.Method,
		Spec:       specRows(s),
		Disclaimer: disclaimer,
	}
	if s.SourceFile != "" {
		r.SpecFile = filepath.Base(s.SourceFile)
	}
	lookup := in.Lookup
	if in.Snapshot != nil {
		var err error
		if lookup, err = spec.SnapshotLookup(in.Snapshot); err != nil {
			return nil, fmt.Errorf("report: catalog: %w", err)
		}
	}
	type job struct {
		d  *spec.Design
		sr *search.Design
	}
	var jobs []job
	res := in.Search
	switch {
	case res != nil:
	case in.Design != nil:
		d := in.Design
		if len(d.Unresolved()) > 0 {
			if lookup == nil {
				return nil, fmt.Errorf("%w: design %s names catalog parts (%s) but no catalog was given", ErrInput, d.SourceFile, strings.Join(d.Unresolved(), ", "))
			}
			if err := d.Resolve(lookup); err != nil {
				return nil, fmt.Errorf("report: %w", err)
			}
		}
		jobs = append(jobs, job{d: d})
	default:
		if in.Snapshot == nil {
			return nil, fmt.Errorf("%w: spec %s: give a search result, a design or a catalog to search", ErrInput, s.Name)
		}
		top := in.Top
		if top <= 0 {
			top = DefaultTop
		}
		var err error
		res, err = search.Solve(ctx, in.Snapshot, s, search.Options{Top: top, Combos: in.Combos, Frontier: in.Frontier, Rates: in.Rates})
		if res == nil {
			return nil, fmt.Errorf("report: searching for designs: %w", err)
		}
	}
	if res != nil {
		for i := range res.Designs {
			d, err := res.DesignN(i + 1)
			if err != nil {
				return nil, fmt.Errorf("report: design %d: %w", i+1, err)
			}
			jobs = append(jobs, job{d: d, sr: &res.Designs[i]})
		}
		r.Cautions = append(r.Cautions, res.Cautions...)
		r.Notes = append(r.Notes, res.Notes...)
		r.NearMisses = nearMisses(res.NearMisses)
		fp, err := frontierPlot(res)
		if err != nil {
			return nil, fmt.Errorf("report: frontier plot: %w", err)
		}
		r.Frontier = fp
		if res.Infeasible != nil {
			r.Infeasible = infeasibleText(res.Infeasible)
		}
	}
	if len(jobs) == 0 && len(r.Infeasible) == 0 {
		r.Infeasible = []string{"the search returned no designs"}
	}
	build, err := buildOf(s)
	if err != nil {
		return nil, err
	}
	pr := pricer{build: build, lookup: lookup}
	for i, j := range jobs {
		if err := ctx.Err(); err != nil {
			return nil, fmt.Errorf("report: %w", err)
		}
		dr, err := buildDesign(s, j.d, j.sr, i+1, &in, &pr)
		if err != nil {
			name := j.d.Name
			if name == "" {
				name = j.d.SourceFile
			}
			return nil, fmt.Errorf("report: design %d (%s): %w", i+1, name, err)
		}
		r.Designs = append(r.Designs, dr)
		r.Cautions = append(r.Cautions, dr.result.Cautions...)
	}
	r.Safety, r.Cautions = splitCautions(r.Cautions)
	r.Compare = compareTable(r.Designs)
	return r, nil
}

// disclaimer is printed at the foot of every report (project rule: defer
// to the applicable standards and to budget.QualifiedPerson).
const disclaimer = "plumb is a selection aid, not a safety approval. Figures come from catalog data and the models named in the notes; " +
	"check them against the datasheets. Where voltages are hazardous, creepage, clearance, insulation and ratings must be checked " +
	"against the applicable standards (IEC 61010-1, IEC 62368-1) and local codes by " + budget.QualifiedPerson + "."

// fixedNotes close the notes of every report.
var fixedNotes = []string{
	"Margins: limit over value for a maximum, value over limit for a minimum (linear ratio for dB); above 1 passes.",
	"Plots use the Okabe–Ito colour-blind-safe palette; limit lines are dashed vermilion.",
}

// SafetyNote is SafetyDeferral, for the template.
func (r *Report) SafetyNote() string { return SafetyDeferral }

// FixedNotes are the notes printed on every report after the search's.
func (r *Report) FixedNotes() []string { return fixedNotes }

// SafetyDeferral closes the safety box of every report that has one.
const SafetyDeferral = "These cautions do not replace a safety assessment: check the design against the applicable standards " +
	"(IEC 61010-1, IEC 62368-1) and local codes, with " + budget.QualifiedPerson + "."

// splitCautions moves the cautions about hazardous voltages and about parts
// near their ratings to the front list, and drops exact repeats (every
// design of one spec carries the same hazard caution).
func splitCautions(all []string) (safety, other []string) {
	seen := map[string]bool{}
	for _, c := range all {
		if seen[c] {
			continue
		}
		seen[c] = true
		if l := strings.ToLower(c); strings.Contains(l, "hazardous") || strings.Contains(l, "rating") {
			safety = append(safety, c)
		} else {
			other = append(other, c)
		}
	}
	return safety, other
}

func nearMisses(nms []search.NearMiss) []NearMiss {
	var out []NearMiss
	for _, nm := range nms {
		var parts []string
		for _, p := range nm.Parts {
			parts = append(parts, p.Position+" "+p.Part)
		}
		v := NearMiss{Parts: strings.Join(parts, ", "), UnitCost: money(nm.UnitCost, nm.Currency)}
		for _, f := range nm.Fails {
			v.Fails = append(v.Fails, f.Text)
		}
		v.Fix = "no single change found that makes it pass"
		if f := nm.Fix; f != nil {
			v.Fix = fmt.Sprintf("%s (%s %s): +%s per stage, %s for the build", f.Change, f.Kind, f.Part,
				money(f.ExtraCost, nm.Currency), money(f.TotalCost, nm.Currency))
		}
		out = append(out, v)
	}
	return out
}

func infeasibleText(inf *search.Infeasible) []string {
	return inf.Lines()
}
