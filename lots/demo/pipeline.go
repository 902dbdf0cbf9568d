package demo

import (
	"bytes"
	"context"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"strings"
	"time"

	"lotproof/lots"
	"lotproof/lots/acceptance"
	"lotproof/lots/allowables"
	"lotproof/lots/reduce"
	"lotproof/lots/render"
	"lotproof/lots/store"
	"lotproof/lots/trend"
	"lotproof/lots/units"
	"lotproof/spec"
)

// Scenario names the invented scenario in the results.
const Scenario = "Orrin Hollow Pumpworks (invented): steel bar and aluminium plate from five invented mills, 2025-Q1 to 2026-Q4"

// Baseline is the period the demo's control limits come from: the five
// quarters before Coldmere Forge's drift begins.
const Baseline = "2025-Q1..2026-Q1"

// Options of a demo run.
type Options struct {
	Date   string       // date written into the results (YYYY-MM-DD)
	Seed   uint64       // seed of the Monte Carlo bounds
	DB     string       // SQLite file the history is recorded in; "" for a temporary one
	System units.System // display unit system
	Step   func()       // called after each of the four steps (may be nil)
}

// Result is everything the demo computed, as written with --format json.
// Trend is in internal units until Trend.Display converts it (a report
// built from it does that).
type Result struct {
	Scenario   string              `json:"scenario"`
	Date       string              `json:"date"`
	Seed       uint64              `json:"seed"`
	Receipts   []lots.GroupSummary `json:"receipts"`
	Reduced    []Reduced           `json:"reduced"`
	Acceptance *acceptance.Result  `json:"acceptance"`
	Allowables *allowables.Report  `json:"allowables"`
	Trend      *trend.Result       `json:"trend"`
	Report     string              `json:"report"`
	Cautions   []string            `json:"cautions"`

	// What a report is built from.
	All        *lots.Dataset      `json:"-"` // receipts and reduced lots
	Specs      []*spec.Spec       `json:"-"`
	Judged     *acceptance.Result `json:"-"` // in internal units
	Campaign   *lots.Dataset      `json:"-"`
	TrendRes   render.Resolutions `json:"-"` // of the trend's values in display units
	RawResults []*reduce.Result   `json:"-"`
}

// Reduced is one reduced raw record, in display units.
type Reduced struct {
	Specimen   string     `json:"specimen"`
	Lot        string     `json:"lot"`
	Modulus    lots.Float `json:"modulus"`
	Proof      lots.Float `json:"proof"`
	Tensile    lots.Float `json:"tensile"`
	Elongation lots.Float `json:"elongation"`
	Units      []string   `json:"units"` // modulus, strengths, elongation
}

// Run runs the demo pipeline on the embedded scenario: reduce the raw
// records, judge every lot against its specification, derive the design
// values of the campaign, record the history in a database and trend it.
func Run(o Options) (*Result, error) {
	step := func() {
		if o.Step != nil {
			o.Step()
		}
	}
	res := &Result{Scenario: Scenario, Date: o.Date, Seed: o.Seed}

	// 1. Reduce the raw records; add the separately measured hardness.
	rs, err := reduce.ReduceFS(FS(), "raw", reduce.Options{})
	if err != nil {
		return nil, err
	}
	hardness, err := Dataset("raw-hardness.csv")
	if err != nil {
		return nil, err
	}
	newLots, err := lots.Merge("demo/raw (reduced) + demo/raw-hardness.csv", reduce.Dataset(rs, "demo/raw"), hardness)
	if err != nil {
		return nil, err
	}
	res.Reduced = reducedRows(newLots, o.System)
	res.RawResults = rs
	step()

	// 2. Judge every lot, old and new, against its specification.
	rec, err := Dataset("receipts.csv")
	if err != nil {
		return nil, err
	}
	groups, err := rec.Group(lots.ByLot, nil)
	if err != nil {
		return nil, err
	}
	res.Receipts = lots.Summarize(rec, groups, o.System)
	all, err := lots.Merge("demo/receipts.csv + reduced records", rec, newLots)
	if err != nil {
		return nil, err
	}
	specs, err := Specs()
	if err != nil {
		return nil, err
	}
	acc, err := acceptance.Judge(all, specs, lots.ByLot)
	if err != nil {
		return nil, err
	}
	res.Acceptance = acc.Display(o.System)
	res.All, res.Specs, res.Judged = all, specs, acc
	step()

	// 3. Design values from the qualification campaign.
	camp, err := Dataset("campaign.csv")
	if err != nil {
		return nil, err
	}
	aopt := allowables.DefaultOptions()
	aopt.Seed, aopt.System = o.Seed, o.System
	res.Allowables, err = allowables.Analyze(camp, aopt, o.Date)
	res.Campaign = camp
	if err != nil {
		return nil, err
	}
	step()

	// 4. Record the history in a database and trend it.
	res.TrendRes = render.Resolutions{}
	if res.Trend, err = history(rec, newLots, specs, o.Date, o.DB, res.TrendRes, o.System); err != nil {
		return nil, err
	}
	step()
	res.Cautions = append([]string{lots.Caution}, lots.ExtraCautions(append(append([]string{}, acc.Cautions...), res.Allowables.Cautions...))...)
	return res, nil
}

// Dataset reads one embedded results file (named demo/NAME).
func Dataset(name string) (*lots.Dataset, error) {
	b, err := Read(name)
	if err != nil {
		return nil, err
	}
	return lots.ReadCSV(bytes.NewReader(b), "demo/"+name)
}

// Specs reads the embedded purchase specifications.
func Specs() ([]*spec.Spec, error) {
	var specs []*spec.Spec
	for _, name := range []string{"spec-steel-bar.yaml", "spec-plate.yaml"} {
		b, err := Read(name)
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

// history records the receipts and the new lots, with their verdicts, into
// a SQLite database (db, or a temporary one; two imports, as an inspector
// would make them) and computes the quarterly trend by supplier.
func history(receipts, newLots *lots.Dataset, specs []*spec.Spec, date, db string, rs render.Resolutions, sys units.System) (*trend.Result, error) {
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
		judged, err := acceptance.Judge(d, specs, lots.ByLot)
		if err != nil {
			return nil, err
		}
		verdicts := make([]store.Verdict, 0, len(judged.Lots))
		for _, l := range judged.Lots {
			verdicts = append(verdicts, store.Verdict{Lot: l.Lot, Spec: l.Spec, Verdict: l.Verdict})
		}
		if _, err := s.Record(ctx, d, verdicts, store.LimitsOf(specs), store.Meta{Time: when, User: "demo", Version: lots.Version}); err != nil {
			return nil, err
		}
	}
	return trend.ComputeShown(ctx, s, trend.Options{Baseline: Baseline}, rs, sys)
}

func reducedRows(d *lots.Dataset, sys units.System) []Reduced {
	col := func(name string) int { return d.Property(name) }
	e, p, t, a := col("modulus"), col("proof"), col("tensile"), col("elongation")
	var rows []Reduced
	for _, s := range d.All() {
		r := Reduced{Specimen: s.ID, Lot: s.Lot, Modulus: lots.NaN, Proof: lots.NaN, Tensile: lots.NaN, Elongation: lots.NaN}
		for _, c := range []struct {
			i   int
			dst *lots.Float
		}{{e, &r.Modulus}, {p, &r.Proof}, {t, &r.Tensile}, {a, &r.Elongation}} {
			if c.i >= 0 && !s.Missing(c.i) {
				u := d.Properties[c.i].Unit.Display(sys)
				*c.dst = lots.Float(u.FromInternal(s.Values[c.i]))
			}
		}
		for _, i := range []int{e, p, a} {
			if i >= 0 {
				r.Units = append(r.Units, d.Properties[i].Unit.Display(sys).Symbol)
			}
		}
		rows = append(rows, r)
	}
	return rows
}

// WriteFiles writes the embedded demo files (all but the READMEs) into
// dir, which must not exist yet (nothing is overwritten), and returns
// their paths relative to it.
func WriteFiles(dir string) ([]string, error) {
	if _, err := os.Stat(dir); err == nil {
		return nil, fmt.Errorf("--data-dir %s exists: give a new folder (nothing is overwritten)", dir)
	}
	fsys := FS()
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
		return nil, err
	}
	for _, p := range files {
		b, err := fs.ReadFile(fsys, p)
		if err != nil {
			return nil, err
		}
		dst := filepath.Join(dir, filepath.FromSlash(p))
		if err := os.MkdirAll(filepath.Dir(dst), 0o755); err != nil {
			return nil, err
		}
		if err := os.WriteFile(dst, b, 0o644); err != nil {
			return nil, err
		}
	}
	return files, nil
}
