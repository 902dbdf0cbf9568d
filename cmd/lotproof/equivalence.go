package main

import (
	"fmt"
	"io"
	"strconv"
	"strings"

	"github.com/spf13/cobra"

	"lotproof/lots"
	"lotproof/lots/equivalence"
	"lotproof/lots/render"
)

type equivalenceOptions struct {
	Data  string // optional results file
	Test  equivalence.Options
	Input inputOptions
	Table tableOption
	Out   output
}

func newEquivalenceCmd(g *globalOptions, st streams) *cobra.Command {
	var o equivalenceOptions
	cmd := &cobra.Command{
		Use:   "equivalence --baseline-mean M --baseline-sd S [--n N] [--alpha A] [DATA --property P]",
		Short: "Test new lots for equivalence to a qualification baseline by their mean and minimum",
		Long: `equivalence computes the two acceptance limits of the mean-and-minimum
equivalence test (Vangel 2002, Technometrics 44:242; CMH-17-1G Vol. 1
section 8.4.1): a lot of n values is equivalent to a baseline with mean M and
standard deviation S when

  its mean    >= M - k_mean * S   and
  its minimum >= M - k_min  * S,

with the factors chosen so that a lot drawn from the baseline fails with
probability alpha (default 0.05), the two criteria failing separately with
equal probability. The factors are computed from the joint distribution of
the mean and the minimum of n normal values by numerical convolution.

With --n the limits for that lot size are printed. With a results file DATA
and --property, every lot is tested with the factors for its own size.
Baseline values are in --unit (default: the data column's unit, else MPa).
Exit status 1 when any lot fails.`,
		Args: maxArgs(1, "one results file"),
		RunE: func(cmd *cobra.Command, args []string) error {
			var err error
			if o.Out, err = g.resolve(st); err != nil {
				return err
			}
			if len(args) == 1 {
				o.Data = args[0]
			}
			if !cmd.Flags().Changed("baseline-mean") || !cmd.Flags().Changed("baseline-sd") {
				return usageError{fmt.Errorf("--baseline-mean and --baseline-sd are required")}
			}
			return runEquivalence(o, st)
		},
	}
	cmd.Flags().Float64Var(&o.Test.Mean, "baseline-mean", 0, "baseline (qualification) mean, in --unit")
	cmd.Flags().Float64Var(&o.Test.SD, "baseline-sd", 0, "baseline standard deviation, in --unit")
	cmd.Flags().StringVar(&o.Test.Unit, "unit", "", "unit of the baseline values (default: the data column's unit, else MPa)")
	cmd.Flags().IntVar(&o.Test.N, "n", 0, "specimens per lot for which to print the limits")
	cmd.Flags().Float64Var(&o.Test.Alpha, "alpha", 0.05, "probability that a lot from the baseline fails the test")
	cmd.Flags().StringVar(&o.Test.Property, "property", "", "property column to test (with DATA)")
	cmd.Flags().StringVar(&o.Test.Material, "material", "", "test only lots of this material (with DATA)")
	cmd.Flags().BoolVar(&o.Test.AllMaterials, "all-materials", false, "test the lots of every material in DATA against the one baseline (default: refused when DATA holds several materials)")
	addInputFlags(cmd, &o.Input)
	addTableFlag(cmd, &o.Table, "limits", "lots")
	return cmd
}

func init() { register(newEquivalenceCmd) }

func runEquivalence(o equivalenceOptions, st streams) error {
	if err := o.Table.check(); err != nil {
		return err
	}
	if err := o.Test.Check(o.Data != ""); err != nil {
		return usageError{err}
	}
	o.Test.System = o.Out.System
	var d *lots.Dataset
	var by lots.GroupBy
	var res equivalence.Result
	var err error
	// The text table's decimals come from the resolution of the tested
	// column's values over the whole file.
	rs := render.Resolutions{}
	if o.Data == "" {
		if res, err = equivalence.Test(nil, "", o.Test); err != nil {
			return err
		}
	} else {
		// One lot at a time (lots.ScanLotsFile); Begin starts afresh when
		// the file is read a second time.
		var t *equivalence.Tester
		var startErr error
		var keep func(*lots.Specimen) bool
		d, by, err = scanLotsWith(o.Data, o.Input, st, lots.LotScan{
			Begin: func(d *lots.Dataset) {
				rs = render.Resolutions{}
				if t, startErr = equivalence.NewTester(d, o.Test); startErr != nil {
					keep = func(*lots.Specimen) bool { return false }
					return
				}
				var see func(*lots.Specimen)
				if o.Out.Format == render.Text {
					p := d.Property(o.Test.Property)
					u, name := d.Properties[p].Unit.Display(o.Out.System), d.Properties[p].Name
					see = func(s *lots.Specimen) { rs.Add(s.Material, name, u.FromInternal(s.Values[p])) }
				}
				keep = t.Keep(see)
			},
			Keep: func(s *lots.Specimen) bool { return keep == nil || keep(s) },
			Lot:  func(l *lots.Lot) error { return t.Lot(l) },
		})
		if err != nil {
			// the source, as lots.Merge names it
			err = lots.GroupInputError(strings.Join(append([]string{o.Data}, o.Input.More...), " + "), err)
		} else {
			err = startErr
		}
		if err == nil {
			res, err = t.Result(d)
		}
		if err != nil {
			return err
		}
	}
	err = emit(st.Out, func(w io.Writer) error {
		if o.Out.Format == render.JSON {
			if len(res.Lots) == 0 {
				return render.WriteJSON(w, res)
			}
			// Lot by lot: a year of receipts is tens of MB of JSON.
			head := res
			head.Lots = res.Lots[:1] // a placeholder: omitempty leaves out an empty list
			return render.WriteJSONList(w, head, "lots", len(res.Lots), func(i int) any { return res.Lots[i] })
		}
		var pr render.Resolution // of the lots' values (unknown without them)
		if d != nil && o.Out.Format == render.Text {
			pr = rs.Of("", res.Property)
		}
		ft := render.NewTable("Equivalence limits", ">n", ">alpha", ">k minimum", ">k mean", ">alpha each", ">min individual limit", ">mean limit", "unit")
		for _, f := range res.Factors {
			ft.Add(strconv.Itoa(f.N), render.N(res.Alpha, 4), render.Factor(f.KMin), render.Factor(f.KMean), render.F(f.AlphaEach, 5),
				pr.Stat(float64(f.MinLimit)), pr.Stat(float64(f.MeanLimit)), res.Unit)
		}
		ft.Note("Baseline mean %s %s, SD %s %s.", pr.Stat(res.BaselineMean), res.Unit, pr.Spread(res.BaselineSD), res.Unit)
		ft.Note("Method: %s.", res.Method)
		ft.Name = "limits"
		tables := []*render.Table{ft}
		if d != nil {
			lt := render.NewTable("Lots ("+res.Property+")", string(by), "supplier", ">n", ">mean", ">min", ">mean limit", ">min limit", "verdict", "reasons")
			for _, l := range res.Lots {
				lt.Add(l.Lot, l.Supplier, strconv.Itoa(l.N), pr.Stat(float64(l.Mean)), pr.Given(float64(l.Min)),
					pr.Stat(float64(l.MeanLimit)), pr.Stat(float64(l.MinLimit)), l.Verdict, joinReasons(l.Reasons))
			}
			lt.Note("Source %s, SHA-256 %s.", res.Source, res.Digest)
			lt.Name = "lots"
			tables = append(tables, lt)
		} else if o.Table.Name == "lots" {
			return usageError{fmt.Errorf("--table lots needs a results file and --property")}
		}
		tables[len(tables)-1].Note("Caution: %s", equivalence.Caution)
		tables, err := o.Table.pick(o.Out.Format, tables)
		if err != nil {
			return err
		}
		return writeTables(w, o.Out.Format, tables...)
	})
	if err != nil {
		return err
	}
	if !res.AllEquivalent() {
		return verdictError{"one or more lots are not equivalent to the baseline (or could not be tested)"}
	}
	return nil
}

func joinReasons(r []string) string { return strings.Join(r, "; ") }
