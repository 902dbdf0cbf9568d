package trend

import (
	"math"

	"lotproof/lots"
	"lotproof/lots/units"
)

// Display converts the result from the stored (internal) units into the
// display units of the chosen system, in place. A property's display unit
// follows the unit it was entered in (EnteredUnits; a modulus entered in
// GPa is shown in GPa, or Msi), as lotproof summary shows it.
func (r *Result) Display(sys units.System) {
	type conv struct {
		sym string
		f   func(float64) float64
	}
	cache := map[[2]string]conv{}
	get := func(stored, property string) conv {
		key := [2]string{stored, property}
		if c, ok := cache[key]; ok {
			return c
		}
		c := conv{sym: stored, f: func(v float64) float64 { return v }}
		if u, err := units.Parse(stored); err == nil {
			shown := u
			if e, err := units.Parse(r.EnteredUnits[property]); err == nil && r.EnteredUnits[property] != "" && units.Compatible(e, u) {
				shown = e
			}
			d := shown.Display(sys)
			c = conv{sym: d.Symbol, f: func(v float64) float64 { return d.FromInternal(u.ToInternal(v)) }}
		}
		cache[key] = c
		return c
	}
	f := func(c conv, v *lots.Float) {
		if !math.IsNaN(float64(*v)) {
			*v = lots.Float(c.f(float64(*v)))
		}
	}
	unitOf := map[[3]string]string{}
	for i := range r.Periods {
		p := &r.Periods[i]
		unitOf[[3]string{p.Group, p.Material, p.Property}] = p.Unit
		c := get(p.Unit, p.Property)
		p.Unit = c.sym
		f(c, &p.Mean)
		f(c, &p.SD)
		f(c, &p.Minimum)
	}
	for i := range r.Series {
		s := &r.Series[i]
		c := get(s.Unit, s.Property)
		s.Unit = c.sym
		for _, v := range []*lots.Float{&s.Center, &s.MRBar, &s.Sigma, &s.Lower, &s.Upper, &s.SBar} {
			f(c, v)
		}
		for j := range s.Points {
			p := &s.Points[j]
			for _, v := range []*lots.Float{&p.Mean, &p.SD, &p.Lower, &p.Upper, &p.SLower, &p.SUpper, &p.EWMA, &p.EWMALow, &p.EWMAHigh} {
				f(c, v)
			}
		}
	}
	for i := range r.Signals {
		s := &r.Signals[i]
		if s.Rule == "shift_welch" {
			continue // p-value against α
		}
		c := get(unitOf[[3]string{s.Group, s.Material, s.Property}], s.Property)
		f(c, &s.Value)
		f(c, &s.Limit)
	}
}
