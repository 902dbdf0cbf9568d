package main

import (
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"github.com/spf13/cobra"

	"lotproof/lots"
	"lotproof/lots/progress"
	"lotproof/lots/reduce"
	"lotproof/lots/render"
	"lotproof/lots/units"
)

type reduceOptions struct {
	Paths         []string
	ModulusRange  string  // "LO:HI" in MPa (ksi with --units us); empty: automatic
	OffsetPercent float64 // offset of the proof strength [%]
	PlotDir       string  // write one SVG per specimen here
	Out           output
}

func init() { register(newReduceCmd) }

func newReduceCmd(g *globalOptions, st streams) *cobra.Command {
	var o reduceOptions
	var showFormat bool
	cmd := &cobra.Command{
		Use:   "reduce PATH...",
		Short: "Reduce raw tensile records to specimen properties",
		Long: `reduce reads raw tensile records (lotproof's record format: a metadata block
and force against extension or strain; lotproof reduce --record-format
describes it) from files, folders of *.rec files, or - for standard input,
and computes per specimen:
modulus (least-squares elastic line, ASTM E111), 0.2 % offset proof strength
(ISO 6892-1 Rp0.2, ASTM E8/E8M offset method), upper and lower yield strength
(ISO 6892-1 ReH, ReL), tensile strength, uniform elongation (Ag), elongation
after fracture, reduction of area, toughness (area under the curve) and the
modulus of resilience.

The output is the specimen results CSV the other commands read, so
  lotproof reduce raw/ | lotproof summary -
works. --format json adds the audit of every specimen: points used for the
modulus, R^2, residual SD, toe shift, notes and warnings. A property that
cannot be determined is left empty with a warning on standard error.

Computed properties support, and never replace, the governing test standard,
specification, regulations and licensed engineering judgement.`,
		Args: func(cmd *cobra.Command, args []string) error {
			if len(args) == 0 && !showFormat {
				return usageError{fmt.Errorf("reduce expects one or more record files or folders (or -); see lotproof reduce --help")}
			}
			return nil
		},
		RunE: withOutput(g, st, &o.Out, func(args []string) error {
			if showFormat {
				_, err := io.WriteString(st.Out, reduce.FormatDoc)
				return err
			}
			o.Paths = args
			return runReduce(o, st)
		}),
	}
	cmd.Flags().StringVar(&o.ModulusRange, "modulus-range", "", "stress range LO:HI of the elastic fit in MPa (ksi with --units us); default: found automatically")
	cmd.Flags().Float64Var(&o.OffsetPercent, "offset", 0.2, "plastic strain of the proof strength in %")
	cmd.Flags().BoolVar(&showFormat, "record-format", false, "print the description of the raw record format and exit")
	cmd.Flags().StringVar(&o.PlotDir, "plot-dir", "", "write a stress-strain plot SPECIMEN.svg per specimen into this folder")
	return cmd
}

// reduceOpts turns the flags into reduce.Options.
func (o reduceOptions) reduceOpts() (reduce.Options, error) {
	var opt reduce.Options
	if !(o.OffsetPercent > 0 && o.OffsetPercent <= 5) {
		return opt, usageError{fmt.Errorf("--offset %g: expected a plastic strain in %% above 0 and at most 5, e.g. 0.2", o.OffsetPercent)}
	}
	opt.Offset = o.OffsetPercent / 100
	if o.ModulusRange != "" {
		a, b, ok := strings.Cut(o.ModulusRange, ":")
		lo, err1 := strconv.ParseFloat(strings.TrimSpace(a), 64)
		hi, err2 := strconv.ParseFloat(strings.TrimSpace(b), 64)
		if !ok || err1 != nil || err2 != nil || !(lo >= 0) || !(hi > lo) || math.IsInf(hi, 0) {
			return opt, usageError{fmt.Errorf("--modulus-range %q: expected LO:HI with 0 <= LO < HI, e.g. 40:160", o.ModulusRange)}
		}
		u, _ := units.Parse("MPa")
		u = u.Display(o.Out.System)
		opt.ModulusFrom, opt.ModulusTo = u.ToInternal(lo), u.ToInternal(hi)
	}
	return opt, nil
}

func runReduce(o reduceOptions, st streams) error {
	opt, err := o.reduceOpts()
	if err != nil {
		return err
	}
	bar := progress.New(st.Err, st.ErrTerminal, int64(reduce.CountFiles(o.Paths)), "reduce")
	rs, err := reduce.ReducePaths(o.Paths, st.In, opt, func() { bar.Add(1) })
	bar.Finish()
	if err != nil {
		return err
	}
	if o.PlotDir != "" {
		if err := reduce.WritePlots(o.PlotDir, rs); err != nil {
			return usageError{err}
		}
	}
	if o.Out.Format != render.JSON {
		for _, r := range rs {
			for _, w := range r.Warnings {
				fmt.Fprintf(st.Err, "lotproof: warning: %s: specimen %s: %s\n", r.Source, r.ID, w)
			}
		}
	}
	return emit(st.Out, func(w io.Writer) error {
		switch o.Out.Format {
		case render.JSON:
			return render.WriteJSON(w, reduce.NewReport(rs, o.Out.System))
		case render.CSV:
			_, err := w.Write(reduce.ResultsCSV(rs, o.Out.System))
			return err
		}
		return writeTables(w, o.Out.Format, reduceTable(rs, o.Out.System))
	})
}

// reduceTable lays the results out for a terminal, in display units.
func reduceTable(rs []*reduce.Result, sys units.System) *render.Table {
	cols := []string{"specimen", "lot"}
	for _, c := range reduce.Columns {
		cols = append(cols, ">"+lots.Property{Name: c.Name, Unit: c.Unit}.Label(c.Unit.Display(sys)))
	}
	cols = append(cols, ">warnings")
	t := render.NewTable("", cols...)
	for _, r := range rs {
		row := []any{r.ID, r.Lot}
		for _, c := range reduce.Columns {
			row = append(row, render.N(c.Unit.Display(sys).FromInternal(c.Value(r)), 4))
		}
		row = append(row, strconv.Itoa(len(r.Warnings)))
		t.Add(row...)
	}
	t.Note("%s", reduce.Caution)
	return t
}
