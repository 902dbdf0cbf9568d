package allowables

import (
	"errors"
	"fmt"
	"math"
	"sort"
	"strings"

	"lotproof/lots"
	"lotproof/lots/units"
	"lotproof/stats"
)

// Methods a design value can be computed by.
const (
	Weibull              = "weibull"                // two-parameter Weibull, exact tabulated factor to n = 100, handbook closed form above
	WeibullExact         = "weibull-exact"          // two-parameter Weibull, exact pivotal bound by Monte Carlo
	Normal               = "normal"                 // normal, exact noncentral-t factor
	Lognormal            = "lognormal"              // normal method on logarithms
	Nonparametric        = "nonparametric"          // order statistic (rank from the binomial)
	HansonKoop           = "hanson-koopmans"        // Hanson-Koopmans (1964)
	ANOVA                = "anova"                  // between/within-lot variance components
	RandomEffects        = "random-effects"         // one-way random-effects generalized pivotal bound (never chosen automatically)
	RandomEffectsWeibull = "random-effects-weibull" // the random-effects bound on the logarithms, Weibull values within lots
	LotAware             = "lot-aware"              // the default: the handbook choice, lowered to the lot-aware bounds where they are lower (2+ lots)
	Handbook             = "handbook"               // the handbook procedure: the automatic choice of CMH-17-1G 8.3, used as it is
)

// AllMethods lists the methods a user may ask for, in documentation order.
var AllMethods = []string{Weibull, WeibullExact, Normal, Lognormal, Nonparametric, HansonKoop, ANOVA, RandomEffects, RandomEffectsWeibull, LotAware, Handbook}

// BoundMethods are the methods that compute a bound themselves (AllMethods
// without the two procedures that choose among them), in the same order.
var BoundMethods = AllMethods[:len(AllMethods)-2]

// Level is a tolerance-bound level: content p at confidence gamma.
type Level struct {
	Content    float64 `json:"content"`
	Confidence float64 `json:"confidence"`
}

// Options control the procedure. DefaultOptions gives the usual values.
type Options struct {
	Properties []string          // properties to analyse (default: all)
	GroupBy    lots.GroupBy      // lot or heat
	A, B       Level             // A-basis and B-basis levels
	Exclude    map[string]string // specimen id -> reason for excluding it
	Method     string            // "" for the automatic choice, or one of AllMethods
	Seed       uint64            // seed of the Monte Carlo bound
	Sims       int               // Monte Carlo samples for weibull-exact
	System     units.System      // display units of the results

	OutlierAlpha float64 // maximum normed residual test level
	LotAlpha     float64 // k-sample Anderson-Darling level
	OSLMin       float64 // a distribution is accepted when its AD OSL exceeds this
	LeveneAlpha  float64 // equality of normalized variances across conditions
	PoolOSLMin   float64 // normality of the pooled normalized data

	// Done, when set, is called after each property and condition (a
	// progress display); Steps tells how many there will be.
	Done func()
}

// DefaultOptions are the usual levels: A-basis 99% content, B-basis 90%,
// both at 95% confidence (CMH-17-1G Vol. 1 section 1.5 definitions; MMPDS
// section 9.1); the maximum normed residual test at alpha 0.05 (CMH-17-1G
// 8.3.3); the k-sample Anderson-Darling test at alpha 0.025 (CMH-17-1G
// 8.3.2.2 uses 0.025 for batch comparison); a distribution accepted when
// its Anderson-Darling OSL exceeds 0.05 (CMH-17-1G 8.3.4); Levene's test at
// alpha 0.05 for pooling across conditions (CMH-17-1G 8.3.5.2 style). The
// section numbers are from memory of CMH-17-1G; the levels are common
// practice in composite and metallic allowables work.
func DefaultOptions() Options {
	return Options{
		GroupBy:      lots.ByLot,
		A:            Level{0.99, 0.95},
		B:            Level{0.90, 0.95},
		Seed:         1,
		Sims:         10000,
		System:       units.SI,
		OutlierAlpha: 0.05,
		LotAlpha:     0.025,
		OSLMin:       0.05,
		LeveneAlpha:  0.05,
		PoolOSLMin:   0.05,
	}
}

// Recommended campaign sizes, common practice: CMH-17-1G Vol. 1 section
// 2.3 asks for at least 3 batches and 18 specimens for a B-basis value
// (reduced sampling; 5 batches and 30 specimens otherwise), and 5 batches
// and 55 specimens for an A-basis value; MMPDS section 9.2 asks for at
// least 100 observations from at least 10 heats or lots for direct
// computation of A- and B-values of metals. From memory: check the edition
// that governs your work.
const (
	MinLotsB      = 3
	MinSpecimensB = 18
	MinLotsA      = 5
	MinSpecimensA = 55
	FewLotsANOVA  = 5 // the ANOVA method is unreliable with fewer lots (CMH-17-1G 8.3.5)
)

// Step is one decision of the procedure, for the audit trail.
type Step struct {
	Step      string     `json:"step"`
	Statistic lots.Float `json:"statistic"`
	Threshold lots.Float `json:"threshold"`
	Decision  string     `json:"decision"`
	Reason    string     `json:"reason"`
}

// Basis is one design value with how it was computed.
type Basis struct {
	Value      lots.Float `json:"value"`
	Factor     lots.Float `json:"factor"` // k in mean - k sd, or the method's own factor (see Note)
	Content    float64    `json:"content"`
	Confidence float64    `json:"confidence"`
	MCStdErr   lots.Float `json:"mc_std_error"` // Monte Carlo standard error, null when exact
	Method     string     `json:"method"`       // the method that gave this value ("" when not defined)
	Note       string     `json:"note,omitempty"`
}

// Outlier is a value flagged by the maximum normed residual test. It is
// kept unless the user excluded it.
type Outlier struct {
	Specimen string     `json:"specimen"`
	Lot      string     `json:"lot"`
	Value    lots.Float `json:"value"`
	Within   string     `json:"within"` // "lot" or "all data"
	MNR      lots.Float `json:"mnr"`
	Critical lots.Float `json:"critical"`
}

// Exclusion is a specimen the user left out, with the reason given.
type Exclusion struct {
	Specimen string     `json:"specimen"`
	Lot      string     `json:"lot"`
	Value    lots.Float `json:"value"`
	Reason   string     `json:"reason"`
}

// Pooled is the design value from pooling test conditions.
type Pooled struct {
	Conditions []string   `json:"conditions"`
	N          int        `json:"n"`
	CV         lots.Float `json:"pooled_cv"` // pooled SD of the mean-normalized values
	DF         int        `json:"df"`
	ABasis     lots.Float `json:"a_basis"`
	BBasis     lots.Float `json:"b_basis"`
	AFactor    lots.Float `json:"a_factor"`
	BFactor    lots.Float `json:"b_factor"`
}

// Result is the design-value analysis of one property at one condition.
type Result struct {
	Property   string                `json:"property"`
	Condition  string                `json:"condition"`
	Unit       string                `json:"unit"`
	N          int                   `json:"n"`
	Lots       int                   `json:"lots"`
	Method     string                `json:"method"`
	AutoMethod string                `json:"automatic_method"`
	ABasis     lots.Float            `json:"a_basis"`
	BBasis     lots.Float            `json:"b_basis"`
	A          Basis                 `json:"a"`
	B          Basis                 `json:"b"`
	Parameters map[string]lots.Float `json:"parameters"`
	Mean       lots.Float            `json:"mean"`
	SD         lots.Float            `json:"sd"`
	Min        lots.Float            `json:"min"`
	Max        lots.Float            `json:"max"`
	LotSizes   map[string]int        `json:"lot_sizes"`
	Outliers   []Outlier             `json:"outliers"`
	Excluded   []Exclusion           `json:"excluded"`
	Pooled     *Pooled               `json:"pooled_across_conditions"`
	Warnings   []string              `json:"warnings"`
	Steps      []Step                `json:"steps"`

	values [][]float64 // per lot, display units, after exclusions
	usedB  string      // the method that gave the B-basis value (lot-aware)
	pooled bool        // the lots were pooled (no lot effect)
	shape  string      // the accepted distribution, for pooling across conditions
}

// Report is the whole analysis of a campaign.
type Report struct {
	Input    string   `json:"input"`
	SHA256   string   `json:"sha256"`
	Version  string   `json:"tool_version"`
	Seed     uint64   `json:"seed"`
	Date     string   `json:"date"`
	Options  Settings `json:"settings"`
	Cautions []string `json:"cautions"`
	Results  []Result `json:"results"`
}

// Settings records the options a report was made with.
type Settings struct {
	GroupBy      string  `json:"group_by"`
	A            Level   `json:"a_level"`
	B            Level   `json:"b_level"`
	Method       string  `json:"method"`
	OutlierAlpha float64 `json:"outlier_alpha"`
	LotAlpha     float64 `json:"lot_alpha"`
	OSLMin       float64 `json:"osl_min"`
	LeveneAlpha  float64 `json:"levene_alpha"`
	Sims         int     `json:"simulations"`
}

// Cautions accompany every set of design values.
var Cautions = []string{
	lots.Caution,
	"A- and B-basis values describe the population the tested lots represent; they do not cover processing, environments or lots outside it.",
}

// Steps is how many property and condition analyses Analyze makes (the
// total of a progress display).
func Steps(d *lots.Dataset, opt Options) int {
	n := len(opt.Properties)
	if n == 0 {
		n = len(d.Properties)
	}
	return n * len(d.Conditions())
}

// Analyze runs the procedure on a dataset, per property and condition.
func Analyze(d *lots.Dataset, opt Options, date string) (*Report, error) {
	if err := checkOptions(opt); err != nil {
		return nil, err
	}
	props, err := selectProperties(d, opt.Properties)
	if err != nil {
		return nil, err
	}
	if err := checkExclusions(d, opt.Exclude); err != nil {
		return nil, err
	}
	rep := &Report{
		Input: d.Source, SHA256: d.Digest, Version: lots.Version, Seed: opt.Seed, Date: date,
		Options: Settings{GroupBy: string(opt.GroupBy), A: opt.A, B: opt.B, Method: methodName(opt.Method),
			OutlierAlpha: opt.OutlierAlpha, LotAlpha: opt.LotAlpha, OSLMin: opt.OSLMin, LeveneAlpha: opt.LeveneAlpha, Sims: opt.Sims},
		Cautions: Cautions,
	}
	conds := d.Conditions()
	analysed := 0
	var firstErr error
	for _, p := range props {
		prop := d.Properties[p]
		var group []int // indexes into rep.Results of this property
		for _, c := range conds {
			groups, err := d.Group(opt.GroupBy, lots.InCondition(c))
			if err != nil {
				return nil, err
			}
			r, err := analyzeOne(d, p, c, groups, opt)
			if opt.Done != nil {
				opt.Done()
			}
			var ie *lots.InputError
			if errors.As(err, &ie) {
				// This property and condition cannot be analysed: say so
				// and go on with the others.
				if firstErr == nil {
					firstErr = err
				}
				rep.Results = append(rep.Results, notAnalysed(prop, c, opt, ie))
				continue
			}
			if err != nil {
				return nil, err
			}
			if r == nil {
				continue // no values of this property at this condition
			}
			analysed++
			group = append(group, len(rep.Results))
			rep.Results = append(rep.Results, *r)
		}
		if len(group) > 1 {
			poolConditions(rep.Results, group, opt)
		}
	}
	if analysed == 0 {
		if firstErr != nil {
			return nil, firstErr
		}
		return nil, lots.Inputf(d.Source, "check the property columns and the exclusions", "no values to analyse")
	}
	return rep, nil
}

// NotAnalysed is the method of a result that could not be computed.
const NotAnalysed = "not analysed"

// notAnalysed is the result of a property and condition whose data cannot
// give a design value, with the reason.
func notAnalysed(prop lots.Property, cond string, opt Options, ie *lots.InputError) Result {
	var why []string
	for _, p := range ie.Problems {
		why = append(why, p.What+"; "+p.Fix)
	}
	reason := strings.Join(why, "; ")
	return Result{Property: prop.Name, Condition: cond, Unit: prop.Unit.Display(opt.System).Symbol, Method: NotAnalysed,
		ABasis: lots.NaN, BBasis: lots.NaN,
		A:          Basis{Value: lots.NaN, Factor: lots.NaN, MCStdErr: lots.NaN, Content: opt.A.Content, Confidence: opt.A.Confidence},
		B:          Basis{Value: lots.NaN, Factor: lots.NaN, MCStdErr: lots.NaN, Content: opt.B.Content, Confidence: opt.B.Confidence},
		Parameters: map[string]lots.Float{}, Mean: lots.NaN, SD: lots.NaN, Min: lots.NaN, Max: lots.NaN,
		LotSizes: map[string]int{}, Outliers: []Outlier{}, Excluded: []Exclusion{},
		Warnings: []string{"not analysed: " + reason},
		Steps:    []Step{{Step: "input", Statistic: lots.NaN, Threshold: lots.NaN, Decision: NotAnalysed, Reason: reason}}}
}

func methodName(m string) string {
	if m == "" {
		return LotAware
	}
	return m
}

func checkOptions(opt Options) error {
	for _, l := range []Level{opt.A, opt.B} {
		if !(l.Content > 0 && l.Content < 1) || !(l.Confidence > 0 && l.Confidence < 1) {
			return fmt.Errorf("content and confidence must lie strictly between 0 and 1 (got %g and %g)", l.Content, l.Confidence)
		}
	}
	if opt.Method != "" {
		ok := false
		for _, m := range AllMethods {
			ok = ok || m == opt.Method
		}
		if !ok {
			return fmt.Errorf("unknown method %q: expected one of %s", opt.Method, strings.Join(AllMethods, ", "))
		}
	}
	if opt.Sims < 1000 {
		return fmt.Errorf("at least 1000 Monte Carlo samples are needed (got %d)", opt.Sims)
	}
	return nil
}

func selectProperties(d *lots.Dataset, names []string) ([]int, error) {
	if len(names) == 0 {
		out := make([]int, len(d.Properties))
		for i := range out {
			out[i] = i
		}
		return out, nil
	}
	var out []int
	for _, n := range names {
		i := d.Property(n)
		if i < 0 {
			return nil, lots.Inputf(d.Source, "use one of: "+strings.Join(d.PropertyNames(), ", "), "property %q is not in the file", n)
		}
		out = append(out, i)
	}
	return out, nil
}

func checkExclusions(d *lots.Dataset, ex map[string]string) error {
	if len(ex) == 0 {
		return nil
	}
	found := map[string]bool{}
	for i := range d.Len() {
		if _, ok := ex[d.ID(i)]; ok {
			found[d.ID(i)] = true
		}
	}
	ids := make([]string, 0, len(ex))
	for id := range ex {
		ids = append(ids, id)
	}
	sort.Strings(ids) // messages in a fixed order
	var missing []string
	for _, id := range ids {
		reason := ex[id]
		if !found[id] {
			missing = append(missing, id)
		}
		if strings.TrimSpace(reason) == "" {
			return fmt.Errorf("excluding specimen %q needs a reason (--reason), for the audit trail", id)
		}
	}
	if len(missing) > 0 {
		sort.Strings(missing)
		return lots.Inputf(d.Source, "check the specimen ids given with --exclude", "excluded specimen(s) not in the file: %s", strings.Join(missing, ", "))
	}
	return nil
}

// analyzeOne analyses one property at one condition. It returns nil when
// there are no values.
func analyzeOne(d *lots.Dataset, p int, cond string, groups []lots.Group, opt Options) (*Result, error) {
	prop := d.Properties[p]
	u := prop.Unit.Display(opt.System)
	r := &Result{Property: prop.Name, Condition: cond, Unit: u.Symbol, LotSizes: map[string]int{},
		Parameters: map[string]lots.Float{}, Outliers: []Outlier{}, Excluded: []Exclusion{}, Warnings: []string{}}
	var lotKeys []string
	var at [][]int // per lot: the dataset index of each value kept
	for _, g := range groups {
		vals, idx := d.Values(p, g.Specimens)
		// Kept values and indexes overwrite the slices as they are read.
		keep, keepAt := vals[:0], idx[:0]
		for j, v := range vals {
			i := idx[j]
			v = u.FromInternal(v)
			if reason, ok := opt.Exclude[d.ID(i)]; ok {
				r.Excluded = append(r.Excluded, Exclusion{Specimen: d.ID(i), Lot: g.Key, Value: lots.Float(v), Reason: reason})
				continue
			}
			keep = append(keep, v)
			keepAt = append(keepAt, i)
		}
		if len(keep) == 0 {
			continue
		}
		lotKeys = append(lotKeys, g.Key)
		at = append(at, keepAt)
		r.values = append(r.values, keep)
		r.LotSizes[g.Key] = len(keep)
	}
	all := flatten(r.values)
	if len(all) == 0 && len(r.Excluded) == 0 {
		return nil, nil
	}
	r.N, r.Lots = len(all), len(r.values)
	where := prop.Name
	if cond != "" {
		where += " at " + cond
	}
	r.step("input", math.NaN(), math.NaN(), fmt.Sprintf("%d values from %d lots", r.N, r.Lots),
		fmt.Sprintf("%d excluded by the user, missing values left out", len(r.Excluded)))
	for _, e := range r.Excluded {
		r.step("exclusion", float64(e.Value), math.NaN(), "specimen "+e.Specimen+" excluded", e.Reason)
	}
	if r.N < 2 {
		return nil, lots.Inputf(d.Source, "test more specimens, or choose another property", "%s: %d value(s); a tolerance bound needs at least 2", where, r.N)
	}
	sum, err := stats.Describe(all)
	if err != nil {
		return nil, lots.Inputf(d.Source, "check the values", "%s: %v", where, err)
	}
	r.Mean, r.SD, r.Min, r.Max = lots.Float(sum.Mean), lots.Float(sum.SD), lots.Float(sum.Min), lots.Float(sum.Max)
	if sum.SD == 0 {
		return nil, lots.Inputf(d.Source, "check the data: identical values usually mean a copied column or a rounding problem", "%s: all %d values are equal (%g); no distribution can be fitted", where, r.N, sum.Mean)
	}
	screenOutliers(r, lotKeys, func(i, j int) string { return d.ID(at[i][j]) }, opt)
	auto, err := chooseMethod(r, opt)
	if err != nil {
		return nil, lots.Inputf(d.Source, "check the values", "%s: %v", where, err)
	}
	r.AutoMethod = auto
	r.Method = procedureMethod(opt.Method, auto)
	switch {
	case r.Method == LotAware:
		r.step("method", math.NaN(), math.NaN(), "lot-aware (the default)",
			"the handbook procedure's "+auto+" bound, lowered to either of two bounds that allow for lot-to-lot variation wherever it is lower: "+
				"the random-effects bound for normal lots by generalized pivotal quantities (Krishnamoorthy and Mathew 2004, Technometrics 46), "+
				"and the same bound on the logarithms of the values with Weibull values within lots and a lognormal lot factor "+
				"(smallest-extreme-value errors, their variance's spread matched by Satterthwaite's 1946 method); the lowest of the three bounds holds its confidence wherever any of them does")
	case opt.Method == Handbook:
		r.step("method", math.NaN(), math.NaN(), "handbook procedure chosen by the user",
			"the automatic choice of the handbook procedure, used as it is: "+auto)
	case r.Method != auto:
		r.step("method", math.NaN(), math.NaN(), "method forced to "+opt.Method,
			"the user chose the method; the handbook procedure would have used "+auto)
		r.warn("method forced to %s by the user; the handbook procedure would have used %s", opt.Method, auto)
	}
	if err := computeBasis(r, opt); err != nil {
		return nil, lots.Inputf(d.Source, "choose another method with --method, or test more specimens", "%s: %v", where, err)
	}
	campaignWarnings(r)
	return r, nil
}

func (r *Result) step(name string, stat, thr float64, decision, reason string) {
	r.Steps = append(r.Steps, Step{Step: name, Statistic: lots.Float(stat), Threshold: lots.Float(thr), Decision: decision, Reason: reason})
}

func (r *Result) warn(format string, args ...any) {
	r.Warnings = append(r.Warnings, fmt.Sprintf(format, args...))
}

func flatten(v [][]float64) []float64 {
	n := 0
	for _, x := range v {
		n += len(x)
	}
	out := make([]float64, 0, n)
	for _, x := range v {
		out = append(out, x...)
	}
	return out
}

// minScreen is the fewest values the outlier test is applied to.
const minScreen = 4

// screenOutliers runs the maximum normed residual test (iteratively, as in
// CMH-17-1G 8.3.3) within each lot of at least 4 values and over all data.
// Flagged values are reported and kept; id(i, j) is the specimen id of
// the j-th value of lot i.
func screenOutliers(r *Result, lotKeys []string, id func(lot, j int) string, opt Options) {
	flag := func(vals []float64, lotOf func(int) (string, string), within string) {
		if len(vals) < minScreen {
			return
		}
		res, err := stats.ScreenOutliers(vals, opt.OutlierAlpha, true)
		if err != nil {
			return // all equal within the lot: nothing to screen
		}
		for k, o := range res {
			// The k-th value flagged was tested among len(vals)-k values.
			// Below 4 values the test says little: at n = 3 the statistic
			// cannot exceed (n-1)/sqrt(n) = 1.1547 and the critical value
			// at alpha 0.05 is about 1.1543 (stats.MNRCritical), so almost
			// any unequal triple is "flagged". Such results are not used.
			if len(vals)-k < minScreen {
				break
			}
			lot, id := lotOf(o.Index)
			r.Outliers = append(r.Outliers, Outlier{Specimen: id, Lot: lot, Value: lots.Float(o.Value), Within: within,
				MNR: lots.Float(o.MNR), Critical: lots.Float(o.Critical)})
			r.step("outlier screen ("+within+")", o.MNR, o.Critical, "specimen "+id+" flagged as an outlier",
				fmt.Sprintf("maximum normed residual %.3f exceeds the critical value %.3f at alpha %g; kept unless excluded with a reason", o.MNR, o.Critical, opt.OutlierAlpha))
		}
	}
	for i, vals := range r.values {
		i := i
		flag(vals, func(j int) (string, string) { return lotKeys[i], id(i, j) }, "lot "+lotKeys[i])
	}
	// The lot of the j-th of all values: the last lot starting at or before j.
	start := make([]int, len(r.values))
	for i := 1; i < len(r.values); i++ {
		start[i] = start[i-1] + len(r.values[i-1])
	}
	flag(flatten(r.values), func(j int) (string, string) {
		i := sort.Search(len(start), func(i int) bool { return start[i] > j }) - 1
		return lotKeys[i], id(i, j-start[i])
	}, "all data")
	if len(r.Outliers) == 0 {
		r.step("outlier screen", math.NaN(), math.NaN(), "no outliers",
			fmt.Sprintf("maximum normed residual test at alpha %g within each lot of 4 or more values and over all data", opt.OutlierAlpha))
	} else {
		// A value flagged within its lot and over all data is one value:
		// count specimens, not flags.
		seen := map[string]bool{}
		for _, o := range r.Outliers {
			seen[o.Specimen] = true
		}
		r.warn("%d value(s) flagged as outliers (within a lot, over all data or both) and kept; investigate them and exclude only with a documented physical cause", len(seen))
	}
}
