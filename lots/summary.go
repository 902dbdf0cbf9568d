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
	for i, g := range groups {
		out = append(out, SummarizeLot(d.Properties, d.Lot(g, i), sys))
	}
	return out
}

// SummarizeLot describes one lot as Summarize does; props are the
// properties of the lot's value columns.
func SummarizeLot(props []Property, l *Lot, sys units.System) GroupSummary {
	gs := GroupSummary{Key: l.Key, Supplier: l.Supplier, Material: l.Material, Specimens: l.Len(),
		Properties: make([]PropertySummary, 0, len(props))}
	vals := make([]float64, 0, l.Len())
	for p, prop := range props {
		u := prop.Unit.Display(sys)
		vals = vals[:0]
		for _, v := range l.Values[p] {
			if !math.IsNaN(v) {
				vals = append(vals, v)
			}
		}
		ps := PropertySummary{Property: prop.Name, Unit: u.Symbol, N: len(vals), Missing: l.Len() - len(vals),
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
	return gs
}
