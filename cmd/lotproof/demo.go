package main

import (
	"bytes"
	"context"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"time"

	"github.com/spf13/cobra"

	"lotproof/lots"
	"lotproof/lots/acceptance"
	"lotproof/lots/allowables"
	"lotproof/lots/demo"
	"lotproof/lots/progress"
	"lotproof/lots/reduce"
	"lotproof/lots/render"
	"lotproof/lots/store"
	"lotproof/lots/trend"
	"lotproof/lots/units"
	"lotproof/spec"
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

// demoResult is everything the demo computed, as written with --format json.
type demoResult struct {
	Scenario   string              `json:"scenario"`
	Date       string              `json:"date"`
	Seed       uint64              `json:"seed"`
	Receipts   []lots.GroupSummary `json:"receipts"`
	Reduced    []demoReduced       `json:"reduced"`
	Acceptance *acceptance.Result  `json:"acceptance"`
	Allowables *allowables.Report  `json:"allowables"`
	Trend      *trend.Result       `json:"trend"`
	Report     string              `json:"report"`
	Cautions   []string            `json:"cautions"`
	campaign   *lots.Dataset       // for the resolution the design values print at
}

// demoReduced is one reduced raw record, in display units.
type demoReduced struct {
	Specimen   string     `json:"specimen"`
	Lot        string     `json:"lot"`
	Modulus    lots.Float `json:"modulus"`
	Proof      lots.Float `json:"proof"`
	Tensile    lots.Float `json:"tensile"`
	Elongation lots.Float `json:"elongation"`
	Units      []string   `json:"units"` // modulus, strengths, elongation
}

const demoScenario = "Orrin Hollow Pumpworks (invented): steel bar and aluminium plate from five invented mills, 2025-Q1 to 2026-Q4"

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
	res := demoResult{Scenario: demoScenario, Date: date, Seed: o.Seed}

	// 1. Reduce the raw records; add the separately measured hardness.
	rs, err := reduce.ReduceFS(demo.FS(), "raw", reduce.Options{})
	if err != nil {
		return err
	}
	hardness, err := demoData("raw-hardness.csv")
	if err != nil {
		return err
	}
	newLots, err := lots.Merge("demo/raw (reduced) + demo/raw-hardness.csv", reduce.Dataset(rs, "demo/raw"), hardness)
	if err != nil {
		return err
	}
	res.Reduced = demoReducedRows(newLots, o.Out)
	bar.Add(1)

	// 2. Judge every lot, old and new, against its specification.
	receipts, err := demoData("receipts.csv")
	if err != nil {
		return err
	}
	groups, err := receipts.Group(lots.ByLot, nil)
	if err != nil {
		return err
	}
	res.Receipts = lots.Summarize(receipts, groups, o.Out.System)
	all, err := lots.Merge("demo/receipts.csv + reduced records", receipts, newLots)
	if err != nil {
		return err
	}
	specs, err := demoSpecs()
	if err != nil {
		return err
	}
	acc, err := acceptance.Judge(all, specs, lots.ByLot)
	if err != nil {
		return err
	}
	res.Acceptance = acc.Display(o.Out.System)
	bar.Add(1)

	// 3. Design values from the qualification campaign.
	campaign, err := demoData("campaign.csv")
	if err != nil {
		return err
	}
	aopt := allowables.DefaultOptions()
	aopt.Seed, aopt.System = o.Seed, o.Out.System
	res.Allowables, err = allowables.Analyze(campaign, aopt, date)
	res.campaign = campaign
	if err != nil {
		return err
	}
	bar.Add(1)

	// 4. Record the history in a temporary database and trend it.
	trendRes := render.Resolutions{}
	tr, err := demoTrend(receipts, newLots, specs, date, o.DB, trendRes, o.Out.System)
	if err != nil {
		return err
	}
	bar.Add(1)

	// 5. The report.
	if o.Report != "" {
		doc, err := reportDocument(reportInputs{Title: "Demo: Orrin Hollow Pumpworks receipts and qualification (invented)",
			Date: date, Data: all, By: lots.ByLot, Specs: specs, Acceptance: acc, Campaign: campaign,
			Allowables: res.Allowables, Trend: tr, TrendRes: trendRes, TrendFrom: "temporary SQLite database", Reduced: rs,
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
		tr.Display(o.Out.System)
	}
	res.Trend = tr
	bar.Add(1)
	res.Cautions = append([]string{lots.Caution}, dedupe(append(append([]string{}, acc.Cautions...), res.Allowables.Cautions...))...)
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

// demoData reads one embedded results file.
func demoData(name string) (*lots.Dataset, error) {
	b, err := demo.Read(name)
	if err != nil {
		return nil, err
	}
	return lots.ReadCSV(bytes.NewReader(b), "demo/"+name)
}

// demoSpecs reads the embedded purchase specifications.
func demoSpecs() ([]*spec.Spec, error) {
	var specs []*spec.Spec
	for _, name := range []string{"spec-steel-bar.yaml", "spec-plate.yaml"} {
		b, err := demo.Read(name)
		if err != nil {
			return nil, err
		}
		s, err := spec.Parse("demo/"+name, b)
		if err != nil {
			return nil, err
		}
		specs = append(specs, s)
	}
	return specs, spec.CheckSet(specs)
}

// demoTrend records the receipts and the new lots, with their verdicts,
// into a temporary SQLite database (two imports, as an inspector would
// make them) and computes the quarterly trend by supplier.
func demoTrend(receipts, newLots *lots.Dataset, specs []*spec.Spec, date, db string, rs render.Resolutions, sys units.System) (*trend.Result, error) {
	dir, err := os.MkdirTemp("", "lotproof-demo-")
	if err != nil {
		return nil, err
	}
	defer os.RemoveAll(dir)
	ctx := context.Background()
	path := filepath.Join(dir, "history.db")
	if db != "" {
		path = db
	}
	s, err := store.Open(ctx, path)
	if err != nil {
		return nil, err
	}
	defer s.Close()
	when, _ := time.Parse("2006-01-02", date)
	for _, d := range []*lots.Dataset{receipts, newLots} {
		verdicts, _, _, err := judgeLots(d, specs, lots.ByLot)
		if err != nil {
			return nil, err
		}
		if _, err := s.Record(ctx, d, verdicts, store.LimitsOf(specs), store.Meta{Time: when, User: "demo", Version: lots.Version}); err != nil {
			return nil, err
		}
	}
	return computeTrend(ctx, s, trend.Options{Baseline: demoBaseline}, rs, sys)
}

func demoReducedRows(d *lots.Dataset, out output) []demoReduced {
	col := func(name string) int { return d.Property(name) }
	e, p, t, a := col("modulus"), col("proof"), col("tensile"), col("elongation")
	var rows []demoReduced
	for _, s := range d.Specimens {
		r := demoReduced{Specimen: s.ID, Lot: s.Lot, Modulus: lots.NaN, Proof: lots.NaN, Tensile: lots.NaN, Elongation: lots.NaN}
		for _, c := range []struct {
			i   int
			dst *lots.Float
		}{{e, &r.Modulus}, {p, &r.Proof}, {t, &r.Tensile}, {a, &r.Elongation}} {
			if c.i >= 0 && !s.Missing(c.i) {
				u := d.Properties[c.i].Unit.Display(out.System)
				*c.dst = lots.Float(u.FromInternal(s.Values[c.i]))
			}
		}
		for _, i := range []int{e, p, a} {
			if i >= 0 {
				r.Units = append(r.Units, d.Properties[i].Unit.Display(out.System).Symbol)
			}
		}
		rows = append(rows, r)
	}
	return rows
}

// demoTables lays the demo's results out: the reduced records, the lots
// that did not conform, the design values and the trend signals.
func demoTables(res demoResult, text bool) []*render.Table {
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

	al := allowablesTables(res.Allowables, res.campaign, false)[0]
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

// demoBaseline is the period the demo's control limits come from: the five
// quarters before Coldmere Forge's drift begins.
const demoBaseline = "2025-Q1..2026-Q1"

// writeDemoData writes the embedded demo files into dir, which must not
// exist yet (nothing is overwritten), and says what to try with them.
func writeDemoData(dir string, st streams) error {
	if _, err := os.Stat(dir); err == nil {
		return usageError{fmt.Errorf("--data-dir %s exists: give a new folder (nothing is overwritten)", dir)}
	}
	fsys := demo.FS()
	var files []string
	err := fs.WalkDir(fsys, ".", func(p string, e fs.DirEntry, err error) error {
		if err != nil {
			return err
		}
		if e.IsDir() || strings.HasSuffix(p, "README.md") {
			return nil
		}
		files = append(files, p)
		return nil
	})
	if err != nil {
		return err
	}
	for _, p := range files {
		b, err := fs.ReadFile(fsys, p)
		if err != nil {
			return err
		}
		dst := filepath.Join(dir, filepath.FromSlash(p))
		if err := os.MkdirAll(filepath.Dir(dst), 0o755); err != nil {
			return usageError{err}
		}
		if err := os.WriteFile(dst, b, 0o644); err != nil {
			return usageError{err}
		}
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
