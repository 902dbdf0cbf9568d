package report

import (
	"fmt"

	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// PlanSeries is one basis's design-value ratios per plan: the median and a
// scatter band (e.g. the 10th and 90th percentiles of the campaigns).
type PlanSeries struct {
	Name              string
	Median, Low, High []float64
}

// PlanBandData is what PlanBandPlot draws: one column per candidate plan.
type PlanBandData struct {
	Title  string
	Labels []string // one per plan, e.g. "5x6"
	Series []PlanSeries
}

// PlanBandPlot draws, per plan, each series' median as a marker with its
// scatter band as an error bar, and the line at 1 (the design value equal
// to the population's true percentile).
func PlanBandPlot(d PlanBandData) ([]byte, error) {
	k := len(d.Labels)
	if k == 0 || len(d.Series) == 0 {
		return nil, fmt.Errorf("plan plot %q: no plans", d.Title)
	}
	p := newPlot(d.Title, "plan (lots x specimens per lot)", "design value / true percentile")
	for si, s := range d.Series {
		if len(s.Median) != k || len(s.Low) != k || len(s.High) != k {
			return nil, fmt.Errorf("plan plot %q: series %q has %d medians for %d plans", d.Title, s.Name, len(s.Median), k)
		}
		for _, xs := range [][]float64{s.Median, s.Low, s.High} {
			if err := finite("plan plot "+d.Title+", "+s.Name, xs); err != nil {
				return nil, err
			}
		}
		// Series side by side within a plan's column.
		off := 0.0
		if len(d.Series) > 1 {
			off = 0.3 * (float64(si)/float64(len(d.Series)-1) - 0.5)
		}
		var pts plotter.XYs
		var errs plotter.YErrors
		for i := range s.Median {
			pts = append(pts, plotter.XY{X: float64(i) + off, Y: s.Median[i]})
			errs = append(errs, struct{ Low, High float64 }{s.Median[i] - s.Low[i], s.High[i] - s.Median[i]})
		}
		bars, err := plotter.NewYErrorBars(struct {
			plotter.XYer
			plotter.YErrorer
		}{pts, errs})
		if err != nil {
			return nil, err
		}
		bars.LineStyle = draw.LineStyle{Color: palette[si%len(palette)], Width: vg.Points(1.2)}
		sc, err := plotter.NewScatter(pts)
		if err != nil {
			return nil, err
		}
		sc.GlyphStyle = glyphStyle(si)
		sc.GlyphStyle.Radius = vg.Points(3)
		p.Add(bars, sc)
		p.Legend.Add(s.Name, sc)
	}
	one, err := plotter.NewLine(plotter.XYs{{X: -0.5, Y: 1}, {X: float64(k) - 0.5, Y: 1}})
	if err != nil {
		return nil, err
	}
	one.LineStyle = draw.LineStyle{Color: ink, Width: vg.Points(1), Dashes: dashes[1]}
	p.Add(one)
	p.Legend.Add("true percentile", one)
	names := shortLabels(d.Labels)
	p.NominalX(names...)
	p.X.Min, p.X.Max = -0.5, float64(k)-0.5
	rotateIfCrowded(p, names)
	padY(p, 0.35)
	return renderSVG(p, plotWidth, plotHeight)
}
