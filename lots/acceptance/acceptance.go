package acceptance

import (
	"errors"
	"fmt"
	"math"
	"runtime"
	"slices"
	"strconv"
	"strings"
	"sync"

	"lotproof/lots"
	"lotproof/lots/units"
	"lotproof/spec"
	"lotproof/stats"
)

// Verdicts.
const (
	Conforming    = "conforming"
	Nonconforming = "nonconforming"
	Undecided     = "undecided"
	NotJudged     = "not judged"
)

// OutlierAlpha is the significance level of the maximum normed residual
// screen applied to every lot.
const OutlierAlpha = 0.05

// MaxPlannedSpecimens caps the search for the number of specimens an
// undecided lot would need.
const MaxPlannedSpecimens = 10000

// Caution is shown with every acceptance result.
const Caution = "A verdict is statistical support for the inspector's decision under the governing specification and local practice; it does not replace the specification, regulations, local codes or licensed engineering judgement. Normal distribution of each property within a lot is assumed."

// Result is the judgement of every lot in a dataset.
type Result struct {
	Source   string      `json:"source"`
	Digest   string      `json:"sha256"`
	GroupBy  string      `json:"group_by"`
	Specs    []SpecRef   `json:"specifications"`
	Method   string      `json:"method"`
	Lots     []LotResult `json:"lots"`
	Counts   Counts      `json:"counts"`
	Cautions []string    `json:"cautions"`
}

// SpecRef identifies a specification used.
type SpecRef struct {
	ID         string  `json:"id"`
	Revision   string  `json:"revision"`
	Material   string  `json:"material"`
	Source     string  `json:"source"`
	Content    float64 `json:"content"`
	Confidence float64 `json:"confidence"`
	MinN       int     `json:"min_specimens"`
}

// Counts tallies lot verdicts.
type Counts struct {
	Conforming    int `json:"conforming"`
	Nonconforming int `json:"nonconforming"`
	Undecided     int `json:"undecided"`
	NotJudged     int `json:"not_judged"`
}

// LotResult is the judgement of one lot (or heat).
type LotResult struct {
	Lot        string           `json:"lot"`
	Supplier   string           `json:"supplier"`
	Material   string           `json:"material"`
	Spec       string           `json:"spec"` // "ID rev R", empty when not judged
	Verdict    string           `json:"verdict"`
	N          int              `json:"n"` // specimens in the lot
	Properties []PropertyResult `json:"properties"`
	Reasons    []string         `json:"reasons"`
	Outliers   []Outlier        `json:"outliers"`
	Cautions   []string         `json:"cautions"`
}

// PropertyResult is the judgement of one property of a lot against one
// limit (a property with a minimum and a maximum gives two). Values are in
// Unit (internal units from Judge; see Display).
type PropertyResult struct {
	Property string     `json:"property"`
	Side     string     `json:"side"` // "min" or "max"
	Unit     string     `json:"unit"`
	Limit    lots.Float `json:"limit"`
	N        int        `json:"n"`
	Mean     lots.Float `json:"mean"`
	SD       lots.Float `json:"sd"`
	// Extreme is the minimum individual value (side min) or the maximum
	// (side max).
	Extreme lots.Float `json:"extreme"`
	// MeanBound is the one-sided confidence bound on the mean at the
	// specification's confidence: lower for a minimum, upper for a maximum.
	MeanBound lots.Float `json:"mean_bound"`
	// K is the one-sided normal tolerance factor for (content, confidence, n).
	K lots.Float `json:"k"`
	// ToleranceBound is mean - k*SD (minimum) or mean + k*SD (maximum).
	ToleranceBound lots.Float `json:"tolerance_bound"`
	// Fraction* are the estimated fraction of the lot beyond the limit
	// (Lieberman-Resnikoff MVUE) and its confidence bounds at the
	// specification's confidence.
	FractionEstimate lots.Float `json:"fraction_estimate"`
	FractionUpper    lots.Float `json:"fraction_upper"`
	FractionLower    lots.Float `json:"fraction_lower"`
	Beyond           int        `json:"beyond_limit"` // individual values beyond the limit
	Verdict          string     `json:"verdict"`
	// MoreSpecimens: for an undecided property, the total number of
	// specimens that would reach the confidence at the observed mean and SD
	// (0 when not applicable, -1 when not reachable).
	NeededN int      `json:"needed_n"`
	Reasons []string `json:"reasons"`
}

// Outlier is a value flagged by the maximum normed residual test. It is
// reported, never removed: the lot's figures include it.
type Outlier struct {
	Specimen string     `json:"specimen"`
	Property string     `json:"property"`
	Value    lots.Float `json:"value"`
	Unit     string     `json:"unit"`
	MNR      float64    `json:"mnr"`
	Critical float64    `json:"critical"`
	Line     int        `json:"line"`
}

// Method describes the computation (shown with every result).
const Method = "per lot and limit: one-sided normal tolerance bound, the mean minus (for a minimum) or plus (for a maximum) k standard deviations, with k the exact factor from the noncentral t distribution for the specification's content and confidence; fraction beyond the limit estimated by the Lieberman-Resnikoff (1955) minimum-variance unbiased estimator, with confidence bounds from the noncentral t; t-based confidence bound on the mean; maximum normed residual screen at alpha 0.05 (flagged values are kept)"

// Judge judges every lot (grouped by by) of d against the specification
// that governs its material (spec.ForMaterial). Every property a given
// specification names must be a column of d with a compatible unit;
// otherwise Judge returns a *lots.InputError located at the specification
// entry. Lots are judged in parallel (see Judging); the result is the same
// on any number of cores.
func Judge(d *lots.Dataset, specs []*spec.Spec, by lots.GroupBy) (*Result, error) {
	j, err := Start(d, specs, by)
	if err != nil {
		return nil, err
	}
	groups, err := d.Group(by, nil)
	if err != nil {
		j.Stop()
		return nil, lots.Inputf(d.Source, "group by lot, or fill the heat column", "%v", err)
	}
	for i, g := range groups {
		j.Add(d.Lot(g, i))
	}
	return j.Finish(d)
}

// Judging judges lots as they are added, on every core (GOMAXPROCS
// workers), and hands the results over in the order the lots were added,
// so that the result does not depend on the number of cores. The factors
// that depend only on the number of specimens (k, the t quantile of the
// mean bound) come from one stats.Factors cache, computed once per n.
//
// By default Finish returns every lot's result. With Deliver, each lot's
// result goes to a function as soon as it and every lot before it are
// judged, and is not kept: memory then does not grow with the number of
// lots (at most a few batches per worker are in flight).
type Judging struct {
	d       *lots.Dataset
	specs   []*spec.Spec
	by      lots.GroupBy
	f       *stats.Factors
	jobs    chan *batch
	cur     *batch   // lots added but not yet queued
	pending []*batch // queued, in order, not yet handed over
	limit   int      // most batches in flight before Add waits
	wg      sync.WaitGroup
	done    bool

	limits limitTexts

	sink   func(*LotResult) error // nil: keep the results in kept
	kept   []LotResult
	counts Counts
	err    error // the first error, in order of the lots
}

// batch is judgeBatch lots handed to a worker at a time (fewer hand-offs
// between goroutines than one lot at a time); ready is closed when all
// are judged.
type batch struct {
	lots  []*lots.Lot
	out   []LotResult
	errs  []error
	ready chan struct{}
}

// workers is the number of goroutines judging lots (0: GOMAXPROCS); tests
// set it.
var workers = 0

// Start checks the specifications against the properties of d (only its
// source and properties are used) and starts the workers.
func Start(d *lots.Dataset, specs []*spec.Spec, by lots.GroupBy) (*Judging, error) {
	if d == nil || len(specs) == 0 {
		return nil, lots.Inputf("accept", "give at least one --spec file", "no specification given")
	}
	if err := spec.CheckSet(specs); err != nil {
		return nil, err
	}
	var ps []lots.Problem
	for _, s := range specs {
		for _, l := range s.Limits {
			i := d.Property(l.Property)
			if i < 0 {
				ps = append(ps, lots.Problem{Where: l.Where, What: fmt.Sprintf("%s names property %q but %s has no such column (columns: %s)", s.Label(), l.Property, d.Source, strings.Join(d.PropertyNames(), ", ")), Fix: "add the column to the data, or name the file that holds it as a further results file (files are combined by specimen id: lotproof accept tensile.csv hardness.csv --spec ...), or correct the property name"})
				continue
			}
			if pu := d.Properties[i].Unit; !units.Compatible(pu, l.Unit) {
				ps = append(ps, lots.Problem{Where: l.Where, What: fmt.Sprintf("%s gives %q in %s (%s) but %s has it in %s (%s); they cannot be compared", s.Label(), l.Property, l.Unit.Symbol, l.Unit.Quantity, d.Source, pu.Symbol, pu.Quantity), Fix: "use the same quantity (and for hardness the same scale) in the specification and the data"})
			}
		}
	}
	if len(ps) > 0 {
		if len(ps) > lots.MaxProblems {
			return nil, &lots.InputError{Problems: ps[:lots.MaxProblems], More: len(ps) - lots.MaxProblems}
		}
		return nil, &lots.InputError{Problems: ps}
	}
	n := workers
	if n <= 0 {
		n = runtime.GOMAXPROCS(0)
	}
	j := &Judging{d: d, specs: specs, by: by, f: stats.NewFactors(), jobs: make(chan *batch, 4*n), limit: 8 * n,
		limits: newLimitTexts(specs)}
	for range n {
		j.wg.Add(1)
		go func() {
			defer j.wg.Done()
			for b := range j.jobs {
				for i, l := range b.lots {
					b.out[i], b.errs[i] = judgeLot(j.d, l, j.specs, j.f, j.limits)
					b.lots[i] = nil // the values are not needed any more
				}
				close(b.ready)
			}
		}()
	}
	return j, nil
}

// judgeBatch is how many lots go to a worker at a time.
const judgeBatch = 16

// Deliver makes every lot's result go to fn, in the order the lots were
// added, instead of into the Result that Finish returns. fn runs on the
// goroutine that calls Add or Finish, one lot at a time; the result is
// fn's only for the call. An error from fn stops the handing over, and
// Finish returns it. Call Deliver before the first Add.
func (j *Judging) Deliver(fn func(*LotResult) error) { j.sink = fn }

// Add queues a lot for judging; the lot belongs to the Judging from then
// on. It hands over the results that are ready, and waits for the oldest
// when too many lots are in flight.
func (j *Judging) Add(l *lots.Lot) {
	if j.cur == nil {
		j.cur = &batch{lots: make([]*lots.Lot, 0, judgeBatch), ready: make(chan struct{})}
	}
	j.cur.lots = append(j.cur.lots, l)
	if len(j.cur.lots) == judgeBatch {
		j.queue()
		j.handOver(false)
	}
}

// queue sends the current batch to the workers.
func (j *Judging) queue() {
	b := j.cur
	j.cur = nil
	if b == nil || len(b.lots) == 0 {
		return
	}
	b.out, b.errs = make([]LotResult, len(b.lots)), make([]error, len(b.lots))
	j.pending = append(j.pending, b)
	j.jobs <- b
}

// handOver passes on the results of the batches at the head of the queue
// that are judged; with all, or while too many are in flight, it waits
// for them.
func (j *Judging) handOver(all bool) {
	for len(j.pending) > 0 {
		b := j.pending[0]
		if all || len(j.pending) > j.limit {
			<-b.ready
		} else {
			select {
			case <-b.ready:
			default:
				return
			}
		}
		j.pending[0] = nil
		j.pending = j.pending[1:]
		for i := range b.out {
			j.take(&b.out[i], b.errs[i])
		}
	}
}

// take counts one lot's result and keeps it or hands it to the sink.
func (j *Judging) take(r *LotResult, err error) {
	if j.err != nil {
		return
	}
	if err != nil {
		j.err = err
		return
	}
	switch r.Verdict {
	case Conforming:
		j.counts.Conforming++
	case Nonconforming:
		j.counts.Nonconforming++
	case Undecided:
		j.counts.Undecided++
	default:
		j.counts.NotJudged++
	}
	if j.sink != nil {
		j.err = j.sink(r)
		return
	}
	j.kept = append(j.kept, *r)
}

// Stop ends the workers and drops the results.
func (j *Judging) Stop() {
	j.end()
	j.pending, j.kept = nil, nil
}

// end queues the last batch and ends the workers.
func (j *Judging) end() {
	if !j.done {
		j.done = true
		j.queue()
		close(j.jobs)
		j.wg.Wait()
	}
}

// Finish waits for every lot and returns the result, with the source and
// digest of d: the counts, and the lots unless they went to Deliver's
// function. The error is that of the first lot (in order) that failed, or
// the first the delivery function returned.
func (j *Judging) Finish(d *lots.Dataset) (*Result, error) {
	if !j.done {
		j.queue()
	}
	j.handOver(true)
	j.end()
	if j.err != nil {
		return nil, j.err
	}
	res := &Result{Source: d.Source, Digest: d.Digest, GroupBy: string(j.by), Method: Method, Cautions: []string{Caution},
		Lots: j.kept, Counts: j.counts}
	j.kept = nil
	for _, s := range j.specs {
		res.Specs = append(res.Specs, SpecRef{ID: s.ID, Revision: s.Revision, Material: s.Material, Source: s.Source,
			Content: s.Acceptance.Content, Confidence: s.Acceptance.Confidence, MinN: s.Acceptance.MinSpecimens})
	}
	return res, nil
}

var rank = map[string]int{Conforming: 0, Undecided: 1, Nonconforming: 2}

func judgeLot(d *lots.Dataset, g *lots.Lot, specs []*spec.Spec, f *stats.Factors, limits limitTexts) (LotResult, error) {
	lr := LotResult{Lot: g.Key, Supplier: g.Supplier, Material: g.Material, N: g.Len(),
		Properties: []PropertyResult{}, Reasons: []string{}, Outliers: []Outlier{}, Cautions: []string{Caution}}
	if g.Mixed {
		lr.Reasons = append(lr.Reasons, "the lot's specimens disagree on supplier or material; the first is used")
	}
	s, why := spec.ForMaterial(specs, g.Material)
	if s == nil {
		lr.Verdict = NotJudged
		lr.Reasons = append(lr.Reasons, why)
		return lr, nil
	}
	lr.Spec = s.Label()
	lr.Verdict = Conforming
	lr.Properties = make([]PropertyResult, 0, 2*len(s.Limits))
	var nonconf, undec []string // limits with those verdicts
	for li, l := range s.Limits {
		pi := d.Property(l.Property)
		vals, idx := g.Values[pi], []int(nil) // read only; no value missing: positions are indices
		if slices.ContainsFunc(vals, math.IsNaN) {
			vals, idx = g.Present(pi)
		}
		ids := func(b []byte, j int) []byte {
			if idx == nil {
				return g.AppendID(b, j)
			}
			return g.AppendID(b, idx[j])
		}
		for _, side := range []string{"min", "max"} {
			if (side == "min" && !l.HasMin()) || (side == "max" && !l.HasMax()) {
				continue
			}
			pr, err := judgeSide(l, side, limits.of(s, li, side), vals, ids, s.Acceptance, f)
			if err != nil {
				return lr, err
			}
			pr.Unit = units.Internal(l.Unit.Quantity).Symbol
			if l.Unit.Quantity == units.Hardness {
				pr.Unit = l.Unit.Symbol
			}
			if rank[pr.Verdict] > rank[lr.Verdict] {
				lr.Verdict = pr.Verdict
			}
			switch pr.Verdict {
			case Nonconforming:
				nonconf = append(nonconf, pr.Property+" ("+pr.Side+")")
			case Undecided:
				undec = append(undec, pr.Property+" ("+pr.Side+")")
			}
			lr.Properties = append(lr.Properties, pr)
		}
		// Outlier screen (flag, never delete).
		if len(vals) >= 3 && !clearlyNoOutlier(f, vals) {
			fl, err := f.ScreenOutliers(vals, OutlierAlpha, true)
			if err == nil {
				for _, f := range fl {
					at := f.Index
					if idx != nil {
						at = idx[f.Index]
					}
					lr.Outliers = append(lr.Outliers, Outlier{Specimen: g.ID(at), Property: l.Property, Value: lots.Float(f.Value),
						Unit: unitLabel(l.Unit), MNR: f.MNR, Critical: f.Critical, Line: g.Lines[at]})
				}
			} else if !errors.Is(err, stats.ErrZeroSpread) {
				return lr, fmt.Errorf("outlier screen of lot %s, %s: %w", g.Key, l.Property, err)
			}
		}
	}
	switch lr.Verdict {
	case Conforming:
		lr.Reasons = append(lr.Reasons, "every limit of "+s.Label()+" is met with confidence "+gfmt(s.Acceptance.Confidence)+" for content "+gfmt(s.Acceptance.Content))
	case Nonconforming:
		lr.Reasons = append(lr.Reasons, "nonconforming: "+strings.Join(nonconf, ", "))
		if len(undec) > 0 {
			lr.Reasons = append(lr.Reasons, "undecided: "+strings.Join(undec, ", "))
		}
	case Undecided:
		lr.Reasons = append(lr.Reasons, "undecided: "+strings.Join(undec, ", "))
	}
	if lr.Verdict != Conforming && s.Acceptance.Retests > 0 {
		lr.Reasons = append(lr.Reasons, fmt.Sprintf("%s allows %d retest(s) on %d times the specimens (%d specimens)", s.Label(), s.Acceptance.Retests, s.Acceptance.RetestFactor, s.Acceptance.RetestFactor*max(lr.N, s.Acceptance.MinSpecimens)))
	}
	if len(lr.Outliers) > 0 {
		var fl []string
		for _, o := range lr.Outliers {
			fl = append(fl, o.Specimen+" ("+o.Property+")")
		}
		lr.Reasons = append(lr.Reasons, fmt.Sprintf("flagged by the maximum normed residual test at alpha %g and kept in the figures: %s", OutlierAlpha, strings.Join(fl, ", ")))
	}
	return lr, nil
}

func unitLabel(u units.Unit) string {
	if u.Quantity == units.Hardness {
		return u.Symbol
	}
	return units.Internal(u.Quantity).Symbol
}

// judgeSide judges the values of one property against one limit. A maximum
// is judged as the minimum of the negated values (the methods are
// symmetric), and the figures are mirrored back. ids appends the id of
// the specimen of value i to its first argument.
func judgeSide(l spec.Limit, side, limitText string, vals []float64, ids func(b []byte, i int) []byte, r spec.Rule, f *stats.Factors) (PropertyResult, error) {
	sign, limit := 1.0, l.Min
	word, beyond := "minimum", "below"
	if side == "max" {
		sign, limit = -1.0, l.Max
		word, beyond = "maximum", "above"
	}
	nan := lots.NaN
	pr := PropertyResult{Property: l.Property, Side: side, Limit: lots.Float(limit), N: len(vals),
		Mean: nan, SD: nan, Extreme: nan, MeanBound: nan, K: nan, ToleranceBound: nan,
		FractionEstimate: nan, FractionUpper: nan, FractionLower: nan, Reasons: []string{}}
	n := len(vals)
	show := func(v float64) string { return fmtVal(l.Unit, v) }
	if limitText == "" {
		limitText = show(limit)
	}
	if n == 0 {
		pr.Verdict = Undecided
		pr.Reasons = append(pr.Reasons, "no values for this property in the lot")
		return pr, nil
	}
	// Mirror for a maximum (vals itself, which is only read, for a minimum).
	x := vals
	if sign < 0 {
		x = make([]float64, n)
		for i, v := range vals {
			x[i] = sign * v
		}
	}
	L := sign * limit
	sum := 0.0
	ext := math.Inf(1)
	// The values beyond the limit, listed as "id value unit, ...".
	var fails []byte
	nfail := 0
	for i, v := range x {
		sum += v
		ext = math.Min(ext, v)
		if v < L {
			if nfail > 0 {
				fails = append(fails, ", "...)
			}
			fails = appendVal(append(ids(fails, i), ' '), l.Unit, sign*v)
			nfail++
		}
	}
	pr.Extreme = lots.Float(sign * ext)
	pr.Beyond = nfail
	mean := sum / float64(n)
	pr.Mean = lots.Float(sign * mean)
	decided := ""
	if nfail > 0 {
		msg := strconv.Itoa(nfail) + " value(s) " + beyond + " the " + word + " " + limitText + ": " + string(fails)
		if r.IndividualReject {
			decided = Nonconforming
			pr.Reasons = append(pr.Reasons, msg+" (an individual value beyond a limit rejects the lot)")
		} else {
			pr.Reasons = append(pr.Reasons, msg+" (the specification does not reject on individual values)")
		}
	}
	if n < 2 {
		pr.Reasons = append(pr.Reasons, fmt.Sprintf("one specimen: no standard deviation, so the tolerance bound is undefined; at least %d specimens are required", r.MinSpecimens))
		pr.Verdict = orUndecided(decided)
		return pr, nil
	}
	mean, sd, err := stats.MeanSD(x)
	if err != nil {
		return pr, fmt.Errorf("describe %s: %w", l.Property, err)
	}
	pr.Mean, pr.SD = lots.Float(sign*mean), lots.Float(sd)
	if sd == 0 && nfail == n {
		// Every value is beyond the limit: the estimated fraction beyond
		// it is 1, and the lower confidence bound on that fraction tends
		// to 1 as the spread tends to 0 (it falls as the margin grows,
		// Owen 1968), so the fraction rule below rejects the lot.
		pr.FractionEstimate = 1
		pr.Verdict = Nonconforming
		pr.Reasons = append(pr.Reasons, fmt.Sprintf("all %d values are equal (zero spread) and %s the %s %s: the whole lot as tested is beyond the limit; check for rounding or copied values", n, beyond, word, show(limit)))
		return pr, nil
	}
	if sd == 0 {
		pr.Reasons = append(pr.Reasons, fmt.Sprintf("all %d values are equal (zero spread): the normal tolerance-bound method does not apply; check for rounding or copied values", n))
		pr.Verdict = orUndecided(decided)
		return pr, nil
	}
	mb, err := f.MeanLowerBound(n, mean, sd, r.Confidence)
	if err != nil {
		return pr, err
	}
	pr.MeanBound = lots.Float(sign * mb)
	k, err := f.NormalK(n, r.Content, r.Confidence)
	if err != nil {
		return pr, err
	}
	tb := mean - k*sd
	pr.K, pr.ToleranceBound = lots.Float(k), lots.Float(sign*tb)
	q := (mean - L) / sd
	if f, err := stats.TailFractionMVUE(n, q); err == nil {
		pr.FractionEstimate = lots.Float(f)
	}
	up, err := f.TailFractionBound(n, q, r.Confidence, true)
	if err != nil {
		return pr, err
	}
	lo, err := f.TailFractionBound(n, q, r.Confidence, false)
	if err != nil {
		return pr, err
	}
	pr.FractionUpper, pr.FractionLower = lots.Float(up), lots.Float(lo)
	allowed := 1 - r.Content
	boundWord := "lower"
	if side == "max" {
		boundWord = "upper"
	}
	switch {
	case decided == Nonconforming:
		pr.Verdict = Nonconforming
		if tb < L {
			pr.Reasons = append(pr.Reasons, fmt.Sprintf("%s tolerance bound %s is also %s the %s %s", boundWord, show(sign*tb), beyond, word, show(limit)))
		}
	case lo > allowed:
		pr.Verdict = Nonconforming
		pr.Reasons = append(pr.Reasons, "with confidence "+gfmt(r.Confidence)+" more than "+strconv.FormatFloat(allowed, 'g', 3, 64)+" of the lot is "+beyond+" the "+word+" "+limitText+" (lower confidence bound on that fraction "+strconv.FormatFloat(lo, 'g', 3, 64)+")")
	case tb >= L && n >= r.MinSpecimens:
		pr.Verdict = Conforming
		// (Appended rather than formatted: most limits of most lots end here.)
		b := appendBound(make([]byte, 0, 160), boundWord, l.Unit, sign*tb, k, n)
		b = append(append(append(append(b, ") is not "...), beyond...), " the "...), word...)
		b = append(append(append(append(b, ' '), limitText...), ": at least "...), gfmt(r.Content)...)
		pr.Reasons = append(pr.Reasons, string(append(append(b, " of the lot meets it with confidence "...), gfmt(r.Confidence)...)))
	case tb >= L:
		pr.Verdict = Undecided
		pr.Reasons = append(pr.Reasons, fmt.Sprintf("the tolerance bound meets the limit but the lot has %d specimens, fewer than the %d required", n, r.MinSpecimens))
		pr.NeededN = r.MinSpecimens
	default:
		pr.Verdict = Undecided
		b := appendBound(make([]byte, 0, 160), boundWord, l.Unit, sign*tb, k, n)
		b = append(append(append(append(append(append(b, ") is "...), beyond...), " the "...), word...), ' '), limitText...)
		b = append(append(append(append(b, ": confidence "...), gfmt(r.Confidence)...), " for content "...), gfmt(r.Content)...)
		pr.Reasons = append(pr.Reasons, string(append(b, " not reached"...)))
		// The factors of the search from the interpolant over each decade
		// of sizes above 100 (agreeing with the exact factor to about
		// 1e-14 relative, TestNeededSpecimensMatchesBisection).
		need, err := neededSpecimens(q, r.Content, r.Confidence, n, f.NormalKNear)
		if err != nil {
			return pr, err
		}
		if need > 0 {
			need = max(need, r.MinSpecimens)
		}
		pr.NeededN = need
		switch {
		case need < 0:
			zp := -math.Sqrt2 * math.Erfcinv(2*r.Content)
			pr.Reasons = append(pr.Reasons, fmt.Sprintf("not reachable by testing more specimens: the mean is only %.3f standard deviations from the limit, and the tolerance factor never falls below %.3f, the standard normal quantile of the content", q, zp))
		case need > MaxPlannedSpecimens:
			pr.Reasons = append(pr.Reasons, fmt.Sprintf("more than %d specimens would be needed at the observed mean and SD", MaxPlannedSpecimens))
		default:
			pr.Reasons = append(pr.Reasons, "at the observed mean and SD, "+strconv.Itoa(need)+" specimens in all ("+strconv.Itoa(need-n)+" more) would reach the confidence")
		}
	}
	return pr, nil
}

func orUndecided(v string) string {
	if v == "" {
		return Undecided
	}
	return v
}

// limitTexts are the limits of each specification as the reasons show
// them (fmtVal), made once rather than for every lot.
type limitTexts map[*spec.Spec][][2]string

func newLimitTexts(specs []*spec.Spec) limitTexts {
	t := limitTexts{}
	for _, s := range specs {
		for _, l := range s.Limits {
			t[s] = append(t[s], [2]string{fmtVal(l.Unit, l.Min), fmtVal(l.Unit, l.Max)})
		}
	}
	return t
}

// of is the text of limit i (side "min" or "max") of s, or "" when not
// made.
func (t limitTexts) of(s *spec.Spec, i int, side string) string {
	if i >= len(t[s]) {
		return ""
	}
	if side == "max" {
		return t[s][i][1]
	}
	return t[s][i][0]
}

// gfmt is fmt's %g (the shortest form that reads back).
func gfmt(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }

// fmtVal shows an internal value in the limit's own unit.
func fmtVal(u units.Unit, v float64) string { return string(appendVal(nil, u, v)) }

// appendVal appends fmtVal(u, v) to b.
func appendVal(b []byte, u units.Unit, v float64) []byte {
	// strconv's 'g' with 4 digits is fmt's %.4g, without its cost.
	b = strconv.AppendFloat(b, u.FromInternal(v), 'g', 4, 64)
	return append(append(b, ' '), u.Symbol...)
}

// appendBound appends "lower tolerance bound 512.3 MPa (k = 2.1234, n = 10"
// (the word given, the bound in the limit's unit).
func appendBound(b []byte, word string, u units.Unit, tb, k float64, n int) []byte {
	b = appendVal(append(append(b, word...), " tolerance bound "...), u, tb)
	b = strconv.AppendFloat(append(b, " (k = "...), k, 'f', 4, 64)
	return strconv.AppendInt(append(b, ", n = "...), int64(n), 10)
}

// NeededSpecimens returns the smallest total number of specimens m >= n0
// with k(m; p, gamma) <= q, i.e. at which a lot with standardised margin
// q = (mean - L)/SD would meet the tolerance-bound criterion if the mean and
// SD stayed as observed. It returns -1 when q <= z_p (k decreases to z_p as
// m grows, so the criterion is never met) and MaxPlannedSpecimens+1 when
// more than MaxPlannedSpecimens would be needed. k is stats.NormalK,
// decreasing in m (Owen 1968), so a bisection on m is used.
func NeededSpecimens(q, p, gamma float64, n0 int) (int, error) {
	return neededSpecimens(q, p, gamma, n0, stats.NormalK)
}

// neededSpecimens is NeededSpecimens with the k factor from normalK.
func neededSpecimens(q, p, gamma float64, n0 int, normalK func(n int, p, gamma float64) (float64, error)) (int, error) {
	zp := -math.Sqrt2 * math.Erfcinv(2*p)
	if !(q > zp) {
		return -1, nil
	}
	lo := max(n0, 2)
	ok := func(m int) (bool, error) {
		k, err := normalK(m, p, gamma)
		return k <= q, err
	}
	if good, err := ok(lo); err != nil || good {
		return lo, err
	}
	hi := MaxPlannedSpecimens
	if good, err := ok(hi); err != nil || !good {
		return MaxPlannedSpecimens + 1, err
	}
	// Narrow [lo, hi] (lo too few, hi enough) around a starting guess from
	// the normal approximation of the noncentral t (Johnson, Kotz and
	// Balakrishnan vol. 2, 31.7): k(m) ~ z_p + z_gamma sqrt(1/m + z_p^2/(2m)),
	// so m ~ (1 + z_p^2/2) (z_gamma / (q - z_p))^2; then step away from it
	// in doubling steps until the answer is bracketed, and bisect. The guess
	// only saves work: the answer is decided by the factor alone, so it is
	// the same as a bisection over the whole range.
	if zg := -math.Sqrt2 * math.Erfcinv(2*gamma); zg > 0 {
		d := (q - zp) / zg
		guess := (1 + zp*zp/2) / (d * d)
		if guess > float64(lo) && guess < float64(hi) {
			m := int(math.Ceil(guess))
			good, err := ok(m)
			if err != nil {
				return 0, err
			}
			for step := 1; ; step *= 2 {
				c := m + step
				if good {
					c = m - step
				}
				if c <= lo || c >= hi {
					break
				}
				g, err := ok(c)
				if err != nil {
					return 0, err
				}
				if g != good { // bracketed between m and c
					lo, hi = min(m, c), max(m, c)
					break
				}
				m = c
			}
			if good {
				hi = min(hi, m)
			} else {
				lo = max(lo, m)
			}
		}
	}
	for hi-lo > 1 {
		mid := (lo + hi) / 2
		good, err := ok(mid)
		if err != nil {
			return 0, err
		}
		if good {
			hi = mid
		} else {
			lo = mid
		}
	}
	return hi, nil
}

// Display returns a copy of r with every value converted from the internal
// unit to the unit shown in system sys (hardness stays on its scale).
func (r *Result) Display(sys units.System) *Result {
	out := *r
	out.Lots = make([]LotResult, len(r.Lots))
	for i, l := range r.Lots {
		l.Properties = append(make([]PropertyResult, 0, len(l.Properties)), l.Properties...)
		l.Outliers = append(make([]Outlier, 0, len(l.Outliers)), l.Outliers...)
		out.Lots[i] = l
	}
	return out.DisplayInPlace(sys)
}

// DisplayInPlace converts r itself as Display does, without a copy (for a
// large result that is only shown), and returns it.
func (r *Result) DisplayInPlace(sys units.System) *Result {
	dis := NewDisplay(sys)
	for i := range r.Lots {
		dis.Lot(&r.Lots[i])
	}
	return r
}

// Display converts lot results to the display units of a unit system, as
// Result.Display does, one lot at a time (for lots that are shown as they
// are judged). Each unit symbol is parsed once.
type Display struct {
	sys  units.System
	seen map[string]parsedUnit
}

type parsedUnit struct {
	u   units.Unit
	err error
}

// NewDisplay returns a converter to the display units of sys.
func NewDisplay(sys units.System) *Display { return &Display{sys: sys, seen: map[string]parsedUnit{}} }

func (d *Display) parse(sym string) (units.Unit, error) {
	p, ok := d.seen[sym]
	if !ok {
		p.u, p.err = units.Parse(sym)
		d.seen[sym] = p
	}
	return p.u, p.err
}

// Lot converts l in place.
func (d *Display) Lot(l *LotResult) {
	for j := range l.Properties {
		p := &l.Properties[j]
		u, err := d.parse(p.Unit)
		if err != nil {
			continue
		}
		du := u.Display(d.sys)
		c := func(f lots.Float) lots.Float { return lots.Float(du.FromInternal(u.ToInternal(float64(f)))) }
		p.Limit, p.Mean, p.Extreme, p.MeanBound, p.ToleranceBound = c(p.Limit), c(p.Mean), c(p.Extreme), c(p.MeanBound), c(p.ToleranceBound)
		p.SD = lots.Float(du.FromInternal(u.ToInternal(float64(p.SD))))
		p.Unit = du.Symbol
	}
	for j := range l.Outliers {
		o := &l.Outliers[j]
		u, err := d.parse(o.Unit)
		if err != nil {
			continue
		}
		du := u.Display(d.sys)
		o.Value = lots.Float(du.FromInternal(u.ToInternal(float64(o.Value))))
		o.Unit = du.Symbol
	}
}
