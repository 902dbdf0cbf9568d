package main

import (
	"lotproof/lots"
	"lotproof/lots/render"
	"lotproof/lots/report"
	"lotproof/lots/store"
	"lotproof/lots/units"
)

// resolutionsOf infers each property's resolution from its values in the
// display unit of sys (render.Resolution), for the tables people read.
func resolutionsOf(d *lots.Dataset, sys units.System) render.Resolutions {
	return report.DataResolutions(d, sys)
}

// addLotResolutions takes one streamed lot's values into rs, under the
// lot's material (that of its first specimen, as its rows are labelled).
func addLotResolutions(rs render.Resolutions, props []lots.Property, l *lots.Lot, sys units.System) {
	for p, prop := range props {
		u := prop.Unit.Display(sys)
		r := rs.At(l.Material, prop.Name)
		for _, v := range l.Values[p] {
			r.Add(u.FromInternal(v))
		}
	}
}

// trendSeen takes the values a trend uses into rs, each in the unit the
// trend shows it in (trend.Result.Display: the unit the property was
// entered in, in the units of sys).
func trendSeen(rs render.Resolutions, entered map[string]string, sys units.System) func(store.LotValues) {
	conv := map[[2]string]func(float64) float64{}
	return func(v store.LotValues) {
		key := [2]string{v.Unit, v.Property}
		f, ok := conv[key]
		if !ok {
			f = func(x float64) float64 { return x }
			if u, err := units.Parse(v.Unit); err == nil {
				shown := u
				if e, err := units.Parse(entered[v.Property]); err == nil && entered[v.Property] != "" && units.Compatible(e, u) {
					shown = e
				}
				d := shown.Display(sys)
				f = func(x float64) float64 { return d.FromInternal(u.ToInternal(x)) }
			}
			conv[key] = f
		}
		r := rs.At(v.Material, v.Property)
		for _, x := range v.Values {
			r.Add(f(x))
		}
	}
}
