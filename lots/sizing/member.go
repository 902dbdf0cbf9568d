package sizing

import (
	"encoding/json"
	"fmt"
	"math"
	"strings"

	"lotproof/lots"
	"lotproof/lots/input"
	"lotproof/lots/units"
)

// MemberOptions describe an axial member: the design value (typed in, or
// from an allowables JSON result), the factor of safety, and the load or
// the section. Lengths are in mm (in with the US system).
type MemberOptions struct {
	DesignValue float64 // in StressUnit
	StressUnit  string
	From        string // allowables JSON
	Property    string
	Condition   string
	Basis       string // a or b
	Safety      float64
	Load        float64 // in LoadUnit; 0 with a section given: find the largest load
	LoadUnit    string
	Shape       string
	Width       float64      // rectangle width (length unit)
	Thickness   float64      // rectangle thickness, for the reverse
	Outer       float64      // tube outer diameter or round diameter (reverse)
	Inner       float64      // tube inner diameter (reverse)
	System      units.System // mm and SI loads, or in and US loads
}

// Member is the sized member, as written with --format json.
type Member struct {
	DesignValue float64  `json:"design_value"`
	Source      string   `json:"design_value_source"`
	Safety      float64  `json:"factor_of_safety"`
	Allowable   float64  `json:"allowable_stress"`
	StressUnit  string   `json:"stress_unit"`
	Load        float64  `json:"load"`
	LoadUnit    string   `json:"load_unit"`
	Mode        string   `json:"mode"` // "section for load" or "load for section"
	Section     Section  `json:"section"`
	LengthUnit  string   `json:"length_unit"`
	Cautions    []string `json:"cautions"`
}

var loadToN = map[string]float64{"n": 1, "kn": 1e3, "lbf": 4.4482216152605, "kip": 4448.2216152605}

// SizeMember gives the section an axial member needs for o.Load or, with
// no load, the largest load the section given may carry.
func SizeMember(o MemberOptions) (Member, error) {
	for _, f := range []struct {
		name string
		v    float64
	}{{"--design-value", o.DesignValue}, {"--safety", o.Safety}, {"--load", o.Load}, {"--width", o.Width},
		{"--thickness", o.Thickness}, {"--diameter", o.Outer}, {"--inner", o.Inner}} {
		if math.IsNaN(f.v) || math.IsInf(f.v, 0) || f.v < 0 || f.v > 1e12 {
			return Member{}, fmt.Errorf("%s %g: give a finite, non-negative number below 1e12", f.name, f.v)
		}
	}
	value, source, unit, err := designValue(o)
	if err != nil {
		return Member{}, err
	}
	lf, ok := loadToN[strings.ToLower(o.LoadUnit)]
	if !ok {
		return Member{}, fmt.Errorf("unknown load unit %q: expected N, kN, lbf or kip", o.LoadUnit)
	}
	lengthUnit, mm := "mm", 1.0
	if o.System == units.US {
		lengthUnit, mm = "in", 25.4
	}
	allowDisp, err := Allowable(value, o.Safety)
	if err != nil {
		return Member{}, err
	}
	allowMPa := unit.ToInternal(allowDisp)
	res := Member{DesignValue: value, Source: source, Safety: o.Safety, Allowable: allowDisp, StressUnit: unit.Symbol,
		LoadUnit: o.LoadUnit, LengthUnit: lengthUnit, Cautions: Cautions}
	shape := Shape(strings.ToLower(o.Shape))
	if o.Load != 0 {
		res.Mode, res.Load = "section for load", o.Load
		area, err := Area(o.Load*lf, allowMPa)
		if err != nil {
			return Member{}, err
		}
		given := o.Width
		if shape == Tube {
			given = o.Outer
		}
		sec, err := Size(shape, area, given*mm)
		if err != nil {
			return Member{}, err
		}
		res.Section = scaleSection(sec, 1/mm)
	} else {
		res.Mode = "load for section"
		sec := scaleSection(Section{Shape: shape, Diameter: o.Outer, Inner: o.Inner, Width: o.Width, Thickness: o.Thickness}, mm)
		a, err := AreaOf(sec)
		if err != nil {
			return Member{}, err
		}
		sec.Area = a
		p, err := MaxLoad(sec, allowMPa)
		if err != nil {
			return Member{}, err
		}
		res.Load = p / lf
		res.Section = scaleSection(sec, 1/mm)
	}
	return res, nil
}

// scaleSection multiplies every length by f and the area by f^2.
func scaleSection(s Section, f float64) Section {
	s.Diameter *= f
	s.Inner *= f
	s.Wall *= f
	s.Width *= f
	s.Thickness *= f
	s.Area *= f * f
	return s
}

// designValue returns the design value in its unit, where it came from.
func designValue(o MemberOptions) (float64, string, units.Unit, error) {
	if o.From == "" {
		u, err := units.Parse(o.StressUnit)
		if err != nil || u.Quantity != units.Stress {
			return 0, "", u, fmt.Errorf("--stress-unit %q is not a stress unit", o.StressUnit)
		}
		if o.DesignValue == 0 {
			return 0, "", u, fmt.Errorf("give the design value with --design-value, or an allowables result with --from")
		}
		return o.DesignValue, "typed in", u, nil
	}
	b, err := lots.ReadInput(o.From, input.AllowablesJSON, nil)
	if err != nil {
		return 0, "", units.Unit{}, err
	}
	var rep struct {
		Results []struct {
			Property  string   `json:"property"`
			Condition string   `json:"condition"`
			Unit      string   `json:"unit"`
			A         *float64 `json:"a_basis"`
			B         *float64 `json:"b_basis"`
		} `json:"results"`
	}
	if err := json.Unmarshal(b, &rep); err != nil {
		return 0, "", units.Unit{}, lots.Inputf(o.From, "give the JSON written by lotproof allowables --format json", "not an allowables result: %v", err)
	}
	var found []int
	for i, r := range rep.Results {
		if strings.EqualFold(r.Property, o.Property) && (o.Condition == "" || r.Condition == o.Condition) {
			found = append(found, i)
		}
	}
	if len(found) != 1 {
		return 0, "", units.Unit{}, lots.Inputf(o.From, "name one property with --property and, when there are several conditions, one --condition",
			"%d results match property %q condition %q", len(found), o.Property, o.Condition)
	}
	r := rep.Results[found[0]]
	v := r.B
	if strings.EqualFold(o.Basis, "a") {
		v = r.A
	} else if !strings.EqualFold(o.Basis, "b") {
		return 0, "", units.Unit{}, fmt.Errorf("--basis %q: expected a or b", o.Basis)
	}
	if v == nil {
		return 0, "", units.Unit{}, lots.Inputf(o.From, "use the other basis, or type the value in", "the %s-basis value of %s is not defined", strings.ToUpper(o.Basis), r.Property)
	}
	u, err := units.Parse(r.Unit)
	if err != nil || u.Quantity != units.Stress {
		return 0, "", u, lots.Inputf(o.From, "size only from a strength property", "%s is in %q, not a stress", r.Property, r.Unit)
	}
	src := fmt.Sprintf("%s-basis %s", strings.ToUpper(o.Basis), r.Property)
	if r.Condition != "" {
		src += " at " + r.Condition
	}
	return *v, src, u, nil
}
