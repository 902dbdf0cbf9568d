// Package equivalence tests new lots against a qualification baseline with
// the mean-and-minimum equivalence test (Vangel 2002, Technometrics 44:242;
// CMH-17-1G Vol. 1 section 8.4.1): a lot of n values is equivalent to a
// baseline with mean M and standard deviation S when its mean is at least
// M - k_mean*S and its minimum at least M - k_min*S, with the factors from
// stats.MeanMinFactors.
package equivalence

import (
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"

	"lotproof/lots"
	"lotproof/lots/units"
	"lotproof/stats"
)

// Options of a test. Mean and SD are the baseline in Unit (default: the
// tested column's unit, else MPa).
type Options struct {
	Mean, SD float64
	Unit     string
	N        int     // lot size for which to give the limits (0: none)
	Alpha    float64 // probability that a lot from the baseline fails
	Property string  // column to test (with data)
	Material string  // test only lots of this material (with data)
	// AllMaterials tests the lots of every material against the one
	// baseline; without it, data holding several materials is refused.
	AllMaterials bool
	System       units.System // display unit system
}

// FactorRow is the pair of factors and limits for one lot size.
type FactorRow struct {
	N         int        `json:"n"`
	KMin      float64    `json:"k_min"`
	KMean     float64    `json:"k_mean"`
	AlphaEach float64    `json:"alpha_each"`
	MinLimit  lots.Float `json:"min_limit"`
	MeanLimit lots.Float `json:"mean_limit"`
}

// Lot is the verdict on one lot.
type Lot struct {
	Lot       string     `json:"lot"`
	Supplier  string     `json:"supplier"`
	N         int        `json:"n"`
	Mean      lots.Float `json:"mean"`
	Min       lots.Float `json:"min"`
	MeanLimit lots.Float `json:"mean_limit"`
	MinLimit  lots.Float `json:"min_limit"`
	Verdict   string     `json:"verdict"` // "equivalent", "not equivalent", "not tested"
	Reasons   []string   `json:"reasons"`
}

// Result of a test; values are in Unit (the display unit).
type Result struct {
	Source       string      `json:"source,omitempty"`
	Digest       string      `json:"sha256,omitempty"`
	Property     string      `json:"property,omitempty"`
	Unit         string      `json:"unit"`
	BaselineMean float64     `json:"baseline_mean"`
	BaselineSD   float64     `json:"baseline_sd"`
	Alpha        float64     `json:"alpha"`
	Factors      []FactorRow `json:"factors"`
	Lots         []Lot       `json:"lots,omitempty"`
	Method       string      `json:"method"`
	Cautions     []string    `json:"cautions"`
}

// AllEquivalent reports whether every tested lot is equivalent (no lot
// failed and none could not be tested).
func (r Result) AllEquivalent() bool {
	for _, l := range r.Lots {
		if l.Verdict != "equivalent" {
			return false
		}
	}
	return true
}

// Caution is the statement every equivalence result carries.
const Caution = "An equivalence result is statistical support for the engineer's decision; it does not replace the governing specification, the qualification program's rules, regulations or licensed engineering judgement. The baseline mean and SD are treated as known, and values are assumed normal."

const method = "mean-and-minimum test (Vangel 2002; CMH-17-1G 8.4.1): factors with equal individual risks and overall risk alpha, from the joint distribution of the mean and minimum of n normal values by numerical convolution (Romberg-extrapolated trapezoid)"

// Check validates the options before any data is read; withData tells
// whether a results file will be tested.
func (o Options) Check(withData bool) error {
	if !(o.Alpha > 0 && o.Alpha < 0.5) {
		return fmt.Errorf("--alpha %g: expected a probability between 0 and 0.5", o.Alpha)
	}
	if math.IsNaN(o.Mean) || math.IsInf(o.Mean, 0) || !(o.SD > 0) || math.IsInf(o.SD, 0) {
		return fmt.Errorf("--baseline-mean must be finite and --baseline-sd positive (got %g, %g)", o.Mean, o.SD)
	}
	if o.N != 0 && (o.N < 2 || o.N > 200) {
		return fmt.Errorf("--n %d: expected 2 to 200 specimens", o.N)
	}
	if !withData && o.N == 0 {
		return fmt.Errorf("give --n, or a results file and --property")
	}
	if !withData && o.Property != "" {
		return fmt.Errorf("--property needs a results file")
	}
	if withData && o.Property == "" {
		return fmt.Errorf("--property is required with a results file")
	}
	return nil
}

// Test gives the limits for o.N and, with a dataset d (nil for none),
// tests each of its groups (by lot or heat) of o.Material in o.Property
// with the factors for its own size.
func Test(d *lots.Dataset, by lots.GroupBy, o Options) (Result, error) {
	t, err := NewTester(d, o)
	if err != nil {
		return Result{}, err
	}
	if d != nil {
		err := d.ScanLots(lots.LotScan{By: by, Keep: t.Keep(nil), Lot: t.Lot})
		if err != nil {
			return Result{}, lots.GroupInputError(d.Source, err)
		}
	}
	return t.Result(d)
}

// Tester tests lots one at a time (Lot), for a file read lot by lot;
// Result gives the whole outcome.
type Tester struct {
	o        Options
	prop     int // the tested column; -1 without data
	mu, sd   float64
	disp     units.Unit
	res      Result
	factors  map[int]stats.EquivalenceFactors
	material map[string]bool // lower-case materials of the lots seen
	mats     []string        // the same, quoted as given, in order
}

// NewTester checks the options and, with data (d holds at least the
// source and the property columns), the tested column and the baseline
// unit.
func NewTester(d *lots.Dataset, o Options) (*Tester, error) {
	if err := o.Check(d != nil); err != nil {
		return nil, err
	}
	prop := -1
	if d != nil {
		if prop = d.Property(o.Property); prop < 0 {
			return nil, lots.Inputf(d.Source, "choose one of the file's property columns", "no property %q (columns: %v)", o.Property, d.PropertyNames())
		}
	}
	// Baseline unit.
	var bu units.Unit
	var err error
	switch {
	case o.Unit != "":
		if bu, err = units.Parse(o.Unit); err != nil {
			return nil, err
		}
	case d != nil:
		bu = d.Properties[prop].Unit
	default:
		bu, _ = units.Parse("MPa")
	}
	if d != nil && !units.Compatible(bu, d.Properties[prop].Unit) {
		return nil, fmt.Errorf("--unit %s cannot be compared with %s in %s", bu.Symbol, d.Properties[prop].Unit.Symbol, d.Source)
	}
	t := &Tester{o: o, prop: prop, mu: bu.ToInternal(o.Mean), sd: bu.ToInternal(o.SD), disp: bu,
		factors: map[int]stats.EquivalenceFactors{}, material: map[string]bool{}}
	if d != nil {
		t.disp = d.Properties[prop].Unit.Display(o.System)
	} else if bu.Quantity != units.Hardness {
		t.disp = bu.Display(o.System)
	}
	t.res = Result{Unit: t.disp.Symbol, BaselineMean: t.disp.FromInternal(t.mu), BaselineSD: t.disp.FromInternal(t.sd), Alpha: o.Alpha,
		Method: method, Cautions: []string{Caution}}
	if o.N > 0 {
		if _, err := t.factor(o.N); err != nil {
			return nil, err
		}
	}
	return t, nil
}

// Keep is the specimen filter of the lots to test (those of o.Material),
// nil when every specimen is tested. Every specimen of the input is shown
// to it in file order; each is passed on to see first, when set.
func (t *Tester) Keep(see func(*lots.Specimen)) func(*lots.Specimen) bool {
	want := strings.TrimSpace(t.o.Material)
	switch {
	case want == "" && see == nil:
		return nil
	case want == "":
		return func(s *lots.Specimen) bool { see(s); return true }
	}
	return func(s *lots.Specimen) bool {
		if see != nil {
			see(s)
		}
		return strings.EqualFold(strings.TrimSpace(s.Material), want)
	}
}

func (t *Tester) factor(n int) (stats.EquivalenceFactors, error) {
	if f, ok := t.factors[n]; ok {
		return f, nil
	}
	f, err := stats.MeanMinFactors(n, t.o.Alpha)
	if err != nil {
		return f, err
	}
	t.factors[n] = f
	return f, nil
}

func (t *Tester) show(v float64) lots.Float { return lots.Float(t.disp.FromInternal(v)) }

// Lot tests one lot (of the kept specimens), in order of first appearance.
func (t *Tester) Lot(g *lots.Lot) error {
	if m := strings.TrimSpace(g.Material); !t.material[strings.ToLower(m)] {
		t.material[strings.ToLower(m)] = true
		t.mats = append(t.mats, strconv.Quote(m))
	}
	vals, _ := g.Present(t.prop)
	l := Lot{Lot: g.Key, Supplier: g.Supplier, N: len(vals), Mean: lots.NaN, Min: lots.NaN, MeanLimit: lots.NaN, MinLimit: lots.NaN, Reasons: []string{}}
	defer func() { t.res.Lots = append(t.res.Lots, l) }()
	if len(vals) < 2 || len(vals) > 200 {
		l.Verdict = "not tested"
		l.Reasons = append(l.Reasons, fmt.Sprintf("%d values; the test needs 2 to 200", len(vals)))
		return nil
	}
	f, err := t.factor(len(vals))
	if err != nil {
		return err
	}
	sum, mn := 0.0, math.Inf(1)
	for _, v := range vals {
		sum += v
		mn = math.Min(mn, v)
	}
	mean := sum / float64(len(vals))
	ml, nl := t.mu-f.KMean*t.sd, t.mu-f.KMin*t.sd
	sym := t.disp.Symbol
	l.Mean, l.Min, l.MeanLimit, l.MinLimit = t.show(mean), t.show(mn), t.show(ml), t.show(nl)
	l.Verdict = "equivalent"
	if mean < ml {
		l.Verdict = "not equivalent"
		l.Reasons = append(l.Reasons, fmt.Sprintf("mean %.4g is below the mean limit %.4g %s", float64(l.Mean), float64(l.MeanLimit), sym))
	}
	if mn < nl {
		l.Verdict = "not equivalent"
		l.Reasons = append(l.Reasons, fmt.Sprintf("minimum %.4g is below the minimum-individual limit %.4g %s", float64(l.Min), float64(l.MinLimit), sym))
	}
	if l.Verdict == "equivalent" {
		l.Reasons = append(l.Reasons, "mean and minimum meet both limits")
	}
	return nil
}

// Result is the outcome, once every lot of d (nil without data) has been
// tested. It refuses data of several materials unless o.Material or
// o.AllMaterials says which to test.
func (t *Tester) Result(d *lots.Dataset) (Result, error) {
	res := t.res
	if d != nil {
		if len(res.Lots) == 0 {
			return Result{}, lots.Inputf(d.Source, "check --material against the file's material column", "no lots of material %q", t.o.Material)
		}
		if t.o.Material == "" && !t.o.AllMaterials && len(t.mats) > 1 {
			return Result{}, fmt.Errorf("%s holds lots of %d materials (%s), and a baseline describes one: give --material, or --all-materials to test them all against this baseline", d.Source, len(t.mats), strings.Join(t.mats, ", "))
		}
		res.Source, res.Digest, res.Property = d.Source, d.Digest, d.Properties[t.prop].Name
	}
	ns := make([]int, 0, len(t.factors))
	for n := range t.factors {
		ns = append(ns, n)
	}
	sort.Ints(ns)
	for _, n := range ns {
		f := t.factors[n]
		res.Factors = append(res.Factors, FactorRow{N: n, KMin: f.KMin, KMean: f.KMean, AlphaEach: f.AlphaEach,
			MinLimit: t.show(t.mu - f.KMin*t.sd), MeanLimit: t.show(t.mu - f.KMean*t.sd)})
	}
	return res, nil
}
