package main

import (
	"bytes"
	"fmt"
	"io"
	"path/filepath"
	"sort"
	"strings"

	"github.com/spf13/cobra"

	"lotproof/lots"
	"lotproof/lots/acceptance"
	"lotproof/lots/allowables"
	"lotproof/lots/demo"
	"lotproof/lots/progress"
	"lotproof/lots/render"
	"lotproof/lots/trend"
)

type demoOptions struct {
	Report string // report file; "" for none
	DB     string // database file the history is recorded in; "" for a temporary one
	Date   string
	Seed   uint64
	Table  tableOption
	Out    output
}

const demoReport = "lotproof-report-demo.html"

func newDemoCmd(g *globalOptions, st streams) *cobra.Command {
	o := demoOptions{Report: demoReport, Seed: allowables.DefaultOptions().Seed}
	var noReport bool
	var dataDir string
	cmd := &cobra.Command{
		Use:   "demo",
		Short: "Run the whole job on the embedded, invented demo scenario",
		Long: `demo runs lotproof's pipeline on an invented scenario embedded in the binary.
Orrin Hollow Pumpworks buys steel bar and aluminium plate from five invented
mills; over eight quarters it received 64 lots, and two more arrived as raw
tensile records (66 lots in all). The demo

  1. reduces the raw tensile records to specimen properties,
  2. judges every lot against the invented purchase specifications,
  3. derives A- and B-basis design values from a qualification campaign,
  4. records the lots in a temporary database (or in --db FILE, kept for
     lotproof serve --db FILE) and trends each supplier by quarter,
     flagging drift,
  5. writes a one-file HTML report (default ` + demoReport + `).

The input files are embedded in lotproof (named demo/... in the output);
--data-dir DIR writes them out, e.g. to run lotproof accept on them.

Every company, material, specification and number in it is invented.`,
		Args: exactArgs(0, "no arguments"),
		RunE: withOutput(g, st, &o.Out, func(args []string) error {
			if dataDir != "" {
				return writeDemoData(dataDir, st)
			}
			if noReport {
				o.Report = ""
			}
			if o.Report == "-" {
				return usageError{fmt.Errorf("--report - would mix the report with the demo's results on standard output: give a file name, or --no-report")}
			}
			return runDemo(o, st)
		}),
	}
	cmd.Flags().StringVar(&o.Report, "report", o.Report, "write the HTML report to this file")
	cmd.Flags().BoolVar(&noReport, "no-report", false, "do not write the HTML report")
	cmd.Flags().StringVar(&o.DB, "db", "", "record the demo history in this SQLite file (kept, e.g. for lotproof serve --db FILE)")
	cmd.Flags().StringVar(&dataDir, "data-dir", "", "write the demo's input files (results, specifications, raw records) into this new folder, to try the other commands on them, and exit")
	cmd.Flags().StringVar(&o.Date, "date", "", "date written into the results (default: today, or SOURCE_DATE_EPOCH)")
	cmd.Flags().Uint64Var(&o.Seed, "seed", o.Seed, "seed of the Monte Carlo bounds")
	addTableFlag(cmd, &o.Table, "reduced", "lots", "allowables", "signals")
	return cmd
}

func runDemo(o demoOptions, st streams) error {
	if err := o.Table.check(); err != nil {
		return err
	}
	date, err := runDate(o.Date)
	if err != nil {
		return err
	}
	bar := progress.New(st.Err, st.ErrTerminal, 6, "demo")
	defer bar.Finish()
	res, err := demo.Run(demo.Options{Date: date, Seed: o.Seed, DB: o.DB, System: o.Out.System, Step: func() { bar.Add(1) }})
	if err != nil {
		return err
	}

	// 5. The report.
	if o.Report != "" {
		doc, err := reportDocument(reportInputs{Title: "Demo: Orrin Hollow Pumpworks receipts and qualification (invented)",
			Date: date, Data: res.All, By: lots.ByLot, Specs: res.Specs, Acceptance: res.Judged, Campaign: res.Campaign,
			Allowables: res.Allowables, Trend: res.Trend, TrendRes: res.TrendRes, TrendFrom: "temporary SQLite database", Reduced: res.RawResults,
			System: o.Out.System, Seed: o.Seed})
		if err != nil {
			return err
		}
		var page bytes.Buffer
		if err := doc.WriteHTML(&page); err != nil {
			return err
		}
		if err := writeOut(o.Report, page.Bytes(), st); err != nil {
			return err
		}
		if abs, err := filepath.Abs(o.Report); err == nil {
			res.Report = abs
		} else {
			res.Report = o.Report
		}
	} else {
		res.Trend.Display(o.Out.System)
	}
	bar.Add(1)
	bar.Finish()
	return emit(st.Out, func(w io.Writer) error {
		if o.Out.Format == render.JSON {
			return render.WriteJSON(w, res)
		}
		tables, err := o.Table.pick(o.Out.Format, demoTables(res, o.Out.Format == render.Text))
		if err != nil {
			return err
		}
		return writeTables(w, o.Out.Format, tables...)
	})
}

// demoTables lays the demo's results out: the reduced records, the lots
// that did not conform, the design values and the trend signals.
func demoTables(res *demo.Result, text bool) []*render.Table {
	var out []*render.Table
	u := []string{"", "", ""}
	if len(res.Reduced) > 0 && len(res.Reduced[0].Units) == 3 {
		u = res.Reduced[0].Units
	}
	red := render.NewTable("", "specimen", "lot", ">modulus ["+u[0]+"]", ">proof ["+u[1]+"]", ">tensile ["+u[1]+"]", ">elongation ["+u[2]+"]")
	for _, r := range res.Reduced {
		red.Add(r.Specimen, r.Lot, render.Given(float64(r.Modulus)), render.Given(float64(r.Proof)),
			render.Given(float64(r.Tensile)), render.Given(float64(r.Elongation)))
	}
	if text {
		red.Title = fmt.Sprintf("%s\nDate %s, seed %d\n\n1. Raw tensile records reduced", res.Scenario, res.Date, res.Seed)
	}
	out = append(out, red)

	acc := res.Acceptance
	lotsT := render.NewTable("", "lot", "supplier", "verdict", "reasons")
	for _, l := range acc.Lots {
		if l.Verdict != acceptance.Conforming {
			why, _ := acceptance.DecisiveReasons(l, acc.MinSpecimens(l.Spec))
			lotsT.Add(l.Lot, l.Supplier, l.Verdict, why)
		}
	}
	if text {
		c := acc.Counts
		var specs []string
		for _, s := range acc.Specs {
			specs = append(specs, s.ID+" rev "+s.Revision)
		}
		lotsT.Title = fmt.Sprintf("2. Lot acceptance against %s: %d lots, %d conforming, %d nonconforming, %d undecided, %d not judged\nLots that did not conform:",
			strings.Join(specs, " and "), len(acc.Lots), c.Conforming, c.Nonconforming, c.Undecided, c.NotJudged)
		var flagged []string
		for _, l := range acc.Lots {
			for _, f := range l.Outliers {
				flagged = append(flagged, fmt.Sprintf("%s %s %s", f.Specimen, f.Property, render.Given(float64(f.Value))))
			}
		}
		sort.Strings(flagged)
		lotsT.Note("%d values flagged by the maximum normed residual test within their lot (alpha 0.05; kept): %s", len(flagged), strings.Join(flagged, ", "))
	}
	out = append(out, lotsT)

	al := allowablesTables(res.Allowables, res.Campaign, false)[0]
	if text {
		al.Title = fmt.Sprintf("3. Design values from the qualification campaign %s (A-basis %g%%/%g%%, B-basis %g%%/%g%% content/confidence; lotproof allowables shows the audit trail)",
			res.Allowables.Input, 100*res.Allowables.Options.A.Content, 100*res.Allowables.Options.A.Confidence,
			100*res.Allowables.Options.B.Content, 100*res.Allowables.Options.B.Confidence)
	}
	out = append(out, al)

	// One row per supplier and property: where the first signal fired,
	// and how many followed (the JSON and lotproof trend list them all).
	type key struct{ group, property string }
	first := map[key]trend.Signal{}
	count := map[key]int{}
	rules := map[key]map[string]bool{}
	var keys []key
	for _, s := range res.Trend.Signals {
		k := key{s.Group, s.Property}
		if _, ok := first[k]; !ok {
			keys = append(keys, k)
			first[k] = s
			rules[k] = map[string]bool{}
		} else if s.Period < first[k].Period {
			first[k] = s
		}
		count[k]++
		rules[k][s.Rule] = true
	}
	sort.Slice(keys, func(i, j int) bool {
		if keys[i].group != keys[j].group {
			return keys[i].group < keys[j].group
		}
		return keys[i].property < keys[j].property
	})
	sig := render.NewTable("", "supplier", "property", "first flagged", "lot", "rule", ">signals", "rules fired")
	for _, k := range keys {
		f := first[k]
		var rs []string
		for r := range rules[k] {
			rs = append(rs, r)
		}
		sort.Strings(rs)
		sig.Add(k.group, k.property, f.Period, f.Lot, render.Label{Text: trend.RuleLabel(f.Rule), Key: f.Rule}, fmt.Sprint(count[k]), render.Label{Text: trend.RuleLabels(rs), Key: strings.Join(rs, " ")})
	}
	if text {
		sig.Title = fmt.Sprintf("4. Supplier trend by quarter (control limits from %s): %d signals; the first per supplier and property (lotproof trend lists them all)", res.Trend.Baseline, len(res.Trend.Signals))
		if res.Report != "" {
			sig.Note("\n5. Report: %s", res.Report)
		}
		for _, c := range res.Cautions {
			sig.Note("Note: %s", c)
		}
	}
	out = append(out, sig)
	for i, n := range []string{"reduced", "lots", "allowables", "signals"} {
		out[i].Name = n
	}
	return out
}

// writeDemoData writes the embedded demo files into dir, which must not
// exist yet (nothing is overwritten), and says what to try with them.
func writeDemoData(dir string, st streams) error {
	files, err := demo.WriteFiles(dir)
	if err != nil {
		return usageError{err}
	}
	fmt.Fprintf(st.Out, "wrote %d demo files into %s; for example:\n"+
		"  lotproof accept %s --spec %s --spec %s\n"+
		"  lotproof reduce %s | lotproof accept - %s --spec %s\n"+
		"  lotproof allowables %s\n",
		len(files), dir,
		filepath.Join(dir, "receipts.csv"), filepath.Join(dir, "spec-steel-bar.yaml"), filepath.Join(dir, "spec-plate.yaml"),
		filepath.Join(dir, "raw"), filepath.Join(dir, "raw-hardness.csv"), filepath.Join(dir, "spec-plate.yaml"),
		filepath.Join(dir, "campaign.csv"))
	return nil
}
