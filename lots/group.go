package lots

import (
	"fmt"
	"strings"
)

// GroupBy names what specimens are grouped by: the lot or the heat.
type GroupBy string

// The two groupings.
const (
	ByLot  GroupBy = "lot"
	ByHeat GroupBy = "heat"
)

// ParseGroupBy reads "lot" or "heat".
func ParseGroupBy(s string) (GroupBy, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "", "lot":
		return ByLot, nil
	case "heat":
		return ByHeat, nil
	}
	return "", fmt.Errorf("unknown grouping %q: expected lot or heat", s)
}

// Group is a set of specimens that share a lot (or heat), in file order.
// Supplier and Material are those of the group's specimens; when they
// disagree within a group the first one is kept and Mixed is set.
type Group struct {
	Key       string // the lot or heat label
	Supplier  string
	Material  string
	Specimens []int // indexes of the dataset's specimens
	Mixed     bool  // supplier or material differs within the group
}

// Group splits the specimens into groups by lot or heat, keeping the order
// of first appearance. With a non-nil keep, only specimens for which keep
// returns true are grouped (for example those of one test condition).
// Grouping by heat requires every kept specimen to carry a heat.
func (d *Dataset) Group(by GroupBy, keep func(*Specimen) bool) ([]Group, error) {
	index := map[string]int{}
	var out []Group
	// Specimens of one identity (lot, heat, supplier, material, date,
	// condition) fall in the same group: it is looked up once for each.
	groupOf := make([]int, len(d.idents))
	for k := range groupOf {
		groupOf[k] = -1
	}
	var s Specimen
	// First each kept specimen's group and the group sizes, then the
	// indexes into one array cut to size (no slice grows).
	of := make([]int32, d.n)
	var size []int
	for i := range d.n {
		of[i] = -1
		if keep != nil {
			s = d.Specimen(i)
			if !keep(&s) {
				continue
			}
		}
		g := groupOf[d.kind(i)]
		if g < 0 {
			if keep == nil {
				s = d.Specimen(i)
			}
			key := s.Lot
			if by == ByHeat {
				key = s.Heat
				if key == "" {
					return nil, noHeatError(d.Source, &s)
				}
			}
			var ok bool
			if g, ok = index[key]; !ok {
				g = len(out)
				index[key] = g
				out = append(out, Group{Key: key, Supplier: s.Supplier, Material: s.Material})
			}
			if gr := &out[g]; gr.Supplier != s.Supplier || gr.Material != s.Material {
				gr.Mixed = true
			}
			groupOf[d.kind(i)] = g
		}
		if g == len(size) {
			size = append(size, 0)
		}
		of[i] = int32(g)
		size[g]++
	}
	total := 0
	for _, k := range size {
		total += k
	}
	all := make([]int, 0, total)
	for g := range out {
		out[g].Specimens, all = all[:0:size[g]], all[size[g]:size[g]]
	}
	for i, g := range of {
		if g >= 0 {
			out[g].Specimens = append(out[g].Specimens, i)
		}
	}
	return out, nil
}

// InCondition returns a keep function for Group that selects one test condition.
func InCondition(c string) func(*Specimen) bool {
	return func(s *Specimen) bool { return s.Condition == c }
}
