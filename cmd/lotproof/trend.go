package main

import (
	"context"
	"fmt"
	"io"
	"strconv"

	"github.com/spf13/cobra"

	"lotproof/lots/render"
	"lotproof/lots/store"
	"lotproof/lots/trend"
	"lotproof/spec"
)

type trendOptions struct {
	DB    string
	Specs []string
	Trend trend.Options
	Table tableOption
	Out   output
}

func newTrendCmd(g *globalOptions, st streams) *cobra.Command {
	var o trendOptions
	cmd := &cobra.Command{
		Use:   "trend [--db URL] [--by supplier|material] [--property P] [--every quarter|month] [--since D] [--until D] [--baseline FROM..TO]",
		Short: "Trend suppliers (or materials) by quarter or month from the lot history",
		Long: `trend reads the lot history (see lotproof record) and prints, per supplier
(or material), property and period: the number of lots and specimens, the
mean and SD, Ppk against the specification minimum with a lower confidence
bound, the estimated parts per million below the minimum and the lots
rejected. It charts the lot means as individuals with moving-range limits and
the lot SDs on an S chart, with limits from a baseline of periods (default:
the first four), applies the Western Electric run rules, follows an EWMA of
the lot means and tests for a shift between consecutive periods. Every
signal is listed with its rule, period and lot.

The minimum comes from the specification limits recorded with the imports,
or from --spec files given here (these win).

Trend signals support, and never replace, the governing specification,
regulations, local codes and licensed engineering judgement.`,
		Args: exactArgs(0, "no arguments (the data come from the database)"),
		RunE: withOutput(g, st, &o.Out, func(args []string) error {
			return runTrend(o, st)
		}),
	}
	f := cmd.Flags()
	f.StringVar(&o.DB, "db", "", "database: a SQLite file or postgres://... URL (default: $LOTPROOF_DB or lotproof.db)")
	f.StringArrayVar(&o.Specs, "spec", nil, "purchase specification file (YAML) giving the minimums; repeat for several materials")
	f.StringVar(&o.Trend.By, "by", "supplier", "group by supplier or material")
	f.StringVar(&o.Trend.Property, "property", "", "trend one property only (default: all)")
	f.StringVar(&o.Trend.Every, "every", "quarter", "period: quarter or month")
	f.StringVar(&o.Trend.Since, "since", "", "first test date included (YYYY-MM-DD)")
	f.StringVar(&o.Trend.Until, "until", "", "last test date included (YYYY-MM-DD)")
	f.StringVar(&o.Trend.Baseline, "baseline", "", "periods the control limits come from, FROM..TO (e.g. 2025-Q1..2025-Q4; default: the first four periods)")
	f.Float64Var(&o.Trend.Confidence, "confidence", trend.DefaultConfidence, "confidence of the Ppk lower bound")
	addTableFlag(cmd, &o.Table, "periods", "signals", "limits")
	return cmd
}

func init() { register(newTrendCmd) }

func runTrend(o trendOptions, st streams) error {
	if err := o.Table.check(); err != nil {
		return err
	}
	specs, err := spec.ReadFiles(o.Specs)
	if err != nil {
		return err
	}
	o.Trend.Limits = store.LimitsOf(specs)
	ctx := context.Background()
	url := store.ResolveURL(o.DB)
	s, err := store.OpenReadOnly(ctx, url)
	if err != nil {
		return usageError{err}
	}
	defer s.Close()
	var rs render.Resolutions // for tables people read only
	if o.Out.Format == render.Text {
		rs = render.Resolutions{}
	}
	res, err := trend.ComputeShown(ctx, s, o.Trend, rs, o.Out.System)
	if err != nil {
		return err
	}
	if len(res.Periods) == 0 {
		fmt.Fprintf(st.Err, "lotproof: %s holds no dated lots to trend (record results files first)\n", s.Where())
	}
	res.Display(o.Out.System)
	return emit(st.Out, func(w io.Writer) error {
		if o.Out.Format == render.JSON {
			return render.WriteJSON(w, res)
		}
		tables, err := o.Table.pick(o.Out.Format, trendTables(res, rs))
		if err != nil {
			return err
		}
		return writeTables(w, o.Out.Format, tables...)
	})
}

func trendTables(r *trend.Result, rs render.Resolutions) []*render.Table {
	pt := render.NewTable(fmt.Sprintf("Trend by %s and %s", r.By, r.Every), r.By, "material", "property", "unit", "period", "baseline",
		">lots", ">specimens", ">mean", ">sd", ">minimum", ">Ppk", ">Ppk lower bound", ">ppm below minimum", ">judged", ">rejected")
	for _, p := range r.Periods {
		base := ""
		if p.Baseline {
			base = "yes"
		}
		pr := rs.Of(p.Material, p.Property)
		pt.Add(p.Group, p.Material, p.Property, p.Unit, p.Period, base, strconv.Itoa(p.Lots), strconv.Itoa(p.Specimens),
			pr.Stat(float64(p.Mean)), pr.Spread(float64(p.SD)), pr.Given(float64(p.Minimum)), render.Factor(float64(p.Ppk)),
			render.Factor(float64(p.PpkLower)), render.PPM(float64(p.PPMBelow)),
			strconv.Itoa(p.LotsJudged), strconv.Itoa(p.LotsRejected))
	}
	if r.Baseline != "" {
		pt.Note("Control limits from the baseline %s (--baseline).", r.Baseline)
	} else {
		pt.Note("Control limits from each series' first %d periods (the default; --baseline FROM..TO sets the range); the limits table shows each series' baseline.", trend.DefaultBaseline)
	}
	pt.Notes = append(pt.Notes, r.Caution)
	st := render.NewTable("Signals", "rule", r.By, "material", "property", "period", "lot", ">value", ">limit", "detail")
	for _, s := range r.Signals {
		pr := rs.Of(s.Material, s.Property)
		st.Add(render.Label{Text: trend.RuleLabel(s.Rule), Key: s.Rule}, s.Group, s.Material, s.Property, s.Period, s.Lot, pr.Stat(float64(s.Value)), pr.Stat(float64(s.Limit)), s.Detail)
	}
	if len(r.Signals) == 0 {
		st.Note("no signals")
	}
	lt := render.NewTable("Control limits", r.By, "material", "property", "unit", "baseline", ">baseline lots", ">centre", ">mean moving range", ">sigma", ">lower limit", ">upper limit", ">mean SD", "notes")
	for _, s := range r.Series {
		pr := rs.Of(s.Material, s.Property)
		notes := ""
		for i, n := range s.Notes {
			if i > 0 {
				notes += "; "
			}
			notes += n
		}
		lt.Add(s.Group, s.Material, s.Property, s.Unit, s.BaselineFrom+".."+s.BaselineTo, strconv.Itoa(s.BaselineLots),
			pr.Stat(float64(s.Center)), pr.Spread(float64(s.MRBar)), pr.Spread(float64(s.Sigma)), pr.Stat(float64(s.Lower)),
			pr.Stat(float64(s.Upper)), pr.Spread(float64(s.SBar)), notes)
	}
	for _, m := range r.Methods {
		lt.Note("%s", m)
	}
	for _, w := range r.Warnings {
		lt.Note("warning: %s", w)
	}
	if r.By == "material" { // the group is the material: one column of it
		pt.DropColumn(1)
		st.DropColumn(2)
		lt.DropColumn(1)
	}
	pt.Name, st.Name, lt.Name = "periods", "signals", "limits"
	return []*render.Table{pt, st, lt}
}
