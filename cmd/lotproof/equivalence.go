package main

import (
	"fmt"
	"io"
	"math"
	"sort"
	"strconv"
	"strings"

	"github.com/spf13/cobra"

	"lotproof/lots"
	"lotproof/lots/render"
	"lotproof/lots/units"
	"lotproof/stats"
)

type equivalenceOptions struct {
	Data     string // optional results file
	Property string
	Material string
	AllMat   bool // test lots of several materials against one baseline
	Mean, SD float64
	Unit     string
	N        int
	Alpha    float64
	Input    inputOptions
	Table    tableOption
	Out      output
}

func newEquivalenceCmd(g *globalOptions, st streams) *cobra.Command {
	var o equivalenceOptions
	cmd := &cobra.Command{
		Use:   "equivalence --baseline-mean M --baseline-sd S [--n N] [--alpha A] [DATA --property P]",
		Short: "Test new lots for equivalence to a qualification baseline by their mean and minimum",
		Long: `equivalence computes the two acceptance limits of the mean-and-minimum
equivalence test (Vangel 2002, Technometrics 44:242; CMH-17-1G Vol. 1
section 8.4.1): a lot of n values is equivalent to a baseline with mean M and
standard deviation S when

  its mean    >= M - k_mean * S   and
  its minimum >= M - k_min  * S,

with the factors chosen so that a lot drawn from the baseline fails with
probability alpha (default 0.05), the two criteria failing separately with
equal probability. The factors are computed from the joint distribution of
the mean and the minimum of n normal values by numerical convolution.

With --n the limits for that lot size are printed. With a results file DATA
and --property, every lot is tested with the factors for its own size.
Baseline values are in --unit (default: the data column's unit, else MPa).
Exit status 1 when any lot fails.`,
		Args: maxArgs(1, "one results file"),
		RunE: func(cmd *cobra.Command, args []string) error {
			var err error
			if o.Out, err = g.resolve(st); err != nil {
				return err
			}
			if len(args) == 1 {
				o.Data = args[0]
			}
			if !cmd.Flags().Changed("baseline-mean") || !cmd.Flags().Changed("baseline-sd") {
				return usageError{fmt.Errorf("--baseline-mean and --baseline-sd are required")}
			}
			return runEquivalence(o, st)
		},
	}
	cmd.Flags().Float64Var(&o.Mean, "baseline-mean", 0, "baseline (qualification) mean, in --unit")
	cmd.Flags().Float64Var(&o.SD, "baseline-sd", 0, "baseline standard deviation, in --unit")
	cmd.Flags().StringVar(&o.Unit, "unit", "", "unit of the baseline values (default: the data column's unit, else MPa)")
	cmd.Flags().IntVar(&o.N, "n", 0, "specimens per lot for which to print the limits")
	cmd.Flags().Float64Var(&o.Alpha, "alpha", 0.05, "probability that a lot from the baseline fails the test")
	cmd.Flags().StringVar(&o.Property, "property", "", "property column to test (with DATA)")
	cmd.Flags().StringVar(&o.Material, "material", "", "test only lots of this material (with DATA)")
	cmd.Flags().BoolVar(&o.AllMat, "all-materials", false, "test the lots of every material in DATA against the one baseline (default: refused when DATA holds several materials)")
	addInputFlags(cmd, &o.Input)
	addTableFlag(cmd, &o.Table, "limits", "lots")
	return cmd
}

func init() { register(newEquivalenceCmd) }

type equivalenceFactorRow struct {
	N         int        `json:"n"`
	KMin      float64    `json:"k_min"`
	KMean     float64    `json:"k_mean"`
	AlphaEach float64    `json:"alpha_each"`
	MinLimit  lots.Float `json:"min_limit"`
	MeanLimit lots.Float `json:"mean_limit"`
}

type equivalenceLot struct {
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

type equivalenceResult struct {
	Source       string                 `json:"source,omitempty"`
	Digest       string                 `json:"sha256,omitempty"`
	Property     string                 `json:"property,omitempty"`
	Unit         string                 `json:"unit"`
	BaselineMean float64                `json:"baseline_mean"`
	BaselineSD   float64                `json:"baseline_sd"`
	Alpha        float64                `json:"alpha"`
	Factors      []equivalenceFactorRow `json:"factors"`
	Lots         []equivalenceLot       `json:"lots,omitempty"`
	Method       string                 `json:"method"`
	Cautions     []string               `json:"cautions"`
}

const equivalenceCaution = "An equivalence result is statistical support for the engineer's decision; it does not replace the governing specification, the qualification program's rules, regulations or licensed engineering judgement. The baseline mean and SD are treated as known, and values are assumed normal."

func runEquivalence(o equivalenceOptions, st streams) error {
	if err := o.Table.check(); err != nil {
		return err
	}
	if !(o.Alpha > 0 && o.Alpha < 0.5) {
		return usageError{fmt.Errorf("--alpha %g: expected a probability between 0 and 0.5", o.Alpha)}
	}
	if math.IsNaN(o.Mean) || math.IsInf(o.Mean, 0) || !(o.SD > 0) || math.IsInf(o.SD, 0) {
		return usageError{fmt.Errorf("--baseline-mean must be finite and --baseline-sd positive (got %g, %g)", o.Mean, o.SD)}
	}
	if o.N != 0 && (o.N < 2 || o.N > 200) {
		return usageError{fmt.Errorf("--n %d: expected 2 to 200 specimens", o.N)}
	}
	if o.Data == "" && o.N == 0 {
		return usageError{fmt.Errorf("give --n, or a results file and --property")}
	}
	if o.Data == "" && o.Property != "" {
		return usageError{fmt.Errorf("--property needs a results file")}
	}
	var d *lots.Dataset
	var by lots.GroupBy
	prop := -1
	var err error
	if o.Data != "" {
		if o.Property == "" {
			return usageError{fmt.Errorf("--property is required with a results file")}
		}
		if d, by, err = readData(o.Data, o.Input, st); err != nil {
			return err
		}
		if prop = d.Property(o.Property); prop < 0 {
			return lots.Inputf(d.Source, "choose one of the file's property columns", "no property %q (columns: %v)", o.Property, d.PropertyNames())
		}
	}
	// Baseline unit.
	var bu units.Unit
	switch {
	case o.Unit != "":
		if bu, err = units.Parse(o.Unit); err != nil {
			return usageError{err}
		}
	case d != nil:
		bu = d.Properties[prop].Unit
	default:
		bu, _ = units.Parse("MPa")
	}
	if d != nil && !units.Compatible(bu, d.Properties[prop].Unit) {
		return usageError{fmt.Errorf("--unit %s cannot be compared with %s in %s", bu.Symbol, d.Properties[prop].Unit.Symbol, d.Source)}
	}
	mu, sd := bu.ToInternal(o.Mean), bu.ToInternal(o.SD)
	disp := bu
	if d != nil {
		disp = d.Properties[prop].Unit.Display(o.Out.System)
	} else if bu.Quantity != units.Hardness {
		disp = bu.Display(o.Out.System)
	}
	show := func(v float64) lots.Float { return lots.Float(disp.FromInternal(v)) }
	res := equivalenceResult{Unit: disp.Symbol, BaselineMean: disp.FromInternal(mu), BaselineSD: disp.FromInternal(sd), Alpha: o.Alpha,
		Method:   "mean-and-minimum test (Vangel 2002; CMH-17-1G 8.4.1): factors with equal individual risks and overall risk alpha, from the joint distribution of the mean and minimum of n normal values by numerical convolution (Romberg-extrapolated trapezoid)",
		Cautions: []string{equivalenceCaution}}
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
			return err
		}
	}
	anyFail := false
	if d != nil {
		res.Source, res.Digest, res.Property = d.Source, d.Digest, d.Properties[prop].Name
		var keep func(*lots.Specimen) bool
		if o.Material != "" {
			keep = func(s *lots.Specimen) bool {
				return strings.EqualFold(strings.TrimSpace(s.Material), strings.TrimSpace(o.Material))
			}
		}
		groups, err := d.Group(by, keep)
		if err != nil {
			return lots.Inputf(d.Source, "group by lot, or fill the heat column", "%v", err)
		}
		if len(groups) == 0 {
			return lots.Inputf(d.Source, "check --material against the file's material column", "no lots of material %q", o.Material)
		}
		if o.Material == "" && !o.AllMat {
			var mats []string
			seen := map[string]bool{}
			for _, g := range groups {
				if m := strings.TrimSpace(g.Material); !seen[strings.ToLower(m)] {
					seen[strings.ToLower(m)] = true
					mats = append(mats, strconv.Quote(m))
				}
			}
			if len(mats) > 1 {
				return usageError{fmt.Errorf("%s holds lots of %d materials (%s), and a baseline describes one: give --material, or --all-materials to test them all against this baseline", d.Source, len(mats), strings.Join(mats, ", "))}
			}
		}
		for _, g := range groups {
			vals, _ := d.Values(prop, g.Specimens)
			l := equivalenceLot{Lot: g.Key, Supplier: g.Supplier, N: len(vals), Mean: lots.NaN, Min: lots.NaN, MeanLimit: lots.NaN, MinLimit: lots.NaN, Reasons: []string{}}
			if len(vals) < 2 || len(vals) > 200 {
				l.Verdict = "not tested"
				l.Reasons = append(l.Reasons, fmt.Sprintf("%d values; the test needs 2 to 200", len(vals)))
				anyFail = true
				res.Lots = append(res.Lots, l)
				continue
			}
			f, err := factor(len(vals))
			if err != nil {
				return err
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
			} else {
				anyFail = true
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
		res.Factors = append(res.Factors, equivalenceFactorRow{N: n, KMin: f.KMin, KMean: f.KMean, AlphaEach: f.AlphaEach,
			MinLimit: show(mu - f.KMin*sd), MeanLimit: show(mu - f.KMean*sd)})
	}
	err = emit(st.Out, func(w io.Writer) error {
		if o.Out.Format == render.JSON {
			return render.WriteJSON(w, res)
		}
		var pr render.Resolution // of the lots' values (unknown without them)
		if d != nil && o.Out.Format == render.Text {
			pr = resolutionsOf(d, o.Out.System).Of("", res.Property)
		}
		ft := render.NewTable("Equivalence limits", ">n", ">alpha", ">k minimum", ">k mean", ">alpha each", ">min individual limit", ">mean limit", "unit")
		for _, f := range res.Factors {
			ft.Add(strconv.Itoa(f.N), render.N(o.Alpha, 4), render.Factor(f.KMin), render.Factor(f.KMean), render.F(f.AlphaEach, 5),
				pr.Stat(float64(f.MinLimit)), pr.Stat(float64(f.MeanLimit)), res.Unit)
		}
		ft.Note("Baseline mean %s %s, SD %s %s.", pr.Stat(res.BaselineMean), res.Unit, pr.Spread(res.BaselineSD), res.Unit)
		ft.Note("Method: %s.", res.Method)
		ft.Name = "limits"
		tables := []*render.Table{ft}
		if d != nil {
			lt := render.NewTable("Lots ("+res.Property+")", string(by), "supplier", ">n", ">mean", ">min", ">mean limit", ">min limit", "verdict", "reasons")
			for _, l := range res.Lots {
				lt.Add(l.Lot, l.Supplier, strconv.Itoa(l.N), pr.Stat(float64(l.Mean)), pr.Given(float64(l.Min)),
					pr.Stat(float64(l.MeanLimit)), pr.Stat(float64(l.MinLimit)), l.Verdict, joinReasons(l.Reasons))
			}
			lt.Note("Source %s, SHA-256 %s.", res.Source, res.Digest)
			lt.Name = "lots"
			tables = append(tables, lt)
		} else if o.Table.Name == "lots" {
			return usageError{fmt.Errorf("--table lots needs a results file and --property")}
		}
		tables[len(tables)-1].Note("Caution: %s", equivalenceCaution)
		tables, err := o.Table.pick(o.Out.Format, tables)
		if err != nil {
			return err
		}
		return writeTables(w, o.Out.Format, tables...)
	})
	if err != nil {
		return err
	}
	if anyFail {
		return verdictError{"one or more lots are not equivalent to the baseline (or could not be tested)"}
	}
	return nil
}

func joinReasons(r []string) string { return strings.Join(r, "; ") }
