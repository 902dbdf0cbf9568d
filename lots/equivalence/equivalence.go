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
	if err := o.Check(d != nil); err != nil {
		return Result{}, err
	}
	prop := -1
	if d != nil {
		if prop = d.Property(o.Property); prop < 0 {
			return Result{}, lots.Inputf(d.Source, "choose one of the file's property columns", "no property %q (columns: %v)", o.Property, d.PropertyNames())
		}
	}
	// Baseline unit.
	var bu units.Unit
	var err error
	switch {
	case o.Unit != "":
		if bu, err = units.Parse(o.Unit); err != nil {
			return Result{}, err
		}
	case d != nil:
		bu = d.Properties[prop].Unit
	default:
		bu, _ = units.Parse("MPa")
	}
	if d != nil && !units.Compatible(bu, d.Properties[prop].Unit) {
		return Result{}, fmt.Errorf("--unit %s cannot be compared with %s in %s", bu.Symbol, d.Properties[prop].Unit.Symbol, d.Source)
	}
	mu, sd := bu.ToInternal(o.Mean), bu.ToInternal(o.SD)
	disp := bu
	if d != nil {
		disp = d.Properties[prop].Unit.Display(o.System)
	} else if bu.Quantity != units.Hardness {
		disp = bu.Display(o.System)
	}
	show := func(v float64) lots.Float { return lots.Float(disp.FromInternal(v)) }
	res := Result{Unit: disp.Symbol, BaselineMean: disp.FromInternal(mu), BaselineSD: disp.FromInternal(sd), Alpha: o.Alpha,
		Method: method, Cautions: []string{Caution}}
	factors := map[int]stats.EquivalenceFactors{}
	factor := func(n int) (stats.EquivalenceFactors, error) {
		if f, ok := factors[n]; ok {
			return f, nil
		}
		f, err := stats.MeanMinFactors(n, o.Alpha)
		if err != nil {
			return f, err
		}
		factors[n] = f
		return f, nil
	}
	if o.N > 0 {
		if _, err := factor(o.N); err != nil {
			return Result{}, err
		}
	}
	if d != nil {
		res.Source, res.Digest, res.Property = d.Source, d.Digest, d.Properties[prop].Name
		groups, err := groupsOf(d, by, o)
		if err != nil {
			return Result{}, err
		}
		for _, g := range groups {
			vals, _ := d.Values(prop, g.Specimens)
			l := Lot{Lot: g.Key, Supplier: g.Supplier, N: len(vals), Mean: lots.NaN, Min: lots.NaN, MeanLimit: lots.NaN, MinLimit: lots.NaN, Reasons: []string{}}
			if len(vals) < 2 || len(vals) > 200 {
				l.Verdict = "not tested"
				l.Reasons = append(l.Reasons, fmt.Sprintf("%d values; the test needs 2 to 200", len(vals)))
				res.Lots = append(res.Lots, l)
				continue
			}
			f, err := factor(len(vals))
			if err != nil {
				return Result{}, err
			}
			sum, mn := 0.0, math.Inf(1)
			for _, v := range vals {
				sum += v
				mn = math.Min(mn, v)
			}
			mean := sum / float64(len(vals))
			ml, nl := mu-f.KMean*sd, mu-f.KMin*sd
			l.Mean, l.Min, l.MeanLimit, l.MinLimit = show(mean), show(mn), show(ml), show(nl)
			l.Verdict = "equivalent"
			if mean < ml {
				l.Verdict = "not equivalent"
				l.Reasons = append(l.Reasons, fmt.Sprintf("mean %.4g is below the mean limit %.4g %s", float64(l.Mean), float64(l.MeanLimit), disp.Symbol))
			}
			if mn < nl {
				l.Verdict = "not equivalent"
				l.Reasons = append(l.Reasons, fmt.Sprintf("minimum %.4g is below the minimum-individual limit %.4g %s", float64(l.Min), float64(l.MinLimit), disp.Symbol))
			}
			if l.Verdict == "equivalent" {
				l.Reasons = append(l.Reasons, "mean and minimum meet both limits")
			}
			res.Lots = append(res.Lots, l)
		}
	}
	ns := make([]int, 0, len(factors))
	for n := range factors {
		ns = append(ns, n)
	}
	sort.Ints(ns)
	for _, n := range ns {
		f := factors[n]
		res.Factors = append(res.Factors, FactorRow{N: n, KMin: f.KMin, KMean: f.KMean, AlphaEach: f.AlphaEach,
			MinLimit: show(mu - f.KMin*sd), MeanLimit: show(mu - f.KMean*sd)})
	}
	return res, nil
}

// groupsOf groups d's specimens of o.Material and refuses data of several
// materials unless o.Material or o.AllMaterials says which to test.
func groupsOf(d *lots.Dataset, by lots.GroupBy, o Options) ([]lots.Group, error) {
	var keep func(*lots.Specimen) bool
	if o.Material != "" {
		keep = func(s *lots.Specimen) bool {
			return strings.EqualFold(strings.TrimSpace(s.Material), strings.TrimSpace(o.Material))
		}
	}
	groups, err := d.Group(by, keep)
	if err != nil {
		return nil, lots.Inputf(d.Source, "group by lot, or fill the heat column", "%v", err)
	}
	if len(groups) == 0 {
		return nil, lots.Inputf(d.Source, "check --material against the file's material column", "no lots of material %q", o.Material)
	}
	if o.Material == "" && !o.AllMaterials {
		var mats []string
		seen := map[string]bool{}
		for _, g := range groups {
			if m := strings.TrimSpace(g.Material); !seen[strings.ToLower(m)] {
				seen[strings.ToLower(m)] = true
				mats = append(mats, strconv.Quote(m))
			}
		}
		if len(mats) > 1 {
			return nil, fmt.Errorf("%s holds lots of %d materials (%s), and a baseline describes one: give --material, or --all-materials to test them all against this baseline", d.Source, len(mats), strings.Join(mats, ", "))
		}
	}
	return groups, nil
}
