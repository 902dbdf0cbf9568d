package main

import (
	"encoding/json"
	"fmt"
	"io"
	"math"
	"strings"

	"github.com/spf13/cobra"

	"lotproof/lots"
	"lotproof/lots/input"
	"lotproof/lots/render"
	"lotproof/lots/sizing"
	"lotproof/lots/units"
)

type sizeOptions struct {
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
	Width       float64 // rectangle width (length unit)
	Thickness   float64 // rectangle thickness, for the reverse
	Outer       float64 // tube outer diameter or round diameter (reverse)
	Inner       float64 // tube inner diameter (reverse)
	Out         output
}

func init() { register(newSizeCmd) }

func newSizeCmd(g *globalOptions, st streams) *cobra.Command {
	o := sizeOptions{StressUnit: "MPa", LoadUnit: "kN", Shape: "round", Basis: "b"}
	cmd := &cobra.Command{
		Use:   "size",
		Short: "Size an axial member from an allowable stress, or find the largest load for a section",
		Long: `size divides a design value (typed in, or an A- or B-basis value from
"lotproof allowables --format json") by a factor of safety and gives the
cross-section an axial tension member needs for a load: a round bar's
diameter, a rectangle's thickness for a given width, or a tube's inner
diameter for a given outer diameter. Without --load it works the other way:
the largest axial load the section given by --diameter (round), --width and
--thickness (rectangle) or --diameter and --inner (tube) may carry.

Lengths are in mm (--units si) or in (--units us). Uniform axial stress only.`,
		Example: `  lotproof size --design-value 930 --safety 1.5 --load 120 --load-unit kN
  lotproof size --from allowables.json --property tensile --basis b --safety 2 --load 40 --shape tube --diameter 30
  lotproof size --design-value 135 --stress-unit ksi --safety 1.5 --shape round --diameter 0.75 --units us`,
		Args: exactArgs(0, "no arguments (everything is given by flags)"),
	}
	cmd.RunE = withOutput(g, st, &o.Out, func(args []string) error {
		if !cmd.Flags().Changed("load-unit") && o.Out.System == units.US {
			o.LoadUnit = "kip" // loads in US customary units with --units us
		}
		return runSize(o, st)
	})
	f := cmd.Flags()
	f.Float64Var(&o.DesignValue, "design-value", 0, "design value (stress) to divide by the factor of safety")
	f.StringVar(&o.StressUnit, "stress-unit", o.StressUnit, "unit of --design-value: MPa, ksi, psi, GPa ...")
	f.StringVar(&o.From, "from", "", "take the design value from this allowables JSON file")
	f.StringVar(&o.Property, "property", "", "with --from: the property")
	f.StringVar(&o.Condition, "condition", "", "with --from: the test condition (default: the only one)")
	f.StringVar(&o.Basis, "basis", o.Basis, "with --from: a or b")
	f.Float64Var(&o.Safety, "safety", 0, "factor of safety (at least 1)")
	f.Float64Var(&o.Load, "load", 0, "axial load to carry (omit to find the largest load for a section)")
	f.StringVar(&o.LoadUnit, "load-unit", o.LoadUnit, "unit of --load and of the largest load: N, kN, lbf or kip (kip with --units us)")
	f.StringVar(&o.Shape, "shape", o.Shape, "round, rectangle or tube")
	f.Float64Var(&o.Width, "width", 0, "rectangle width")
	f.Float64Var(&o.Thickness, "thickness", 0, "rectangle thickness (largest-load mode)")
	f.Float64Var(&o.Outer, "diameter", 0, "round bar diameter (largest-load mode) or tube outer diameter")
	f.Float64Var(&o.Inner, "inner", 0, "tube inner diameter (largest-load mode)")
	return cmd
}

// sizeResult is what size prints.
type sizeResult struct {
	DesignValue float64        `json:"design_value"`
	Source      string         `json:"design_value_source"`
	Safety      float64        `json:"factor_of_safety"`
	Allowable   float64        `json:"allowable_stress"`
	StressUnit  string         `json:"stress_unit"`
	Load        float64        `json:"load"`
	LoadUnit    string         `json:"load_unit"`
	Mode        string         `json:"mode"` // "section for load" or "load for section"
	Section     sizing.Section `json:"section"`
	LengthUnit  string         `json:"length_unit"`
	Cautions    []string       `json:"cautions"`
}

var loadToN = map[string]float64{"n": 1, "kn": 1e3, "lbf": 4.4482216152605, "kip": 4448.2216152605}

func runSize(o sizeOptions, st streams) error {
	for _, f := range []struct {
		name string
		v    float64
	}{{"--design-value", o.DesignValue}, {"--safety", o.Safety}, {"--load", o.Load}, {"--width", o.Width},
		{"--thickness", o.Thickness}, {"--diameter", o.Outer}, {"--inner", o.Inner}} {
		if math.IsNaN(f.v) || math.IsInf(f.v, 0) || f.v < 0 || f.v > 1e12 {
			return usageError{fmt.Errorf("%s %g: give a finite, non-negative number below 1e12", f.name, f.v)}
		}
	}
	value, source, unit, err := sizeDesignValue(o)
	if err != nil {
		return err
	}
	lf, ok := loadToN[strings.ToLower(o.LoadUnit)]
	if !ok {
		return usageError{fmt.Errorf("unknown load unit %q: expected N, kN, lbf or kip", o.LoadUnit)}
	}
	lengthUnit, mm := "mm", 1.0
	if o.Out.System == units.US {
		lengthUnit, mm = "in", 25.4
	}
	allowDisp, err := sizing.Allowable(value, o.Safety)
	if err != nil {
		return usageError{err}
	}
	allowMPa := unit.ToInternal(allowDisp)
	res := sizeResult{DesignValue: value, Source: source, Safety: o.Safety, Allowable: allowDisp, StressUnit: unit.Symbol,
		LoadUnit: o.LoadUnit, LengthUnit: lengthUnit, Cautions: sizing.Cautions}
	shape := sizing.Shape(strings.ToLower(o.Shape))
	if o.Load != 0 {
		res.Mode, res.Load = "section for load", o.Load
		area, err := sizing.Area(o.Load*lf, allowMPa)
		if err != nil {
			return usageError{err}
		}
		given := o.Width
		if shape == sizing.Tube {
			given = o.Outer
		}
		sec, err := sizing.Size(shape, area, given*mm)
		if err != nil {
			return usageError{err}
		}
		res.Section = scaleSection(sec, 1/mm)
	} else {
		res.Mode = "load for section"
		sec := scaleSection(sizing.Section{Shape: shape, Diameter: o.Outer, Inner: o.Inner, Width: o.Width, Thickness: o.Thickness}, mm)
		a, err := sizing.AreaOf(sec)
		if err != nil {
			return usageError{err}
		}
		sec.Area = a
		p, err := sizing.MaxLoad(sec, allowMPa)
		if err != nil {
			return usageError{err}
		}
		res.Load = p / lf
		res.Section = scaleSection(sec, 1/mm)
	}
	return emit(st.Out, func(w io.Writer) error {
		if o.Out.Format == render.JSON {
			return render.WriteJSON(w, res)
		}
		t := render.NewTable("", "quantity", ">value", "unit")
		t.Add("design value ("+res.Source+")", render.N(res.DesignValue, 5), res.StressUnit)
		t.Add("factor of safety", render.N(res.Safety, 4), "")
		t.Add("allowable stress", render.N(res.Allowable, 5), res.StressUnit)
		t.Add("axial load", render.N(res.Load, 5), res.LoadUnit)
		s := res.Section
		switch s.Shape {
		case sizing.Round:
			t.Add("round bar diameter", render.N(s.Diameter, 5), lengthUnit)
		case sizing.Rectangle:
			t.Add("rectangle width", render.N(s.Width, 5), lengthUnit)
			t.Add("rectangle thickness", render.N(s.Thickness, 5), lengthUnit)
		case sizing.Tube:
			t.Add("tube outer diameter", render.N(s.Diameter, 5), lengthUnit)
			t.Add("tube inner diameter", render.N(s.Inner, 5), lengthUnit)
			t.Add("tube wall", render.N(s.Wall, 5), lengthUnit)
		}
		t.Add("area", render.N(s.Area, 5), lengthUnit+"^2")
		if o.Out.Format == render.Text {
			t.Title = "Axial member: " + res.Mode
			for _, c := range res.Cautions {
				t.Note("Note: %s", c)
			}
		}
		return writeTables(w, o.Out.Format, t)
	})
}

// scaleSection multiplies every length by f and the area by f^2.
func scaleSection(s sizing.Section, f float64) sizing.Section {
	s.Diameter *= f
	s.Inner *= f
	s.Wall *= f
	s.Width *= f
	s.Thickness *= f
	s.Area *= f * f
	return s
}

// sizeDesignValue returns the design value in its unit, where it came from.
func sizeDesignValue(o sizeOptions) (float64, string, units.Unit, error) {
	if o.From == "" {
		u, err := units.Parse(o.StressUnit)
		if err != nil || u.Quantity != units.Stress {
			return 0, "", u, usageError{fmt.Errorf("--stress-unit %q is not a stress unit", o.StressUnit)}
		}
		if o.DesignValue == 0 {
			return 0, "", u, usageError{fmt.Errorf("give the design value with --design-value, or an allowables result with --from")}
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
		return 0, "", units.Unit{}, usageError{fmt.Errorf("--basis %q: expected a or b", o.Basis)}
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
