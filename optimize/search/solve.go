package search

import (
	"context"
	"errors"
	"fmt"
	"math"
	"plumb/optimize/assume"
	"slices"
	"sort"
	"strings"

	"plumb/catalog"
	"plumb/optimize/budget"
	"plumb/optimize/cost"
	"plumb/optimize/family"
	"plumb/optimize/spec"
)

// hazardCaution is printed when a spec's voltages reach hazardous levels.
const hazardCaution = "voltages above 60 V DC (or 30 V rms) are treated as hazardous by IEC 61010-1 and IEC 62368-1: " +
	"creepage, clearance, insulation and resistor voltage ratings must be checked against the applicable standard " +
	"and local codes by " + budget.QualifiedPerson + "; this search is a selection aid, not a safety approval"

// Solve finds the lowest-cost designs in snap that meet every limit of s
// under its analysis method. When none does it returns a Result that says
// why, together with an error wrapping ErrInfeasible.
func Solve(ctx context.Context, snap *catalog.Snapshot, s *spec.Spec, opt Options) (*Result, error) {
	if err := opt.check(); err != nil {
		return nil, err
	}
	if s.Reference.Auto() {
		refs := refOptions(snap.References, s, converterFor(s, opt))
		return solveReferences(s, refs, opt, func(sr *spec.Spec) (*Result, error) { return Solve(ctx, snap, sr, opt) })
	}
	p, err := FromSpec(s)
	if err != nil {
		return nil, err
	}
	// One of the two places catalog parts enter the search (SolveCatalog
	// is the other): unknown figures get their documented defaults here,
	// and each design lists those it rests on.
	snap, assumed := assume.Snapshot(snap)
	var strictNote string
	if s.Assumptions == spec.AssumeStrict {
		snap, strictNote = withoutAssumed(snap, assumed, constrained(s))
	}
	conv := converterFor(s, opt)
	snap = convertSnapshot(snap, conv)
	parts := &Parts{Series: snap.ResistorSeries, Resistors: snap.Resistors, Networks: snap.Networks, Amplifiers: snap.Amplifiers}
	r, err := solveSpec(ctx, parts, p, s, opt)
	r.attachAssumptions(assumed.For, strictNote)
	r.attachConversions(conv)
	return r, err
}

// converterFor returns the converter into the spec's build currency, or
// nil when the spec names none (then the catalog must hold one currency).
func converterFor(s *spec.Spec, opt Options) *cost.Converter {
	if s.Build.Currency == "" {
		return nil
	}
	return &cost.Converter{To: s.Build.Currency, Rates: opt.Rates}
}

// convertSnapshot returns snap with every price in the converter's
// currency, leaving out the parts priced in a currency it has no rate for.
func convertSnapshot(snap *catalog.Snapshot, c *cost.Converter) *catalog.Snapshot {
	if c == nil {
		return snap
	}
	out := *snap
	out.ResistorSeries = convertParts(snap.ResistorSeries, c, func(p *catalog.ResistorSeries) (string, *catalog.Offer) { return p.Part, &p.Offer })
	out.Resistors = convertParts(snap.Resistors, c, func(p *catalog.Resistor) (string, *catalog.Offer) { return p.Part, &p.Offer })
	out.Networks = convertParts(snap.Networks, c, func(p *catalog.Network) (string, *catalog.Offer) { return p.Part, &p.Offer })
	out.Amplifiers = convertParts(snap.Amplifiers, c, func(p *catalog.Amplifier) (string, *catalog.Offer) { return p.Part, &p.Offer })
	return &out
}

func convertParts[T any](parts []T, c *cost.Converter, offer func(*T) (string, *catalog.Offer)) []T {
	out := make([]T, 0, len(parts))
	for _, p := range parts {
		part, o := offer(&p)
		conv, ok := c.Offer(part, *o)
		if !ok {
			continue
		}
		*o = conv
		out = append(out, p)
	}
	return out
}

// attachConversions reports what the converter did.
func (r *Result) attachConversions(c *cost.Converter) {
	if r == nil || c == nil {
		return
	}
	r.Conversions = c.Conversions()
	r.Notes = append(r.Notes, c.Notes()...)
	if n, curs := c.LeftOut(); n > 0 && r.Infeasible != nil {
		// Parts the search never saw are the first suspect: say so before
		// what the diagnosis found among the parts that were left.
		why := fmt.Sprintf("%d part(s) priced in %s were left out, as currency.rates has no rate to %s: add one (see the notes) and solve again",
			n, strings.Join(curs, ", "), c.To)
		if rest := strings.TrimLeft(strings.TrimPrefix(r.Infeasible.Message, ErrInfeasible.Error()), "; "); rest != "" {
			why += "; among the parts left, " + rest
		}
		r.Infeasible.Message = ErrInfeasible.Error() + "; " + why
	}
}

// SolveCatalog is Solve reading the catalog file itself: the resistors
// through indexed queries of the spec's value window, streamed and reduced
// to what the search keeps (per grade, each value's cheapest part), so that
// time and memory follow the candidate rows, not the catalog; the networks
// and amplifiers are read whole. Unknown figures get their defaults as in
// Solve: the streamed rows as they pass, and the assumptions of the parts
// of the designs found are looked up afterwards.
func SolveCatalog(ctx context.Context, st *catalog.Store, s *spec.Spec, opt Options) (*Result, error) {
	if err := opt.check(); err != nil {
		return nil, err
	}
	if s.Reference.Auto() {
		refs, err := st.List(ctx, catalog.Filter{Kind: catalog.KindReference})
		if err != nil {
			return nil, fmt.Errorf("search: reading the catalog's references: %w", err)
		}
		return solveReferences(s, refOptions(refs.References, s, converterFor(s, opt)), opt, func(sr *spec.Spec) (*Result, error) { return SolveCatalog(ctx, st, sr, opt) })
	}
	p, err := FromSpec(s)
	if err != nil {
		return nil, err
	}
	nets, err := st.Networks(ctx)
	if err != nil {
		return nil, err
	}
	amps, err := st.Amplifiers(ctx)
	if err != nil {
		return nil, err
	}
	snap, assumed := assume.Snapshot(&catalog.Snapshot{Networks: nets, Amplifiers: amps})
	conv := converterFor(s, opt)
	rows := &assumedRows{src: st, conv: conv}
	var strictNote string
	if s.Assumptions == spec.AssumeStrict {
		rows.limits = constrained(s)
		snap, strictNote = withoutAssumed(snap, assumed, rows.limits)
	}
	snap = convertSnapshot(snap, conv)
	r, err := solveSpec(ctx, &Parts{Networks: snap.Networks, Amplifiers: snap.Amplifiers, rows: rows}, p, s, opt)
	of := func(parts ...string) []assume.Assumption {
		out := assumed.For(parts...)
		for _, part := range parts {
			if kind, v, err := st.Find(ctx, part); err == nil && kind == catalog.KindResistor {
				_, as := assume.Part(v)
				out = append(out, as...)
			}
		}
		return out
	}
	r.attachAssumptions(of, strings.TrimSpace(strictNote+" "+rows.note()))
	r.attachConversions(conv)
	return r, err
}

func solveSpec(ctx context.Context, parts *Parts, p Problem, s *spec.Spec, opt Options) (*Result, error) {
	ps := parts.forSearch()
	r, err := solveOn(ctx, ps, p, s, opt)
	if IsInfeasible(err) && r != nil {
		// Why: re-solves of the spec with limits taken away or relaxed.
		if derr := diagnose(ctx, ps, s, opt, r); derr != nil {
			return nil, fmt.Errorf("diagnosing the infeasible spec: %w", derr)
		}
	}
	return r, err
}

// solveOn is solveSpec on parts already prepared for the search, without
// the diagnosis of an infeasible spec.
func solveOn(ctx context.Context, parts *Parts, p Problem, s *spec.Spec, opt Options) (*Result, error) {
	opt.spec = s
	r, err := solve(ctx, parts, p, opt, budgetVerifier(ctx, s, opt.Trials), false)
	if r != nil {
		r.spec = s
	}
	return r, err
}

// assumedRows streams resistor rows with their unknown figures filled
// (assume.FillGrade); with limits set (assumptions: strict) it leaves out
// the rows whose filled figures feed one of them, and counts them.
type assumedRows struct {
	src catalog.ResistorSource
	// conv, when set, turns each row's prices into the build currency
	// (the query then asks for every currency).
	conv   *cost.Converter
	limits map[string]bool
	left   []string // the first parts left out
	nLeft  int
}

func (a *assumedRows) EachResistor(ctx context.Context, q catalog.ResistorQuery, fn func(*catalog.ResistorRow) error) error {
	if a.conv != nil {
		q.Currency = ""
	}
	return a.src.EachResistor(ctx, q, func(r *catalog.ResistorRow) error {
		if a.conv != nil {
			o, ok := a.conv.Offer(r.Part, r.Offer)
			if !ok {
				return nil
			}
			r.Offer = o
		}
		filled := assume.FillGrade(&r.Grade)
		if a.limits != nil && feedsAny(filled, a.limits) {
			if a.nLeft++; len(a.left) < 10 {
				a.left = append(a.left, r.Part)
			}
			return nil
		}
		return fn(r)
	})
}

// note says which rows strict assumptions left out.
func (a *assumedRows) note() string {
	if a.nLeft == 0 {
		return ""
	}
	return fmt.Sprintf("assumptions: strict: %d resistor row(s) read for the search left out because a limit would rest on a figure the catalog does not give: %s",
		a.nLeft, strings.Join(a.left, ", "))
}

func feedsAny(figures []string, limits map[string]bool) bool {
	for _, f := range figures {
		for _, l := range assume.Feeds(f) {
			if limits[l] {
				return true
			}
		}
	}
	return false
}

// constrained lists the limits a spec sets, with those every design is
// checked against (headroom and resistor ratings).
func constrained(s *spec.Spec) map[string]bool {
	l := s.Limits
	set := map[string]bool{assume.LimitHeadroom: true, assume.LimitPower: true, assume.LimitVoltage: true}
	for name, on := range map[string]bool{assume.LimitGainError: l.GainError > 0, assume.LimitCMRR: l.CMRRdB > 0,
		assume.LimitGainDrift: l.GainDrift > 0, assume.LimitOutputOffset: l.OutputOffsetV > 0, assume.LimitOffsetDrift: l.OffsetDriftVK > 0,
		assume.LimitNoiseRMS: l.NoiseRMSV > 0, assume.LimitNoiseDensity: l.NoiseDensity > 0, assume.LimitBandwidth: l.BandwidthHz > 0,
		assume.LimitInputImpedance: l.InputImpedance > 0} {
		set[name] = on
	}
	return set
}

// withoutAssumed leaves out of the snapshot every part with an assumed
// figure that feeds one of the limits (assumptions: strict), and says how
// many and which.
func withoutAssumed(snap *catalog.Snapshot, set assume.Set, limits map[string]bool) (*catalog.Snapshot, string) {
	var out []string
	touches := func(part string) bool {
		for _, a := range set[part] {
			for _, l := range assume.Feeds(a.Figure) {
				if limits[l] {
					out = append(out, part)
					return true
				}
			}
		}
		return false
	}
	s := *snap
	s.ResistorSeries = slices.DeleteFunc(slices.Clone(s.ResistorSeries), func(p catalog.ResistorSeries) bool { return touches(p.Part) })
	s.Resistors = slices.DeleteFunc(slices.Clone(s.Resistors), func(p catalog.Resistor) bool { return touches(p.Part) })
	s.Networks = slices.DeleteFunc(slices.Clone(s.Networks), func(p catalog.Network) bool { return touches(p.Part) })
	s.Amplifiers = slices.DeleteFunc(slices.Clone(s.Amplifiers), func(p catalog.Amplifier) bool { return touches(p.Part) })
	if len(out) == 0 {
		return &s, ""
	}
	sort.Strings(out)
	shown := out
	if len(shown) > 10 {
		shown = append(slices.Clone(shown[:10]), fmt.Sprintf("and %d more", len(out)-10))
	}
	return &s, fmt.Sprintf("assumptions: strict: %d part(s) left out because a limit would rest on a figure the catalog does not give: %s", len(out), strings.Join(shown, ", "))
}

// attachAssumptions lists on each design and near miss the assumptions its
// parts rest on (of gives them for a list of part numbers), notes those of
// the ranked designs once, and adds the note of what strict assumptions
// left out. A nil result is left alone.
func (r *Result) attachAssumptions(of func(parts ...string) []assume.Assumption, strictNote string) {
	if r == nil {
		return
	}
	partsOf := func(d *Design) []assume.Assumption {
		var parts []string
		for _, p := range d.Parts {
			parts = append(parts, p.Part)
		}
		out := of(parts...)
		if d.budget != nil {
			// Figures the exact budget took for a part beyond the
			// catalog's (a strapped or matched part's internal resistors
			// behind a source resistance).
			for _, a := range d.budget.Assumptions {
				if slices.Contains(parts, a.Part) && !slices.ContainsFunc(out, func(b assume.Assumption) bool { return b.Part == a.Part && b.Figure == a.Figure }) {
					out = append(out, a)
				}
			}
		}
		return out
	}
	var all []assume.Assumption
	seen := map[string]bool{}
	for i := range r.Designs {
		r.Designs[i].Assumptions = partsOf(&r.Designs[i])
		for _, a := range r.Designs[i].Assumptions {
			if k := a.Part + "|" + a.Figure; !seen[k] {
				seen[k] = true
				all = append(all, a)
			}
		}
	}
	for i := range r.NearMisses {
		r.NearMisses[i].Assumptions = partsOf(&r.NearMisses[i].Design)
	}
	r.Notes = append(r.Notes, assume.Notes(all)...)
	if strictNote != "" {
		r.Notes = append(r.Notes, strictNote)
	}
}

// FromSpec turns a spec into the search's requirement. Families the search
// does not build yet are refused with a message naming them.
func FromSpec(s *spec.Spec) (Problem, error) {
	p := Problem{Gain: math.Abs(s.Gain), SupplyNeg: s.Supply.Min, SupplyPos: s.Supply.Max,
		InMin: s.Input.Min, InMax: s.Input.Max, CMMin: s.CommonMode.Min, CMMax: s.CommonMode.Max,
		TMin: s.Temp.Min, TMax: s.Temp.Max, TRef: s.TempRef, BandwidthHz: s.Limits.BandwidthHz,
		ZinMinOhm: s.Limits.InputImpedance, RMinOhm: s.Impedance.Min, RMaxOhm: s.Impedance.Max,
		LeakageA: s.LeakageA, SourceOhm: s.SourceOhm, LoadOhm: s.LoadOhm, Derating: s.Derating, Method: Method(s.Analysis.Method), CalGain: s.Calibrate.Gain, CalOffset: s.Calibrate.Offset,
		Limits: Limits{TotalGainError: s.Limits.GainError, DriftPPM: s.Limits.GainDrift * 1e6, CMRRdB: s.Limits.CMRRdB,
			OffsetV: s.Limits.OutputOffsetV, OffsetDriftVK: s.Limits.OffsetDriftVK, NoiseDensity: s.Limits.NoiseDensity, NoiseRMS: s.Limits.NoiseRMSV}}
	b, err := cost.BuildOf(s.Build)
	if err != nil {
		return p, fmt.Errorf("%w: %w", ErrProblem, err)
	}
	p.Build = b
	if p.Derating == 0 {
		// The zero value means the documented default, as in the budget.
		p.Derating = spec.DefaultDerating
	}
	if s.Reference != nil {
		p.Ref, p.RefOhm = s.Reference.V, s.Reference.SourceOhm
	}
	for _, c := range s.Combos {
		p.SeriesPairs = p.SeriesPairs || c == spec.Series
		p.ParallelPairs = p.ParallelPairs || c == spec.Parallel
	}
	var unsupported []string
	circuitsOf := map[Circuit]bool{}
	for _, name := range s.Families {
		f := family.Lookup(name)
		if f == nil {
			unsupported = append(unsupported, name)
			continue
		}
		if standalone(f) {
			// A part making either sign is walked as a circuit of its own.
			p.Circuit = Circuit(f.Name)
			p.Families = append(p.Families, partLabel(f, f))
			p.Inverts = s.Gain < 0
		} else if f.Search.Strategy == family.Part {
			// An integrated part is walked in the circuit of Search.As.
			p.Circuit = Circuit(f.Search.As.Name)
			p.Families = append(p.Families, variant(f.Search.As, f.Name))
		} else {
			p.Circuit = Circuit(f.Name)
			// Every build of the circuit (behind the shunt: of the circuit
			// searched per shunt) but an integrated family's part.
			q := Problem{Circuit: Circuit(f.SearchFamily().Name)}
			parts := q.partBuilds()
			for _, b := range q.builds() {
				if !slices.Contains(parts, b) {
					p.Families = append(p.Families, b)
				}
			}
		}
		circuitsOf[p.Circuit] = true
		if f.Reference == family.RefShift {
			p.Shift = s.Offset
			if s.Reference != nil {
				p.RefTol, p.RefDrift = s.Reference.Tolerance, s.Reference.Drift
			}
		}
	}
	if len(unsupported) > 0 || len(p.Families) == 0 {
		return p, fmt.Errorf("%w: families %v: the search builds %s stages; keep one circuit per spec",
			ErrProblem, s.Families, strings.Join(family.Names(), ", "))
	}
	if len(circuitsOf) > 1 {
		return p, fmt.Errorf("%w: families %v: the search walks one circuit per spec; list only families of one circuit (an integrated amplifier may join the circuit it is walked in)", ErrProblem, s.Families)
	}
	channelLimits(s, &p)
	return p, nil
}

// SolveProblem is Solve on a requirement and catalog parts already in the
// search's terms. Without a spec it has no exact budget to confirm the
// designs with: they are ranked on the screening figures alone.
func SolveProblem(ctx context.Context, parts *Parts, p Problem, opt Options) (*Result, error) {
	if err := opt.check(); err != nil {
		return nil, err
	}
	return solve(ctx, parts.forSearch(), p, opt, nil, false)
}

// check refuses options that would size the work beyond its bounds.
func (o *Options) check() error {
	if o.Top > MaxTop {
		return fmt.Errorf("%w: %d designs asked for: a search ranks at most %d", ErrProblem, o.Top, MaxTop)
	}
	return nil
}

// Exhaustive is SolveProblem with the branch and bound replaced by the
// enumeration of every value option of every class of the same search
// space. It returns the same designs, much more slowly; it is the oracle
// the search is tested and measured against.
func Exhaustive(ctx context.Context, parts *Parts, p Problem, opt Options) (*Result, error) {
	if err := opt.check(); err != nil {
		return nil, err
	}
	return solve(ctx, parts.forSearch(), p, opt, nil, true)
}

// verifier confirms a design with an exact method and returns the limits
// it fails (none: it passes).
type verifier func(sd *spec.Design) (*budget.Result, []Failure, error)

// verifyExtra is how many more classes than Top the search keeps when the
// designs are confirmed afterwards, so that a rejected one can be replaced.
func verifyExtra(top int) int { return top + 2 }

func solve(ctx context.Context, parts *Parts, p Problem, opt Options, verify verifier, exhaustive bool) (*Result, error) {
	if err := p.normalize(); err != nil {
		return nil, err
	}
	switch p.strategy() {
	case family.Shunt:
		return solveCurrentSense(ctx, parts, p, opt, verify, exhaustive)
	case family.TwoStage:
		if p.k2 == 0 {
			return solveInAmp(ctx, parts, p, opt, verify, exhaustive)
		}
	}
	if opt.Top <= 0 {
		opt.Top = defaultTop
	}
	if err := ctx.Err(); err != nil {
		return nil, fmt.Errorf("search: %w", err)
	}
	sp, err := newSpace(ctx, parts, &p, opt.Combos)
	if err != nil {
		return nil, err
	}
	if opt.ceiling > 0 {
		return sp.solveBelow(ctx, opt, exhaustive)
	}
	// Keep more classes than ranked: the same grades in another size,
	// technology or part fold into the design above (see gradeKey), and
	// designs the exact budget fails are replaced.
	keep := foldExtra * opt.Top
	if verify != nil {
		keep += verifyExtra(opt.Top)
	}
	if opt.quick {
		// A diagnosis asks whether any design passes: look further down
		// the ranking for one the exact budget confirms.
		keep += quickExtra
	}
	var top []classBest
	var st stats
	classes := func() error {
		for {
			var err error
			if exhaustive {
				st = stats{classes: sp.classCount(), visited: sp.classCount(), evaluated: sp.classCount()}
				top, err = sp.exhaustive(ctx, keep)
			} else {
				top, st, err = sp.branchAndBound(ctx, keep, opt.Progress)
			}
			if err != nil {
				return fmt.Errorf("search: %w", err)
			}
			// Classes of the same grades in other sizes or technologies fold
			// into one design: where they crowd the list, look further.
			if len(top) < keep || keep >= maxKeep*opt.Top {
				return nil
			}
			distinct, err := sp.distinctDesigns(top)
			if err != nil {
				return err
			}
			if distinct >= opt.Top+verifyExtra(opt.Top) || (verify == nil && distinct >= opt.Top) {
				return nil
			}
			keep *= 4
		}
	}
	if err := classes(); err != nil {
		return nil, err
	}
	res := &Result{Method: string(p.Method), Designs: []Design{}, NearMisses: []NearMiss{}}
	if p.hazardous() {
		res.Cautions = append(res.Cautions, hazardCaution)
	}
	if p.Method == MonteCarlo && verify != nil {
		res.Notes = append(res.Notes, "the search screens Monte Carlo specs with root-sum-square figures; every design listed passed the budget's Monte Carlo run")
	} else if p.Method == MonteCarlo {
		res.Notes = append(res.Notes, "the search screens Monte Carlo specs with root-sum-square figures; run the budget of a design for its yield")
	}
	var rejected []NearMiss
	v := &res.verdict
	limit := math.Inf(1)
	type fold struct {
		n        int
		min, max float64
		parts    string
	}
	var folds map[int]*fold
	// The exact budget has the last word. A design it fails (or cannot
	// run) leaves the space (exclude), and its class offers its next
	// design in cost order, which takes its place in the ranking; when
	// the classes kept run out before Top designs pass, the search runs
	// again past them. So a spec is called infeasible only when every
	// design that passes the screening has failed the exact budget, or
	// the search says it stopped short (maxRejected).
	budgeted := opt.failed // designs the exact budget failed or could not run
	if budgeted == nil {
		budgeted = new(int)
	}
	v.maxOut = maxRejected
	if opt.quick {
		v.maxOut = maxRejectedQuick
	}
	stopped := false                      // the designs left cost more than opt.below
	passed := map[optKey]*budget.Result{} // designs the exact budget passed, kept over the rounds
	failedIn := map[uint64]int{}          // per class, its designs the exact budget failed
	cut := map[uint64]bool{}              // classes whose dearer designs were not tried
	for {
		complete := len(top) < keep // every class that passes the screening is in top
		res.Designs, res.designs = res.Designs[:0], res.designs[:0]
		limit = math.Inf(1)
		if opt.below > 0 {
			limit = opt.below
		}
		folded := map[string]int{} // grade key -> index in res.Designs
		folds = map[int]*fold{}
		for i := 0; i < len(top); i++ {
			if len(res.Designs) >= opt.Top {
				break
			}
			d, sd, err := sp.describe(&top[i])
			if err != nil {
				return nil, err
			}
			if opt.below > 0 && d.TotalCost > opt.below*(1+1e-12) {
				stopped = true
				break
			}
			if j, ok := folded[gradeKey(&d)]; ok {
				more := d.UnitCost - res.Designs[j].UnitCost
				if f := folds[j]; f == nil {
					folds[j] = &fold{1, more, more, partList(&d)}
				} else {
					f.n++
					f.min, f.max = math.Min(f.min, more), math.Max(f.max, more)
				}
				continue
			}
			if verify != nil {
				k := optKeyOf(&top[i])
				br, fails, err := passed[k], []Failure(nil), error(nil)
				if br == nil {
					br, fails, err = verify(sd)
				}
				if err == nil {
					adopt(&d, br)
				}
				if err == nil && len(fails) == 0 {
					passed[k] = br
				}
				if err != nil || len(fails) > 0 {
					*budgeted++
					cls := top[i].id
					failedIn[cls]++
					advance := *budgeted <= v.maxOut && failedIn[cls] <= maxClassRejected
					if !advance && top[i].cfg >= 0 {
						cut[cls] = true
					}
					if err != nil {
						// One verdict per design: what the exact budget
						// cannot evaluate is not ranked.
						v.broken.add(err)
					} else {
						rejected = append(rejected, rejectedDesign(d, sd, top[i], fails))
					}
					top = sp.replaceFailed(top, i, complete, advance)
					continue
				}
			}
			if len(res.Designs) == 0 {
				limit = top[i].cost
			}
			d.Rank = len(res.Designs) + 1
			d.ValueVariants = sp.variants(&top[i])
			d.Reasons = sp.reasons(&top[i], &d, res.Designs)
			folded[gradeKey(&d)] = len(res.Designs)
			res.Designs = append(res.Designs, d)
			res.designs = append(res.designs, sd)
		}
		if complete || stopped || len(res.Designs) >= opt.Top || verify == nil || keep >= maxKeep*opt.Top {
			break
		}
		// The classes kept ran out: search again past them, the failed
		// designs left out. A design budgeted before is not budgeted
		// again: it is out of the space, or it passed.
		keep *= 4
		if err := classes(); err != nil {
			return nil, err
		}
	}
	if opt.Progress != nil {
		opt.Progress(st.classes, st.classes)
	}
	res.Search = Stats{Classes: st.classes, Visited: st.visited, BoundPruned: st.boundPruned, Evaluated: st.evaluated}
	v.cut, v.rejected = len(cut), len(rejected)
	res.unproven = v.cut > 0
	if opt.failed == nil {
		// A merged search states its sub-searches' verdicts once.
		res.Notes = append(res.Notes, v.notes()...)
	}
	// One line per design for the classes folded into it.
	for j, f := range folds {
		d := &res.Designs[j]
		if f.n == 1 {
			d.Reasons = append(d.Reasons, fmt.Sprintf("the same grades in another size, technology or part (%s) cost %.4g more per stage", f.parts, f.min))
		} else {
			d.Reasons = append(d.Reasons, fmt.Sprintf("the same grades in %d other sizes, technologies or parts cost %.4g to %.4g more per stage (the cheapest: %s)", f.n, f.min, f.max, f.parts))
		}
	}
	check := nearCheck{verify: verify, spec: opt.spec}
	if opt.failed != nil {
		// The merged search confirms the near misses it keeps.
		check.verify = nil
	}
	if !opt.quick {
		// Near misses are the classes the limits themselves fail, not
		// only those the screen's slack (Problem.loosen) would.
		p.screen = nil
		if opt.failed != nil {
			// The merged search keeps near misses cheaper than its rank 1,
			// which is no dearer than this sub-search's.
			rejected = slices.DeleteFunc(rejected, func(nm NearMiss) bool { return nm.TotalCost >= limit })
		}
		if err := sp.addNearMisses(res, rejected, limit, &check); err != nil {
			return nil, err
		}
	}
	res.Notes = append(res.Notes, check.notes()...)
	if opt.Frontier && !opt.quick && opt.failed != nil {
		// The merged search draws its frontier from every sub-search's.
		if res.pool, err = sp.frontierPool(ctx); err != nil {
			return nil, err
		}
	} else if opt.Frontier && !opt.quick && len(res.Designs) > 0 {
		if err := sp.addFrontier(ctx, res, verify); err != nil {
			return nil, err
		}
	}
	if err := res.finish(ctx); err != nil {
		return nil, err
	}
	if len(res.Designs) == 0 {
		res.Infeasible = sp.infeasible()
		if len(sp.amps)+len(sp.matched) == 0 {
			var need railNeed
			res.Infeasible.Hard, need = hardCauses(parts, &p)
			res.Infeasible.rails = &need
		}
		if opt.failed == nil {
			res.Infeasible.Message += v.infeasibleWhy()
		}
		return res, ErrInfeasible
	}
	return res, nil
}

// maxRejected bounds the designs of one search the exact budget fails (or
// cannot run) whose classes still offer their next design, and
// maxClassRejected those of one class; beyond them a class is dropped
// with its failed design, and the search says so (see solve).
// maxRejectedQuick is maxRejected for the re-solves of a diagnosis.
const (
	maxRejected      = 120
	maxRejectedQuick = 24
	maxClassRejected = 12
)

// replaceFailed takes top[i], a design the exact budget failed, out of
// the space and, with advance, puts its class's next design in cost order
// (evalClass skips excluded designs) into top, in order after i. With
// complete false, top holds only the cheapest classes, and a next design
// dearer than its last is left for the search's next round. It returns
// top.
func (s *space) replaceFailed(top []classBest, i int, complete, advance bool) []classBest {
	b := top[i]
	s.exclude(optKeyOf(&b))
	if b.cfg < 0 {
		return top // a matched amplifier has one design
	}
	if !advance {
		s.exclude(optKey{int32(b.cfg), int32(b.amp), wholeClass})
		return top
	}
	nb, ok := s.evalClass(b.cfg, b.amp)
	if !ok || (!complete && top[len(top)-1].less(&nb)) {
		return top
	}
	j := i + 1 + sort.Search(len(top)-i-1, func(k int) bool { return nb.less(&top[i+1+k]) })
	top = append(top, classBest{})
	copy(top[j+1:], top[j:])
	top[j] = nb
	return top
}

// foldExtra is how many classes per ranked design the search keeps at
// first, so that designs differing only in resistor size, technology or
// part can fold into one row; where they crowd the list the search keeps
// four times as many, up to maxKeep per ranked design.
const (
	foldExtra = 4
	maxKeep   = 256
)

// distinctDesigns counts the designs the classes fold into (gradeKey).
func (s *space) distinctDesigns(top []classBest) (int, error) {
	seen := map[string]bool{}
	for i := range top {
		d, _, err := s.describe(&top[i])
		if err != nil {
			return 0, err
		}
		seen[gradeKey(&d)] = true
	}
	return len(seen), nil
}

// quickExtra is how many more classes a diagnosis's re-solve keeps, so
// that designs the exact budget fails do not hide one it passes.
const quickExtra = 24

// gradeKey identifies what makes designs really different: the family,
// each position's kind and grade (tolerance and tempco, or the network or
// amplifier part) and the amplifier. Designs with one key differ only in
// resistor values, sizes, technologies or part numbers.
func gradeKey(d *Design) string {
	var b strings.Builder
	b.WriteString(d.Family)
	for _, p := range d.Parts {
		fmt.Fprintf(&b, "|%s:%s:", p.Position, p.Kind)
		if p.Kind == string(catalog.KindResistor) {
			fmt.Fprintf(&b, "%g:%g", p.Tolerance, p.TCRppm)
		} else {
			// Two strappings of one part are two circuits, not one grade.
			b.WriteString(p.Part + "~" + p.Strapping)
		}
	}
	return b.String()
}

// partList names a design's resistor part numbers, for a folded note.
func partList(d *Design) string {
	var ps []string
	for _, p := range d.Parts {
		if p.Kind == string(catalog.KindResistor) && !slices.Contains(ps, p.Part) {
			ps = append(ps, p.Part)
		}
	}
	return strings.Join(ps, ", ")
}

// maxNearMisses is the number of near misses reported; maxFixTries bounds
// the failing classes searched for a single fix.
const (
	maxNearMisses = 3
	maxFixTries   = 12
)

// DesignN returns design n (1-based) as a spec design, with every figure
// filled in, for the full budget.
func (r *Result) DesignN(n int) (*spec.Design, error) {
	if n < 1 || n > len(r.designs) {
		return nil, fmt.Errorf("%w: design %d: the result holds designs 1 to %d", ErrProblem, n, len(r.designs))
	}
	return r.designs[n-1], nil
}

// limitText formats a limit's value with its unit, as the budget prints
// its figures.
func limitText(l Limit) string { return budget.FormatFigure(l.Value, l.Unit) }

func findLimit(ls []Limit, name string) (Limit, bool) {
	for _, l := range ls {
		if l.Name == name {
			return l, true
		}
	}
	return Limit{}, false
}

// reasons explains a ranked design: its limits, the binding limit and its
// dominant contributor (from the exact budget the design adopted, else
// from the screening figures), and why it ranks below the design above.
func (s *space) reasons(b *classBest, d *Design, above []Design) []string {
	out := []string{limitSummary(d.Limits)}
	if line, ok := bindingLine(d, func(limit string) (string, float64) { return s.dominant(b, limit) }); ok {
		out = append(out, line)
	}
	if len(above) == 0 {
		out = append(out, fmt.Sprintf("cheapest passing design of the %d classes in the search space", s.classCount()))
	} else {
		out = append(out, s.rankLine(&above[len(above)-1], d))
	}
	if d.ValueVariants > 1 {
		// The channel's screen, and a loosened one (Problem.loosen), read
		// below the exact budget by their slack: the count is of
		// candidates, not of designs that pass.
		screened := ""
		if s.p.Channel != nil || s.p.screen != nil {
			screened = " the screening figures"
		}
		if n := d.ValueVariants - 1; n == 1 {
			out = append(out, "1 other choice of values in these grades also passes"+screened)
		} else {
			out = append(out, fmt.Sprintf("%d other choices of values in these grades also pass%s", n, screened))
		}
	}
	if len(d.ShortStock) > 0 {
		out = append(out, "stock is short for "+strings.Join(d.ShortStock, ", "))
	}
	return out
}

// limitSummary lists every limit with its value, limit and margin.
func limitSummary(ls []Limit) string {
	var sum []string
	for _, l := range ls {
		sum = append(sum, fmt.Sprintf("%s %s (limit %s, %s)", l.Name, limitText(l), limitText(Limit{Name: l.Name, Value: l.Limit, Unit: l.Unit}), marginWords(l)))
	}
	if len(sum) == 0 {
		return "the spec sets no error limit; only the hard limits apply"
	}
	return "meets every limit: " + strings.Join(sum, "; ")
}

// rankLine says why design d ranks below prev: what it costs more, the
// margin of prev's binding limit in both, and what differs.
func (s *space) rankLine(prev, d *Design) string {
	diff := d.UnitCost - prev.UnitCost
	txt := fmt.Sprintf("costs %.4g more per stage than rank %d", diff, prev.Rank)
	if diff == 0 {
		txt = fmt.Sprintf("costs the same as rank %d and follows it on margin (the worst normalised margin first, then resistor stress)", prev.Rank)
	}
	if bl, ok := findLimit(d.Limits, prev.Binding); ok {
		if pl, ok := findLimit(prev.Limits, prev.Binding); ok {
			if m, pm := fmt.Sprintf("%.2f", bl.Margin), fmt.Sprintf("%.2f", pl.Margin); m == pm {
				txt += fmt.Sprintf("; the same %s margin (%sx)", bl.Name, m)
			} else {
				txt += fmt.Sprintf("; %s margin %sx instead of %sx", bl.Name, m, pm)
			}
		}
	}
	return txt + "; " + s.difference(prev, d)
}

func (s *space) classCount() int { return len(s.cfgs)*len(s.amps) + len(s.matched) }

// difference says in words how design d differs from design prev.
func (s *space) difference(prev, d *Design) string {
	if prev.Family != d.Family {
		return fmt.Sprintf("%s instead of %s", d.Family, prev.Family)
	}
	ch := s.differences(prev, d)
	if len(ch) == 0 {
		return "same grades, other price list"
	}
	return strings.Join(ch, ", ")
}

// differences lists the changes from design prev to design d of the same
// family, one item per change: an amplifier, a network, one grade change
// at the positions it covers ("R2, R4: 0.05 % 10 ppm/K instead of 0.1 %
// 25 ppm/K"), a price list.
func (s *space) differences(prev, d *Design) []string {
	var ch []string
	pp := map[string]Part{}
	for _, p := range prev.Parts {
		pp[p.Position] = p
	}
	grades := map[string][]string{} // grade change -> positions
	var order []string
	seen := map[string]bool{}
	for _, p := range d.Parts {
		q, ok := pp[p.Position]
		var c string
		switch {
		case !ok:
			c = p.Position + " added"
		case p.Kind == string(catalog.KindAmplifier) && p.Part != q.Part:
			c = fmt.Sprintf("amplifier %s instead of %s", p.Part, q.Part)
		case p.Kind == string(catalog.KindNetwork) && p.Part != q.Part:
			c = fmt.Sprintf("network %s (%s) instead of %s (%s)", p.Part, gradeText(p), q.Part, gradeText(q))
		case p.Kind == string(catalog.KindResistor) && (p.Tolerance != q.Tolerance || p.TCRppm != q.TCRppm):
			g := fmt.Sprintf("%s instead of %s", gradeText(p), gradeText(q))
			if _, ok := grades[g]; !ok {
				order = append(order, g)
			}
			grades[g] = append(grades[g], p.Position)
		case p.Kind == string(catalog.KindResistor) && p.Part != q.Part && p.ValueOhm == q.ValueOhm:
			c = fmt.Sprintf("%s from %s (same grade, other price list)", p.Position, p.Part)
		}
		if c != "" && !seen[c] {
			seen[c] = true
			ch = append(ch, c)
		}
	}
	var out []string
	for _, g := range order {
		out = append(out, strings.Join(grades[g], ", ")+": "+g)
	}
	return append(out, ch...)
}

func gradeText(p Part) string {
	if p.Kind == string(catalog.KindNetwork) {
		return fmt.Sprintf("network %.3g %% ratio %.3g ppm/K tracking", 100*p.RatioTolerance, p.TCRTracking)
	}
	return fmt.Sprintf("%.3g %% %.3g ppm/K", 100*p.Tolerance, p.TCRppm)
}

// dominant returns the largest contributor to a limit and its share of the
// sum of contributors (worst case: |v|/Σ|v|; RSS: v²/Σv²).
func (s *space) dominant(b *classBest, limit string) (string, float64) {
	type term struct {
		name string
		v    float64
	}
	var ts []term
	p := s.p
	if s.strategy() == family.ShiftNetwork {
		return s.lsDominant(b, limit)
	}
	if b.cfg < 0 {
		a := s.matched[b.amp]
		am := a.a
		switch {
		case a.st != nil && (limit == limGain || limit == limGainInitial || limit == limDrift):
			ts = []term{{"the network's ratio tolerance through the strapping", a.st.GainErrorWorst}, {"the network's ratio tracking through the strapping", a.st.GainDriftPPM * 1e-6 * s.dT}, {"gain quantization", math.Abs(a.k0/p.Gain - 1)}}
			if limit == limDrift {
				ts = ts[1:2]
			}
		case a.st != nil && limit == limCMRR:
			ts = []term{{"the strapped network's match", 1 / a.st.CMRRWorst}, {"the amplifier's CMRR", dbInv(am.CMRRdB)}}
		case limit == limGain, limit == limGainInitial, limit == limDrift:
			ts = []term{{"the amplifier's gain error", am.GainErrorMax}, {"the amplifier's gain drift", am.GainDriftPPM * 1e-6 * s.dT}, {"gain quantization", math.Abs(a.k0/p.Gain - 1)}}
			if limit == limDrift {
				ts = ts[1:2]
			}
		case limit == limCMRR:
			ts = []term{{"the amplifier's CMRR", a.ainv}}
		default:
			ts = []term{{"the amplifier", 1}}
		}
	} else {
		c := &s.cfgs[b.cfg]
		a := &s.amps[b.amp]
		o := c.opts[b.opt]
		sg := s.gainSens(o.k0)
		ng := 1 + o.k0
		var rg, rf string
		if !s.pairNetwork(c) {
			ga, gb := s.groups[c.ga].grade, s.groups[c.gb].grade
			rg, rf = fmt.Sprintf("Rg tolerance %.3g %%", 100*ga.Tolerance), fmt.Sprintf("Rf tolerance %.3g %%", 100*gb.Tolerance)
		}
		switch limit {
		case limGain, limGainInitial:
			q := math.Abs(s.idealGain(o.k0)/p.Gain - 1)
			aol := 0.0
			if a.a.AolVV > 0 {
				aol = ng / a.a.AolVV
			}
			ts = []term{{"ratio quantization", q}, {"open-loop gain", aol}}
			if s.pairNetwork(c) {
				ts = append(ts, term{"the network's ratio tolerance", sg * c.g.sr})
			} else {
				ts = append(ts, term{rg, sg * s.groups[c.ga].grade.Tolerance}, term{rf, sg * s.groups[c.gb].grade.Tolerance})
			}
			if limit == limGain {
				ts = append(ts, term{"resistor tempco over temperature", c.g.drift * sg * 1e-6 * s.dT})
			}
			if p.CalGain {
				ts = []term{{"resistor tempco over temperature", c.g.drift * sg * 1e-6 * s.dT}}
			}
		case limDrift:
			if s.pairNetwork(c) {
				ts = []term{{"the network's tracking tempco", c.g.drift}}
			} else {
				ts = []term{{"Rg tempco", s.groups[c.ga].grade.TCR}, {"Rf tempco", s.groups[c.gb].grade.TCR}}
			}
		case limCMRR:
			cm := cmWorst(o.k0, c.g.hiT, c.g.loT)
			if s.rss {
				cm = c.g.cmRSS / (1 + o.k0)
			}
			ts = []term{{"resistor matching", cm}, {"the amplifier's CMRR", a.ainv}}
		case limOffset, limOffDrift:
			ts = []term{{"amplifier offset voltage", ng * a.a.VosV}, {"amplifier offset drift", ng * a.a.VosDriftVK * s.dT},
				{"bias and offset currents in the resistors", ng * (a.a.IosA + a.a.IbA) * o.rp}}
			if limit == limOffDrift {
				ts = ts[1:2]
			}
		case limNoise, limNoiseRMS:
			ts = []term{{"amplifier voltage noise", a.a.NoiseVHz * a.a.NoiseVHz}, {"resistor thermal noise", 4 * boltzmann * s.tempK * o.rp},
				{"amplifier current noise in the resistors", math.Pow(a.a.NoiseAHz*o.rp, 2)}}
		case limBandwidth:
			ts = []term{{"the amplifier's gain-bandwidth", 1}}
		}
	}
	var sum float64
	best := term{"", -1}
	for _, t := range ts {
		v := math.Abs(t.v)
		if s.rss && limit != limNoise && limit != limNoiseRMS {
			v *= v
		}
		sum += v
		if v > best.v {
			best = term{t.name, v}
		}
	}
	if sum == 0 {
		return best.name, 1
	}
	return best.name, best.v / sum
}

// idealGain is the gain magnitude of ratio k0 with an ideal amplifier.
func (s *space) idealGain(k0 float64) float64 {
	if s.strategy() == family.TwoStage {
		return s.model().Gain(k0) * s.k2
	}
	return s.model().Gain(k0)
}

// nearMiss describes a failing class: its parts, its figures and the
// limits it fails, by how much. Its fix is found by findFix.
func (s *space) nearMiss(f *classBest) (NearMiss, error) {
	d, sd, err := s.describe(f)
	if err != nil {
		return NearMiss{}, err
	}
	nm := NearMiss{Design: d, sd: sd, class: *f}
	for _, l := range d.Limits {
		if l.Pass {
			continue
		}
		by := l.Value/l.Limit - 1
		if l.Name == limCMRR {
			by = l.Limit - l.Value
		} else if l.Name == limBandwidth {
			by = 1 - l.Value/l.Limit
		}
		txt := fmt.Sprintf("%s %s against a limit of %s", l.Name, limitText(l), limitText(Limit{Name: l.Name, Value: l.Limit, Unit: l.Unit}))
		nm.Fails = append(nm.Fails, Failure{Name: l.Name, Value: l.Value, Limit: l.Limit, By: by, Text: txt})
	}
	nm.Shortfall = exactShortfall(d.Limits)
	nm.Reasons = []string{fmt.Sprintf("fails %d limit(s)", len(nm.Fails))}
	return nm, nil
}

// fixCand is one change to a failing class: a single change (another
// amplifier, grade or network) or a pair (another amplifier with another
// grade or network).
type fixCand struct {
	ci, ai int // the changed class (ci < 0: matched amplifier ai)
	lb     float64
	kind   string
}

// maxFixCands is how many passing changes of each size (single, pair) the
// fix search collects for the exact budget to confirm in cost order;
// maxPairLook bounds the (configuration, amplifier) pairs a pair search
// looks at.
const (
	maxFixCands = 3
	maxPairLook = 4096
)

// fixOpt is a change that passes the screening figures, with the design it
// makes.
type fixOpt struct {
	b    classBest
	cand fixCand
}

// fixCandidates returns the changes of failing class f that pass the
// screening figures, cheapest first: up to maxFixCands single changes and,
// with pairs, up to maxFixCands pairs of changes (an amplifier together
// with a grade or a network). Candidates are visited in order of their
// cost lower bound and skipped when their error bound fails, as in the
// search itself.
func (s *space) fixCandidates(f *classBest, pairs bool) (singles, doubles []fixOpt) {
	var cands, related []fixCand
	if f.cfg < 0 {
		for mi := range s.matched {
			if mi != f.amp {
				cands = append(cands, fixCand{-1, mi, s.matched[mi].cost, "amplifier"})
			}
		}
	} else {
		c := &s.cfgs[f.cfg]
		for ai := range s.amps {
			if ai != f.amp {
				cands = append(cands, fixCand{f.cfg, ai, c.costLB + s.amps[ai].cost, "amplifier"})
			}
		}
		for ci := range s.cfgs {
			o := &s.cfgs[ci]
			if ci == f.cfg || o.fam != c.fam {
				continue
			}
			lb := o.costLB + s.amps[f.amp].cost
			kind := ""
			switch {
			case s.pairNetwork(c):
				kind = "network"
			case o.g.s2 != c.g.s2:
				// Another second stage is not a grade change.
			case o.gb == c.gb || o.ga == c.ga || (c.ga == c.gb && o.ga == o.gb):
				// One grade at one set of positions, or one grade for all.
				kind = "grade"
			}
			if kind != "" {
				cands = append(cands, fixCand{ci, f.amp, lb, kind})
				related = append(related, fixCand{ci, -1, o.costLB, kind})
			}
		}
	}
	singles = s.passingFixes(cands)
	if pairs && f.cfg >= 0 && len(related) > 0 {
		doubles = s.passingPairs(f, related)
	}
	return singles, doubles
}

// passingFixes evaluates candidate changes in order of their cost lower
// bound and returns up to maxFixCands that pass, cheapest first.
func (s *space) passingFixes(cands []fixCand) []fixOpt {
	sort.SliceStable(cands, func(i, j int) bool { return cands[i].lb < cands[j].lb })
	var out []fixOpt
	var m metrics
	for _, cd := range cands {
		if len(out) >= maxFixCands && cd.lb > out[len(out)-1].b.cost {
			break
		}
		var b classBest
		ok := false
		if cd.ci < 0 {
			b, ok = s.evalMatchedClass(cd.ai), true
		} else {
			s.bound(&s.cfgs[cd.ci].g, &s.amps[cd.ai], &m)
			if !s.pass(&m) {
				continue
			}
			b, ok = s.evalClass(cd.ci, cd.ai)
		}
		if ok && b.pass {
			out = insertFix(out, fixOpt{b, cd})
		}
	}
	return out
}

// passingPairs walks (related configuration, other amplifier) pairs in
// order of their cost lower bound and returns up to maxFixCands that pass.
func (s *space) passingPairs(f *classBest, related []fixCand) []fixOpt {
	var cfgs []int32
	sort.SliceStable(related, func(i, j int) bool { return related[i].lb < related[j].lb })
	kinds := map[int]string{}
	for _, r := range related {
		cfgs = append(cfgs, int32(r.ci))
		kinds[r.ci] = r.kind
	}
	amps := s.sortedAmps(func(ai int) bool { return ai != f.amp })
	var out []fixOpt
	var m metrics
	looked := 0
	s.walkPairs(cfgs, amps, func(ci, ai int, lb float64) bool {
		looked++
		if looked > maxPairLook || (len(out) >= maxFixCands && lb > out[len(out)-1].b.cost) {
			return true
		}
		s.bound(&s.cfgs[ci].g, &s.amps[ai], &m)
		if !s.pass(&m) {
			return false
		}
		if b, ok := s.evalClass(ci, ai); ok {
			out = insertFix(out, fixOpt{b, fixCand{ci, ai, lb, kinds[ci] + " and amplifier"}})
		}
		return false
	})
	return out
}

// insertFix keeps the maxFixCands cheapest fixes in cost order.
func insertFix(out []fixOpt, f fixOpt) []fixOpt {
	i := sort.Search(len(out), func(i int) bool { return f.b.less(&out[i].b) })
	out = slices.Insert(out, i, f)
	return out[:min(len(out), maxFixCands)]
}

// infeasible says which limits no class can meet, the best value any
// class could reach (optimistic bounds, best resistors with the best
// amplifier for that limit) and the class of part that would be needed.
func (s *space) infeasible() *Infeasible {
	inf := &Infeasible{Message: ErrInfeasible.Error()}
	if len(s.why) > 0 {
		inf.HardLimits = map[string]int(s.why)
	}
	if len(s.amps)+len(s.matched) == 0 {
		inf.Message += "; no amplifier in the catalog passes the hard limits (supply, headroom, swing, bandwidth)"
		return inf
	}
	if len(s.cfgs) == 0 && len(s.matched) == 0 {
		inf.Message += "; no resistor values or network in the catalog give the ratio inside the impedance window and ratings"
		return inf
	}
	best := worstMetrics()
	var m metrics
	take := func(m *metrics) { merge(&best, m) }
	// Per metric, the best resistors and the best amplifier for it.
	var bestAmp, bestCfg metrics = worstMetrics(), worstMetrics()
	for ai := range s.amps {
		s.bound(nil, &s.amps[ai], &m)
		merge(&bestAmp, &m)
	}
	for ci := range s.cfgs {
		s.bound(&s.cfgs[ci].g, nil, &m)
		merge(&bestCfg, &m)
	}
	if len(s.amps) > 0 && len(s.cfgs) > 0 {
		combined := metrics{gainErr: bestCfg.gainErr, totalErr: bestCfg.totalErr, drift: bestCfg.drift,
			cmrrDB: toDB(dbInv(bestCfg.cmrrDB) + dbInv(bestAmp.cmrrDB)), offset: bestAmp.offset, offDrift: bestAmp.offDrift, noise: bestAmp.noise, noiseRMS: bestAmp.noiseRMS}
		take(&combined)
	}
	for mi := range s.matched {
		s.evalMatched(&s.matched[mi], &m)
		take(&m)
	}
	l := &s.p.Limits
	G := s.p.Gain
	add := func(name string, lim, bestV float64, fails bool, needed string) {
		if lim > 0 && fails {
			inf.Limits = append(inf.Limits, InfeasibleLimit{Name: name, Limit: lim, Best: bestV, Unit: budget.UnitOf(name), Needed: needed})
		}
	}
	dT := math.Max(s.dT, 1)
	add(limGain, l.TotalGainError, best.totalErr, best.totalErr > l.TotalGainError,
		fmt.Sprintf("resistors of tolerance <= %s with tempco <= %s, or gain calibration", budget.FormatFigure(l.TotalGainError/4, ""), budget.FormatFigure(1e6*l.TotalGainError/(4*dT), "ppm/K")))
	add(limGainInitial, l.GainError, best.gainErr, best.gainErr > l.GainError,
		fmt.Sprintf("resistors of tolerance <= %s, or gain calibration", budget.FormatFigure(l.GainError/2, "")))
	cmNeed := (1 + G) * dbInv(l.CMRRdB)
	add(limCMRR, l.CMRRdB, best.cmrrDB, best.cmrrDB < l.CMRRdB,
		fmt.Sprintf("a network with ratio tolerance <= %s (or four resistors of tolerance <= %s) and an amplifier with CMRR above %s", budget.FormatFigure(cmNeed/2, ""), budget.FormatFigure(cmNeed/4, ""), budget.FormatFigure(l.CMRRdB, "dB")))
	add(limDrift, l.DriftPPM, best.drift, best.drift > l.DriftPPM,
		fmt.Sprintf("resistors with tempco <= %.3g ppm/K each, or a network with tracking <= %.3g ppm/K", l.DriftPPM/2, l.DriftPPM))
	ng := 1 + s.k*(1-s.w)
	add(limOffset, l.OffsetV, best.offset, best.offset > l.OffsetV,
		fmt.Sprintf("an amplifier with offset <= %s and offset drift <= %s, or offset calibration", budget.FormatFigure(l.OffsetV/ng/2, "V"), budget.FormatFigure(l.OffsetV/ng/2/dT, "V/K")))
	add(limOffDrift, l.OffsetDriftVK, best.offDrift, best.offDrift > l.OffsetDriftVK,
		fmt.Sprintf("an amplifier with offset drift <= %s", budget.FormatFigure(l.OffsetDriftVK/ng, "V/K")))
	add(limNoise, l.NoiseDensity, best.noise, best.noise > l.NoiseDensity,
		fmt.Sprintf("an amplifier with voltage noise <= %s and lower resistor values", budget.FormatFigure(l.NoiseDensity/ng, "V/rtHz")))
	add(limNoiseRMS, l.NoiseRMS, best.noiseRMS, best.noiseRMS > l.NoiseRMS,
		"an amplifier with lower voltage noise or less gain-bandwidth, and lower resistor values")
	if len(inf.Limits) == 0 {
		inf.Message += "; each limit can be met by some part, but no single design meets them all at once"
	}
	return inf
}

func worstMetrics() metrics {
	return metrics{gainErr: math.Inf(1), totalErr: math.Inf(1), drift: math.Inf(1), cmrrDB: math.Inf(-1), offset: math.Inf(1), offDrift: math.Inf(1), noise: math.Inf(1), noiseRMS: math.Inf(1)}
}

func merge(b, m *metrics) {
	b.gainErr = math.Min(b.gainErr, m.gainErr)
	b.totalErr = math.Min(b.totalErr, m.totalErr)
	b.drift = math.Min(b.drift, m.drift)
	b.cmrrDB = math.Max(b.cmrrDB, m.cmrrDB)
	b.offset = math.Min(b.offset, m.offset)
	b.offDrift = math.Min(b.offDrift, m.offDrift)
	b.noise = math.Min(b.noise, m.noise)
	b.noiseRMS = math.Min(b.noiseRMS, m.noiseRMS)
}

// IsInfeasible reports whether err says that no design meets the spec.
func IsInfeasible(err error) bool { return errors.Is(err, ErrInfeasible) }
