package report

import (
	"fmt"
	"math"
	"strconv"

	"lotproof/lots/reduce"
	"lotproof/lots/units"
)

// ReduceSection lays out reduced tensile records: one table row per
// specimen with its properties in the display units of sys (a specimen
// with warnings is marked), the warnings and notes as a list, and the
// stress-strain curve of each specimen as drawn by reduce.PlotSVG, up to
// maxCurves of them (0: all).
func ReduceSection(rs []*reduce.Result, sys units.System, maxCurves int) (Section, error) {
	sec := Section{Title: "Tensile records", Intro: "Properties reduced from the raw load-extension records."}
	if len(rs) == 0 {
		return sec, fmt.Errorf("report: no reduced records")
	}
	cols := []string{"specimen", "lot"}
	var shown []reduce.Column
	for _, c := range reduce.Columns {
		switch c.Name {
		case "modulus", "proof", "tensile", "elongation", "reduction of area":
			shown = append(shown, c)
			cols = append(cols, ">"+c.Name+" ["+c.Unit.Display(sys).Symbol+"]")
		}
	}
	cols = append(cols, "checks")
	t := &Table{Title: "Reduced properties", Columns: Cols(cols...)}
	var remarks []string
	for _, r := range rs {
		row := Cells(r.ID, r.Lot)
		for _, c := range shown {
			du := c.Unit.Display(sys)
			dec := c.Dec
			if sys == units.US {
				dec = c.DecUS
			}
			v := c.Value(r)
			txt := "-"
			if !math.IsNaN(v) && !math.IsInf(v, 0) {
				txt = strconv.FormatFloat(du.FromInternal(v), 'f', dec, 64)
			}
			row = append(row, Cell{Text: txt})
		}
		st := Cell{Text: "no warnings", Status: OK}
		if len(r.Warnings) > 0 {
			st = Cell{Text: fmt.Sprintf("%d warnings", len(r.Warnings)), Status: Warn}
		}
		row = append(row, st)
		t.Rows = append(t.Rows, row)
		for _, w := range r.Warnings {
			remarks = append(remarks, r.ID+": warning: "+w)
		}
		for _, n := range r.Notes {
			remarks = append(remarks, r.ID+": "+n)
		}
	}
	t.Note = "A dash marks a value the record does not determine; the remarks say why."
	sec.Blocks = append(sec.Blocks, t)
	if len(remarks) > 0 {
		sec.Blocks = append(sec.Blocks, List{Title: "Remarks", Items: remarks})
	}
	for i, r := range rs {
		if maxCurves > 0 && i >= maxCurves {
			sec.Blocks = append(sec.Blocks, Paragraph(fmt.Sprintf("Curves of the other %d specimens are left out of the report.", len(rs)-maxCurves)))
			break
		}
		svg, err := reduce.PlotSVG(r)
		if err != nil {
			return sec, fmt.Errorf("report: curve of %s: %w", r.ID, err)
		}
		sec.Blocks = append(sec.Blocks, &Figure{Title: "Stress-strain curve of " + r.ID, SVG: svg,
			Caption: fmt.Sprintf("Source %s; %d points; offset %.3g%% for the proof strength.", r.Source, r.Points, 100*r.Offset)})
	}
	return sec, nil
}
