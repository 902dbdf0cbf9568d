package lots

import (
	"fmt"
	"iter"
	"math"
	"strings"
	"unsafe"

	"lotproof/lots/units"
)

// Property is a measured property column: its name (without the unit) and
// the unit the file gave it in. Values are held in the internal unit of the
// property's quantity (see package units).
type Property struct {
	Name string
	Unit units.Unit
}

// Label is the column heading for the property in unit u, e.g. "tensile [MPa]".
func (p Property) Label(u units.Unit) string { return p.Name + " [" + u.Symbol + "]" }

// Specimen is one tested specimen: its identity, where it came from and its
// measured values. Values[i] belongs to Dataset.Properties[i] and is in the
// internal unit; NaN marks a missing value.
type Specimen struct {
	ID        string
	Lot       string
	Heat      string
	Supplier  string
	Material  string
	Tested    string // ISO 8601 date (YYYY-MM-DD) or empty
	Condition string // test environment label, empty when not given
	Values    []float64
	Line      int // line (CSV) or row (xlsx) it was read from
}

// Missing reports whether the specimen has no value for property i.
func (s Specimen) Missing(i int) bool { return math.IsNaN(s.Values[i]) }

// Dataset is a validated specimen results file. Its specimens are held
// in columns: the identity strings (lot, heat, supplier, material, test
// date, condition) once per distinct combination with one 4-byte index per
// specimen, the ids packed in shared blocks, the values in one array. With
// three properties and ids of about ten characters that is about 60 bytes
// a specimen, against about 200 for a slice of Specimen structs (issue:
// bounded memory at a large buyer's scale). Specimen(i) gives one back.
type Dataset struct {
	Source     string // file name as given ("-" for standard input)
	Digest     string // SHA-256 of the bytes read, hex
	Bytes      int64  // bytes read
	Properties []Property
	Missing    []int // per property: number of empty cells (CountMissing)

	np      int              // values per specimen, fixed by the first Add
	n       int              // specimens
	ids     column[string]   // specimen ids, packed in text's blocks
	kinds   column[uint32]   // per specimen: index into idents
	lines   column[int]      // per specimen: line (CSV) or row (xlsx)
	vals    column[float64]  // np values per specimen, one after another
	idents  []ident          // distinct identities, in order of first appearance
	byIdent map[ident]uint32 // index into idents
	text    packer
}

// blockBits sets the specimens per block of a column: 16,384. Columns grow
// by whole blocks, so reading a large file never copies what it has read
// (a growing slice would, and would briefly hold it twice).
const blockBits = 14

// column holds w values per specimen in blocks of 2^blockBits specimens.
type column[T any] struct{ blocks [][]T }

// at returns the w values of specimen i.
func (c *column[T]) at(i, w int) []T {
	b, o := i>>blockBits, (i&(1<<blockBits-1))*w
	return c.blocks[b][o : o+w : o+w]
}

// add appends the values of specimen i (the next one).
func (c *column[T]) add(i int, v ...T) {
	b := i >> blockBits
	if b == len(c.blocks) {
		c.blocks = append(c.blocks, make([]T, 0, len(v)<<blockBits))
	}
	c.blocks[b] = append(c.blocks[b], v...)
}

// truncate keeps the first n specimens.
func (c *column[T]) truncate(n, w int) {
	b := (n + 1<<blockBits - 1) >> blockBits
	c.blocks = c.blocks[:b]
	if b > 0 {
		c.blocks[b-1] = c.blocks[b-1][:(n-(b-1)<<blockBits)*w]
	}
}

// ident is what a specimen shares with the others of its lot.
type ident struct {
	Lot, Heat, Supplier, Material, Tested, Condition string
}

// packer copies short strings into shared 64 KiB blocks, so that a
// million ids are a few hundred allocations instead of a million. A
// block's bytes are written once, before any string refers to them, and
// never again.
type packer struct{ block []byte }

func (p *packer) copy(s string) string {
	switch {
	case s == "":
		return ""
	case len(s) > 512:
		return strings.Clone(s)
	}
	if cap(p.block)-len(p.block) < len(s) {
		p.block = make([]byte, 0, 64<<10)
	}
	at := len(p.block)
	p.block = append(p.block, s...)
	return unsafe.String(&p.block[at], len(s))
}

// NewDataset returns a dataset of the given specimens (copied).
func NewDataset(source string, props []Property, specimens ...Specimen) *Dataset {
	d := &Dataset{Source: source, Properties: props}
	for _, s := range specimens {
		d.Add(s)
	}
	d.CountMissing()
	return d
}

// Len is the number of specimens.
func (d *Dataset) Len() int { return d.n }

// Specimen returns specimen i. Its Values are the dataset's own: writing
// to them changes the dataset.
func (d *Dataset) Specimen(i int) Specimen {
	k := &d.idents[d.kind(i)]
	return Specimen{ID: d.ID(i), Lot: k.Lot, Heat: k.Heat, Supplier: k.Supplier, Material: k.Material,
		Tested: k.Tested, Condition: k.Condition, Values: d.vals.at(i, d.np), Line: d.lines.at(i, 1)[0]}
}

// ID is the id of specimen i.
func (d *Dataset) ID(i int) string { return d.ids.at(i, 1)[0] }

// kind is the index of specimen i's identity.
func (d *Dataset) kind(i int) uint32 { return d.kinds.at(i, 1)[0] }

// Value is the value of property p of specimen i (NaN when missing).
func (d *Dataset) Value(i, p int) float64 { return d.vals.at(i, d.np)[p] }

// All iterates over the specimens in file order.
func (d *Dataset) All() iter.Seq2[int, Specimen] {
	return func(yield func(int, Specimen) bool) {
		for i := range d.n {
			if !yield(i, d.Specimen(i)) {
				return
			}
		}
	}
}

// Add appends a copy of s. Every specimen of a dataset has the same
// number of values (that of the first one added).
func (d *Dataset) Add(s Specimen) {
	if d.n == 0 && d.np == 0 {
		d.np = len(s.Values)
	}
	if len(s.Values) != d.np {
		panic(fmt.Sprintf("lots: specimen %q has %d values, the dataset %d", s.ID, len(s.Values), d.np))
	}
	d.ids.add(d.n, d.text.copy(s.ID))
	d.kinds.add(d.n, d.identity(s))
	d.lines.add(d.n, s.Line)
	d.vals.add(d.n, s.Values...)
	d.n++
}

// Set replaces specimen i by a copy of s (same number of values).
func (d *Dataset) Set(i int, s Specimen) {
	if len(s.Values) != d.np {
		panic(fmt.Sprintf("lots: specimen %q has %d values, the dataset %d", s.ID, len(s.Values), d.np))
	}
	if s.ID != d.ID(i) {
		d.ids.at(i, 1)[0] = d.text.copy(s.ID)
	}
	d.kinds.at(i, 1)[0] = d.identity(s)
	d.lines.at(i, 1)[0] = s.Line
	copy(d.vals.at(i, d.np), s.Values)
}

// Truncate keeps the first n specimens.
func (d *Dataset) Truncate(n int) {
	d.ids.truncate(n, 1)
	d.kinds.truncate(n, 1)
	d.lines.truncate(n, 1)
	d.vals.truncate(n, d.np)
	d.n = n
}

// identity returns the index of s's identity, adding it when new.
// Specimens of one lot usually come together, so the last one is tried
// first.
func (d *Dataset) identity(s Specimen) uint32 {
	k := ident{s.Lot, s.Heat, s.Supplier, s.Material, s.Tested, s.Condition}
	if d.n > 0 {
		if last := d.kind(d.n - 1); d.idents[last] == k {
			return last
		}
	}
	if i, ok := d.byIdent[k]; ok {
		return i
	}
	if d.byIdent == nil {
		d.byIdent = map[ident]uint32{}
	}
	if len(d.idents) == math.MaxUint32 {
		panic("lots: more than 2^32 distinct specimen identities")
	}
	k = ident{d.text.copy(k.Lot), d.text.copy(k.Heat), d.text.copy(k.Supplier), d.text.copy(k.Material), d.text.copy(k.Tested), d.text.copy(k.Condition)}
	i := uint32(len(d.idents))
	d.idents = append(d.idents, k)
	d.byIdent[k] = i
	return i
}

// CountMissing sets Missing from the values.
func (d *Dataset) CountMissing() {
	d.Missing = make([]int, max(d.np, len(d.Properties)))
	for _, b := range d.vals.blocks {
		for i, v := range b {
			if math.IsNaN(v) {
				d.Missing[i%d.np]++
			}
		}
	}
}

// Property returns the index of the property with the given name (case is
// ignored) or -1.
func (d *Dataset) Property(name string) int {
	for i, p := range d.Properties {
		if strings.EqualFold(p.Name, strings.TrimSpace(name)) {
			return i
		}
	}
	return -1
}

// PropertyNames lists the property names in file order.
func (d *Dataset) PropertyNames() []string {
	out := make([]string, len(d.Properties))
	for i, p := range d.Properties {
		out[i] = p.Name
	}
	return out
}

// Values returns the non-missing values of property prop for the specimens
// at the given indexes, in that order, with their specimen indexes.
func (d *Dataset) Values(prop int, specimens []int) (vals []float64, idx []int) {
	for _, i := range specimens {
		v := d.Value(i, prop)
		if !math.IsNaN(v) {
			if vals == nil {
				vals, idx = make([]float64, 0, len(specimens)), make([]int, 0, len(specimens))
			}
			vals = append(vals, v)
			idx = append(idx, i)
		}
	}
	return vals, idx
}

// Conditions lists the distinct test conditions in order of first
// appearance ("" stands for specimens without a condition).
func (d *Dataset) Conditions() []string {
	seen := map[string]bool{}
	var out []string
	kindSeen := make([]bool, len(d.idents))
	for i := range d.n {
		k := d.kind(i)
		if kindSeen[k] {
			continue
		}
		kindSeen[k] = true
		c := d.idents[k].Condition
		if !seen[c] {
			seen[c] = true
			out = append(out, c)
		}
	}
	return out
}
