package trend

import (
	"context"
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"

	"lotproof/lots"
	"lotproof/lots/store"
	"lotproof/stats"
)

// Options choose what Compute trends and how.
type Options struct {
	By       string // "supplier" (default) or "material"
	Property string // one property; "" = all
	Every    string // "quarter" (default) or "month"
	Since    string // first test date included (YYYY-MM-DD); "" = no limit
	Until    string // last test date included (YYYY-MM-DD); "" = no limit
	// Baseline is the range of periods the control limits come from,
	// "FROM..TO" (e.g. "2025-Q1..2025-Q4"); "" = each series' first
	// four periods.
	Baseline string
	// Limits are specification limits given directly (from --spec files);
	// they take precedence over the limits recorded with the imports.
	Limits     []store.SpecLimit
	Confidence float64 // of the Ppk lower bound; 0 = 0.95
	Lambda     float64 // EWMA weight; 0 = 0.2
	L          float64 // EWMA limit width in sigmas; 0 = 3
	Alpha      float64 // significance of the shift test; 0 = 0.01
	// Seen, when set, is called with each lot's values that the trend
	// uses (for example to infer the resolution the values are printed at).
	Seen func(store.LotValues)
}

// Defaults.
const (
	DefaultConfidence = 0.95
	DefaultLambda     = 0.2
	DefaultL          = 3.0
	DefaultAlpha      = 0.01
	DefaultBaseline   = 4 // periods
)

// Period is one row: a group, property and period.
type Period struct {
	Group        string     `json:"group"`
	Material     string     `json:"material"`
	Property     string     `json:"property"`
	Unit         string     `json:"unit"`
	Period       string     `json:"period"`
	Baseline     bool       `json:"baseline"` // the period is in the baseline
	Lots         int        `json:"lots"`
	Specimens    int        `json:"specimens"`
	Mean         lots.Float `json:"mean"`
	SD           lots.Float `json:"sd"`
	Minimum      lots.Float `json:"minimum"` // specification minimum (null: none)
	Ppk          lots.Float `json:"ppk"`
	PpkLower     lots.Float `json:"ppk_lower"`     // Bissell lower confidence bound
	PPMBelow     lots.Float `json:"ppm_below"`     // normal model, parts per million below the minimum
	LotsJudged   int        `json:"lots_judged"`   // lots with a recorded verdict
	LotsRejected int        `json:"lots_rejected"` // verdict nonconforming
}

// Signal is one firing of a rule.
type Signal struct {
	Rule     string     `json:"rule"`
	Group    string     `json:"group"`
	Material string     `json:"material"`
	Property string     `json:"property"`
	Period   string     `json:"period"`
	Lot      string     `json:"lot"` // "" for period-level signals
	Value    lots.Float `json:"value"`
	Limit    lots.Float `json:"limit"`
	Detail   string     `json:"detail"`
}

// Point is one lot on the charts of its series.
type Point struct {
	Lot      string     `json:"lot"`
	Period   string     `json:"period"`
	Tested   string     `json:"tested"`
	N        int        `json:"n"`
	Mean     lots.Float `json:"mean"`
	SD       lots.Float `json:"sd"`
	Lower    lots.Float `json:"lcl"` // this lot's limits on the chart of lot means (they depend on its size)
	Upper    lots.Float `json:"ucl"`
	SLower   lots.Float `json:"s_lcl"`
	SUpper   lots.Float `json:"s_ucl"`
	EWMA     lots.Float `json:"ewma"`
	EWMALow  lots.Float `json:"ewma_lcl"`
	EWMAHigh lots.Float `json:"ewma_ucl"`
	Verdict  string     `json:"verdict"`
	Baseline bool       `json:"baseline"`
}

// Series is the charts of one group and property.
type Series struct {
	Group        string     `json:"group"`
	Material     string     `json:"material"`
	Property     string     `json:"property"`
	Unit         string     `json:"unit"`
	BaselineFrom string     `json:"baseline_from"`
	BaselineTo   string     `json:"baseline_to"`
	BaselineLots int        `json:"baseline_lots"`
	Center       lots.Float `json:"center"` // mean of the baseline lot means
	MRBar        lots.Float `json:"mr_bar"` // mean moving range of the baseline lot means
	Sigma        lots.Float `json:"sigma"`  // MRbar/d2, d2 = 2/√π ≈ 1.128
	Lower        lots.Float `json:"lcl"`    // individuals chart
	Upper        lots.Float `json:"ucl"`    // individuals chart
	SBar         lots.Float `json:"s_bar"`  // S chart centre
	Points       []Point    `json:"points"`
	Notes        []string   `json:"notes"`
}

// Result is the trend of every group, property and period.
type Result struct {
	By    string `json:"by"`
	Every string `json:"every"`
	// EnteredUnits maps a property to the unit it was entered in
	// (store.EnteredUnits), for Display; not written.
	EnteredUnits map[string]string `json:"-"`
	Since        lots.Text         `json:"since"`    // null when not given
	Until        lots.Text         `json:"until"`    // null when not given
	Baseline     lots.Text         `json:"baseline"` // null: each series' first DefaultBaseline periods
	Periods      []Period          `json:"periods"`
	Signals      []Signal          `json:"signals"`
	Series       []Series          `json:"series"`
	Methods      []string          `json:"methods"`
	Warnings     []string          `json:"warnings"`
	Caution      string            `json:"caution"`
}

// Caution is shown with every trend.
const Caution = "Trend signals and capability estimates support, and never replace, the governing specification, regulations, local codes and licensed engineering judgement. Ppk bounds treat the period's specimens as one independent normal sample; with lot-to-lot variation they are optimistic."

// Methods lists the methods, with their sources, in every result.
func methods(o Options) []string {
	return []string{
		"Lot means charted as individuals; limits centre ± 3·MRbar/d2 with d2 = 2/√π ≈ 1.128, the exact mean range of two normal values (moving range of span 2) from the baseline lots (Montgomery, Introduction to Statistical Quality Control, 7th ed., §6.4; ASTM MNL 7A, Part 3).",
		"Each lot's own limits: centre ± 3·sqrt(σb² + σw²/n) for a lot of n specimens (one-way random-effects model; Montgomery, Design and Analysis of Experiments, §3.9), σw the within-lot SD from the baseline lot SDs (sbar/c4(n), or the pooled SD over c4 of its degrees of freedom + 1), σb² = max(0, σ² - σw²·mean of 1/n over the baseline lots) with σ = MRbar/d2; with σb = 0 this is the x-bar chart with variable sample size (Montgomery §6.3.2). The EWMA and the limits shown per series use the root-mean-square of these over the baseline lots.",
		"Baseline (Phase I): the lots of the baseline periods, less rejected lots and lots beyond trial limits from the median moving range (σ = median MR/0.954; Montgomery §6.2.1 and §6.4), screened once.",
		"Lot SDs on an S chart: LCL = B3(n)·sbar, UCL = B4(n)·sbar, sbar the mean (equal n) or pooled (unequal n) baseline lot SD (Montgomery §6.3.1-6.3.2).",
		"Run rules on the lot means: the four Western Electric zone rules (Statistical Quality Control Handbook, 1956): we1 one point beyond 3σ; we2 two of three beyond 2σ on one side; we3 four of five beyond 1σ on one side; we4 eight in a row on one side.",
		fmt.Sprintf("EWMA of the lot means, λ = %g, L = %g, exact time-varying limits μ0 ± Lσ·sqrt(λ/(2-λ)·(1-(1-λ)^(2i))) with μ0 and σ from the baseline (Lucas and Saccucci 1990, Technometrics 32, 1-12; Montgomery §9.2).", o.Lambda, o.L),
		fmt.Sprintf("Shift between consecutive periods: Welch's two-sample t-test on the lot means of the two periods (each lot one observation), two-sided, α = %g; needs two lots in each period (Welch 1947, Biometrika 34, 28-35).", o.Alpha),
		fmt.Sprintf("Ppk = (mean - minimum)/(3·SD) over the period's specimens (overall SD), with Bissell's approximate %g%% lower confidence bound Ppk - z·sqrt(1/(9n) + Ppk²/(2(n-1))) (Bissell 1990, Applied Statistics 39, 331-340; derived for Cpk, it is the delta-method variance of each one-sided index and so applies to Ppk against a minimum).", 100*o.Confidence),
		"ppm below the minimum: 10^6·Φ((minimum - mean)/SD), normal model.",
		"A lot's period is that of its earliest test date.",
	}
}

func (o *Options) normalize() error {
	o.By = strings.ToLower(strings.TrimSpace(o.By))
	if o.By == "" {
		o.By = "supplier"
	}
	if o.By != "supplier" && o.By != "material" {
		return lots.Inputf("--by", "use --by supplier or --by material", "unknown grouping %q", o.By)
	}
	o.Every = strings.ToLower(strings.TrimSpace(o.Every))
	if o.Every == "" {
		o.Every = "quarter"
	}
	if o.Every != "quarter" && o.Every != "month" {
		return lots.Inputf("--every", "use --every quarter or --every month", "unknown period %q", o.Every)
	}
	for _, d := range []struct{ flag, v string }{{"--since", o.Since}, {"--until", o.Until}} {
		if d.v != "" && !isDate(d.v) {
			return lots.Inputf(d.flag, "write the date as YYYY-MM-DD", "%q is not a date", d.v)
		}
	}
	if o.Since != "" && o.Until != "" && o.Since > o.Until {
		return lots.Inputf("--since", "give --since on or before --until", "--since %s is after --until %s", o.Since, o.Until)
	}
	if o.Baseline != "" {
		from, to, ok := strings.Cut(o.Baseline, "..")
		if !ok || !isPeriod(from, o.Every) || !isPeriod(to, o.Every) || from > to {
			ex := "2025-Q1..2025-Q4"
			if o.Every == "month" {
				ex = "2025-01..2025-12"
			}
			return lots.Inputf("--baseline", "write the baseline as FROM..TO periods, e.g. "+ex, "%q is not a range of %s periods", o.Baseline, o.Every)
		}
	}
	if o.Confidence == 0 {
		o.Confidence = DefaultConfidence
	}
	if o.Lambda == 0 {
		o.Lambda = DefaultLambda
	}
	if o.L == 0 {
		o.L = DefaultL
	}
	if o.Alpha == 0 {
		o.Alpha = DefaultAlpha
	}
	if !(o.Confidence > 0 && o.Confidence < 1) || !(o.Lambda > 0 && o.Lambda <= 1) || !(o.L > 0) || !(o.Alpha > 0 && o.Alpha < 1) {
		return lots.Inputf("options", "use a confidence and α in (0, 1), λ in (0, 1] and L > 0", "invalid confidence %g, λ %g, L %g or α %g", o.Confidence, o.Lambda, o.L, o.Alpha)
	}
	return nil
}

func isDate(s string) bool {
	if len(s) != 10 || s[4] != '-' || s[7] != '-' {
		return false
	}
	y, e1 := strconv.Atoi(s[:4])
	m, e2 := strconv.Atoi(s[5:7])
	d, e3 := strconv.Atoi(s[8:])
	return e1 == nil && e2 == nil && e3 == nil && y > 0 && m >= 1 && m <= 12 && d >= 1 && d <= 31
}

func isPeriod(s, every string) bool {
	if every == "quarter" {
		return len(s) == 7 && s[4] == '-' && s[5] == 'Q' && s[6] >= '1' && s[6] <= '4' && isDate(s[:4]+"-01-01")
	}
	return len(s) == 7 && s[4] == '-' && isDate(s+"-01")
}

// PeriodOf returns the period label of a test date: "2026-Q2" (quarter)
// or "2026-05" (month).
func PeriodOf(date, every string) (string, bool) {
	if !isDate(date) {
		return "", false
	}
	if every == "month" {
		return date[:7], true
	}
	m, _ := strconv.Atoi(date[5:7])
	return date[:4] + "-Q" + strconv.Itoa((m-1)/3+1), true
}

// Compute reads the lot history from st and computes the trend.
func Compute(ctx context.Context, st *store.Store, o Options) (*Result, error) {
	data, err := st.LotSamples(ctx, store.Filter{Property: o.Property})
	if err != nil {
		return nil, err
	}
	verdicts, err := st.LotVerdicts(ctx)
	if err != nil {
		return nil, err
	}
	limits, err := st.SpecLimits(ctx)
	if err != nil {
		return nil, err
	}
	return ComputeFrom(data, verdicts, append(append([]store.SpecLimit(nil), o.Limits...), limits...), o)
}

// lotOf is one lot in one series.
type lotOf struct {
	v       store.LotValues
	period  string
	mean    float64
	sd      float64 // NaN for one value
	verdict string
}

type seriesKey struct{ group, material, property string }

// ComputeFrom computes the trend from lot data, verdicts per lot and
// specification limits (earlier entries take precedence for the same
// material and property).
func ComputeFrom(data []store.LotValues, verdicts map[string][]store.Verdict, limits []store.SpecLimit, o Options) (*Result, error) {
	if err := o.normalize(); err != nil {
		return nil, err
	}
	res := &Result{By: o.By, Every: o.Every, Since: lots.Text(o.Since), Until: lots.Text(o.Until), Baseline: lots.Text(o.Baseline),
		Periods: []Period{}, Signals: []Signal{}, Series: []Series{}, Methods: methods(o), Warnings: []string{}, Caution: Caution}
	if o.Property != "" && len(data) == 0 {
		return nil, lots.Inputf("--property", "name a recorded property (see lotproof record)", "no recorded values of property %q", o.Property)
	}
	minimum := map[[2]string]float64{}
	minSpec := map[[2]string]string{}
	for _, l := range limits {
		k := [2]string{strings.ToLower(l.Material), strings.ToLower(l.Property)}
		if _, ok := minimum[k]; ok || math.IsNaN(l.Minimum) {
			if ok && !math.IsNaN(l.Minimum) && minimum[k] != l.Minimum {
				res.Warnings = append(res.Warnings, fmt.Sprintf("%s and %s give different minimums for %s of %s; %s is used", minSpec[k], l.Spec, l.Property, l.Material, minSpec[k]))
			}
			continue
		}
		minimum[k] = l.Minimum
		minSpec[k] = l.Spec
	}
	undated := 0
	series := map[seriesKey][]lotOf{}
	for _, v := range data {
		if v.Tested == "" {
			undated++
			continue
		}
		if (o.Since != "" && v.Tested < o.Since) || (o.Until != "" && v.Tested > o.Until) {
			continue
		}
		p, ok := PeriodOf(v.Tested, o.Every)
		if !ok {
			undated++
			continue
		}
		if o.Seen != nil {
			o.Seen(v)
		}
		k := seriesKey{v.Supplier, v.Material, v.Property}
		if o.By == "material" {
			k = seriesKey{v.Material, v.Material, v.Property}
		}
		l := lotOf{v: v, period: p, sd: math.NaN()}
		// Mean and SD only (stats.MeanSD: Describe's values and errors,
		// without its sorted copy for the median).
		if m, sd, err := stats.MeanSD(v.Values); err == nil {
			l.mean, l.sd = m, sd
		} else {
			continue
		}
		l.verdict = worstVerdict(verdicts[v.Lot])
		series[k] = append(series[k], l)
	}
	if undated > 0 {
		res.Warnings = append(res.Warnings, fmt.Sprintf("%d lot/property records without a valid test date were left out (a lot's period comes from its test dates)", undated))
	}
	keys := make([]seriesKey, 0, len(series))
	for k := range series {
		keys = append(keys, k)
	}
	sort.Slice(keys, func(i, j int) bool {
		a, b := keys[i], keys[j]
		if a.group != b.group {
			return a.group < b.group
		}
		if a.material != b.material {
			return a.material < b.material
		}
		return a.property < b.property
	})
	for _, k := range keys {
		ls := series[k]
		sort.SliceStable(ls, func(i, j int) bool {
			if ls[i].v.Tested != ls[j].v.Tested {
				return ls[i].v.Tested < ls[j].v.Tested
			}
			return ls[i].v.Lot < ls[j].v.Lot
		})
		min, hasMin := minimum[[2]string{strings.ToLower(ls[0].v.Material), strings.ToLower(k.property)}]
		if !hasMin {
			min = math.NaN()
		}
		computeSeries(res, k, ls, min, o)
	}
	if err := checkBaseline(res, o); err != nil {
		return nil, err
	}
	// Signals in the order of the series, then by period (each series'
	// signals are already in lot order within a rule).
	sort.SliceStable(res.Signals, func(i, j int) bool {
		a, b := res.Signals[i], res.Signals[j]
		if a.Group != b.Group {
			return a.Group < b.Group
		}
		if a.Material != b.Material {
			return a.Material < b.Material
		}
		if a.Property != b.Property {
			return a.Property < b.Property
		}
		return a.Period < b.Period
	})
	return res, nil
}

// worstVerdict picks the most severe of a lot's verdicts.
func worstVerdict(vs []store.Verdict) string {
	rank := map[string]int{"nonconforming": 4, "undecided": 3, "conforming": 2, "not judged": 1}
	best := ""
	for _, v := range vs {
		if rank[v.Verdict] > rank[best] {
			best = v.Verdict
		}
	}
	return best
}

func computeSeries(res *Result, k seriesKey, ls []lotOf, min float64, o Options) {
	unit := ls[0].v.Unit
	// Periods in order.
	var periods []string
	byPeriod := map[string][]int{}
	for i, l := range ls {
		if _, ok := byPeriod[l.period]; !ok {
			periods = append(periods, l.period)
		}
		byPeriod[l.period] = append(byPeriod[l.period], i)
	}
	sort.Strings(periods)
	// Baseline periods.
	inBase := map[string]bool{}
	if o.Baseline != "" {
		from, to, _ := strings.Cut(o.Baseline, "..")
		for _, p := range periods {
			if p >= from && p <= to {
				inBase[p] = true
			}
		}
	} else {
		for i, p := range periods {
			if i < DefaultBaseline {
				inBase[p] = true
			}
		}
	}
	sr := Series{Group: k.group, Material: k.material, Property: k.property, Unit: unit,
		Center: lots.NaN, MRBar: lots.NaN, Sigma: lots.NaN, Lower: lots.NaN, Upper: lots.NaN, SBar: lots.NaN, Notes: []string{}}
	for _, p := range periods {
		if inBase[p] {
			if sr.BaselineFrom == "" {
				sr.BaselineFrom = p
			}
			sr.BaselineTo = p
		}
	}

	// Period rows.
	for _, p := range periods {
		idx := byPeriod[p]
		row := Period{Group: k.group, Material: k.material, Property: k.property, Unit: unit, Period: p, Baseline: inBase[p],
			Lots: len(idx), Mean: lots.NaN, SD: lots.NaN, Minimum: lots.Float(min), Ppk: lots.NaN, PpkLower: lots.NaN, PPMBelow: lots.NaN}
		var vals []float64
		for _, i := range idx {
			vals = append(vals, ls[i].v.Values...)
			if ls[i].verdict != "" && ls[i].verdict != "not judged" {
				row.LotsJudged++
			}
			if ls[i].verdict == "nonconforming" {
				row.LotsRejected++
			}
		}
		row.Specimens = len(vals)
		if m, sd, err := stats.MeanSD(vals); err == nil {
			row.Mean, row.SD = lots.Float(m), lots.Float(sd)
		}
		if !math.IsNaN(min) && len(vals) >= 2 {
			if c, err := stats.PerformanceLower(vals, min, o.Confidence); err == nil {
				row.Ppk, row.PpkLower, row.PPMBelow = lots.Float(c.Index), lots.Float(c.Bound), lots.Float(1e6*c.FractionBelow)
			}
		}
		res.Periods = append(res.Periods, row)
	}

	signal := func(rule, period, lot string, value, limit float64, detail string) {
		res.Signals = append(res.Signals, Signal{Rule: rule, Group: k.group, Material: k.material, Property: k.property,
			Period: period, Lot: lot, Value: lots.Float(value), Limit: lots.Float(limit), Detail: detail})
	}

	// Charts.
	// Baseline lots: those of the baseline periods, less lots rejected at
	// receiving (a known assignable cause) and lots whose mean lies beyond
	// trial limits (Phase I revision of trial limits, Montgomery, 7th ed.,
	// §6.2.1). The trial limits use the median moving range (Montgomery
	// §6.4), which one wild lot cannot inflate; the final limits use the
	// mean moving range of the lots kept.
	means := make([]float64, len(ls))
	base := make([]bool, len(ls))
	var rejected []string
	for i, l := range ls {
		means[i] = l.mean
		base[i] = inBase[l.period]
		if base[i] && l.verdict == "nonconforming" {
			base[i] = false
			rejected = append(rejected, l.v.Lot)
		}
	}
	if len(rejected) > 0 {
		sr.Notes = append(sr.Notes, "left out of the baseline as rejected lots: "+strings.Join(rejected, ", "))
	}
	baseline := func() []float64 {
		var out []float64
		for i := range ls {
			if base[i] {
				out = append(out, means[i])
			}
		}
		return out
	}
	if trial, _, err := stats.IndividualsLimitsMedianMR(baseline()); err == nil {
		var out []string
		for i := range ls {
			if base[i] && (means[i] < trial.Lower || means[i] > trial.Upper) {
				base[i] = false
				out = append(out, ls[i].v.Lot)
			}
		}
		if len(out) > 0 {
			sr.Notes = append(sr.Notes, fmt.Sprintf("left out of the baseline as beyond the trial limits %.6g..%.6g: %s", trial.Lower, trial.Upper, strings.Join(out, ", ")))
		}
	}
	baseMeans := baseline()
	var baseSD []float64
	var baseN []int
	for i, l := range ls {
		if base[i] && !math.IsNaN(l.sd) {
			baseSD = append(baseSD, l.sd)
			baseN = append(baseN, len(l.v.Values))
		}
	}
	sr.BaselineLots = len(baseMeans)
	for i, l := range ls {
		sr.Points = append(sr.Points, Point{Lot: l.v.Lot, Period: l.period, Tested: l.v.Tested, N: len(l.v.Values), Mean: lots.Float(l.mean), SD: lots.Float(l.sd),
			Lower: lots.NaN, Upper: lots.NaN, SLower: lots.NaN, SUpper: lots.NaN, EWMA: lots.NaN, EWMALow: lots.NaN, EWMAHigh: lots.NaN, Verdict: l.verdict, Baseline: base[i]})
	}
	// The S chart centre from the baseline lots (used below for the floor
	// of the lot-mean sigma as well).
	var sbar float64
	var sbarErr error
	if len(baseSD) >= 2 {
		equal := true
		for _, n := range baseN {
			equal = equal && n == baseN[0]
		}
		if equal {
			sbar, sbarErr = stats.MeanSBar(baseSD)
		} else {
			sbar, sbarErr = stats.PooledSBar(baseSD, baseN)
		}
	} else {
		sbarErr = fmt.Errorf("needs two baseline lots with two or more specimens")
	}
	lim, mr, err := stats.IndividualsLimits(baseMeans)
	// Each lot's mean gets its own sigma: Var(lot mean) = sigma_b^2 +
	// sigma_w^2/n (one-way random-effects model; Montgomery, Design and
	// Analysis of Experiments, section 3.9), with sigma_w from the baseline
	// lot SDs and sigma_b^2 what the moving-range sigma leaves beyond the
	// within-lot part (stats.LotMeanSigmas). A lot of 3 specimens gets
	// wider limits than one of 10; with a handful of baseline lots the
	// moving range can also fall below the within-lot part by chance, and
	// then sigma_b is taken as zero. Without a within-lot estimate every lot
	// uses the moving-range sigma.
	sig := make([]float64, len(ls))
	if err == nil {
		for i := range sig {
			sig[i] = lim.Sigma
		}
	}
	if err == nil && sbarErr == nil && sbar > 0 {
		// sigma_w: sbar/c4(n) for equal baseline sizes (Montgomery, 7th
		// ed., section 6.3.1); the pooled SD over c4(df+1), df = sum of
		// (n_j - 1), for unequal sizes (the mean of a chi variable with
		// df degrees of freedom is c4(df+1) sigma).
		df := 0
		equal := true
		for _, n := range baseN {
			df += n - 1
			equal = equal && n == baseN[0]
		}
		cn := df + 1
		if equal {
			cn = baseN[0]
		}
		c4, cerr := stats.C4(cn)
		sizes := make([]int, len(ls))
		for i, l := range ls {
			sizes[i] = len(l.v.Values)
		}
		var sw float64
		if cerr == nil {
			sw = sbar / c4
		}
		if s, between, rms, serr := stats.LotMeanSigmas(lim.Sigma, sw, baseN, sizes); cerr == nil && serr == nil {
			if between == 0 {
				sr.Notes = append(sr.Notes, fmt.Sprintf("the moving-range sigma of the lot means (%.4g) is below what the within-lot scatter alone gives (%.4g); the between-lot variation is taken as zero and each lot's limits are the centre ± 3 × within-lot SD (%.4g) / sqrt(specimens in the lot)", lim.Sigma, rms, sw))
			}
			copy(sig, s)
			lim.Sigma = rms
			lim.Lower, lim.Upper = lim.Center-3*rms, lim.Center+3*rms
			if byN := perSizeLimits(lim.Center, sizes, s); len(byN) > 1 {
				sr.Notes = append(sr.Notes, "each lot's limits depend on its number of specimens: "+strings.Join(byN, "; "))
			}
		}
	}
	for i := range ls {
		if sig[i] > 0 {
			sr.Points[i].Lower, sr.Points[i].Upper = lots.Float(lim.Center-3*sig[i]), lots.Float(lim.Center+3*sig[i])
		}
	}
	if err != nil {
		sr.Notes = append(sr.Notes, fmt.Sprintf("no chart of lot means: the baseline (%s..%s) has %d lots; %v", sr.BaselineFrom, sr.BaselineTo, len(baseMeans), err))
	} else {
		sr.Center, sr.MRBar, sr.Sigma, sr.Lower, sr.Upper = lots.Float(lim.Center), lots.Float(mr), lots.Float(lim.Sigma), lots.Float(lim.Lower), lots.Float(lim.Upper)
		if len(baseMeans) < 10 {
			sr.Notes = append(sr.Notes, fmt.Sprintf("the limits rest on only %d baseline lots; treat signals as prompts to look, not conclusions", len(baseMeans)))
		}
		// The run rules on the lot means standardized by each lot's own
		// sigma.
		z := make([]float64, len(means))
		for i, m := range means {
			z[i] = (m - lim.Center) / sig[i]
		}
		rs, _ := stats.WesternElectric(z, 0, 1)
		for _, r := range rs {
			l := ls[r.Index]
			zone := []float64{0, 3, 2, 1, 0}[r.Rule]
			limit := lim.Center + float64(r.Side)*zone*sig[r.Index]
			detail := map[int]string{
				1: "lot mean beyond the 3-sigma limit",
				2: "two of three consecutive lot means beyond 2 sigma on one side",
				3: "four of five consecutive lot means beyond 1 sigma on one side",
				4: "eight consecutive lot means on one side of the centre line",
			}[r.Rule]
			side := "above"
			if r.Side < 0 {
				side = "below"
			}
			signal(fmt.Sprintf("we%d", r.Rule), l.period, l.v.Lot, l.mean, limit, detail+" ("+side+")")
		}
		// The EWMA runs over the lots not rejected at receiving: a rejected
		// lot is a known, dispositioned cause (it is still plotted and
		// judged by rule 1), and left in it would hold the average away
		// from the centre for several good lots after it.
		var accepted []int
		var accMeans []float64
		for i, l := range ls {
			if l.verdict != "nonconforming" {
				accepted = append(accepted, i)
				accMeans = append(accMeans, means[i])
			}
		}
		if len(accepted) < len(ls) {
			sr.Notes = append(sr.Notes, "the EWMA leaves out lots rejected at receiving")
		}
		// One sigma for the EWMA, which averages over lots: the
		// root-mean-square lot-mean sigma of the baseline (exact for equal
		// lot sizes).
		ew, err := stats.EWMA(accMeans, lim.Center, lim.Sigma, o.Lambda, o.L)
		if err == nil {
			for j, p := range ew {
				i := accepted[j]
				sr.Points[i].EWMA, sr.Points[i].EWMALow, sr.Points[i].EWMAHigh = lots.Float(p.Z), lots.Float(p.Lower), lots.Float(p.Upper)
				if p.Z < p.Lower {
					signal("ewma", ls[i].period, ls[i].v.Lot, p.Z, p.Lower, "EWMA of lot means below its lower limit")
				} else if p.Z > p.Upper {
					signal("ewma", ls[i].period, ls[i].v.Lot, p.Z, p.Upper, "EWMA of lot means above its upper limit")
				}
			}
		}
	}
	// S chart.
	if sbarErr == nil && sbar > 0 {
		sr.SBar = lots.Float(sbar)
		for i, l := range ls {
			if math.IsNaN(l.sd) {
				continue
			}
			sl, err := stats.SChartLimits(sbar, len(l.v.Values))
			if err != nil {
				continue
			}
			sr.Points[i].SLower, sr.Points[i].SUpper = lots.Float(sl.Lower), lots.Float(sl.Upper)
			if l.sd > sl.Upper {
				signal("s_chart", l.period, l.v.Lot, l.sd, sl.Upper, "lot SD above the S chart upper limit")
			} else if sl.Lower > 0 && l.sd < sl.Lower {
				signal("s_chart", l.period, l.v.Lot, l.sd, sl.Lower, "lot SD below the S chart lower limit")
			}
		}
	} else {
		msg := "no S chart"
		if sbarErr != nil {
			msg += ": " + sbarErr.Error()
		}
		sr.Notes = append(sr.Notes, msg)
	}
	// Shift between consecutive periods: Welch on lot means.
	for pi := 1; pi < len(periods); pi++ {
		a, b := lotMeans(ls, byPeriod[periods[pi-1]]), lotMeans(ls, byPeriod[periods[pi]])
		if len(a) < 2 || len(b) < 2 {
			continue
		}
		w, err := stats.WelchT(a, b)
		if err != nil {
			continue
		}
		if w.P < o.Alpha {
			signal("shift_welch", periods[pi], "", w.P, o.Alpha,
				fmt.Sprintf("lot means moved by %.4g %s from %s to %s (Welch t = %.3f, df = %.2f, p = %.3g)", w.Difference, unit, periods[pi-1], periods[pi], w.T, w.DF, w.P))
		}
	}
	res.Series = append(res.Series, sr)
}

func lotMeans(ls []lotOf, idx []int) []float64 {
	out := make([]float64, len(idx))
	for i, j := range idx {
		out[i] = ls[j].mean
	}
	return out
}

// perSizeLimits lists the limits for each distinct lot size, in increasing
// size: "3 specimens: 941.2..1012.4".
func perSizeLimits(center float64, sizes []int, sig []float64) []string {
	seen := map[int]float64{}
	for i, n := range sizes {
		seen[n] = sig[i]
	}
	ns := make([]int, 0, len(seen))
	for n := range seen {
		ns = append(ns, n)
	}
	sort.Ints(ns)
	out := make([]string, len(ns))
	for i, n := range ns {
		out[i] = fmt.Sprintf("%d specimens: %.6g..%.6g", n, center-3*seen[n], center+3*seen[n])
	}
	return out
}
