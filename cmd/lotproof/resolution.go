package main

import (
	"lotproof/lots"
	"lotproof/lots/render"
	"lotproof/lots/report"
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
