package lots

import (
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"math"
	"strconv"
	"strings"

	"lotproof/lots/units"
)

// Merge combines results files into one dataset, for example tensile
// results reduced from raw records with hardness results of the same
// specimens. Properties are matched by name (case ignored) and must
// measure the same quantity (hardness: the same scale). Specimens with the
// same id are one specimen: their identity fields must agree where both
// give them, and a property given twice must have the same value. Order is
// that of first appearance. The digest is the SHA-256 of the inputs'
// digests, in order, joined by newlines.
func Merge(source string, ds ...*Dataset) (*Dataset, error) {
	out := &Dataset{Source: source}
	propIndex := map[string]int{}
	h := sha256.New()
	for _, d := range ds {
		fmt.Fprintln(h, d.Digest)
		out.Bytes += d.Bytes
		for _, p := range d.Properties {
			key := strings.ToLower(p.Name)
			if i, ok := propIndex[key]; ok {
				if !units.Compatible(out.Properties[i].Unit, p.Unit) {
					return nil, Inputf(d.Source, "give the property one unit of one quantity in every file",
						"property %q is in %s here but in %s in %s", p.Name, p.Unit.Symbol, out.Properties[i].Unit.Symbol, ds[0].Source)
				}
				continue
			}
			propIndex[key] = len(out.Properties)
			out.Properties = append(out.Properties, p)
		}
	}
	np := len(out.Properties)
	byID := map[string]int{}
	var probs problems
	var merged []Specimen
	for di, d := range ds {
		cols := make([]int, len(d.Properties))
		for j, p := range d.Properties {
			cols[j] = propIndex[strings.ToLower(p.Name)]
		}
		for _, s := range d.All() {
			where := fmt.Sprintf("%s:%d", d.Source, s.Line)
			i, seen := byID[s.ID]
			if !seen {
				c := s
				c.Values = make([]float64, np)
				for k := range c.Values {
					c.Values[k] = math.NaN()
				}
				for j, v := range s.Values {
					c.Values[cols[j]] = v
				}
				byID[s.ID] = len(merged)
				merged = append(merged, c)
				continue
			}
			t := &merged[i]
			for _, f := range []struct {
				name     string
				dst, src *string
			}{{"lot", &t.Lot, &s.Lot}, {"heat", &t.Heat, &s.Heat}, {"supplier", &t.Supplier, &s.Supplier},
				{"material", &t.Material, &s.Material}, {"tested", &t.Tested, &s.Tested}, {"condition", &t.Condition, &s.Condition}} {
				switch {
				case *f.src == "" || *f.src == *f.dst:
				case *f.dst == "":
					*f.dst = *f.src
				default:
					probs.add(where, fmt.Sprintf("specimen %q: %s %q differs from %q given at %s", s.ID, f.name, *f.src, *f.dst,
						givenAt(ds[:di+1], s.ID, func(e *Specimen, _ []int) bool { return identity(e, f.name) == *f.dst })), "make the files agree")
				}
			}
			for j, v := range s.Values {
				k := cols[j]
				switch {
				case math.IsNaN(v):
				case math.IsNaN(t.Values[k]):
					t.Values[k] = v
				case t.Values[k] != v:
					u := out.Properties[k].Unit
					probs.add(where, fmt.Sprintf("specimen %q: %s is %s %s here but %s %s at %s", s.ID, out.Properties[k].Name,
						strconv.FormatFloat(u.FromInternal(v), 'g', -1, 64), u.Symbol, strconv.FormatFloat(u.FromInternal(t.Values[k]), 'g', -1, 64), u.Symbol,
						givenAt(ds[:di+1], s.ID, func(e *Specimen, c []int) bool {
							for jj, ci := range c {
								if ci == k && e.Values[jj] == t.Values[k] {
									return true
								}
							}
							return false
						}, propIndex)), "keep one value")
				}
			}
		}
	}
	if err := probs.err(); err != nil {
		return nil, err
	}
	out.Digest = hex.EncodeToString(h.Sum(nil))
	out.np = np
	for _, s := range merged {
		out.Add(s)
	}
	out.CountMissing()
	return out, nil
}
