package report

import (
	"fmt"
	"math"

	"lotproof/lots"
	"lotproof/lots/render"
	"lotproof/lots/units"
	"lotproof/stats"
)

// DataResolutions infers each material's and property's resolution from
// its values in the display units of sys (render.Resolution); nil data give
// none.
func DataResolutions(d *lots.Dataset, sys units.System) render.Resolutions {
	rs := render.Resolutions{}
	if d == nil {
		return rs
	}
	for p, prop := range d.Properties {
		u := prop.Unit.Display(sys)
		for _, s := range d.All() {
			if p < len(s.Values) {
				rs.Add(s.Material, prop.Name, u.FromInternal(s.Values[p]))
			}
		}
	}
	return rs
}

// PropertyOptions choose what PropertyFigures draws.
type PropertyOptions struct {
	By     string       // grouping label for the dot plot axis ("lot" or "heat")
	System units.System // display units
	// Minimum is the specification minimum in the internal unit (NaN: none).
	Minimum float64
	// Lines are further reference values in the internal unit, e.g.
	// {"B-basis", 552.3}; shown on the histogram and the dot plot.
	Lines []RefLine
	// Marked are group keys drawn in the alarm colour (e.g. rejected lots).
	Marked []string
}

// PropertyFigures draws one property of a dataset: a dot plot by group, a
// histogram with the fitted normal, lognormal and Weibull densities, and
// normal and Weibull probability plots. Values are shown in the display
// unit of opt.System. The fits are those of package stats (normal: sample
// mean and SD; lognormal: the same on ln x; Weibull: maximum likelihood);
// a fit that cannot be made (for example a non-positive value for the
// Weibull fit) is left out of the figures and said in the caption.
func PropertyFigures(d *lots.Dataset, prop int, groups []lots.Group, opt PropertyOptions) ([]Block, error) {
	if d == nil || prop < 0 || prop >= len(d.Properties) {
		return nil, fmt.Errorf("report: no property %d in the data", prop)
	}
	p := d.Properties[prop]
	du := p.Unit.Display(opt.System)
	conv := func(v float64) float64 { return du.FromInternal(v) }
	name := p.Name
	var all []float64
	var dg []DotGroup
	for _, g := range groups {
		vals, _ := d.Values(prop, g.Specimens)
		out := make([]float64, len(vals))
		for i, v := range vals {
			out[i] = conv(v)
		}
		all = append(all, out...)
		dg = append(dg, DotGroup{Label: g.Key, Values: out})
	}
	if len(all) < 3 {
		return nil, fmt.Errorf("report: %s has %d values; the figures need at least 3", name, len(all))
	}
	res := render.ResolutionOf(all...)
	var lines []RefLine
	if !math.IsNaN(opt.Minimum) {
		lines = append(lines, RefLine{Label: fmt.Sprintf("spec minimum %s %s", res.Given(conv(opt.Minimum)), du.Symbol), Value: conv(opt.Minimum)})
	}
	for _, l := range opt.Lines {
		lines = append(lines, RefLine{Label: fmt.Sprintf("%s %s %s", l.Label, res.Stat(conv(l.Value)), du.Symbol), Value: conv(l.Value)})
	}
	by := opt.By
	if by == "" {
		by = "lot"
	}
	var blocks []Block
	dots, err := DotPlot(DotPlotData{Title: name + " by " + by, XLabel: by, Quantity: name, Unit: du.Symbol, Groups: dg, Lines: lines, Marked: opt.Marked})
	if err != nil {
		return nil, err
	}
	blocks = append(blocks, &Figure{Title: name + " of every specimen, by " + by, SVG: dots,
		Caption: fmt.Sprintf("Circles: specimens; bars: %s means; crosses: marked %ss. %d values in %d groups.", by, by, len(all), len(dg))})

	var fits Fits
	var missing []string
	nf, err := stats.FitNormal(all)
	if err == nil {
		fits.Normal = &NormalFit{Mu: nf.Mu, Sigma: nf.Sigma}
	} else {
		missing = append(missing, "normal ("+err.Error()+")")
	}
	lf, err := stats.FitLognormal(all)
	if err == nil {
		fits.Lognormal = &LognormalFit{Mu: lf.Mu, Sigma: lf.Sigma}
	} else {
		missing = append(missing, "lognormal ("+err.Error()+")")
	}
	wf, err := stats.FitWeibull(all)
	if err == nil {
		fits.Weibull = &WeibullFit{Shape: wf.Shape, Scale: wf.Scale}
	} else {
		missing = append(missing, "Weibull ("+err.Error()+")")
	}
	note := ""
	if len(missing) > 0 {
		note = fmt.Sprintf(" Not fitted: %v.", missing)
	}
	hist, err := Histogram(HistogramData{Title: name + ": distribution", Quantity: name, Unit: du.Symbol, Values: all, Fits: fits, Lines: lines})
	if err != nil {
		return nil, err
	}
	blocks = append(blocks, &Figure{Title: name + ": histogram with fitted densities", SVG: hist,
		Caption: "Bars are scaled to unit area so that they compare with the densities: normal (sample mean and SD), lognormal (the same on ln x), two-parameter Weibull (maximum likelihood)." + note})
	pd := ProbData{Quantity: name, Unit: du.Symbol, Values: all}
	if fits.Normal != nil {
		pd.Title = name + ": normal probability plot"
		svg, err := NormalProbPlot(pd, *fits.Normal)
		if err != nil {
			return nil, err
		}
		blocks = append(blocks, &Figure{Title: pd.Title, SVG: svg, Caption: "Plotting positions: Benard's median ranks (i-0.3)/(n+0.4); a straight line supports the normal model."})
	}
	if fits.Weibull != nil {
		pd.Title = name + ": Weibull probability plot"
		svg, err := WeibullProbPlot(pd, *fits.Weibull)
		if err != nil {
			return nil, err
		}
		blocks = append(blocks, &Figure{Title: pd.Title, SVG: svg, Caption: "Plotting positions: Benard's median ranks (i-0.3)/(n+0.4); ln(-ln(1-p)) against ln x, on which a Weibull sample falls on a straight line."})
	}
	return blocks, nil
}
