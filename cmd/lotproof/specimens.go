package main

import (
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"github.com/spf13/cobra"

	"lotproof/lots"
	"lotproof/lots/render"
	"lotproof/lots/units"
	"lotproof/spec"
	"lotproof/stats"
)

type specimensOptions struct {
	Data                string
	Spec, Property      string
	Mean, SD            float64
	Min, Max            float64
	Unit                string
	Content, Confidence float64
	Target              float64
	MinN, MaxN          int
	set                 map[string]bool
	Input               inputOptions
	Out                 output
}

// specimensSearchLimit bounds the search for the smallest n.
const specimensSearchLimit = 2000

func newSpecimensCmd(g *globalOptions, st streams) *cobra.Command {
	var o specimensOptions
	cmd := &cobra.Command{
		Use:   "specimens --mean M --sd S --min L [--content p --confidence g] [--target 0.9] | --spec SPEC.yaml --property P DATA",
		Short: "Probability of a conforming verdict as the number of specimens grows",
		Long: `specimens plans how many specimens to test per lot. For a lot whose property
has mean M and standard deviation S, it prints, for each number of
specimens n, the probability that the one-sided (content p, confidence g)
tolerance bound meets the limit (mean - k*SD >= L, or mean + k*SD <= U),
computed exactly from the noncentral t distribution, and the smallest n at
which that probability reaches the target (default 0.9).

With --spec, --property and a results file DATA, the limit, content,
confidence and minimum specimens come from the specification, and M and S
from the lots of the specification's material in DATA (grand mean and
pooled within-lot SD: the outlook for a typical lot); --mean and --sd
override them. When the specification gives a minimum and a maximum, the
limit nearer the mean (in SDs) is used. The probability counts the
tolerance-bound criterion only; a specification that also rejects on
individual values lowers it slightly.`,
		Args: maxArgs(1, "one results file"),
		RunE: func(cmd *cobra.Command, args []string) error {
			var err error
			if o.Out, err = g.resolve(st); err != nil {
				return err
			}
			if len(args) == 1 {
				o.Data = args[0]
			}
			o.set = map[string]bool{}
			for _, f := range []string{"mean", "sd", "min", "max", "content", "confidence", "min-specimens"} {
				o.set[f] = cmd.Flags().Changed(f)
			}
			return runSpecimens(o, st)
		},
	}
	f := cmd.Flags()
	f.Float64Var(&o.Mean, "mean", 0, "lot mean, in --unit")
	f.Float64Var(&o.SD, "sd", 0, "lot standard deviation, in --unit")
	f.Float64Var(&o.Min, "min", 0, "specification minimum, in --unit")
	f.Float64Var(&o.Max, "max", 0, "specification maximum, in --unit (instead of --min)")
	f.StringVar(&o.Unit, "unit", "MPa", "unit of --mean, --sd, --min and --max")
	f.Float64Var(&o.Content, "content", 0.90, "content p of the tolerance bound")
	f.Float64Var(&o.Confidence, "confidence", 0.90, "confidence g of the tolerance bound")
	f.Float64Var(&o.Target, "target", 0.90, "wanted probability of a conforming verdict")
	f.IntVar(&o.MinN, "min-specimens", 2, "smallest number of specimens shown (the specification's minimum with --spec)")
	f.IntVar(&o.MaxN, "max-n", 30, "largest number of specimens shown")
	f.StringVar(&o.Spec, "spec", "", "specification file (YAML) giving the limit and rule")
	f.StringVar(&o.Property, "property", "", "property of the specification (with --spec)")
	addInputFlags(cmd, &o.Input)
	return cmd
}

func init() { register(newSpecimensCmd) }

type specimensRow struct {
	N    int        `json:"n"`
	K    lots.Float `json:"k"`
	Prob lots.Float `json:"probability"`
}

type specimensResult struct {
	Spec       string         `json:"spec,omitempty"`
	Source     string         `json:"source,omitempty"`
	Property   string         `json:"property,omitempty"`
	Unit       string         `json:"unit"`
	Mean       float64        `json:"mean"`
	SD         float64        `json:"sd"`
	Side       string         `json:"side"`
	Limit      float64        `json:"limit"`
	Margin     float64        `json:"margin"` // (mean - L)/SD or (U - mean)/SD
	Content    float64        `json:"content"`
	Confidence float64        `json:"confidence"`
	Target     float64        `json:"target"`
	MinN       int            `json:"min_specimens"`
	SmallestN  int            `json:"smallest_n"` // -1: not reachable, 0: beyond the search limit
	Rows       []specimensRow `json:"rows"`
	Reasons    []string       `json:"reasons"`
	Method     string         `json:"method"`
	Cautions   []string       `json:"cautions"`
}

const specimensCaution = "The planned probability assumes the lot's mean and SD are as given and the property is normal; it supports, and never replaces, the governing specification, local practice and the inspector's judgement."

func runSpecimens(o specimensOptions, st streams) error {
	if !(o.Target > 0 && o.Target < 1) {
		return usageError{fmt.Errorf("--target %g: expected a probability between 0 and 1", o.Target)}
	}
	if o.MaxN < 2 || o.MaxN > 1000 {
		return usageError{fmt.Errorf("--max-n %d: expected 2 to 1000", o.MaxN)}
	}
	res := specimensResult{Target: o.Target, Method: "P(mean - k*SD >= L) = P(T >= k sqrt(n)), T noncentral t with n-1 df and noncentrality sqrt(n) (mean - L)/SD, k the exact one-sided normal tolerance factor (Owen 1968)",
		Cautions: []string{specimensCaution}, Reasons: []string{}}
	var u units.Unit
	var mean, sd, limit float64 // internal units
	side := "min"
	if o.Spec != "" {
		if o.Data == "" || o.Property == "" {
			return usageError{fmt.Errorf("--spec needs --property and a results file")}
		}
		s, err := spec.ReadFile(o.Spec)
		if err != nil {
			return err
		}
		l, ok := s.Limit(o.Property)
		if !ok {
			return lots.Inputf(s.Source, "choose a property the specification names", "%s has no property %q", s.Label(), o.Property)
		}
		d, by, err := readData(o.Data, o.Input, st)
		if err != nil {
			return err
		}
		pi := d.Property(o.Property)
		if pi < 0 {
			return lots.Inputf(d.Source, "add the column or choose another property", "no property %q (columns: %v)", o.Property, d.PropertyNames())
		}
		if !units.Compatible(l.Unit, d.Properties[pi].Unit) {
			return lots.Inputf(l.Where, "use the same quantity and scale in the specification and the data", "%s gives %q in %s but %s has it in %s", s.Label(), l.Property, l.Unit.Symbol, d.Source, d.Properties[pi].Unit.Symbol)
		}
		groups, err := d.Group(by, func(sp *lots.Specimen) bool {
			return strings.EqualFold(strings.TrimSpace(sp.Material), strings.TrimSpace(s.Material)) || sp.Material == ""
		})
		if err != nil {
			return lots.Inputf(d.Source, "group by lot, or fill the heat column", "%v", err)
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
			return lots.Inputf(d.Source, "give a file with lots of "+s.Material, "no lots with at least two values of %q for material %q", o.Property, s.Material)
		}
		mean, sd = sum/float64(cnt), math.Sqrt(ss/float64(df))
		u = d.Properties[pi].Unit
		if o.set["mean"] {
			mean = u.ToInternal(o.Mean)
		}
		if o.set["sd"] {
			sd = u.ToInternal(o.SD)
		}
		if !(sd > 0) {
			return lots.Inputf(d.Source, "check the data", "the pooled within-lot SD of %q is zero", o.Property)
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
		if o.set["content"] {
			res.Content = o.Content
		}
		if o.set["confidence"] {
			res.Confidence = o.Confidence
		}
		if o.set["min-specimens"] {
			res.MinN = o.MinN
		}
		res.Spec, res.Source, res.Property = s.Label(), d.Source, l.Property
		res.Reasons = append(res.Reasons, fmt.Sprintf("mean and pooled within-lot SD of %d values in %d lots of %s", cnt, len(groups), s.Material))
	} else {
		if o.Data != "" {
			return usageError{fmt.Errorf("a results file is used only with --spec")}
		}
		if !o.set["mean"] || !o.set["sd"] || o.set["min"] == o.set["max"] {
			return usageError{fmt.Errorf("give --mean, --sd and one of --min or --max (or --spec, --property and a results file)")}
		}
		var err error
		if u, err = units.Parse(o.Unit); err != nil {
			return usageError{err}
		}
		mean, sd = u.ToInternal(o.Mean), u.ToInternal(o.SD)
		limit = u.ToInternal(o.Min)
		if o.set["max"] {
			side, limit = "max", u.ToInternal(o.Max)
		}
		for _, v := range []float64{mean, sd, limit} {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return usageError{fmt.Errorf("--mean, --sd and the limit must be finite")}
			}
		}
		if !(sd > 0) {
			return usageError{fmt.Errorf("--sd %g must be positive", o.SD)}
		}
		res.Content, res.Confidence, res.MinN = o.Content, o.Confidence, o.MinN
	}
	for _, r := range []struct {
		name string
		v    float64
	}{{"content", res.Content}, {"confidence", res.Confidence}} {
		if !(r.v >= 0.5 && r.v < 1) {
			return usageError{fmt.Errorf("--%s %g: expected a proportion in [0.5, 1)", r.name, r.v)}
		}
	}
	if res.MinN < 2 || res.MinN > o.MaxN {
		return usageError{fmt.Errorf("--min-specimens %d: expected 2 to --max-n (%d)", res.MinN, o.MaxN)}
	}
	margin := (mean - limit) / sd
	if side == "max" {
		margin = (limit - mean) / sd
	}
	disp := u.Display(o.Out.System)
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
			return err
		}
		res.Rows = append(res.Rows, specimensRow{N: n, K: lots.Float(k), Prob: lots.Float(p)})
		if res.SmallestN == 0 && p >= o.Target {
			res.SmallestN = n
		}
	}
	zp := -math.Sqrt2 * math.Erfcinv(2*res.Content)
	if res.SmallestN == 0 {
		if margin <= zp {
			res.SmallestN = -1
			res.Reasons = append(res.Reasons, fmt.Sprintf("not reachable: the mean is %.3f SD inside the limit, not more than z_p = %.3f, so the probability does not grow towards 1 with n", margin, zp))
		} else {
			for n := o.MaxN + 1; n <= specimensSearchLimit; n++ {
				_, p, err := prob(n)
				if err != nil {
					return err
				}
				if p >= o.Target {
					res.SmallestN = n
					break
				}
			}
			if res.SmallestN == 0 {
				res.Reasons = append(res.Reasons, fmt.Sprintf("more than %d specimens would be needed", specimensSearchLimit))
			}
		}
	}
	if res.SmallestN > 0 {
		res.Reasons = append(res.Reasons, fmt.Sprintf("%d specimens give probability %.3g or more of a conforming verdict (first n from %d at which the target is reached)", res.SmallestN, o.Target, res.MinN))
	}
	return emit(st.Out, func(w io.Writer) error {
		if o.Out.Format == render.JSON {
			return render.WriteJSON(w, res)
		}
		t := render.NewTable("Probability of a conforming verdict", ">n", ">k", ">probability", "target")
		for _, r := range res.Rows {
			mark := ""
			if r.N == res.SmallestN {
				mark = "reached"
			}
			t.Add(strconv.Itoa(r.N), render.F(float64(r.K), 4), render.F(float64(r.Prob), 4), mark)
		}
		word := "minimum"
		if side == "max" {
			word = "maximum"
		}
		t.Note("Mean %.5g %s, SD %.4g %s, %s %.5g %s: margin %.3f SD; content %g, confidence %g, target %g.", res.Mean, res.Unit, res.SD, res.Unit, word, res.Limit, res.Unit, margin, res.Content, res.Confidence, o.Target)
		if res.Spec != "" {
			t.Note("From %s, property %s, data %s.", res.Spec, res.Property, res.Source)
		}
		for _, r := range res.Reasons {
			t.Note("%s.", r)
		}
		t.Note("Method: %s.", res.Method)
		t.Note("Caution: %s", specimensCaution)
		return writeTables(w, o.Out.Format, t)
	})
}
