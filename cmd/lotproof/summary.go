package main

import (
	"io"
	"strconv"

	"github.com/spf13/cobra"

	"lotproof/lots"
	"lotproof/lots/render"
)

type summaryOptions struct {
	Data  string
	Input inputOptions
	Out   output
}

func newSummaryCmd(g *globalOptions, st streams) *cobra.Command {
	var o summaryOptions
	cmd := &cobra.Command{
		Use:   "summary DATA [DATA...]",
		Short: "Describe every lot: count, mean, SD, minimum and maximum per property",
		Long: `summary reads a specimen results file (CSV, .xlsx, or - for standard input)
and prints, for every lot (or heat) and property, the number of values, the
number missing, the mean, the sample standard deviation, the minimum and the
maximum.`,
		Args: dataArgs,
		RunE: withOutput(g, st, &o.Out, func(args []string) error {
			o.Data, o.Input.More = args[0], args[1:]
			return runSummary(o, st)
		}),
	}
	cmd.Long += multiFileHelp
	addInputFlags(cmd, &o.Input)
	return cmd
}

func addInputFlags(cmd *cobra.Command, in *inputOptions) {
	cmd.Flags().StringVar(&in.Sheet, "sheet", "", "sheet of an .xlsx workbook (default: the first)")
	cmd.Flags().StringVar(&in.GroupBy, "group-by", "lot", "group specimens by lot or heat")
}

func runSummary(o summaryOptions, st streams) error {
	// One lot at a time: the summary of each is kept, its values are not.
	var sum []lots.GroupSummary
	var props []lots.Property
	var rs render.Resolutions // for tables people read only
	_, by, err := scanLots(o.Data, o.Input, st, func(d *lots.Dataset) {
		sum, props = sum[:0], d.Properties
		if o.Out.Format == render.Text {
			rs = render.Resolutions{}
		}
	}, func(l *lots.Lot) error {
		sum = append(sum, lots.SummarizeLot(props, l, o.Out.System))
		if rs != nil {
			addLotResolutions(rs, props, l, o.Out.System)
		}
		return nil
	})
	if err != nil {
		return err
	}
	if sum == nil {
		sum = []lots.GroupSummary{}
	}
	return emit(st.Out, func(w io.Writer) error { return writeSummary(w, sum, by, rs, o.Out) })
}

// writeSummary writes a summary in the output's format; rs are the
// properties' resolutions for the table people read.
func writeSummary(w io.Writer, sum []lots.GroupSummary, by lots.GroupBy, rs render.Resolutions, out output) error {
	if out.Format == render.JSON {
		return summaryJSON(w, by, sum)
	}
	return writeTables(w, out.Format, summaryTable(string(by), sum, rs))
}

// summaryTable lays a summary out as one row per group and property.
func summaryTable(by string, sum []lots.GroupSummary, rs render.Resolutions) *render.Table {
	t := render.NewTable("", by, "supplier", "property", "unit", ">n", ">missing", ">mean", ">sd", ">min", ">max")
	for _, g := range sum {
		for _, p := range g.Properties {
			r := rs.Of(g.Material, p.Property)
			t.Add(g.Key, g.Supplier, p.Property, p.Unit, strconv.Itoa(p.N), strconv.Itoa(p.Missing),
				r.Stat(float64(p.Mean)), r.Spread(float64(p.SD)), r.Given(float64(p.Min)), r.Given(float64(p.Max)))
		}
	}
	return t
}
