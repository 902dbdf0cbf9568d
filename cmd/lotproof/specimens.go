package main

import (
	"io"
	"strconv"

	"github.com/spf13/cobra"

	"lotproof/lots"
	"lotproof/lots/acceptance/specimens"
	"lotproof/lots/render"
	"lotproof/spec"
)

type specimensOptions struct {
	Data                string
	Spec, Property      string
	Mean, SD            float64
	Min, Max            float64
	Unit                string
	Content, Confidence float64
	Target              float64
	MinN, MaxN          int
	set                 map[string]bool
	Input               inputOptions
	Out                 output
}

func newSpecimensCmd(g *globalOptions, st streams) *cobra.Command {
	var o specimensOptions
	cmd := &cobra.Command{
		Use:   "specimens --mean M --sd S --min L [--content p --confidence g] [--target 0.9] | --spec SPEC.yaml --property P DATA",
		Short: "Probability of a conforming verdict as the number of specimens grows",
		Long: `specimens plans how many specimens to test per lot. For a lot whose property
has mean M and standard deviation S, it prints, for each number of
specimens n, the probability that the one-sided (content p, confidence g)
tolerance bound meets the limit (mean - k*SD >= L, or mean + k*SD <= U),
computed exactly from the noncentral t distribution, and the smallest n at
which that probability reaches the target (default 0.9).

With --spec, --property and a results file DATA, the limit, content,
confidence and minimum specimens come from the specification, and M and S
from the lots of the specification's material in DATA (grand mean and
pooled within-lot SD: the outlook for a typical lot); --mean and --sd
override them. When the specification gives a minimum and a maximum, the
limit nearer the mean (in SDs) is used. The probability counts the
tolerance-bound criterion only; a specification that also rejects on
individual values lowers it slightly.`,
		Args: maxArgs(1, "one results file"),
		RunE: func(cmd *cobra.Command, args []string) error {
			var err error
			if o.Out, err = g.resolve(st); err != nil {
				return err
			}
			if len(args) == 1 {
				o.Data = args[0]
			}
			o.set = map[string]bool{}
			for _, f := range []string{"mean", "sd", "min", "max", "content", "confidence", "min-specimens"} {
				o.set[f] = cmd.Flags().Changed(f)
			}
			return runSpecimens(o, st)
		},
	}
	f := cmd.Flags()
	f.Float64Var(&o.Mean, "mean", 0, "lot mean, in --unit")
	f.Float64Var(&o.SD, "sd", 0, "lot standard deviation, in --unit")
	f.Float64Var(&o.Min, "min", 0, "specification minimum, in --unit")
	f.Float64Var(&o.Max, "max", 0, "specification maximum, in --unit (instead of --min)")
	f.StringVar(&o.Unit, "unit", "MPa", "unit of --mean, --sd, --min and --max")
	f.Float64Var(&o.Content, "content", 0.90, "content p of the tolerance bound")
	f.Float64Var(&o.Confidence, "confidence", 0.90, "confidence g of the tolerance bound")
	f.Float64Var(&o.Target, "target", 0.90, "wanted probability of a conforming verdict")
	f.IntVar(&o.MinN, "min-specimens", 2, "smallest number of specimens shown (the specification's minimum with --spec)")
	f.IntVar(&o.MaxN, "max-n", 30, "largest number of specimens shown")
	f.StringVar(&o.Spec, "spec", "", "specification file (YAML) giving the limit and rule")
	f.StringVar(&o.Property, "property", "", "property of the specification (with --spec)")
	addInputFlags(cmd, &o.Input)
	return cmd
}

func init() { register(newSpecimensCmd) }

func runSpecimens(o specimensOptions, st streams) error {
	po := specimens.Options{Property: o.Property, Mean: o.Mean, SD: o.SD, Min: o.Min, Max: o.Max, Unit: o.Unit,
		Content: o.Content, Confidence: o.Confidence, Target: o.Target, MinN: o.MinN, MaxN: o.MaxN, Set: o.set, System: o.Out.System}
	if err := po.Check(o.Spec != "", o.Data != ""); err != nil {
		return usageError{err}
	}
	var s *spec.Spec
	var d *lots.Dataset
	var by lots.GroupBy
	if o.Spec != "" {
		var err error
		if s, err = spec.ReadFile(o.Spec); err != nil {
			return err
		}
		if _, err := specimens.Limit(s, o.Property); err != nil {
			return err
		}
		if d, by, err = readData(o.Data, o.Input, st); err != nil {
			return err
		}
	}
	res, err := specimens.Plan(po, s, d, by)
	if err != nil {
		return err
	}
	return emit(st.Out, func(w io.Writer) error {
		if o.Out.Format == render.JSON {
			return render.WriteJSON(w, res)
		}
		t := render.NewTable("Probability of a conforming verdict", ">n", ">k", ">probability", "target")
		for _, r := range res.Rows {
			mark := ""
			if r.N == res.SmallestN {
				mark = "reached"
			}
			t.Add(strconv.Itoa(r.N), render.F(float64(r.K), 4), render.F(float64(r.Prob), 4), mark)
		}
		word := "minimum"
		if res.Side == "max" {
			word = "maximum"
		}
		t.Note("Mean %.5g %s, SD %.4g %s, %s %.5g %s: margin %.3f SD; content %g, confidence %g, target %g.", res.Mean, res.Unit, res.SD, res.Unit, word, res.Limit, res.Unit, res.Margin, res.Content, res.Confidence, res.Target)
		if res.Spec != "" {
			t.Note("From %s, property %s, data %s.", res.Spec, res.Property, res.Source)
		}
		for _, r := range res.Reasons {
			t.Note("%s.", r)
		}
		t.Note("Method: %s.", res.Method)
		t.Note("Caution: %s", specimens.Caution)
		return writeTables(w, o.Out.Format, t)
	})
}
