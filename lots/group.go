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
	Specimens []int // indexes into Dataset.Specimens
	Mixed     bool  // supplier or material differs within the group
}

// Group splits the specimens into groups by lot or heat, keeping the order
// of first appearance. With a non-nil keep, only specimens for which keep
// returns true are grouped (for example those of one test condition).
// Grouping by heat requires every kept specimen to carry a heat.
func (d *Dataset) Group(by GroupBy, keep func(*Specimen) bool) ([]Group, error) {
	index := map[string]int{}
	var out []Group
	for i := range d.Specimens {
		s := &d.Specimens[i]
		if keep != nil && !keep(s) {
			continue
		}
		key := s.Lot
		if by == ByHeat {
			key = s.Heat
			if key == "" {
				return nil, noHeatError(d.Source, s)
			}
		}
		g, ok := index[key]
		if !ok {
			g = len(out)
			index[key] = g
			out = append(out, Group{Key: key, Supplier: s.Supplier, Material: s.Material})
		}
		gr := &out[g]
		if gr.Supplier != s.Supplier || gr.Material != s.Material {
			gr.Mixed = true
		}
		gr.Specimens = append(gr.Specimens, i)
	}
	return out, nil
}

// InCondition returns a keep function for Group that selects one test condition.
func InCondition(c string) func(*Specimen) bool {
	return func(s *Specimen) bool { return s.Condition == c }
}
