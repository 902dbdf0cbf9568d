package render

import (
	"math"
	"strings"
)

// One formatting rule per kind of quantity, the same in every command's
// table and in the report (CSV and JSON always carry the full value):
//
//	Given    a value as measured or specified (an individual value, the
//	         minimum or maximum of the data, a specification limit):
//	         6 significant digits, trailing zeros dropped, so a value shows
//	         as it was entered (930 MPa, 8 %, 14.9 %) and a converted one
//	         (134.885 ksi) without noise
//	Stat     a statistic in the data's unit (a mean, a confidence or
//	         tolerance bound, a design value, a centre line or control
//	         limit): 5 significant digits, trailing zeros dropped
//	Spread   a standard deviation or moving range: 3 significant digits
//	Factor   a factor or index (k, Ppk): 3 decimals
//	Fraction a fraction of a lot or a probability: 3 significant digits;
//	         below one in a million "<1e-06"
//	PPM      parts per million: 3 significant digits; below 0.01 "<0.01"
//
// A missing value is "-".

// Given formats a measured or specified value.
func Given(v float64) Number { return Number{V: v, Digit: 6, Trim: true} }

// Stat formats a statistic in the data's unit.
func Stat(v float64) Number { return Number{V: v, Digit: 5, Trim: true} }

// Spread formats a standard deviation or range.
func Spread(v float64) Number { return Number{V: v, Digit: 3} }

// Factor formats a factor or index.
func Factor(v float64) Number { return Number{V: v, Digit: 3, Fixed: true} }

// Fraction formats a fraction or probability.
func Fraction(v float64) Number { return Number{V: v, Digit: 3, Floor: 1e-6} }

// PPM formats parts per million.
func PPM(v float64) Number { return Number{V: v, Digit: 3, Floor: 0.01} }

// trimZeros drops trailing zeros after a decimal point ("8.000" -> "8",
// "14.90" -> "14.9").
func trimZeros(s string) string {
	if !strings.Contains(s, ".") || strings.ContainsAny(s, "eE") {
		return s
	}
	s = strings.TrimRight(s, "0")
	return strings.TrimSuffix(s, ".")
}

// floorText is the text of a small positive value below floor.
func floorText(v, floor float64) (string, bool) {
	if floor > 0 && v > 0 && v < floor && !math.IsNaN(v) {
		return "<" + trimZeros(Num(floor, 1)), true
	}
	return "", false
}
