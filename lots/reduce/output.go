package reduce

import (
	"bytes"
	"encoding/csv"
	"io/fs"
	"math"
	"path"
	"sort"
	"strconv"
	"strings"

	"lotproof/lots"
	"lotproof/lots/units"
)

// Column is a property column of the results: its name, the unit it is
// held in and a function that picks the value (internal unit) from a
// Result.
type Column struct {
	Name  string
	Unit  units.Unit
	Value func(*Result) float64
	Dec   int // decimals written in the SI display unit
	DecUS int // decimals written in the US display unit
}

func mustUnit(s string) units.Unit {
	u, err := units.Parse(s)
	if err != nil {
		panic(err) // fixed table below
	}
	return u
}

// Columns are the property columns of the specimen results, in order.
var Columns = []Column{
	{"modulus", mustUnit("GPa"), func(r *Result) float64 { return r.Modulus }, 2, 3},
	{"proof", mustUnit("MPa"), func(r *Result) float64 { return r.Proof }, 1, 2},
	{"upper yield", mustUnit("MPa"), func(r *Result) float64 { return r.UpperYield }, 1, 2},
	{"lower yield", mustUnit("MPa"), func(r *Result) float64 { return r.LowerYield }, 1, 2},
	{"tensile", mustUnit("MPa"), func(r *Result) float64 { return r.Tensile }, 1, 2},
	{"uniform elongation", mustUnit("%"), func(r *Result) float64 { return r.Uniform }, 2, 2},
	{"elongation", mustUnit("%"), func(r *Result) float64 { return r.Elongation }, 2, 2},
	{"reduction of area", mustUnit("%"), func(r *Result) float64 { return r.ReductionOfArea }, 2, 2},
	{"toughness", mustUnit("MJ/m^3"), func(r *Result) float64 { return r.Toughness }, 3, 1},
	{"resilience", mustUnit("MJ/m^3"), func(r *Result) float64 { return r.Resilience }, 4, 2},
}

// ResultsCSV writes the results as a specimen results CSV (header
// specimen,lot,heat,supplier,material,tested,condition and the property
// columns with their units in system sys; missing values are empty), the
// table every other lotproof command reads.
func ResultsCSV(rs []*Result, sys units.System) []byte {
	var b bytes.Buffer
	w := csv.NewWriter(&b)
	head := []string{"specimen", "lot", "heat", "supplier", "material", "tested", "condition"}
	for _, c := range Columns {
		head = append(head, lots.Property{Name: c.Name, Unit: c.Unit}.Label(c.Unit.Display(sys)))
	}
	w.Write(head)
	for _, r := range rs {
		row := []string{r.ID, r.Lot, r.Heat, r.Supplier, r.Material, r.Tested, r.Condition}
		for _, c := range Columns {
			v := c.Value(r)
			if math.IsNaN(v) {
				row = append(row, "")
				continue
			}
			d := c.Unit.Display(sys)
			dec := c.Dec
			if sys == units.US {
				dec = c.DecUS
			}
			row = append(row, strconv.FormatFloat(d.FromInternal(v), 'f', dec, 64))
		}
		w.Write(row)
	}
	w.Flush()
	return b.Bytes()
}

// Dataset turns results into a lots.Dataset (values in internal units, as
// the readers give them). Source names where the results came from.
func Dataset(rs []*Result, source string) *lots.Dataset {
	d := &lots.Dataset{Source: source, Missing: make([]int, len(Columns))}
	for _, c := range Columns {
		d.Properties = append(d.Properties, lots.Property{Name: c.Name, Unit: c.Unit})
	}
	for i, r := range rs {
		sp := lots.Specimen{ID: r.ID, Lot: r.Lot, Heat: r.Heat, Supplier: r.Supplier, Material: r.Material,
			Tested: r.Tested, Condition: r.Condition, Line: i + 2, Values: make([]float64, len(Columns))}
		for j, c := range Columns {
			sp.Values[j] = c.Value(r)
			if math.IsNaN(sp.Values[j]) {
				d.Missing[j]++
			}
		}
		d.Add(sp)
	}
	return d
}

// RecordExt is the file name extension of raw records in a folder.
const RecordExt = ".rec"

// ReduceFS parses and reduces every *.rec file in the folder dir of fsys
// (not its subfolders), in file name order and record order. Specimen ids
// must be unique across the folder. Problems in any file are collected and
// returned together as a *lots.InputError; names in messages are
// path.Join(dir, file).
func ReduceFS(fsys fs.FS, dir string, opt Options) ([]*Result, error) {
	ents, err := fs.ReadDir(fsys, dir)
	if err != nil {
		return nil, lots.Inputf(dir, "give a folder that holds raw records (*.rec)", "cannot read the folder: %v", err)
	}
	var names []string
	for _, e := range ents {
		if !e.IsDir() && strings.EqualFold(path.Ext(e.Name()), RecordExt) {
			names = append(names, e.Name())
		}
	}
	sort.Strings(names)
	if len(names) == 0 {
		return nil, lots.Inputf(dir, "raw record files end in .rec (see FORMAT.md)", "no %s files in the folder", RecordExt)
	}
	b := NewBatch(opt)
	for _, n := range names {
		p := path.Join(dir, n)
		f, err := fsys.Open(p)
		if err != nil {
			b.Problems(lots.Inputf(p, "check that the file can be read", "cannot read: %v", err))
			continue
		}
		recs, err := Parse(f, p)
		f.Close()
		if err != nil {
			if !b.Problems(err) {
				return nil, err
			}
			continue
		}
		if err := b.Add(recs); err != nil {
			return nil, err
		}
	}
	return b.Results()
}

// Batch reduces records as they are read, file by file, so that only
// one file's points are held at a time; it checks that specimen ids are
// unique across everything added and collects every unusable record
// into one *lots.InputError.
type Batch struct {
	opt   Options
	seen  map[string]string
	out   []*Result
	probs []lots.Problem
	more  int
}

// NewBatch starts an empty batch.
func NewBatch(opt Options) *Batch { return &Batch{opt: opt, seen: map[string]string{}} }

// Add reduces records in order. It returns an error only for a failure
// that is not a problem of the input.
func (b *Batch) Add(recs []*Record) error {
	for _, rec := range recs {
		where := rec.Where(rec.Line)
		if first, dup := b.seen[rec.ID]; dup {
			b.problem(lots.Problem{Where: where, What: "duplicate specimen id " + strconv.Quote(rec.ID) + " (first at " + first + ")", Fix: "specimen ids must be unique; rename one of the records"})
			continue
		}
		b.seen[rec.ID] = where
		r, err := Reduce(rec, b.opt)
		if b.opt.Done != nil {
			b.opt.Done()
		}
		if err != nil {
			ie, ok := err.(*lots.InputError)
			if !ok {
				return err
			}
			for _, p := range ie.Problems {
				b.problem(p)
			}
			b.more += ie.More
			continue
		}
		b.out = append(b.out, r)
	}
	return nil
}

// Problems adds located input problems found elsewhere (reading a file).
func (b *Batch) Problems(err error) bool {
	ie, ok := err.(*lots.InputError)
	if !ok {
		return false
	}
	for _, p := range ie.Problems {
		b.problem(p)
	}
	b.more += ie.More
	return true
}

func (b *Batch) problem(p lots.Problem) {
	if len(b.probs) < lots.MaxProblems {
		b.probs = append(b.probs, p)
	} else {
		b.more++
	}
}

// Results returns the results in order, or every problem found.
func (b *Batch) Results() ([]*Result, error) {
	if len(b.probs) > 0 {
		return nil, &lots.InputError{Problems: b.probs, More: b.more}
	}
	return b.out, nil
}

// ReduceAll reduces records in order, checks that specimen ids are unique
// and collects every unusable record into one *lots.InputError.
func ReduceAll(recs []*Record, opt Options) ([]*Result, error) {
	b := NewBatch(opt)
	if err := b.Add(recs); err != nil {
		return nil, err
	}
	return b.Results()
}
