package report

import (
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"

	"lotproof/lots/render"
	"lotproof/lots/trend"
)

// PpkTarget is the Ppk below which a period is marked with a caution: 1.33
// is the usual minimum for a characteristic in ongoing supply (common
// practice); below 1.0 the period is marked as failing.
const PpkTarget = 1.33

// TrendSection lays out a supplier trend: the periods table (Ppk below
// PpkTarget or a rejected lot marked), the signals, and for every series
// its individuals chart of lot means and its EWMA chart (all series, or
// only those with a signal when all is false), then per property the
// period means and Ppk of every group. Values are shown in the units the
// trend result carries, at the resolutions rs of the properties' values in
// those units (nil: unknown; see render.Resolution).
func TrendSection(r *trend.Result, all bool, rs render.Resolutions) (Section, error) {
	sec := Section{Title: "Supplier trend"}
	if r == nil || len(r.Periods) == 0 {
		return sec, fmt.Errorf("report: the trend has no periods")
	}
	sec.Intro = fmt.Sprintf("Lots grouped by %s, periods of one %s%s.", r.By, r.Every, rangeText(string(r.Since), string(r.Until)))

	t := &Table{Title: "Periods", Columns: Cols(r.By, "property", "period", ">lots", ">specimens", ">mean", ">SD", ">minimum", ">Ppk", ">Ppk lower bound", ">ppm below", ">lots rejected")}
	for _, p := range r.Periods {
		period := p.Period
		if p.Baseline {
			period += " (baseline)"
		}
		ppk := Cell{Text: render.Factor(float64(p.Ppk)).Text()}
		switch v := float64(p.Ppk); {
		case math.IsNaN(v):
		case v < 1:
			ppk.Status = Fail
		case v < PpkTarget:
			ppk.Status = Warn
		default:
			ppk.Status = OK
		}
		rej := Cell{Text: strconv.Itoa(p.LotsRejected) + " of " + strconv.Itoa(p.LotsJudged)}
		if p.LotsRejected > 0 {
			rej.Status = Fail
		}
		pr := rs.Of(p.Material, p.Property)
		row := Cells(p.Group, p.Property+unitText(p.Unit), period, strconv.Itoa(p.Lots), strconv.Itoa(p.Specimens),
			pr.Stat(float64(p.Mean)).Text(), pr.Spread(float64(p.SD)).Text(), pr.Given(float64(p.Minimum)).Text())
		row = append(row, ppk, Cell{Text: render.Factor(float64(p.PpkLower)).Text()}, Cell{Text: render.PPM(float64(p.PPMBelow)).Text()}, rej)
		t.Rows = append(t.Rows, row)
	}
	t.Note = fmt.Sprintf("Ppk marks: %s at or above %.2f, %s from 1.00 to %.2f, %s below 1.00 (common practice). The lower bound is the one-sided confidence bound the trend states in its methods.",
		OK.symbol(), PpkTarget, Warn.symbol(), PpkTarget, Fail.symbol())
	sec.Blocks = append(sec.Blocks, t)

	if len(r.Signals) > 0 {
		st := &Table{Title: "Signals", Columns: Cols("rule", r.By, "property", "period", "lot", ">value", ">limit", "detail")}
		for _, s := range r.Signals {
			row := []Cell{{Text: trend.RuleLabel(s.Rule), Status: Warn}}
			pr := rs.Of(s.Material, s.Property)
			row = append(row, Cells(s.Group, s.Property, s.Period, s.Lot, pr.Stat(float64(s.Value)).Text(), pr.Stat(float64(s.Limit)).Text(), s.Detail)...)
			st.Rows = append(st.Rows, row)
		}
		sec.Blocks = append(sec.Blocks, st)
	} else {
		sec.Blocks = append(sec.Blocks, Paragraph("No rule signalled."))
	}

	left := 0
	for _, s := range r.Series {
		if !all && !hasSignal(r, s) {
			left++
			continue
		}
		blocks, err := seriesCharts(r, s, rs)
		if err != nil {
			return sec, err
		}
		sec.Blocks = append(sec.Blocks, blocks...)
	}
	if left > 0 {
		sec.Blocks = append(sec.Blocks, Paragraph(fmt.Sprintf("Control and EWMA charts are drawn for the %d series with a signal; the other %d series have none (lotproof trend lists their figures).", len(r.Series)-left, left)))
	}

	blocks, err := periodPlots(r)
	if err != nil {
		return sec, err
	}
	sec.Blocks = append(sec.Blocks, blocks...)

	if len(r.Methods) > 0 {
		sec.Blocks = append(sec.Blocks, List{Title: "Methods", Items: r.Methods})
	}
	if len(r.Warnings) > 0 {
		sec.Blocks = append(sec.Blocks, List{Title: "Warnings", Items: r.Warnings})
	}
	if r.Caution != "" {
		sec.Blocks = append(sec.Blocks, Paragraph(r.Caution))
	}
	return sec, nil
}

func hasSignal(r *trend.Result, s trend.Series) bool {
	for _, sg := range r.Signals {
		if sg.Group == s.Group && sg.Property == s.Property && sg.Material == s.Material {
			return true
		}
	}
	return false
}

func seriesCharts(r *trend.Result, s trend.Series, rs render.Resolutions) ([]Block, error) {
	if len(s.Points) == 0 {
		return nil, nil
	}
	name := s.Group + ", " + s.Property
	sig := map[string]map[int]bool{"ind": {}, "ewma": {}, "s": {}}
	index := map[string]int{}
	for i, p := range s.Points {
		index[p.Lot] = i
	}
	for _, sg := range r.Signals {
		if sg.Group != s.Group || sg.Property != s.Property || sg.Material != s.Material || sg.Lot == "" {
			continue
		}
		i, ok := index[sg.Lot]
		if !ok {
			continue
		}
		switch {
		case strings.HasPrefix(sg.Rule, "we"):
			sig["ind"][i] = true
		case sg.Rule == "ewma":
			sig["ewma"][i] = true
		case sg.Rule == "s_chart":
			sig["s"][i] = true
		}
	}
	// chart gathers the points with a finite value (a lot left out of a
	// chart, such as a rejected lot on the EWMA, has none).
	chart := func(kind string, value func(trend.Point) float64, lo, hi func(trend.Point) float64) (labels []string, vals, lower, upper []float64, signals []int, left int) {
		for i, p := range s.Points {
			v := value(p)
			if math.IsNaN(v) || math.IsInf(v, 0) {
				left++
				continue
			}
			if sig[kind][i] {
				signals = append(signals, len(vals))
			}
			labels = append(labels, p.Lot)
			vals = append(vals, v)
			if lo != nil {
				lower = append(lower, lo(p))
				upper = append(upper, hi(p))
			}
		}
		return
	}
	var out []Block
	if !math.IsNaN(float64(s.Center)) {
		// Each lot's own limits (they depend on its size), else the series'.
		own := func(v, series float64) float64 {
			if math.IsNaN(v) {
				return series
			}
			return v
		}
		labels, vals, lower, upper, signals, left := chart("ind", func(p trend.Point) float64 { return float64(p.Mean) },
			func(p trend.Point) float64 { return own(float64(p.Lower), float64(s.Lower)) },
			func(p trend.Point) float64 { return own(float64(p.Upper), float64(s.Upper)) })
		if math.IsNaN(float64(s.Lower)) {
			lower, upper = nil, nil
		}
		if len(vals) > 0 {
			svg, err := ControlChart(ChartData{Title: "Lot means: " + name, XLabel: "lot, in test order", Quantity: "lot mean " + s.Property, Unit: s.Unit,
				Labels: labels, Values: vals, Centre: float64(s.Center), Lower: lower, Upper: upper, Signals: signals, Name: "lot mean"})
			if err != nil {
				return nil, err
			}
			out = append(out, &Figure{Title: "Individuals chart of lot means, " + name, SVG: svg,
				Caption: fmt.Sprintf("Centre line and limits from the baseline %s to %s (%d lots): centre %s, limits %s to %s %s. Circled: lots that fired a run rule.%s",
					s.BaselineFrom, s.BaselineTo, s.BaselineLots, rs.Of(s.Material, s.Property).Stat(float64(s.Center)), rs.Of(s.Material, s.Property).Stat(float64(s.Lower)), rs.Of(s.Material, s.Property).Stat(float64(s.Upper)), s.Unit, leftText(left))})
		}
		labels, vals, lo, hi, signals, left := chart("ewma", func(p trend.Point) float64 { return float64(p.EWMA) },
			func(p trend.Point) float64 { return float64(p.EWMALow) }, func(p trend.Point) float64 { return float64(p.EWMAHigh) })
		if len(vals) > 0 {
			svg, err := ControlChart(ChartData{Title: "EWMA: " + name, XLabel: "lot, in test order", Quantity: "EWMA of lot means", Unit: s.Unit,
				Labels: labels, Values: vals, Centre: float64(s.Center), Lower: lo, Upper: hi, Signals: signals, Name: "EWMA"})
			if err != nil {
				return nil, err
			}
			out = append(out, &Figure{Title: "EWMA chart of lot means, " + name, SVG: svg,
				Caption: "Limits widen to their asymptote over the first lots. Circled: lots where the EWMA left its limits." + leftText(left)})
		}
	}
	// The S chart of the lot SDs, whose signals the table lists.
	if !math.IsNaN(float64(s.SBar)) {
		labels, vals, lo, hi, signals, left := chart("s", func(p trend.Point) float64 { return float64(p.SD) },
			func(p trend.Point) float64 { return float64(p.SLower) }, func(p trend.Point) float64 { return float64(p.SUpper) })
		if len(vals) > 1 {
			svg, err := ControlChart(ChartData{Title: "Lot SDs: " + name, XLabel: "lot, in test order", Quantity: "lot SD " + s.Property, Unit: s.Unit,
				Labels: labels, Values: vals, Centre: float64(s.SBar), Lower: lo, Upper: hi, Signals: signals, Name: "lot SD"})
			if err != nil {
				return nil, err
			}
			out = append(out, &Figure{Title: "S chart of lot SDs, " + name, SVG: svg,
				Caption: fmt.Sprintf("Centre line the mean lot SD of the baseline, %s %s; limits for each lot's size. Circled: lots whose SD left its limits.%s",
					rs.Of(s.Material, s.Property).Spread(float64(s.SBar)), s.Unit, leftText(left))})
		}
	}
	return out, nil
}

// leftText says how many lots a chart leaves out.
func leftText(n int) string {
	switch n {
	case 0:
		return ""
	case 1:
		return " One lot without a value on this chart is left out (for example a lot rejected at receiving, which the EWMA skips)."
	}
	return fmt.Sprintf(" %d lots without a value on this chart are left out (for example lots rejected at receiving, which the EWMA skips).", n)
}

// periodPlots draws, for every property (and material), the period means
// and the period Ppk of each group.
func periodPlots(r *trend.Result) ([]Block, error) {
	type key struct{ material, property string }
	var keys []key
	periods := map[key]map[string]bool{}
	for _, p := range r.Periods {
		k := key{p.Material, p.Property}
		if periods[k] == nil {
			periods[k] = map[string]bool{}
			keys = append(keys, k)
		}
		periods[k][p.Period] = true
	}
	var out []Block
	for _, k := range keys {
		var ps []string
		for p := range periods[k] {
			ps = append(ps, p)
		}
		sort.Strings(ps)
		at := map[string]int{}
		for i, p := range ps {
			at[p] = i
		}
		var groups []string
		mean := map[string][]float64{}
		ppk := map[string][]float64{}
		unit := ""
		minimum := math.NaN()
		for _, p := range r.Periods {
			if p.Material != k.material || p.Property != k.property {
				continue
			}
			if mean[p.Group] == nil {
				groups = append(groups, p.Group)
				mean[p.Group], ppk[p.Group] = nans(len(ps)), nans(len(ps))
			}
			mean[p.Group][at[p.Period]] = float64(p.Mean)
			ppk[p.Group][at[p.Period]] = float64(p.Ppk)
			unit = p.Unit
			if !math.IsNaN(float64(p.Minimum)) {
				minimum = float64(p.Minimum)
			}
		}
		title := k.property
		if k.material != "" {
			title += ", " + k.material
		}
		var ms, ks []TrendSeries
		anyPpk := false
		for _, g := range groups {
			ms = append(ms, TrendSeries{Label: g, Values: mean[g]})
			ks = append(ks, TrendSeries{Label: g, Values: ppk[g]})
			if !allNaN(ppk[g]) {
				anyPpk = true
			}
		}
		var lines []RefLine
		if !math.IsNaN(minimum) {
			lines = append(lines, RefLine{Label: "spec minimum " + render.Given(minimum).Text() + unitSuffix(unit), Value: minimum})
		}
		if len(ps) < 2 {
			continue // one period: the table says it all, a chart of one point does not
		}
		svg, err := TrendPlot(TrendData{Title: "Period mean: " + title, Quantity: "mean " + k.property, Unit: unit, Periods: ps, Series: ms, Lines: lines})
		if err != nil {
			return nil, err
		}
		out = append(out, &Figure{Title: "Mean by " + r.Every + " and " + r.By + ", " + title, SVG: svg,
			Caption: "Mean of every specimen tested in the period; a gap is a period without lots."})
		if anyPpk {
			svg, err := TrendPlot(TrendData{Title: "Period Ppk: " + title, Quantity: "Ppk (point estimate)", Periods: ps, Series: ks,
				Lines: []RefLine{{Label: fmt.Sprintf("Ppk %.2f", PpkTarget), Value: PpkTarget}, {Label: "Ppk 1.00", Value: 1}}})
			if err != nil {
				return nil, err
			}
			out = append(out, &Figure{Title: "Ppk by " + r.Every + " and " + r.By + ", " + title, SVG: svg,
				Caption: "Ppk = (mean - minimum) / (3 SD) of the period's specimens (point estimate; the table gives the lower confidence bound)."})
		}
	}
	return out, nil
}

func nans(n int) []float64 {
	out := make([]float64, n)
	for i := range out {
		out[i] = math.NaN()
	}
	return out
}

func allNaN(xs []float64) bool {
	for _, x := range xs {
		if !math.IsNaN(x) {
			return false
		}
	}
	return true
}

// num formats a number with sig significant digits; "-" for a missing value.
func num(v float64, sig int) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "-"
	}
	return strconv.FormatFloat(v, 'g', sig, 64)
}

func unitText(u string) string {
	if u == "" {
		return ""
	}
	return " [" + u + "]"
}

func unitSuffix(u string) string {
	if u == "" {
		return ""
	}
	return " " + u
}

func rangeText(since, until string) string {
	switch {
	case since != "" && until != "":
		return ", " + since + " to " + until
	case since != "":
		return ", from " + since
	case until != "":
		return ", to " + until
	}
	return ""
}
