// Package specimens plans how many specimens to test per lot: for a lot
// whose property has a given mean and SD, the probability that the
// one-sided normal tolerance bound of n values meets the specification
// limit, P(mean - k*SD >= L) = P(T >= k sqrt(n)) with T noncentral t
// (n-1 degrees of freedom, noncentrality sqrt(n)(mean - L)/SD) and k the
// exact one-sided tolerance factor (Owen 1968), for each n, and the
// smallest n at which it reaches a target.
package specimens

import (
	"fmt"
	"math"
	"strings"

	"lotproof/lots"
	"lotproof/lots/units"
	"lotproof/spec"
	"lotproof/stats"
)

// SearchLimit bounds the search for the smallest n.
const SearchLimit = 2000

// Options of a plan. Without a specification, Mean, SD and one of Min or
// Max (in Unit) describe the lot; with one, the limit, content,
// confidence and minimum specimens come from it and the mean and SD from
// the data, and the given values override them.
type Options struct {
	Property            string // property of the specification
	Mean, SD            float64
	Min, Max            float64
	Unit                string
	Content, Confidence float64
	Target              float64
	MinN, MaxN          int
	// Set tells which of mean, sd, min, max, content, confidence and
	// min-specimens were given.
	Set    map[string]bool
	System units.System // display unit system
}

// Row is the outlook for n specimens.
type Row struct {
	N    int        `json:"n"`
	K    lots.Float `json:"k"`
	Prob lots.Float `json:"probability"`
}

// Result of a plan; values are in Unit (the display unit).
type Result struct {
	Spec       string   `json:"spec,omitempty"`
	Source     string   `json:"source,omitempty"`
	Property   string   `json:"property,omitempty"`
	Unit       string   `json:"unit"`
	Mean       float64  `json:"mean"`
	SD         float64  `json:"sd"`
	Side       string   `json:"side"`
	Limit      float64  `json:"limit"`
	Margin     float64  `json:"margin"` // (mean - L)/SD or (U - mean)/SD
	Content    float64  `json:"content"`
	Confidence float64  `json:"confidence"`
	Target     float64  `json:"target"`
	MinN       int      `json:"min_specimens"`
	SmallestN  int      `json:"smallest_n"` // -1: not reachable, 0: beyond the search limit
	Rows       []Row    `json:"rows"`
	Reasons    []string `json:"reasons"`
	Method     string   `json:"method"`
	Cautions   []string `json:"cautions"`
}

// Caution is the statement every plan carries.
const Caution = "The planned probability assumes the lot's mean and SD are as given and the property is normal; it supports, and never replaces, the governing specification, local practice and the inspector's judgement."

// Check validates the options before anything is read: withSpec and
// withData tell whether a specification and a results file are given.
func (o Options) Check(withSpec, withData bool) error {
	if !(o.Target > 0 && o.Target < 1) {
		return fmt.Errorf("--target %g: expected a probability between 0 and 1", o.Target)
	}
	if o.MaxN < 2 || o.MaxN > 1000 {
		return fmt.Errorf("--max-n %d: expected 2 to 1000", o.MaxN)
	}
	if withSpec {
		if !withData || o.Property == "" {
			return fmt.Errorf("--spec needs --property and a results file")
		}
		return nil
	}
	if withData {
		return fmt.Errorf("a results file is used only with --spec")
	}
	if !o.Set["mean"] || !o.Set["sd"] || o.Set["min"] == o.Set["max"] {
		return fmt.Errorf("give --mean, --sd and one of --min or --max (or --spec, --property and a results file)")
	}
	return nil
}

// Limit returns the specification's limit of property, or an error
// located in the specification.
func Limit(s *spec.Spec, property string) (spec.Limit, error) {
	l, ok := s.Limit(property)
	if !ok {
		return l, lots.Inputf(s.Source, "choose a property the specification names", "%s has no property %q", s.Label(), property)
	}
	return l, nil
}

// Plan gives the probability of a conforming verdict for each n from the
// minimum to o.MaxN and the smallest n reaching o.Target. With a
// specification s (nil for none), d holds the lots (grouped by by) of
// its material whose grand mean and pooled within-lot SD describe a
// typical lot.
func Plan(o Options, s *spec.Spec, d *lots.Dataset, by lots.GroupBy) (Result, error) {
	if err := o.Check(s != nil, d != nil); err != nil {
		return Result{}, err
	}
	res := Result{Target: o.Target, Method: "P(mean - k*SD >= L) = P(T >= k sqrt(n)), T noncentral t with n-1 df and noncentrality sqrt(n) (mean - L)/SD, k the exact one-sided normal tolerance factor (Owen 1968)",
		Cautions: []string{Caution}, Reasons: []string{}}
	var u units.Unit
	var mean, sd, limit float64 // internal units
	side := "min"
	if s != nil {
		l, err := Limit(s, o.Property)
		if err != nil {
			return Result{}, err
		}
		pi := d.Property(o.Property)
		if pi < 0 {
			return Result{}, lots.Inputf(d.Source, "add the column or choose another property", "no property %q (columns: %v)", o.Property, d.PropertyNames())
		}
		if !units.Compatible(l.Unit, d.Properties[pi].Unit) {
			return Result{}, lots.Inputf(l.Where, "use the same quantity and scale in the specification and the data", "%s gives %q in %s but %s has it in %s", s.Label(), l.Property, l.Unit.Symbol, d.Source, d.Properties[pi].Unit.Symbol)
		}
		groups, err := d.Group(by, func(sp *lots.Specimen) bool {
			return strings.EqualFold(strings.TrimSpace(sp.Material), strings.TrimSpace(s.Material)) || sp.Material == ""
		})
		if err != nil {
			return Result{}, lots.Inputf(d.Source, "group by lot, or fill the heat column", "%v", err)
		}
		sum, cnt, ss, df := 0.0, 0, 0.0, 0
		for _, g := range groups {
			vals, _ := d.Values(pi, g.Specimens)
			if len(vals) == 0 {
				continue
			}
			m := 0.0
			for _, v := range vals {
				m += v
			}
			m /= float64(len(vals))
			for _, v := range vals {
				ss += (v - m) * (v - m)
			}
			sum += m * float64(len(vals))
			cnt += len(vals)
			df += len(vals) - 1
		}
		if cnt == 0 || df == 0 {
			return Result{}, lots.Inputf(d.Source, "give a file with lots of "+s.Material, "no lots with at least two values of %q for material %q", o.Property, s.Material)
		}
		mean, sd = sum/float64(cnt), math.Sqrt(ss/float64(df))
		u = d.Properties[pi].Unit
		if o.Set["mean"] {
			mean = u.ToInternal(o.Mean)
		}
		if o.Set["sd"] {
			sd = u.ToInternal(o.SD)
		}
		if !(sd > 0) {
			return Result{}, lots.Inputf(d.Source, "check the data", "the pooled within-lot SD of %q is zero", o.Property)
		}
		switch {
		case l.HasMin() && l.HasMax():
			if (l.Max-mean)/sd < (mean-l.Min)/sd {
				side, limit = "max", l.Max
			} else {
				limit = l.Min
			}
		case l.HasMax():
			side, limit = "max", l.Max
		default:
			limit = l.Min
		}
		r := s.Acceptance
		res.Content, res.Confidence, res.MinN = r.Content, r.Confidence, r.MinSpecimens
		if o.Set["content"] {
			res.Content = o.Content
		}
		if o.Set["confidence"] {
			res.Confidence = o.Confidence
		}
		if o.Set["min-specimens"] {
			res.MinN = o.MinN
		}
		res.Spec, res.Source, res.Property = s.Label(), d.Source, l.Property
		res.Reasons = append(res.Reasons, fmt.Sprintf("mean and pooled within-lot SD of %d values in %d lots of %s", cnt, len(groups), s.Material))
	} else {
		var err error
		if u, err = units.Parse(o.Unit); err != nil {
			return Result{}, err
		}
		mean, sd = u.ToInternal(o.Mean), u.ToInternal(o.SD)
		limit = u.ToInternal(o.Min)
		if o.Set["max"] {
			side, limit = "max", u.ToInternal(o.Max)
		}
		for _, v := range []float64{mean, sd, limit} {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return Result{}, fmt.Errorf("--mean, --sd and the limit must be finite")
			}
		}
		if !(sd > 0) {
			return Result{}, fmt.Errorf("--sd %g must be positive", o.SD)
		}
		res.Content, res.Confidence, res.MinN = o.Content, o.Confidence, o.MinN
	}
	for _, r := range []struct {
		name string
		v    float64
	}{{"content", res.Content}, {"confidence", res.Confidence}} {
		if !(r.v >= 0.5 && r.v < 1) {
			return Result{}, fmt.Errorf("--%s %g: expected a proportion in [0.5, 1)", r.name, r.v)
		}
	}
	if res.MinN < 2 || res.MinN > o.MaxN {
		return Result{}, fmt.Errorf("--min-specimens %d: expected 2 to --max-n (%d)", res.MinN, o.MaxN)
	}
	margin := (mean - limit) / sd
	if side == "max" {
		margin = (limit - mean) / sd
	}
	disp := u.Display(o.System)
	res.Unit, res.Mean, res.SD, res.Limit, res.Side, res.Margin = disp.Symbol, disp.FromInternal(mean), disp.FromInternal(sd), disp.FromInternal(limit), side, margin
	prob := func(n int) (float64, float64, error) {
		k, err := stats.NormalK(n, res.Content, res.Confidence)
		if err != nil {
			return 0, 0, err
		}
		p, err := stats.ToleranceBoundPassProb(n, res.Content, res.Confidence, margin)
		return k, p, err
	}
	for n := res.MinN; n <= o.MaxN; n++ {
		k, p, err := prob(n)
		if err != nil {
			return Result{}, err
		}
		res.Rows = append(res.Rows, Row{N: n, K: lots.Float(k), Prob: lots.Float(p)})
		if res.SmallestN == 0 && p >= o.Target {
			res.SmallestN = n
		}
	}
	zp := -math.Sqrt2 * math.Erfcinv(2*res.Content)
	if res.SmallestN == 0 {
		if margin <= zp {
			res.SmallestN = -1
			res.Reasons = append(res.Reasons, fmt.Sprintf("not reachable: the mean is %.3f standard deviations inside the limit, not more than %.3f (the standard normal quantile of the content), so the probability does not grow towards 1 with more specimens", margin, zp))
		} else {
			for n := o.MaxN + 1; n <= SearchLimit; n++ {
				_, p, err := prob(n)
				if err != nil {
					return Result{}, err
				}
				if p >= o.Target {
					res.SmallestN = n
					break
				}
			}
			if res.SmallestN == 0 {
				res.Reasons = append(res.Reasons, fmt.Sprintf("more than %d specimens would be needed", SearchLimit))
			}
		}
	}
	if res.SmallestN > 0 {
		res.Reasons = append(res.Reasons, fmt.Sprintf("%d specimens give probability %.3g or more of a conforming verdict (first n from %d at which the target is reached)", res.SmallestN, o.Target, res.MinN))
	}
	return res, nil
}
