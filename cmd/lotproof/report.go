package main

import (
	"bytes"
	"context"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"

	"github.com/spf13/cobra"

	"lotproof/lots"
	"lotproof/lots/acceptance"
	"lotproof/lots/allowables"
	"lotproof/lots/progress"
	"lotproof/lots/reduce"
	"lotproof/lots/render"
	"lotproof/lots/report"
	"lotproof/lots/store"
	"lotproof/lots/trend"
	"lotproof/lots/units"
	"lotproof/spec"
)

type reportOptions struct {
	Data     string
	Specs    []string
	Campaign string
	DB       string
	Records  []string
	OutFile  string
	Title    string
	Date     string
	Seed     uint64
	Input    inputOptions
	Out      output
}

func init() { register(newReportCmd) }

func newReportCmd(g *globalOptions, st streams) *cobra.Command {
	o := reportOptions{Seed: allowables.DefaultOptions().Seed}
	cmd := &cobra.Command{
		Use:   "report DATA [DATA...] --spec SPEC.yaml [--campaign CAMPAIGN.csv] [--db URL] [--out FILE]",
		Short: "Write one self-contained HTML report: verdicts, design values, trend and figures",
		Long: `report judges every lot of DATA against its specification (as lotproof
accept does) and writes a single HTML file with inline figures and no
scripts or network requests, readable on screen and printable on A4 or
Letter paper. It holds:

  - a summary and the cautions that go with the results;
  - the lot verdicts with the figures behind them, the reasons, the values
    flagged by the outlier screen and the operating characteristic of each
    specification's plan;
  - with --campaign: A- and B-basis design values with their audit trail
    (as lotproof allowables), and figures of the campaign data;
  - per material and property with a specification minimum: a dot plot by
    lot, a histogram with fitted normal, lognormal and Weibull densities,
    and normal and Weibull probability plots;
  - with --db: the supplier trend of the lot history (as lotproof trend),
    with control and EWMA charts and the mean and Ppk by period;
  - with --records: the properties reduced from raw tensile records (as
    lotproof reduce, default options) and their stress-strain curves.

The report goes to --out (default: standard output, which must not be a
terminal). --format does not apply. Exit status: 0 when
every lot conforms, 1 when any lot is nonconforming, undecided or not
judged (the report is still written), 2 on bad input.

Statistical results support, and never replace, the governing
specification, regulations, local codes and licensed engineering judgement.`,
		Example: `  lotproof report receipts.csv --spec steel.yaml --out receipts.html
  lotproof report receipts.csv --spec steel.yaml --spec plate.yaml --campaign campaign.csv --db lotproof.db --out full.html`,
		Args: dataArgs,
		RunE: withOutput(g, st, &o.Out, func(args []string) error {
			o.Data, o.Input.More = args[0], args[1:]
			if g.Format != "" {
				return usageError{fmt.Errorf("report writes one HTML file; --format %s does not apply (accept, allowables and trend give the same results as JSON or CSV)", g.Format)}
			}
			if o.OutFile == "-" && st.OutTerminal {
				return usageError{fmt.Errorf("the report is an HTML file of a few megabytes: give --out FILE (or redirect standard output to a file)")}
			}
			return runReport(o, st)
		}),
	}
	cmd.Long += multiFileHelp
	addInputFlags(cmd, &o.Input)
	f := cmd.Flags()
	f.StringArrayVar(&o.Specs, "spec", nil, "specification file (YAML); repeat for several materials")
	f.StringVar(&o.Campaign, "campaign", "", "qualification campaign results (CSV or .xlsx) for A- and B-basis values")
	f.StringVar(&o.DB, "db", "", "lot history to trend: a SQLite file or postgres://... URL (default: no trend)")
	f.StringArrayVar(&o.Records, "records", nil, "raw tensile records (file or folder of *.rec, as lotproof reduce reads) whose curves the report shows; repeat for several")
	f.StringVarP(&o.OutFile, "out", "o", "-", "HTML file to write (- for standard output)")
	f.StringVar(&o.Title, "title", "", "report title (default: from the data file name)")
	f.StringVar(&o.Date, "date", "", "date shown in the report and its audit trails (default: today, or SOURCE_DATE_EPOCH)")
	f.Uint64Var(&o.Seed, "seed", o.Seed, "seed of the Monte Carlo bound of the design values (weibull-exact)")
	return cmd
}

// reportInputs are the results a report is made of; nil parts are left out.
// The demo builds one of these and calls reportDocument.
type reportInputs struct {
	Title      string
	Date       string
	Data       *lots.Dataset
	By         lots.GroupBy
	Specs      []*spec.Spec
	Acceptance *acceptance.Result
	Campaign   *lots.Dataset
	Allowables *allowables.Report
	Trend      *trend.Result      // values in internal units
	TrendRes   render.Resolutions // of the trend's values in the units of System
	TrendFrom  string             // where the trend came from (database)
	Reduced    []*reduce.Result
	System     units.System
	Seed       uint64
}

// reportDocument assembles the report document from computed results.
func reportDocument(in reportInputs) (*report.Document, error) {
	b := report.Inputs{Title: in.Title, Date: in.Date, Data: in.Data, By: in.By, System: in.System, OnlyLimited: true,
		Minimums: map[string]float64{}}
	if b.Title == "" && in.Data != nil {
		b.Title = "Lot report: " + filepath.Base(in.Data.Source)
	}
	var specNames []string
	for _, s := range in.Specs {
		specNames = append(specNames, s.Label()+" ("+s.Source+")")
		for _, l := range s.Limits {
			if l.HasMin() {
				b.Minimums[report.MinimumKey(s.Material, l.Property)] = l.Min
			}
		}
	}
	if len(specNames) > 0 {
		b.Extra = append(b.Extra, report.KV{Key: "Specifications", Value: strings.Join(specNames, "; ")})
	}
	sys := "SI"
	if in.System == units.US {
		sys = "US customary"
	}
	b.Extra = append(b.Extra, report.KV{Key: "Units", Value: sys})
	if in.Acceptance != nil {
		rs := resolutionsOf(in.Data, in.System)
		sec, sum, err := report.AcceptanceSection(in.Acceptance, in.System, rs)
		if err != nil {
			return nil, err
		}
		b.Sections = append(b.Sections, sec)
		b.Summary = append(b.Summary, sum...)
		b.Cautions = append(b.Cautions, in.Acceptance.Cautions...)
		b.Appendices = append(b.Appendices, report.AcceptanceAppendix(in.Acceptance, in.System, rs))
		for _, l := range in.Acceptance.Lots {
			if l.Verdict == acceptance.Nonconforming {
				b.Marked = append(b.Marked, l.Lot)
			}
		}
	}
	if in.Allowables != nil {
		sec, sum, err := report.AllowablesSection(in.Allowables, in.Campaign)
		if err != nil {
			return nil, err
		}
		b.Sections = append(b.Sections, sec)
		b.Summary = append(b.Summary, sum...)
		b.Cautions = append(b.Cautions, in.Allowables.Cautions...)
		b.Seed = strconv.FormatUint(in.Allowables.Seed, 10)
		if in.Campaign != nil {
			b.Extra = append(b.Extra, report.KV{Key: "Campaign", Value: in.Campaign.Source + " (SHA-256 " + in.Campaign.Digest + ")"})
		}
	}
	if in.Trend != nil && len(in.Trend.Periods) > 0 {
		in.Trend.Display(in.System)
		b.Trend = in.Trend
		b.TrendResolutions = in.TrendRes
		b.Cautions = append(b.Cautions, in.Trend.Caution)
		if in.TrendFrom != "" {
			b.Extra = append(b.Extra, report.KV{Key: "Lot history", Value: in.TrendFrom})
		}
	}
	b.Reduced = in.Reduced
	b.Cautions = lots.ExtraCautions(b.Cautions)
	return report.Build(b)
}

func runReport(o reportOptions, st streams) error {
	if o.Campaign == "-" && (o.Data == "-" || slices.Contains(o.Input.More, "-")) {
		return usageError{fmt.Errorf("DATA and --campaign cannot both be standard input")}
	}
	specs, err := readSpecs(o.Specs)
	if err != nil {
		return err
	}
	date, err := runDate(o.Date)
	if err != nil {
		return err
	}
	steps := int64(3)
	for _, opt := range []bool{o.Campaign != "", o.DB != "", len(o.Records) > 0} {
		if opt {
			steps++
		}
	}
	bar := progress.New(st.Err, st.ErrTerminal, steps, "report")
	defer bar.Finish()

	d, by, err := readData(o.Data, o.Input, st)
	if err != nil {
		return err
	}
	acc, err := acceptance.Judge(d, specs, by)
	if err != nil {
		return err
	}
	bar.Add(1)
	in := reportInputs{Title: o.Title, Date: date, Data: d, By: by, Specs: specs, Acceptance: acc, System: o.Out.System, Seed: o.Seed}
	if o.Campaign != "" {
		cd, cby, err := readData(o.Campaign, o.Input, st)
		if err != nil {
			return err
		}
		opt := allowables.DefaultOptions()
		opt.GroupBy, opt.Seed, opt.System = cby, o.Seed, o.Out.System
		rep, err := allowables.Analyze(cd, opt, date)
		if err != nil {
			return err
		}
		in.Campaign, in.Allowables = cd, rep
		bar.Add(1)
	}
	if o.DB != "" {
		ctx := context.Background()
		s, err := store.OpenReadOnly(ctx, store.ResolveURL(o.DB))
		if err != nil {
			return usageError{err}
		}
		in.TrendRes = render.Resolutions{}
		tr, err := trend.ComputeShown(ctx, s, trend.Options{Limits: store.LimitsOf(specs)}, in.TrendRes, o.Out.System)
		in.TrendFrom = s.Where()
		s.Close()
		if err != nil {
			return err
		}
		if len(tr.Periods) == 0 {
			fmt.Fprintf(st.Err, "lotproof: %s holds no dated lots to trend; the report has no trend section\n", in.TrendFrom)
		}
		in.Trend = tr
		bar.Add(1)
	}
	if len(o.Records) > 0 {
		var err error
		if in.Reduced, err = reduce.ReducePaths(o.Records, st.In, reduce.Options{}, nil); err != nil {
			return err
		}
		bar.Add(1)
	}
	doc, err := reportDocument(in)
	if err != nil {
		return err
	}
	bar.Add(1)
	var page bytes.Buffer
	if err := doc.WriteHTML(&page); err != nil {
		return err
	}
	bar.Add(1)
	bar.Finish()
	if err := writeOut(o.OutFile, page.Bytes(), st); err != nil {
		return err
	}
	c := acc.Counts
	if c.Nonconforming+c.Undecided+c.NotJudged > 0 {
		return verdictError{fmt.Sprintf("%d of %d lots conforming, %d nonconforming, %d undecided, %d not judged",
			c.Conforming, len(acc.Lots), c.Nonconforming, c.Undecided, c.NotJudged)}
	}
	return nil
}

// writeOut writes the page to standard output ("-" or empty) or to a file,
// through a temporary file in the same folder renamed into place, so that a
// failed run never leaves a partial report.
func writeOut(name string, page []byte, st streams) error {
	if name == "" || name == "-" {
		return emit(st.Out, func(w io.Writer) error { _, err := w.Write(page); return err })
	}
	dir := filepath.Dir(name)
	tmp, err := os.CreateTemp(dir, ".lotproof-report-*.html")
	if err != nil {
		return usageError{fmt.Errorf("--out %s: %w", name, err)}
	}
	defer os.Remove(tmp.Name())
	if _, err := tmp.Write(page); err != nil {
		tmp.Close()
		return fmt.Errorf("--out %s: %w", name, err)
	}
	if err := tmp.Close(); err != nil {
		return fmt.Errorf("--out %s: %w", name, err)
	}
	if err := os.Chmod(tmp.Name(), 0o644); err != nil {
		return err
	}
	if err := os.Rename(tmp.Name(), name); err != nil {
		return usageError{fmt.Errorf("--out %s: %w", name, err)}
	}
	fmt.Fprintf(st.Err, "lotproof: wrote %s (%d bytes)\n", name, len(page))
	return nil
}
