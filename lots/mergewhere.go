package lots

import (
	"fmt"
	"strings"
)

// givenAt locates where one of the datasets first gave specimen id the
// value a merge conflict is about: "file:line", or "an earlier file" when
// it cannot be found. match sees the specimen as read and the columns of
// its dataset mapped to the merged property index (nil when propIndex is
// not given). Used only to word conflicts, so a linear search is fine.
func givenAt(ds []*Dataset, id string, match func(s *Specimen, cols []int) bool, propIndex ...map[string]int) string {
	for _, d := range ds {
		var cols []int
		if len(propIndex) > 0 {
			cols = make([]int, len(d.Properties))
			for j, p := range d.Properties {
				cols[j] = propIndex[0][strings.ToLower(p.Name)]
			}
		}
		for i := range d.Len() {
			if s := d.Specimen(i); s.ID == id && match(&s, cols) {
				return fmt.Sprintf("%s:%d", d.Source, s.Line)
			}
		}
	}
	return "an earlier file"
}

// identity returns a specimen's identity field by the name Merge uses.
func identity(s *Specimen, field string) string {
	switch field {
	case "lot":
		return s.Lot
	case "heat":
		return s.Heat
	case "supplier":
		return s.Supplier
	case "material":
		return s.Material
	case "tested":
		return s.Tested
	case "condition":
		return s.Condition
	}
	return ""
}
