package main

import (
	"encoding/csv"
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
	// One lot at a time: the lots are summarised (and, for CSV and JSON,
	// written to a spill buffer, so that memory does not grow with the
	// number of lots) on a second goroutine while the file is read, in the
	// order they come. A table for people keeps the summaries: the
	// values' resolutions are known only at the end.
	var sum []lots.GroupSummary
	var props []lots.Property
	var rs render.Resolutions // for tables people read only
	var buf *spillBuffer
	var cw *csv.Writer
	var items *render.JSONItems
	var failed error // of the writing goroutine
	var work chan []*lots.Lot
	var done chan struct{}
	var batch []*lots.Lot
	stop := func() {
		if work != nil {
			if len(batch) > 0 {
				work <- batch
				batch = nil
			}
			close(work)
			<-done
			work = nil
		}
	}
	defer func() { stop(); buf.close() }()
	if o.Out.Format != render.Text {
		defer streamingGC()()
	}
	by, _ := lots.ParseGroupBy(o.Input.GroupBy)
	_, _, err := scanLots(o.Data, o.Input, st, func(d *lots.Dataset) {
		stop() // a second reading starts afresh
		sum, props, batch, failed = sum[:0], d.Properties, nil, nil
		buf.close()
		buf, cw, items = &spillBuffer{}, nil, nil
		var t *render.Table
		switch o.Out.Format {
		case render.Text:
			rs = render.Resolutions{}
		case render.CSV:
			t = newSummaryTable(string(by))
			t.CSVOnly = true
			cw = csv.NewWriter(buf)
			cw.Write(t.Columns)
		case render.JSON:
			items = render.NewJSONArrayItems(buf)
		}
		work, done = make(chan []*lots.Lot, 8), make(chan struct{})
		go func(work chan []*lots.Lot, props []lots.Property, rs render.Resolutions, t *render.Table) {
			defer close(done)
			for b := range work {
				for _, l := range b {
					g := lots.SummarizeLot(props, l, o.Out.System)
					switch {
					case failed != nil:
					case t != nil:
						addSummaryRows(t, g, nil)
						failed = t.WriteCSVRows(cw)
					case items != nil:
						v, err := summaryItem(by, &g)
						if err == nil {
							err = items.Add(v)
						}
						failed = err
					default:
						sum = append(sum, g)
						addLotResolutions(rs, props, l, o.Out.System)
					}
				}
			}
		}(work, props, rs, t)
	}, func(l *lots.Lot) error {
		batch = append(batch, l)
		if len(batch) == 16 {
			work <- batch
			batch = make([]*lots.Lot, 0, 16)
		}
		return nil
	})
	stop()
	if err == nil {
		err = failed
	}
	if err != nil {
		return err
	}
	switch {
	case buf == nil: // no pass over the input began
	case cw != nil:
		cw.Flush()
		if err := cw.Error(); err != nil {
			return err
		}
		return buf.writeTo(st.Out)
	case items != nil:
		if err := items.Flush(); err != nil {
			return err
		}
		return render.WriteJSONArrayItems(st.Out, items.Len(), buf.writeTo)
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
	t := newSummaryTable(by)
	for _, g := range sum {
		addSummaryRows(t, g, rs)
	}
	return t
}

// newSummaryTable is the summary table's heading.
func newSummaryTable(by string) *render.Table {
	return render.NewTable("", by, "supplier", "property", "unit", ">n", ">missing", ">mean", ">sd", ">min", ">max")
}

// addSummaryRows adds a group's rows, one per property.
func addSummaryRows(t *render.Table, g lots.GroupSummary, rs render.Resolutions) {
	for _, p := range g.Properties {
		r := rs.Of(g.Material, p.Property)
		t.Add(g.Key, g.Supplier, p.Property, p.Unit, strconv.Itoa(p.N), strconv.Itoa(p.Missing),
			r.Stat(float64(p.Mean)), r.Spread(float64(p.SD)), r.Given(float64(p.Min)), r.Given(float64(p.Max)))
	}
}
