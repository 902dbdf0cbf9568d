package sizing

import (
	"errors"
	"fmt"
	"math"
)

// Shape is a cross-section shape.
type Shape string

// The shapes sized.
const (
	Round     Shape = "round"     // solid round bar: diameter
	Rectangle Shape = "rectangle" // rectangle: width given, thickness found
	Tube      Shape = "tube"      // round tube: outer diameter given, inner found
)

// Cautions printed with every sizing result.
var Cautions = []string{
	"Factors of safety commonly range from about 1.2 to 4 depending on the consequence of failure and the uncertainty in loads, material and analysis (common practice); the governing code or specification decides.",
	"This is the uniform axial stress P/A only: check buckling, stress concentrations, fatigue, combined loading and joints separately.",
	"Statistical design values support, and never replace, the governing specification, regulations, local codes and licensed engineering judgement.",
}

// Allowable is the allowable stress: the design value divided by the
// factor of safety. Both must be positive and the factor at least 1.
func Allowable(designValue, safety float64) (float64, error) {
	if !(designValue > 0) || math.IsInf(designValue, 0) {
		return 0, fmt.Errorf("the design value must be a positive stress (got %g)", designValue)
	}
	if !(safety >= 1) || math.IsInf(safety, 0) {
		return 0, fmt.Errorf("the factor of safety must be at least 1 (got %g)", safety)
	}
	return designValue / safety, nil
}

// Area is the cross-section area needed to carry the axial load P at the
// allowable stress: A = P / sigma_allow. Load in N and stress in MPa give
// mm^2.
func Area(load, allowable float64) (float64, error) {
	if !(load > 0) || math.IsInf(load, 0) {
		return 0, fmt.Errorf("the load must be positive (got %g)", load)
	}
	if !(allowable > 0) {
		return 0, errors.New("the allowable stress must be positive")
	}
	return load / allowable, nil
}

// Section is a sized cross-section (lengths in mm, area in mm^2).
type Section struct {
	Shape     Shape   `json:"shape"`
	Diameter  float64 `json:"diameter,omitempty"`       // round: diameter; tube: outer diameter
	Inner     float64 `json:"inner_diameter,omitempty"` // tube
	Wall      float64 `json:"wall,omitempty"`           // tube: (D - d)/2
	Width     float64 `json:"width,omitempty"`          // rectangle
	Thickness float64 `json:"thickness,omitempty"`      // rectangle
	Area      float64 `json:"area"`
}

// Size finds the smallest section of the shape with at least area A:
// round d = sqrt(4A/pi); rectangle of width b: t = A/b; tube of outer
// diameter D: d_i = sqrt(D^2 - 4A/pi), which needs D^2 > 4A/pi.
func Size(shape Shape, area, given float64) (Section, error) {
	switch shape {
	case Round:
		d := math.Sqrt(4 * area / math.Pi)
		return Section{Shape: Round, Diameter: d, Area: area}, nil
	case Rectangle:
		if !(given > 0) {
			return Section{}, errors.New("a rectangle needs its width (--width)")
		}
		return Section{Shape: Rectangle, Width: given, Thickness: area / given, Area: area}, nil
	case Tube:
		if !(given > 0) {
			return Section{}, errors.New("a tube needs its outer diameter (--outer)")
		}
		full := math.Pi * given * given / 4
		if full <= area {
			return Section{}, fmt.Errorf("a tube of outer diameter %g has at most %.4g mm^2, less than the %.4g mm^2 needed: choose a larger outer diameter (at least %.4g) or a solid bar",
				given, full, area, math.Sqrt(4*area/math.Pi))
		}
		di := math.Sqrt(given*given - 4*area/math.Pi)
		return Section{Shape: Tube, Diameter: given, Inner: di, Wall: (given - di) / 2, Area: area}, nil
	}
	return Section{}, fmt.Errorf("unknown shape %q: expected round, rectangle or tube", shape)
}

// AreaOf is the area of a given section: round pi d^2/4, rectangle b t,
// tube pi (D^2 - d^2)/4.
func AreaOf(s Section) (float64, error) {
	switch s.Shape {
	case Round:
		if !(s.Diameter > 0) {
			return 0, errors.New("a round bar needs a positive diameter")
		}
		return math.Pi * s.Diameter * s.Diameter / 4, nil
	case Rectangle:
		if !(s.Width > 0 && s.Thickness > 0) {
			return 0, errors.New("a rectangle needs a positive width and thickness")
		}
		return s.Width * s.Thickness, nil
	case Tube:
		if !(s.Diameter > 0 && s.Inner >= 0 && s.Inner < s.Diameter) {
			return 0, errors.New("a tube needs an outer diameter larger than its inner diameter")
		}
		return math.Pi * (s.Diameter*s.Diameter - s.Inner*s.Inner) / 4, nil
	}
	return 0, fmt.Errorf("unknown shape %q: expected round, rectangle or tube", s.Shape)
}

// MaxLoad is the largest axial load a section carries at the allowable
// stress: P = sigma_allow A (N for MPa and mm^2).
func MaxLoad(s Section, allowable float64) (float64, error) {
	a, err := AreaOf(s)
	if err != nil {
		return 0, err
	}
	return allowable * a, nil
}
