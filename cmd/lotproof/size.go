package main

import (
	"io"

	"github.com/spf13/cobra"

	"lotproof/lots/render"
	"lotproof/lots/sizing"
	"lotproof/lots/units"
)

type sizeOptions struct {
	Member sizing.MemberOptions
	Out    output
}

func init() { register(newSizeCmd) }

func newSizeCmd(g *globalOptions, st streams) *cobra.Command {
	o := sizeOptions{Member: sizing.MemberOptions{StressUnit: "MPa", LoadUnit: "kN", Shape: "round", Basis: "b"}}
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
			o.Member.LoadUnit = "kip" // loads in US customary units with --units us
		}
		return runSize(o, st)
	})
	f := cmd.Flags()
	f.Float64Var(&o.Member.DesignValue, "design-value", 0, "design value (stress) to divide by the factor of safety")
	f.StringVar(&o.Member.StressUnit, "stress-unit", o.Member.StressUnit, "unit of --design-value: MPa, ksi, psi, GPa ...")
	f.StringVar(&o.Member.From, "from", "", "take the design value from this allowables JSON file")
	f.StringVar(&o.Member.Property, "property", "", "with --from: the property")
	f.StringVar(&o.Member.Condition, "condition", "", "with --from: the test condition (default: the only one)")
	f.StringVar(&o.Member.Basis, "basis", o.Member.Basis, "with --from: a or b")
	f.Float64Var(&o.Member.Safety, "safety", 0, "factor of safety (at least 1)")
	f.Float64Var(&o.Member.Load, "load", 0, "axial load to carry (omit to find the largest load for a section)")
	f.StringVar(&o.Member.LoadUnit, "load-unit", o.Member.LoadUnit, "unit of --load and of the largest load: N, kN, lbf or kip (kip with --units us)")
	f.StringVar(&o.Member.Shape, "shape", o.Member.Shape, "round, rectangle or tube")
	f.Float64Var(&o.Member.Width, "width", 0, "rectangle width")
	f.Float64Var(&o.Member.Thickness, "thickness", 0, "rectangle thickness (largest-load mode)")
	f.Float64Var(&o.Member.Outer, "diameter", 0, "round bar diameter (largest-load mode) or tube outer diameter")
	f.Float64Var(&o.Member.Inner, "inner", 0, "tube inner diameter (largest-load mode)")
	return cmd
}

func runSize(o sizeOptions, st streams) error {
	o.Member.System = o.Out.System
	res, err := sizing.SizeMember(o.Member)
	if err != nil {
		return err
	}
	lengthUnit := res.LengthUnit
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
