package lots

import (
	"math"
	"strings"

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
func (s *Specimen) Missing(i int) bool { return math.IsNaN(s.Values[i]) }

// Dataset is a validated specimen results file.
type Dataset struct {
	Source     string // file name as given ("-" for standard input)
	Digest     string // SHA-256 of the bytes read, hex
	Bytes      int64  // bytes read
	Properties []Property
	Specimens  []Specimen
	Missing    []int // per property: number of empty cells
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
		v := d.Specimens[i].Values[prop]
		if !math.IsNaN(v) {
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
	for i := range d.Specimens {
		c := d.Specimens[i].Condition
		if !seen[c] {
			seen[c] = true
			out = append(out, c)
		}
	}
	return out
}
