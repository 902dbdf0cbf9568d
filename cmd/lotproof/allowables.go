package main

import (
	"fmt"
	"io"
	"math"
	"os"
	"strconv"
	"strings"
	"time"

	"github.com/spf13/cobra"

	"lotproof/lots"
	"lotproof/lots/allowables"
	"lotproof/lots/progress"
	"lotproof/lots/render"
	"lotproof/lots/report"
)

type allowablesOptions struct {
	Data       string
	Input      inputOptions
	Properties []string
	AContent   float64
	BContent   float64
	Confidence float64
	Exclude    []string
	Reasons    []string
	Method     string
	Seed       uint64
	Sims       int
	Date       string
	Table      tableOption
	Out        output
}

func init() { register(newAllowablesCmd) }

func newAllowablesCmd(g *globalOptions, st streams) *cobra.Command {
	def := allowables.DefaultOptions()
	o := allowablesOptions{AContent: def.A.Content, BContent: def.B.Content, Confidence: def.A.Confidence, Seed: def.Seed, Sims: def.Sims}
	cmd := &cobra.Command{
		Use:   "allowables DATA [DATA...]",
		Short: "Derive A- and B-basis design values from a multi-lot test campaign",
		Long: `allowables derives one-sided lower tolerance bounds (A-basis: 99% content,
B-basis: 90% content, both at 95% confidence) per property and test condition
from a campaign's specimen results (CSV, .xlsx, or - for standard input).

For each property and condition it screens outliers (maximum normed residual,
flagged, never dropped), then follows the handbook procedure: it compares the
lots (k-sample Anderson-Darling), pools them and picks a distribution by
Anderson-Darling OSL in the order Weibull, normal, lognormal (then
nonparametric, then Hanson-Koopmans), or uses the ANOVA method when the lots
differ. By default (lot-aware) each value is then lowered to either of two
bounds that allow for lot-to-lot variation whenever they are lower: the
random-effects bound of normal lots (Krishnamoorthy and Mathew 2004) and the
same bound on the logarithms with Weibull values within lots; --method
handbook gives the handbook procedure's value as it is. Then it tries to pool
test conditions. Every decision is recorded: --format json carries the whole
audit trail.

Statistical design values support, and never replace, the governing
specification, regulations, local codes and licensed engineering judgement.`,
		Example: `  lotproof allowables campaign.csv
  lotproof allowables campaign.xlsx --property tensile --group-by heat --format json
  lotproof allowables campaign.csv --exclude QB-Q03-RT-2 --reason "void at fracture origin"`,
		Args: dataArgs,
		RunE: withOutput(g, st, &o.Out, func(args []string) error {
			o.Data, o.Input.More = args[0], args[1:]
			return runAllowables(o, st)
		}),
	}
	cmd.Long += multiFileHelp
	addInputFlags(cmd, &o.Input)
	f := cmd.Flags()
	f.StringArrayVar(&o.Properties, "property", nil, "analyse this property (repeat for several; default: all)")
	f.Float64Var(&o.AContent, "a-content", o.AContent, "content of the A-basis bound")
	f.Float64Var(&o.BContent, "b-content", o.BContent, "content of the B-basis bound")
	f.Float64Var(&o.Confidence, "confidence", o.Confidence, "confidence of both bounds")
	f.StringArrayVar(&o.Exclude, "exclude", nil, "leave this specimen out (repeat; each needs a --reason)")
	f.StringArrayVar(&o.Reasons, "reason", nil, "the reason for the matching --exclude, recorded in the audit trail")
	f.StringVar(&o.Method, "method", "auto", "auto (the lot-aware default), handbook (the handbook procedure as published), or force one of: "+strings.Join(allowables.BoundMethods, ", "))
	f.Uint64Var(&o.Seed, "seed", o.Seed, "seed of the Monte Carlo bound (weibull-exact)")
	f.IntVar(&o.Sims, "simulations", o.Sims, "Monte Carlo samples of the weibull-exact bound")
	f.StringVar(&o.Date, "date", "", "date written into the audit trail (default: today, or SOURCE_DATE_EPOCH)")
	addTableFlag(cmd, &o.Table, "values", "decisions")
	return cmd
}

// runDate is the date for the audit trail: the flag, else
// SOURCE_DATE_EPOCH (reproducible-builds convention), else today (UTC).
func runDate(flag string) (string, error) {
	if flag != "" {
		if _, err := time.Parse("2006-01-02", flag); err != nil {
			return "", usageError{fmt.Errorf("--date %q: write it as YYYY-MM-DD", flag)}
		}
		return flag, nil
	}
	if s := os.Getenv("SOURCE_DATE_EPOCH"); s != "" {
		if n, err := strconv.ParseInt(s, 10, 64); err == nil {
			return time.Unix(n, 0).UTC().Format("2006-01-02"), nil
		}
	}
	return time.Now().UTC().Format("2006-01-02"), nil
}

func runAllowables(o allowablesOptions, st streams) error {
	if err := o.Table.check(); err != nil {
		return err
	}
	opt := allowables.DefaultOptions()
	opt.Properties = o.Properties
	opt.A.Content, opt.B.Content = o.AContent, o.BContent
	opt.A.Confidence, opt.B.Confidence = o.Confidence, o.Confidence
	opt.Seed, opt.Sims, opt.System = o.Seed, o.Sims, o.Out.System
	if o.Method != "auto" {
		opt.Method = o.Method
	}
	if len(o.Exclude) != len(o.Reasons) {
		return usageError{fmt.Errorf("%d --exclude but %d --reason: give a reason for every excluded specimen, in the same order", len(o.Exclude), len(o.Reasons))}
	}
	if len(o.Exclude) > 0 {
		opt.Exclude = map[string]string{}
		for i, id := range o.Exclude {
			if _, dup := opt.Exclude[id]; dup {
				return usageError{fmt.Errorf("--exclude %s is given twice: give each specimen once, with one --reason", id)}
			}
			opt.Exclude[id] = o.Reasons[i]
		}
	}
	date, err := runDate(o.Date)
	if err != nil {
		return err
	}
	d, by, err := readData(o.Data, o.Input, st)
	if err != nil {
		return err
	}
	opt.GroupBy = by
	bar := progress.New(st.Err, st.ErrTerminal, int64(allowables.Steps(d, opt)), "design values")
	opt.Done = func() { bar.Add(1) }
	rep, err := allowables.Analyze(d, opt, date)
	bar.Finish()
	if err != nil {
		return err
	}
	return emit(st.Out, func(w io.Writer) error {
		if o.Out.Format == render.JSON {
			return render.WriteJSON(w, rep)
		}
		tables, err := o.Table.pick(o.Out.Format, allowablesTables(rep, d, o.Out.Format == render.Text))
		if err != nil {
			return err
		}
		return writeTables(w, o.Out.Format, tables...)
	})
}

// allowablesTables lays the essentials out: the design values, all
// decisions in one table (for CSV and --table decisions), then (in text)
// the decisions and warnings of each result. Values print at the
// resolution of the campaign's values (report.CampaignResolution).
func allowablesTables(rep *allowables.Report, campaign *lots.Dataset, text bool) []*render.Table {
	all := render.NewTable("Decisions", "property", "condition", "step", "decision", ">statistic", ">threshold", "reason")
	all.Name, all.Hidden = "decisions", true
	for _, r := range rep.Results {
		for _, s := range r.Steps {
			all.Add(r.Property, r.Condition, s.Step, s.Decision, render.N(float64(s.Statistic), 4), render.N(float64(s.Threshold), 4), s.Reason)
		}
	}
	t := render.NewTable("", "property", "condition", "unit", ">n", ">lots", "method", ">A-basis", ">B-basis", ">pooled A", ">pooled B", ">mean", ">sd", ">min")
	res := make([]render.Resolution, len(rep.Results))
	for i, r := range rep.Results {
		res[i] = report.CampaignResolution(campaign, r)
		pr := res[i]
		pa, pb := pr.Stat(math.NaN()), pr.Stat(math.NaN())
		if r.Pooled != nil {
			pa, pb = pr.Stat(float64(r.Pooled.ABasis)), pr.Stat(float64(r.Pooled.BBasis))
		}
		t.Add(r.Property, r.Condition, r.Unit, strconv.Itoa(r.N), strconv.Itoa(r.Lots), methodLabel(r),
			pr.Stat(float64(r.ABasis)), pr.Stat(float64(r.BBasis)), pa, pb,
			pr.Stat(float64(r.Mean)), pr.Spread(float64(r.SD)), pr.Given(float64(r.Min)))
	}
	t.Name = "values"
	if !text {
		return []*render.Table{t, all}
	}
	t.Title = fmt.Sprintf("Design values from %s (sha256 %s)\nlotproof %s, seed %d, %s; A-basis %g%%/%g%%, B-basis %g%%/%g%% content/confidence",
		rep.Input, short(rep.SHA256), rep.Version, rep.Seed, rep.Date,
		100*rep.Options.A.Content, 100*rep.Options.A.Confidence, 100*rep.Options.B.Content, 100*rep.Options.B.Confidence)
	for _, c := range rep.Cautions {
		t.Note("Note: %s", c)
	}
	out := []*render.Table{t, all}
	for i, r := range rep.Results {
		pr := res[i]
		name := r.Property
		if r.Condition != "" {
			name += " at " + r.Condition
		}
		d := render.NewTable(name+": decisions", "step", "decision", ">statistic", ">threshold")
		for _, s := range r.Steps {
			if s.Step == "input" {
				continue
			}
			d.Add(s.Step, s.Decision, render.N(float64(s.Statistic), 4), render.N(float64(s.Threshold), 4))
		}
		d.Note("A-basis %s (factor %s) by %s, B-basis %s (factor %s) by %s (%s)", pr.Stat(float64(r.ABasis)), render.Factor(float64(r.A.Factor)), orDash(r.A.Method),
			pr.Stat(float64(r.BBasis)), render.Factor(float64(r.B.Factor)), orDash(r.B.Method), r.Method)
		for _, wn := range r.Warnings {
			d.Note("Warning: %s", wn)
		}
		out = append(out, d)
	}
	return out
}

func short(h string) string {
	if len(h) > 16 {
		return h[:16] + "..."
	}
	return h
}

// methodLabel is the method column: the method, and for the lot-aware
// default the method that gave the B-basis value (or the A-basis value).
func methodLabel(r allowables.Result) string {
	if r.Method != allowables.LotAware {
		return r.Method
	}
	if r.B.Method != "" {
		return r.Method + ": " + r.B.Method
	}
	return r.Method + ": " + orDash(r.A.Method)
}

func orDash(s string) string {
	if s == "" {
		return "-"
	}
	return s
}
