package trend

import (
	"context"

	"lotproof/lots/render"
	"lotproof/lots/store"
	"lotproof/lots/units"
)

// ComputeShown is Compute with the units the properties were entered in
// (Result.EnteredUnits), so that Display shows each property as the
// summary of its results file does. When rs is not nil, the resolutions
// of the values used, in the display units of sys, go into it.
func ComputeShown(ctx context.Context, s *store.Store, o Options, rs render.Resolutions, sys units.System) (*Result, error) {
	entered, err := s.EnteredUnits(ctx)
	if err != nil {
		return nil, err
	}
	if rs != nil {
		o.Seen = seenIn(rs, entered, sys)
	}
	res, err := Compute(ctx, s, o)
	if err != nil {
		return nil, err
	}
	res.EnteredUnits = entered
	return res, nil
}

// seenIn takes the values a trend uses into rs, each in the unit the
// trend shows it in (Result.Display: the unit the property was entered
// in, in the units of sys).
func seenIn(rs render.Resolutions, entered map[string]string, sys units.System) func(store.LotValues) {
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
