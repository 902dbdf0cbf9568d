package render

import "math"

// MaxDecimals is the finest resolution inferred from data: values that need
// more decimals than this (for example after a conversion to US customary
// units) have no finite resolution and print by the significant-digit rules.
const MaxDecimals = 6

// Resolution is the step at which a property's values were reported, as a
// number of decimals in the display unit (0 for whole numbers such as 930,
// 1 for 14.5, 2 for 12.25). It is inferred from the values themselves, so
// it also holds for values read back from the database. The zero value is
// "unknown" (no value seen, or a value with no finite resolution); the
// formatters then fall back to Given, Stat and Spread.
//
// Printed (common practice; rounding to a stated number of digits as in
// ASTM E29):
//
//	Given   values, limits and extremes at the resolution (a limit finer
//	        than the data keeps its own decimals: it is never rounded)
//	Stat    means, bounds, design values and control limits with one
//	        decimal more
//	Spread  standard deviations and ranges with one decimal more, or 3
//	        significant digits, whichever shows more
type Resolution struct {
	Dec   int  // decimals (valid when Known)
	Known bool // every value seen is exact at Dec decimals
	bad   bool // a value had no finite resolution
}

// decimalsOf is the fewest decimals (at most MaxDecimals) at which v is
// exactly represented, allowing for the floating-point error of a unit
// conversion (0.1+0.2 is 0.3 at 1 decimal); ok is false when there are none.
func decimalsOf(v float64) (int, bool) {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, false
	}
	tol := 1e-11 * math.Max(1, math.Abs(v))
	p := 1.0
	for d := 0; d <= MaxDecimals; d++ {
		if math.Abs(math.Round(v*p)/p-v) <= tol {
			return d, true
		}
		p *= 10
	}
	return 0, false
}

// Add takes one more value in the display unit into the resolution; a
// missing value (NaN) is skipped.
func (r *Resolution) Add(v float64) {
	if math.IsNaN(v) || r.bad {
		return
	}
	d, ok := decimalsOf(v)
	if !ok {
		*r = Resolution{bad: true}
		return
	}
	if !r.Known || d > r.Dec {
		r.Dec = d
	}
	r.Known = true
}

// ResolutionOf infers the resolution of values in their display unit.
func ResolutionOf(vs ...float64) Resolution {
	var r Resolution
	for _, v := range vs {
		r.Add(v)
	}
	return r
}

// Given formats a value, limit or extreme at the resolution.
func (r Resolution) Given(v float64) Number {
	own, ok := decimalsOf(v)
	if !r.Known || !ok {
		return Given(v)
	}
	return Number{V: v, Digit: max(r.Dec, own), Fixed: true}
}

// Stat formats a mean, bound or limit computed from the data: one decimal
// more than the resolution.
func (r Resolution) Stat(v float64) Number {
	if !r.Known || math.IsInf(v, 0) {
		return Stat(v)
	}
	return Number{V: v, Digit: r.Dec + 1, Fixed: true}
}

// Spread formats a standard deviation or range: one decimal more than the
// resolution, or 3 significant digits if that shows more.
func (r Resolution) Spread(v float64) Number {
	if !r.Known || math.IsInf(v, 0) {
		return Spread(v)
	}
	dec := r.Dec + 1
	if v != 0 && !math.IsNaN(v) {
		dec = max(dec, 2-int(math.Floor(math.Log10(math.Abs(v)))))
	}
	return Number{V: v, Digit: min(dec, 12), Fixed: true}
}

// Resolutions are the resolutions of several properties, by material and
// property (one material's values may be reported at another step than
// another's, or computed). A nil map, or a property not in it, is unknown.
type Resolutions map[[2]string]*Resolution

// At is the resolution of property prop of material, to Add values to.
func (m Resolutions) At(material, prop string) *Resolution {
	k := [2]string{material, prop}
	r := m[k]
	if r == nil {
		r = &Resolution{}
		m[k] = r
	}
	return r
}

// Add takes one more value of property prop of material (in its display
// unit).
func (m Resolutions) Add(material, prop string, v float64) { m.At(material, prop).Add(v) }

// Of is the resolution of property prop of material (unknown when not
// seen); material "" is the property over every material: known only when
// every material's is, at the finest of them.
func (m Resolutions) Of(material, prop string) Resolution {
	if material != "" {
		if r := m[[2]string{material, prop}]; r != nil {
			return *r
		}
		return Resolution{}
	}
	var out Resolution
	for k, r := range m {
		if k[1] != prop {
			continue
		}
		switch {
		case r.bad || out.bad:
			out = Resolution{bad: true}
		case !out.Known:
			out = *r
		case r.Known:
			out.Dec = max(out.Dec, r.Dec)
		}
	}
	return out
}
