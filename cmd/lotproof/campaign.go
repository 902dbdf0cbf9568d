package main

import (
	"bytes"
	"fmt"
	"io"
	"math"
	"os"
	"sort"
	"strconv"
	"strings"

	"github.com/spf13/cobra"

	"lotproof/lots"
	"lotproof/lots/allowables"
	"lotproof/lots/campaign"
	"lotproof/lots/progress"
	"lotproof/lots/render"
	"lotproof/lots/report"
)

type campaignOptions struct {
	Lots         []int
	Specimens    []int
	Plans        []string // "5x6"
	Mean         float64
	CV           string
	BetweenShare string
	Dist         string
	CostSpecimen float64
	CostLot      float64
	AContent     float64
	BContent     float64
	Confidence   float64
	Method       string
	Runs         int
	Seed         uint64
	TargetRatio  float64
	TargetBasis  string
	Workers      int
	Figure       string // SVG file of the design value ratio against plan
	Report       string // one-file HTML report: the plans, the figure, the notes
	Out          output
}

func init() { register(newCampaignCmd) }

func newCampaignCmd(g *globalOptions, st streams) *cobra.Command {
	def := allowables.DefaultOptions()
	o := campaignOptions{Mean: 100, BetweenShare: "0", Dist: campaign.Normal, CostSpecimen: 1, AContent: def.A.Content,
		BContent: def.B.Content, Confidence: def.A.Confidence, Method: "auto", Runs: 1000, Seed: 1, TargetBasis: "b"}
	cmd := &cobra.Command{
		Use:   "campaign",
		Short: "Plan a test campaign: simulate candidate plans and compare their design values, coverage and cost",
		Long: `campaign answers, before any specimen is tested, what a campaign of so many
lots of so many specimens is likely to give. For each candidate plan it
simulates many campaigns from the population you describe (mean, coefficient
of variation, share of the variance between lots, shape), runs the same
design-value procedure as "lotproof allowables" on each, and reports:

  - how often the A- and B-basis values lie at or below the population's
    true 1st and 10th percentiles (the coverage; it should be at least the
    confidence, 95%), with the simulation's standard error;
  - the design value as a fraction of the true percentile: the median, and
    the 10th percentile of the campaigns (a plan whose 10th percentile is low
    gives a poor design value one time in ten);
  - how often each method gave the B-basis value, and the plan's cost.

With --target-ratio it names the cheapest plan whose median B-basis ratio
(or A-basis, --target-basis a) reaches the target. Plans come from every
combination of --lots and --specimens, or from --plan 5x6 (repeatable).
The between-lot share applies to the values (normal) or to their logarithms
(lognormal and Weibull). The same seed gives the same answer.

Statistical values support, and never replace, the governing specification,
regulations, local codes and licensed engineering judgement. The simulation
assumes the population you describe.`,
		Example: `  lotproof campaign --lots 3,5,10 --specimens 6 --cv 5%
  lotproof campaign --lots 3,5,10 --specimens 6,10 --cv 4% --between-share 30% --dist weibull --cost-specimen 120 --cost-lot 2500 --target-ratio 0.95
  lotproof campaign --plan 5x6 --plan 3x18 --cv 0.06 --format json`,
		Args: exactArgs(0, "no arguments (everything is given by flags)"),
		RunE: withOutput(g, st, &o.Out, func(args []string) error {
			return runCampaign(o, st)
		}),
	}
	f := cmd.Flags()
	f.IntSliceVar(&o.Lots, "lots", nil, "numbers of lots to try, e.g. 3,5,10")
	f.IntSliceVar(&o.Specimens, "specimens", nil, "specimens per lot to try, e.g. 6,10")
	f.StringArrayVar(&o.Plans, "plan", nil, "a plan as LOTSxSPECIMENS, e.g. 5x6 (repeat for several)")
	f.Float64Var(&o.Mean, "mean", o.Mean, "expected mean (typical value) of the property; the ratios depend on it only through the CV")
	f.StringVar(&o.CV, "cv", "", "coefficient of variation of individual values, e.g. 5% or 0.05 (required)")
	f.StringVar(&o.BetweenShare, "between-share", o.BetweenShare, "share of the variance between lots, e.g. 30% or 0.3")
	f.StringVar(&o.Dist, "dist", o.Dist, "population shape: normal, lognormal or weibull")
	f.Float64Var(&o.CostSpecimen, "cost-specimen", o.CostSpecimen, "cost of one specimen (the default counts specimens)")
	f.Float64Var(&o.CostLot, "cost-lot", o.CostLot, "cost of procuring one lot (heat or batch)")
	f.Float64Var(&o.AContent, "a-content", o.AContent, "content of the A-basis bound")
	f.Float64Var(&o.BContent, "b-content", o.BContent, "content of the B-basis bound")
	f.Float64Var(&o.Confidence, "confidence", o.Confidence, "confidence of both bounds")
	f.StringVar(&o.Method, "method", o.Method, "auto (the lot-aware default), handbook (the handbook procedure as published), or force one of: "+strings.Join(allowables.BoundMethods, ", "))
	f.IntVar(&o.Runs, "runs", o.Runs, "campaigns simulated per plan")
	f.Uint64Var(&o.Seed, "seed", o.Seed, "seed of the simulation")
	f.Float64Var(&o.TargetRatio, "target-ratio", 0, "name the cheapest plan whose median design value reaches this fraction of the true percentile")
	f.StringVar(&o.TargetBasis, "target-basis", o.TargetBasis, "the basis --target-ratio applies to: a or b")
	f.StringVar(&o.Figure, "figure", "", "also write a figure (SVG) of the design value ratio against plan, with the 10th-90th percentile band")
	f.StringVar(&o.Report, "report", "", "also write a one-file HTML report: the plans, that figure and the notes")
	f.IntVar(&o.Workers, "workers", 0, "parallel workers (default: all cores; the answer does not depend on it)")
	return cmd
}

// parseShare reads 0.3 or 30%, from 0 up to (not including) 1.
func parseShare(flag, s string, zeroOK bool) (float64, error) {
	t := strings.TrimSpace(s)
	scale := 1.0
	if strings.HasSuffix(t, "%") {
		scale = 0.01
		t = strings.TrimSpace(strings.TrimSuffix(t, "%"))
	}
	v, err := strconv.ParseFloat(t, 64)
	v *= scale
	if err != nil || !(v >= 0 && v < 1) || (!zeroOK && v == 0) {
		return 0, usageError{fmt.Errorf("--%s %q: expected a fraction from 0 up to 1 (e.g. 0.05 or 5%%)", flag, s)}
	}
	return v, nil
}

// campaignPlans builds the plans from --plan, or every combination of
// --lots and --specimens (in the order given).
func campaignPlans(o campaignOptions) ([]campaign.Plan, error) {
	var plans []campaign.Plan
	for _, s := range o.Plans {
		a, b, ok := strings.Cut(strings.ToLower(strings.TrimSpace(s)), "x")
		k, err1 := strconv.Atoi(strings.TrimSpace(a))
		m, err2 := strconv.Atoi(strings.TrimSpace(b))
		if !ok || err1 != nil || err2 != nil {
			return nil, usageError{fmt.Errorf("--plan %q: write a plan as LOTSxSPECIMENS, e.g. 5x6", s)}
		}
		plans = append(plans, campaign.Plan{Lots: k, Specimens: m})
	}
	if len(o.Lots) > 0 || len(o.Specimens) > 0 {
		if len(o.Lots) == 0 || len(o.Specimens) == 0 {
			return nil, usageError{fmt.Errorf("give both --lots and --specimens (e.g. --lots 3,5,10 --specimens 6), or --plan 5x6")}
		}
		for _, k := range o.Lots {
			for _, m := range o.Specimens {
				plans = append(plans, campaign.Plan{Lots: k, Specimens: m})
			}
		}
	}
	if len(plans) == 0 {
		return nil, usageError{fmt.Errorf("no plan given: use --lots 3,5,10 --specimens 6, or --plan 5x6")}
	}
	if len(plans) > 200 {
		return nil, usageError{fmt.Errorf("%d plans: give at most 200", len(plans))}
	}
	return plans, nil
}

func runCampaign(o campaignOptions, st streams) error {
	plans, err := campaignPlans(o)
	if err != nil {
		return err
	}
	if strings.TrimSpace(o.CV) == "" {
		return usageError{fmt.Errorf("--cv is required: the coefficient of variation of individual values, e.g. 5%%")}
	}
	cv, err := parseShare("cv", o.CV, false)
	if err != nil {
		return err
	}
	share, err := parseShare("between-share", o.BetweenShare, true)
	if err != nil {
		return err
	}
	opt := allowables.DefaultOptions()
	opt.A.Content, opt.B.Content = o.AContent, o.BContent
	opt.A.Confidence, opt.B.Confidence = o.Confidence, o.Confidence
	if o.Method != "auto" {
		opt.Method = o.Method
	}
	if o.Workers < 0 || o.Workers > 1024 {
		return usageError{fmt.Errorf("--workers %d: give 0 (all cores) up to 1024", o.Workers)}
	}
	c := campaign.Config{Plans: plans, Population: campaign.Population{Dist: strings.ToLower(o.Dist), Mean: o.Mean, CV: cv, BetweenShare: share},
		CostSpecimen: o.CostSpecimen, CostLot: o.CostLot, Procedure: opt, Runs: o.Runs, Seed: o.Seed, Workers: o.Workers,
		TargetRatio: o.TargetRatio, TargetBasis: strings.ToLower(o.TargetBasis)}
	if err := c.Check(); err != nil {
		return usageError{err}
	}
	bar := progress.New(st.Err, st.ErrTerminal, int64(len(plans)*o.Runs), "campaigns")
	c.Done = func(n int) { bar.Add(int64(n)) }
	res, err := campaign.Run(c)
	bar.Finish()
	if err != nil {
		return usageError{err}
	}
	var svg []byte
	if o.Figure != "" || o.Report != "" {
		if svg, err = campaignFigure(res); err != nil {
			return err
		}
	}
	if err := emit(st.Out, func(w io.Writer) error {
		switch o.Out.Format {
		case render.JSON:
			return render.WriteJSON(w, res)
		case render.CSV:
			return campaignCSV(res).WriteCSV(w)
		}
		return campaignText(res).WriteText(w)
	}); err != nil {
		return err
	}
	if o.Figure != "" {
		if err := os.WriteFile(o.Figure, svg, 0o644); err != nil {
			return fmt.Errorf("writing the figure: %w", err)
		}
	}
	if o.Report != "" {
		var b bytes.Buffer
		if err := campaignDocument(res, svg).WriteHTML(&b); err != nil {
			return err
		}
		if err := os.WriteFile(o.Report, b.Bytes(), 0o644); err != nil {
			return fmt.Errorf("writing the report: %w", err)
		}
	}
	return nil
}

// campaignDocument lays the planner's answer out as a one-file HTML
// report: the table of plans with its notes, and the figure of the design
// value ratio against plan with the band of the simulated campaigns.
func campaignDocument(res *campaign.Result, svg []byte) *report.Document {
	t := campaignText(res)
	title, intro, _ := strings.Cut(t.Title, "\n")
	cols := make([]string, len(t.Columns))
	for i, c := range t.Columns {
		if i < len(t.Right) && t.Right[i] {
			c = ">" + c
		}
		cols[i] = c
	}
	rt := &report.Table{Title: "Candidate plans", Columns: report.Cols(cols...)}
	for _, r := range t.Rows {
		rt.Rows = append(rt.Rows, report.Cells(r...))
	}
	sec := report.Section{Title: title, Intro: intro, Blocks: []report.Block{rt,
		&report.Figure{Title: "Design value against plan", SVG: svg,
			Caption: "Per plan, the median design value as a fraction of the population's true percentile (A- and B-basis), with the band from the 10th to the 90th percentile of the simulated campaigns."},
		report.List{Title: "Notes", Items: t.Notes}}}
	return &report.Document{Title: "Campaign plan", Cautions: res.Cautions,
		Meta: report.Meta{Version: lots.Version, Seed: strconv.FormatUint(res.Seed, 10)}, Sections: []report.Section{sec}}
}

// campaignFigure draws the A- and B-basis ratio per plan with the band
// from the 10th to the 90th percentile of the simulated campaigns.
func campaignFigure(res *campaign.Result) ([]byte, error) {
	d := report.PlanBandData{Title: fmt.Sprintf("Design value against plan (%s population, CV %s%%)", res.Population.Dist, strconv.FormatFloat(100*res.Population.CV, 'g', 4, 64))}
	a := report.PlanSeries{Name: "A-basis: median, 10th-90th percentile"}
	b := report.PlanSeries{Name: "B-basis: median, 10th-90th percentile"}
	for _, p := range res.Plans {
		if math.IsNaN(float64(p.MedianBRatio)) || math.IsNaN(float64(p.MedianARatio)) {
			continue // a plan without design values has nothing to draw
		}
		d.Labels = append(d.Labels, fmt.Sprintf("%dx%d", p.Lots, p.Specimens))
		a.Median, a.Low, a.High = append(a.Median, float64(p.MedianARatio)), append(a.Low, float64(p.P10ARatio)), append(a.High, float64(p.P90ARatio))
		b.Median, b.Low, b.High = append(b.Median, float64(p.MedianBRatio)), append(b.Low, float64(p.P10BRatio)), append(b.High, float64(p.P90BRatio))
	}
	d.Series = []report.PlanSeries{b, a}
	return report.PlanBandPlot(d)
}

// campaignCSV is one table, one row per plan, every number in full.
func campaignCSV(res *campaign.Result) *render.Table {
	cols := []string{"lots", "specimens per lot", "specimens", "campaigns", "cost", "A coverage", "A coverage standard error",
		"B coverage", "B coverage standard error", "A median ratio", "A 10th percentile ratio", "A 90th percentile ratio",
		"B median ratio", "B 10th percentile ratio", "B 90th percentile ratio", "campaigns with an A-basis value",
		"campaigns with a B-basis value", "campaigns without a design value"}
	for _, m := range allowables.BoundMethods {
		cols = append(cols, "campaigns by "+m)
	}
	t := render.NewTable("", cols...)
	for _, p := range res.Plans {
		row := []any{strconv.Itoa(p.Lots), strconv.Itoa(p.Specimens), strconv.Itoa(p.N), strconv.Itoa(p.Runs), render.Exact(p.Cost),
			render.Exact(float64(p.CoverageA)), render.Exact(float64(p.CoverageASE)), render.Exact(float64(p.CoverageB)), render.Exact(float64(p.CoverageBSE)),
			render.Exact(float64(p.MedianARatio)), render.Exact(float64(p.P10ARatio)), render.Exact(float64(p.P90ARatio)), render.Exact(float64(p.MedianBRatio)), render.Exact(float64(p.P10BRatio)),
			render.Exact(float64(p.P90BRatio)), strconv.Itoa(p.DefinedA), strconv.Itoa(p.DefinedB), strconv.Itoa(p.Failed)}
		for _, m := range allowables.BoundMethods {
			row = append(row, strconv.Itoa(p.Methods[m]))
		}
		t.Add(row...)
	}
	return t
}

// campaignText is the table people read.
func campaignText(res *campaign.Result) *render.Table {
	pop := res.Population
	t := render.NewTable(fmt.Sprintf("Campaign plans: %s population, mean %s, CV %s%%, %s%% of the variance between lots\n"+
		"%d simulated campaigns per plan (seed %d), %s procedure; A-basis %g%%/%g%%, B-basis %g%%/%g%% content/confidence",
		pop.Dist, strconv.FormatFloat(pop.Mean, 'g', 6, 64), strconv.FormatFloat(100*pop.CV, 'g', 4, 64), strconv.FormatFloat(100*pop.BetweenShare, 'g', 4, 64), res.Runs, res.Seed, res.Method,
		100*res.A.Content, 100*res.A.Confidence, 100*res.B.Content, 100*res.B.Confidence),
		">lots", ">per lot", ">specimens", ">cost", ">A coverage", ">B coverage", ">A median", ">B median", ">B 10th pct", "methods")
	for _, p := range res.Plans {
		t.Add(strconv.Itoa(p.Lots), strconv.Itoa(p.Specimens), strconv.Itoa(p.N), strconv.FormatFloat(p.Cost, 'f', -1, 64),
			coverText(float64(p.CoverageA), float64(p.CoverageASE)), coverText(float64(p.CoverageB), float64(p.CoverageBSE)),
			render.Fixed(float64(p.MedianARatio), 3), render.Fixed(float64(p.MedianBRatio), 3), render.Fixed(float64(p.P10BRatio), 3),
			methodsText(p))
	}
	t.Note("Coverage: the share of campaigns whose design value lies at or below the true percentile (%s for A, %s for B), +/- its simulation standard error; it should be at least the confidence.",
		render.Num(res.TrueA, 5), render.Num(res.TrueB, 5))
	t.Note("Median and 10th percentile: the design value as a fraction of the true percentile, over the simulated campaigns; the rest is strength given away to sampling.")
	switch {
	case res.TargetRatio == 0:
	case res.Cheapest != nil:
		t.Note("Cheapest plan whose median %s-basis ratio reaches %g: %d lots of %d specimens.", strings.ToUpper(res.TargetBasis), res.TargetRatio, res.Cheapest.Lots, res.Cheapest.Specimens)
	default:
		t.Note("No plan reaches a median %s-basis ratio of %g: try more lots or specimens.", strings.ToUpper(res.TargetBasis), res.TargetRatio)
	}
	for _, p := range res.Plans {
		if p.Failed > 0 {
			t.Note("%d lots x %d: %d of %d campaigns gave no design value.", p.Lots, p.Specimens, p.Failed, p.Runs)
		}
	}
	for _, c := range res.Cautions {
		t.Note("Note: %s", c)
	}
	return t
}

func coverText(c, se float64) string {
	if math.IsNaN(c) {
		return "-"
	}
	return render.Fixed(c, 3) + " +/- " + render.Fixed(se, 3)
}

// methodsText is "weibull 62%, anova 20%, ..." in decreasing order.
func methodsText(p campaign.PlanResult) string {
	type mc struct {
		m string
		n int
	}
	var ms []mc
	for m, n := range p.Methods {
		ms = append(ms, mc{m, n})
	}
	sort.Slice(ms, func(i, j int) bool {
		if ms[i].n != ms[j].n {
			return ms[i].n > ms[j].n
		}
		return ms[i].m < ms[j].m
	})
	var parts []string
	for _, x := range ms {
		pct := 100 * float64(x.n) / float64(p.Runs)
		if pct < 1 {
			parts = append(parts, x.m+" <1%")
			continue
		}
		parts = append(parts, fmt.Sprintf("%s %.0f%%", x.m, pct))
	}
	return strings.Join(parts, ", ")
}
