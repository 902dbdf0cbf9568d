package lots

import (
	"math"

	"gonum.org/v1/gonum/stat"

	"lotproof/lots/units"
)

// PropertySummary is the plain description of one property in one group,
// in the display unit Unit.
type PropertySummary struct {
	Property string `json:"property"`
	Unit     string `json:"unit"`
	N        int    `json:"n"`
	Missing  int    `json:"missing"`
	Mean     Float  `json:"mean"`
	SD       Float  `json:"sd"`
	Min      Float  `json:"min"`
	Max      Float  `json:"max"`
}

// GroupSummary describes one lot (or heat).
type GroupSummary struct {
	Key        string            `json:"lot"`
	Supplier   string            `json:"supplier"`
	Material   string            `json:"material"`
	Specimens  int               `json:"specimens"`
	Properties []PropertySummary `json:"properties"`
}

// Summarize describes every group and property: count, missing count,
// mean, sample standard deviation (n-1; NaN for fewer than two values),
// minimum and maximum, converted to the display unit of system sys. The
// mean and variance use gonum's stat.MeanVariance, a corrected two-pass
// algorithm (Chan, Golub and LeVeque 1983).
func Summarize(d *Dataset, groups []Group, sys units.System) []GroupSummary {
	out := make([]GroupSummary, 0, len(groups))
	for _, g := range groups {
		gs := GroupSummary{Key: g.Key, Supplier: g.Supplier, Material: g.Material, Specimens: len(g.Specimens)}
		for p, prop := range d.Properties {
			u := prop.Unit.Display(sys)
			vals, _ := d.Values(p, g.Specimens)
			ps := PropertySummary{Property: prop.Name, Unit: u.Symbol, N: len(vals), Missing: len(g.Specimens) - len(vals),
				Mean: NaN, SD: NaN, Min: NaN, Max: NaN}
			if len(vals) > 0 {
				m, v := stat.MeanVariance(vals, nil)
				ps.Mean = Float(u.FromInternal(m))
				if len(vals) > 1 {
					ps.SD = Float(u.FromInternal(math.Sqrt(v)))
				}
				lo, hi := vals[0], vals[0]
				for _, x := range vals {
					lo, hi = math.Min(lo, x), math.Max(hi, x)
				}
				ps.Min, ps.Max = Float(u.FromInternal(lo)), Float(u.FromInternal(hi))
			}
			gs.Properties = append(gs.Properties, ps)
		}
		out = append(out, gs)
	}
	return out
}
