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
		d.Specimens = append(d.Specimens, sp)
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
	var all []*Record
	var probs []lots.Problem
	more := 0
	collect := func(err error) bool {
		if ie, ok := err.(*lots.InputError); ok {
			for _, p := range ie.Problems {
				if len(probs) < lots.MaxProblems {
					probs = append(probs, p)
				} else {
					more++
				}
			}
			more += ie.More
			return true
		}
		return false
	}
	for _, n := range names {
		p := path.Join(dir, n)
		data, err := fs.ReadFile(fsys, p)
		if err != nil {
			collect(lots.Inputf(p, "check that the file can be read", "cannot read: %v", err))
			continue
		}
		recs, err := ParseBytes(data, p)
		if err != nil {
			if !collect(err) {
				return nil, err
			}
			continue
		}
		all = append(all, recs...)
	}
	if len(probs) > 0 {
		return nil, &lots.InputError{Problems: probs, More: more}
	}
	return ReduceAll(all, opt)
}

// ReduceAll reduces records in order, checks that specimen ids are unique
// and collects every unusable record into one *lots.InputError.
func ReduceAll(recs []*Record, opt Options) ([]*Result, error) {
	var probs []lots.Problem
	more := 0
	seen := map[string]string{}
	out := make([]*Result, 0, len(recs))
	for _, rec := range recs {
		where := rec.Where(rec.Line)
		if first, dup := seen[rec.ID]; dup {
			probs = append(probs, lots.Problem{Where: where, What: "duplicate specimen id " + strconv.Quote(rec.ID) + " (first at " + first + ")", Fix: "specimen ids must be unique; rename one of the records"})
			continue
		}
		seen[rec.ID] = where
		r, err := Reduce(rec, opt)
		if opt.Done != nil {
			opt.Done()
		}
		if err != nil {
			ie, ok := err.(*lots.InputError)
			if !ok {
				return nil, err
			}
			for _, p := range ie.Problems {
				if len(probs) < lots.MaxProblems {
					probs = append(probs, p)
				} else {
					more++
				}
			}
			continue
		}
		out = append(out, r)
	}
	if len(probs) > lots.MaxProblems {
		more += len(probs) - lots.MaxProblems
		probs = probs[:lots.MaxProblems]
	}
	if len(probs) > 0 {
		return nil, &lots.InputError{Problems: probs, More: more}
	}
	return out, nil
}
