package report

import (
	"bytes"
	"fmt"
	"image/color"
	"math"
	"slices"

	xfont "golang.org/x/image/font"
	"gonum.org/v1/gonum/stat/distuv"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgsvg"

	"lotproof/lots/render"
)

// Plot sizes: the width fits the text block of A4 and Letter paper.
const (
	plotWidth  = 16 * vg.Centimeter
	plotHeight = 9 * vg.Centimeter
)

// Restrained colours, each paired with its own dash pattern so that lines
// stay distinguishable when printed in black and white.
var (
	ink     = color.RGBA{0x1b, 0x1f, 0x24, 0xff}
	palette = []color.RGBA{
		{0x2d, 0x4a, 0x66, 0xff}, // slate blue
		{0xb0, 0x5a, 0x14, 0xff}, // rust
		{0x2e, 0x7d, 0x4f, 0xff}, // green
		{0x6a, 0x4c, 0x93, 0xff}, // violet
		{0x7a, 0x6a, 0x1a, 0xff}, // olive
		{0x4d, 0x4d, 0x4d, 0xff}, // grey
	}
	dashes = [][]vg.Length{
		nil,
		{vg.Points(6), vg.Points(3)},
		{vg.Points(2), vg.Points(2)},
		{vg.Points(8), vg.Points(3), vg.Points(2), vg.Points(3)},
		{vg.Points(12), vg.Points(4)},
		{vg.Points(4), vg.Points(2), vg.Points(1), vg.Points(2)},
	}
	glyphs = []draw.GlyphDrawer{draw.CircleGlyph{}, draw.TriangleGlyph{}, draw.SquareGlyph{}, draw.CrossGlyph{}, draw.PlusGlyph{}, draw.RingGlyph{}}
	alarm  = color.RGBA{0xa1, 0x20, 0x1b, 0xff}
)

func lineStyle(i int) draw.LineStyle {
	return draw.LineStyle{Color: palette[i%len(palette)], Width: vg.Points(1.2), Dashes: dashes[i%len(dashes)]}
}

func glyphStyle(i int) draw.GlyphStyle {
	return draw.GlyphStyle{Color: palette[i%len(palette)], Radius: vg.Points(2.4), Shape: glyphs[i%len(glyphs)]}
}

// RefLine is a labelled reference value drawn across a plot: a vertical
// line on a histogram (spec minimum, A- and B-basis) or a horizontal line
// on a chart (spec minimum, limits, targets).
type RefLine struct {
	Label string
	Value float64
}

// newPlot makes a plot with the report's fonts and a title and axis labels.
func newPlot(title, xlabel, ylabel string) *plot.Plot {
	p := plot.New()
	p.Title.Text = title
	p.X.Label.Text = xlabel
	p.Y.Label.Text = ylabel
	for _, f := range []*font.Font{&p.Title.TextStyle.Font, &p.X.Label.TextStyle.Font, &p.Y.Label.TextStyle.Font,
		&p.X.Tick.Label.Font, &p.Y.Tick.Label.Font, &p.Legend.TextStyle.Font} {
		f.Typeface = "Liberation"
		f.Variant = "Sans"
	}
	p.Title.TextStyle.Font.Size = vg.Points(11)
	p.Title.TextStyle.Font.Weight = xfont.WeightBold
	p.X.Label.TextStyle.Font.Size = vg.Points(9.5)
	p.Y.Label.TextStyle.Font.Size = vg.Points(9.5)
	p.X.Tick.Label.Font.Size = vg.Points(8.5)
	p.Y.Tick.Label.Font.Size = vg.Points(8.5)
	p.Legend.TextStyle.Font.Size = vg.Points(8.5)
	p.X.Tick.Marker = plainTicks{}
	p.Y.Tick.Marker = plainTicks{}
	p.Legend.Top = true
	p.Legend.Padding = vg.Points(1.5)
	p.Title.Padding = vg.Points(6)
	grid := plotter.NewGrid()
	grid.Vertical.Color = color.Gray{0xe0}
	grid.Horizontal.Color = color.Gray{0xe0}
	grid.Vertical.Width = vg.Points(0.5)
	grid.Horizontal.Width = vg.Points(0.5)
	p.Add(grid)
	return p
}

// renderSVG draws p into an SVG document of the given size. The bytes depend
// only on the plot, so the same data gives the same SVG.
func renderSVG(p *plot.Plot, w, h vg.Length) (out []byte, err error) {
	defer func() {
		if r := recover(); r != nil {
			out, err = nil, fmt.Errorf("plot %q could not be drawn: %v", p.Title.Text, r)
		}
	}()
	c := vgsvg.New(w, h)
	p.Draw(draw.New(c))
	var b bytes.Buffer
	if _, err := c.WriteTo(&b); err != nil {
		return nil, err
	}
	// Plot text comes from user strings: keep the SVG valid UTF-8.
	return bytes.ToValidUTF8(b.Bytes(), []byte("\uFFFD")), nil
}

// finite checks that every value is a finite number.
func finite(what string, xs []float64) error {
	for i, x := range xs {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return fmt.Errorf("%s: value %d is %v; plots need finite numbers", what, i+1, x)
		}
	}
	return nil
}

func finiteRefs(what string, ls []RefLine) error {
	for _, l := range ls {
		if math.IsNaN(l.Value) || math.IsInf(l.Value, 0) {
			return fmt.Errorf("%s: reference line %q is %v", what, l.Label, l.Value)
		}
	}
	return nil
}

// axisLabel joins a quantity and its unit: "tensile strength [MPa]".
func axisLabel(q, unit string) string {
	if unit == "" {
		return q
	}
	return q + " [" + unit + "]"
}

// Fits are fitted distributions to overlay on a histogram; a nil field is
// not drawn.
type Fits struct {
	Normal    *NormalFit
	Lognormal *LognormalFit
	Weibull   *WeibullFit
}

// NormalFit is a normal distribution with mean Mu and standard deviation Sigma.
type NormalFit struct{ Mu, Sigma float64 }

// LognormalFit is a lognormal distribution: ln X is normal with mean Mu and
// standard deviation Sigma.
type LognormalFit struct{ Mu, Sigma float64 }

// WeibullFit is a two-parameter Weibull distribution with shape Shape
// (beta) and scale Scale (alpha): F(x) = 1 - exp(-(x/alpha)^beta).
type WeibullFit struct{ Shape, Scale float64 }

// pdf is the normal density exp(-(x-mu)^2/(2 sigma^2)) / (sigma sqrt(2 pi)),
// by gonum distuv.Normal (checked against scipy.stats.norm.pdf out to 9
// sigma, testdata/report/plot_ref.json).
func (f NormalFit) pdf(x float64) float64 { return distuv.Normal{Mu: f.Mu, Sigma: f.Sigma}.Prob(x) }

// pdf is the lognormal density exp(-(ln x-mu)^2/(2 sigma^2)) / (x sigma
// sqrt(2 pi)) for x > 0 and 0 otherwise, by gonum distuv.LogNormal (checked
// against scipy.stats.lognorm.pdf).
func (f LognormalFit) pdf(x float64) float64 {
	if x <= 0 {
		return 0
	}
	return distuv.LogNormal{Mu: f.Mu, Sigma: f.Sigma}.Prob(x)
}

// pdf is the Weibull density (beta/alpha)(x/alpha)^(beta-1)
// exp(-(x/alpha)^beta) for x > 0 and 0 otherwise, by gonum distuv.Weibull
// (checked against scipy.stats.weibull_min.pdf).
func (f WeibullFit) pdf(x float64) float64 {
	if x <= 0 {
		return 0
	}
	return distuv.Weibull{K: f.Shape, Lambda: f.Scale}.Prob(x)
}

// normalScore is the y position of cumulative probability p on the normal
// probability plot, the standard normal quantile Phi^-1(p) (gonum
// distuv.UnitNormal.Quantile, checked against scipy.stats.norm.ppf).
func normalScore(p float64) float64 { return distuv.UnitNormal.Quantile(p) }

// weibullScore is the y position of cumulative probability p on the
// Weibull probability plot, ln(-ln(1-p)).
func weibullScore(p float64) float64 { return math.Log(-math.Log1p(-p)) }

// HistogramData is what Histogram draws.
type HistogramData struct {
	Title    string
	Quantity string // x-axis quantity, e.g. "tensile strength"
	Unit     string // e.g. "MPa"
	Values   []float64
	Bins     int // 0: Sturges' rule, ceil(log2 n) + 1
	Fits     Fits
	Lines    []RefLine // vertical lines: spec minimum, A-basis, B-basis
}

// Histogram draws a density histogram of the values with the fitted normal,
// lognormal and Weibull densities overlaid (so the curves and bars share
// one scale: bar areas sum to one) and vertical reference lines. Densities:
// normal f(x) = exp(-(x-mu)^2/(2 sigma^2)) / (sigma sqrt(2 pi)); lognormal
// f(x) = exp(-(ln x-mu)^2/(2 sigma^2)) / (x sigma sqrt(2 pi)); Weibull
// f(x) = (beta/alpha)(x/alpha)^(beta-1) exp(-(x/alpha)^beta), evaluated
// with gonum's distuv.
func Histogram(h HistogramData) ([]byte, error) {
	if len(h.Values) < 2 {
		return nil, fmt.Errorf("histogram %q: need at least 2 values, got %d", h.Title, len(h.Values))
	}
	if err := finite("histogram "+h.Title, h.Values); err != nil {
		return nil, err
	}
	if err := finiteRefs("histogram "+h.Title, h.Lines); err != nil {
		return nil, err
	}
	bins := h.Bins
	if bins <= 0 {
		bins = int(math.Ceil(math.Log2(float64(len(h.Values))))) + 1
	}
	lo, hi := slices.Min(h.Values), slices.Max(h.Values)
	if lo == hi {
		return nil, fmt.Errorf("histogram %q: all %d values are %g; nothing to draw", h.Title, len(h.Values), lo)
	}
	p := newPlot(h.Title, axisLabel(h.Quantity, h.Unit), axisLabel("probability density", "1/"+h.Unit))
	hist, err := plotter.NewHist(plotter.Values(h.Values), bins)
	if err != nil {
		return nil, fmt.Errorf("histogram %q: %w", h.Title, err)
	}
	hist.Normalize(1)
	hist.FillColor = color.RGBA{0xd5, 0xdd, 0xe6, 0xff}
	hist.LineStyle = draw.LineStyle{Color: color.RGBA{0x7d, 0x8e, 0xa1, 0xff}, Width: vg.Points(0.6)}
	p.Add(hist)
	p.Legend.Add(fmt.Sprintf("data (n = %d)", len(h.Values)), hist)

	// x range: the data and every reference line, with a margin.
	xmin, xmax := lo, hi
	for _, l := range h.Lines {
		xmin, xmax = math.Min(xmin, l.Value), math.Max(xmax, l.Value)
	}
	pad := 0.08 * (xmax - xmin)
	xmin, xmax = xmin-pad, xmax+pad
	ymax := 0.0
	for _, b := range hist.Bins {
		ymax = math.Max(ymax, b.Weight/(b.Max-b.Min))
	}
	type curve struct {
		name string
		f    func(float64) float64
	}
	var curves []curve
	if f := h.Fits.Normal; f != nil {
		if !(f.Sigma > 0) || math.IsInf(f.Mu, 0) || math.IsNaN(f.Mu) {
			return nil, fmt.Errorf("histogram %q: normal fit needs finite mean and sigma > 0 (got %g, %g)", h.Title, f.Mu, f.Sigma)
		}
		res := render.ResolutionOf(h.Values...)
		curves = append(curves, curve{fmt.Sprintf("normal (mean %s, sd %s)", res.Stat(f.Mu), res.Spread(f.Sigma)), f.pdf})
	}
	if f := h.Fits.Lognormal; f != nil {
		if !(f.Sigma > 0) || math.IsInf(f.Mu, 0) || math.IsNaN(f.Mu) {
			return nil, fmt.Errorf("histogram %q: lognormal fit needs finite mu and sigma > 0 (got %g, %g)", h.Title, f.Mu, f.Sigma)
		}
		curves = append(curves, curve{fmt.Sprintf("lognormal (mu %.4g, sigma %.3g)", f.Mu, f.Sigma), f.pdf})
	}
	if f := h.Fits.Weibull; f != nil {
		if !(f.Shape > 0) || !(f.Scale > 0) || math.IsInf(f.Shape, 0) || math.IsInf(f.Scale, 0) {
			return nil, fmt.Errorf("histogram %q: Weibull fit needs shape > 0 and scale > 0 (got %g, %g)", h.Title, f.Shape, f.Scale)
		}
		curves = append(curves, curve{fmt.Sprintf("Weibull (shape %.3g, scale %.4g)", f.Shape, f.Scale), f.pdf})
	}
	const samples = 240
	for i, c := range curves {
		pts := make(plotter.XYs, samples)
		for j := range pts {
			x := xmin + (xmax-xmin)*float64(j)/float64(samples-1)
			pts[j] = plotter.XY{X: x, Y: c.f(x)}
			if math.IsNaN(pts[j].Y) || math.IsInf(pts[j].Y, 0) {
				pts[j].Y = 0
			}
			ymax = math.Max(ymax, pts[j].Y)
		}
		l, err := plotter.NewLine(pts)
		if err != nil {
			return nil, fmt.Errorf("histogram %q: %w", h.Title, err)
		}
		l.LineStyle = lineStyle(i)
		p.Add(l)
		p.Legend.Add(c.name, l)
	}
	ytop := ymax * 1.12
	for i, r := range h.Lines {
		l, err := plotter.NewLine(plotter.XYs{{X: r.Value, Y: 0}, {X: r.Value, Y: ytop}})
		if err != nil {
			return nil, fmt.Errorf("histogram %q: %w", h.Title, err)
		}
		l.LineStyle = draw.LineStyle{Color: refColor(i), Width: vg.Points(1.4), Dashes: dashes[(i+1)%len(dashes)]}
		p.Add(l)
		p.Legend.Add(r.Label, l)
	}
	p.X.Min, p.X.Max = xmin, xmax
	p.Y.Min, p.Y.Max = 0, ytop*1.25 // headroom for the legend
	return renderSVG(p, plotWidth, plotHeight)
}

// refColor is the colour of the i-th reference line: the first (usually
// the specification minimum) in the alarm colour, then dark inks.
func refColor(i int) color.Color {
	if i == 0 {
		return alarm
	}
	return []color.RGBA{{0x1b, 0x1f, 0x24, 0xff}, {0x6a, 0x4c, 0x93, 0xff}, {0x2e, 0x7d, 0x4f, 0xff}}[(i-1)%3]
}

// BenardRank is Benard's approximation to the median rank of the i-th of n
// ordered values (i from 1): p = (i - 0.3) / (n + 0.4) (Benard and
// Bos-Levenbach, 1953; the usual plotting position for Weibull paper, e.g.
// Abernethy, The New Weibull Handbook, 5th ed., sec. 2.6).
func BenardRank(i, n int) float64 { return (float64(i) - 0.3) / (float64(n) + 0.4) }

// ProbData is what the probability plots draw.
type ProbData struct {
	Title    string
	Quantity string
	Unit     string
	Values   []float64
}

// probTicks labels a probability axis (in transformed units) with
// cumulative percentages.
type probTicks struct{ f func(p float64) float64 }

var probLevels = []float64{0.001, 0.01, 0.05, 0.1, 0.2, 0.3, 0.5, 0.7, 0.8, 0.9, 0.95, 0.99, 0.999}

func (t probTicks) Ticks(min, max float64) []plot.Tick {
	var ts []plot.Tick
	for _, p := range probLevels {
		y := t.f(p)
		if y >= min && y <= max {
			ts = append(ts, plot.Tick{Value: y, Label: fmt.Sprintf("%g", 100*p)})
		}
	}
	return ts
}

// logValueTicks labels an axis that holds ln(x) with values of x.
type logValueTicks struct{}

func (logValueTicks) Ticks(min, max float64) []plot.Tick {
	ts := plot.DefaultTicks{}.Ticks(math.Exp(min), math.Exp(max))
	out := make([]plot.Tick, 0, len(ts))
	for _, t := range ts {
		if t.Value <= 0 {
			continue
		}
		out = append(out, plot.Tick{Value: math.Log(t.Value), Label: t.Label})
	}
	return out
}

// NormalProbPlot draws the ordered values against the standard normal
// quantile of Benard's median ranks, z_i = Phi^-1((i-0.3)/(n+0.4)), with the
// fitted normal line z = (x - mu)/sigma. Points on a straight line support
// a normal model. The y axis is labelled in cumulative percent.
func NormalProbPlot(d ProbData, fit NormalFit) ([]byte, error) {
	xs, err := probInput(d)
	if err != nil {
		return nil, err
	}
	if !(fit.Sigma > 0) || math.IsNaN(fit.Mu) || math.IsInf(fit.Mu, 0) || math.IsInf(fit.Sigma, 0) {
		return nil, fmt.Errorf("normal probability plot %q: fit needs finite mean and sigma > 0", d.Title)
	}
	q := normalScore
	pts := make(plotter.XYs, len(xs))
	for i, x := range xs {
		pts[i] = plotter.XY{X: x, Y: q(BenardRank(i+1, len(xs)))}
	}
	line := func(x float64) float64 { return (x - fit.Mu) / fit.Sigma }
	p := newPlot(d.Title, axisLabel(d.Quantity, d.Unit), "cumulative probability [%] (Benard median ranks)")
	p.Y.Tick.Marker = probTicks{q}
	res := render.ResolutionOf(d.Values...)
	return probPlot(p, pts, line, fmt.Sprintf("normal fit (mean %s, sd %s)", res.Stat(fit.Mu), res.Spread(fit.Sigma)), q)
}

// WeibullProbPlot draws ln(-ln(1-p_i)) of Benard's median ranks against
// ln x_i, with the fitted line ln(-ln(1-F)) = beta (ln x - ln alpha). The x
// axis is logarithmic (labelled in the data's unit), the y axis in
// cumulative percent.
func WeibullProbPlot(d ProbData, fit WeibullFit) ([]byte, error) {
	xs, err := probInput(d)
	if err != nil {
		return nil, err
	}
	if xs[0] <= 0 {
		//lint:ignore ST1005 error text begins with a proper name (Weibull)
		return nil, fmt.Errorf("Weibull probability plot %q: values must be positive (smallest is %g)", d.Title, xs[0])
	}
	if !(fit.Shape > 0) || !(fit.Scale > 0) || math.IsInf(fit.Shape, 0) || math.IsInf(fit.Scale, 0) {
		//lint:ignore ST1005 error text begins with a proper name (Weibull)
		return nil, fmt.Errorf("Weibull probability plot %q: fit needs shape > 0 and scale > 0", d.Title)
	}
	ww := weibullScore
	pts := make(plotter.XYs, len(xs))
	for i, x := range xs {
		pts[i] = plotter.XY{X: math.Log(x), Y: ww(BenardRank(i+1, len(xs)))}
	}
	line := func(lx float64) float64 { return fit.Shape * (lx - math.Log(fit.Scale)) }
	p := newPlot(d.Title, axisLabel(d.Quantity, d.Unit)+", log scale", "cumulative probability [%] (Benard median ranks)")
	p.X.Tick.Marker = logValueTicks{}
	p.Y.Tick.Marker = probTicks{ww}
	return probPlot(p, pts, line, fmt.Sprintf("Weibull fit (shape %.3g, scale %.4g)", fit.Shape, fit.Scale), ww)
}

func probInput(d ProbData) ([]float64, error) {
	if len(d.Values) < 3 {
		return nil, fmt.Errorf("probability plot %q: need at least 3 values, got %d", d.Title, len(d.Values))
	}
	if err := finite("probability plot "+d.Title, d.Values); err != nil {
		return nil, err
	}
	xs := slices.Clone(d.Values)
	slices.Sort(xs)
	if xs[0] == xs[len(xs)-1] {
		return nil, fmt.Errorf("probability plot %q: all values are equal", d.Title)
	}
	return xs, nil
}

func probPlot(p *plot.Plot, pts plotter.XYs, line func(float64) float64, fitName string, tr func(float64) float64) ([]byte, error) {
	n := len(pts)
	xmin, xmax := pts[0].X, pts[n-1].X
	pad := 0.06 * (xmax - xmin)
	xmin, xmax = xmin-pad, xmax+pad
	ymin, ymax := math.Min(pts[0].Y, tr(0.01)), math.Max(pts[n-1].Y, tr(0.99))
	fl, err := plotter.NewLine(plotter.XYs{{X: xmin, Y: line(xmin)}, {X: xmax, Y: line(xmax)}})
	if err != nil {
		return nil, err
	}
	fl.LineStyle = lineStyle(1)
	s, err := plotter.NewScatter(pts)
	if err != nil {
		return nil, err
	}
	s.GlyphStyle = glyphStyle(0)
	p.Add(fl, s)
	p.Legend.Add(fmt.Sprintf("data (n = %d)", n), s)
	p.Legend.Add(fitName, fl)
	p.Legend.Left, p.Legend.Top = true, true
	p.X.Min, p.X.Max = xmin, xmax
	p.Y.Min, p.Y.Max = ymin-0.3, ymax+0.3
	return renderSVG(p, plotWidth, plotHeight)
}

// DotGroup is one column of a dot plot.
type DotGroup struct {
	Label  string
	Values []float64
}

// DotPlotData is what DotPlot draws.
type DotPlotData struct {
	Title    string
	XLabel   string // e.g. "lot"
	Quantity string
	Unit     string
	Groups   []DotGroup
	Lines    []RefLine // horizontal lines, e.g. the specification minimum
	Marked   []string  // labels of groups to draw in the alarm colour (e.g. rejected lots)
}

// DotPlot draws every value of every group as a dot above its label, the
// group means as short bars, and horizontal reference lines. Non-finite
// values are refused.
func DotPlot(d DotPlotData) ([]byte, error) {
	if len(d.Groups) == 0 {
		return nil, fmt.Errorf("dot plot %q: no groups", d.Title)
	}
	if err := finiteRefs("dot plot "+d.Title, d.Lines); err != nil {
		return nil, err
	}
	p := newPlot(d.Title, d.XLabel, axisLabel(d.Quantity, d.Unit))
	marked := map[string]bool{}
	for _, m := range d.Marked {
		marked[m] = true
	}
	var normal, bad, means plotter.XYs
	names := make([]string, len(d.Groups))
	for gi, g := range d.Groups {
		names[gi] = g.Label
		if err := finite("dot plot "+d.Title+", group "+g.Label, g.Values); err != nil {
			return nil, err
		}
		if len(g.Values) == 0 {
			continue
		}
		sum := 0.0
		for _, v := range g.Values {
			sum += v
			pt := plotter.XY{X: float64(gi), Y: v}
			if marked[g.Label] {
				bad = append(bad, pt)
			} else {
				normal = append(normal, pt)
			}
		}
		means = append(means, plotter.XY{X: float64(gi), Y: sum / float64(len(g.Values))})
	}
	if len(normal)+len(bad) == 0 {
		return nil, fmt.Errorf("dot plot %q: no values", d.Title)
	}
	if len(normal) > 0 {
		s, err := plotter.NewScatter(normal)
		if err != nil {
			return nil, err
		}
		s.GlyphStyle = draw.GlyphStyle{Color: palette[0], Radius: vg.Points(2), Shape: draw.RingGlyph{}}
		p.Add(s)
		p.Legend.Add("specimen", s)
	}
	if len(bad) > 0 {
		s, err := plotter.NewScatter(bad)
		if err != nil {
			return nil, err
		}
		s.GlyphStyle = draw.GlyphStyle{Color: alarm, Radius: vg.Points(2.4), Shape: draw.CrossGlyph{}}
		p.Add(s)
		p.Legend.Add("specimen, marked group", s)
	}
	m, err := plotter.NewScatter(means)
	if err != nil {
		return nil, err
	}
	m.GlyphStyle = draw.GlyphStyle{Color: ink, Radius: vg.Points(4), Shape: barGlyph{}}
	p.Add(m)
	p.Legend.Add("group mean", m)
	k := float64(len(d.Groups))
	for i, r := range d.Lines {
		l, err := plotter.NewLine(plotter.XYs{{X: -0.5, Y: r.Value}, {X: k - 0.5, Y: r.Value}})
		if err != nil {
			return nil, err
		}
		l.LineStyle = draw.LineStyle{Color: refColor(i), Width: vg.Points(1.3), Dashes: dashes[(i+1)%len(dashes)]}
		p.Add(l)
		p.Legend.Add(r.Label, l)
	}
	names = shortLabels(names)
	p.NominalX(names...)
	p.X.Min, p.X.Max = -0.5, k-0.5
	rotateIfCrowded(p, names)
	w := plotWidth
	padY(p, 0.4)
	return renderSVG(p, w, plotHeight)
}

// barGlyph is a short horizontal bar (a group mean).
type barGlyph struct{}

func (barGlyph) DrawGlyph(c *draw.Canvas, sty draw.GlyphStyle, pt vg.Point) {
	c.StrokeLine2(draw.LineStyle{Color: sty.Color, Width: vg.Points(1.6)}, pt.X-sty.Radius*1.6, pt.Y, pt.X+sty.Radius*1.6, pt.Y)
}

// rotateIfCrowded turns category labels vertical when they would overlap.
func rotateIfCrowded(p *plot.Plot, names []string) {
	longest := 0
	for _, n := range names {
		longest = max(longest, len([]rune(n)))
	}
	if len(names)*(longest+1) > 70 {
		p.X.Tick.Label.Rotation = math.Pi / 2
		p.X.Tick.Label.XAlign = draw.XRight
		p.X.Tick.Label.YAlign = draw.YCenter
	}
}

// padY leaves headroom above the data for the legend (a fraction of the
// data range) and a little room below it.
func padY(p *plot.Plot, frac float64) {
	r := p.Y.Max - p.Y.Min
	p.Y.Max += frac * r
	p.Y.Min -= 0.05 * r
}

// ChartData is a control chart: one value per point with a centre line and
// lower and upper limits. Lower and Upper hold either one value (constant
// limits) or one per point (limits that vary, as on an EWMA chart before
// it reaches its asymptote); NaN in them leaves that limit out at that
// point. Signals are the indexes of points that signal.
type ChartData struct {
	Title    string
	XLabel   string
	Quantity string
	Unit     string
	Labels   []string // one per point (lot or period)
	Values   []float64
	Centre   float64
	Lower    []float64
	Upper    []float64
	Signals  []int
	Name     string // legend name of the values, e.g. "lot mean" or "EWMA"
}

// ControlChart draws an individuals or EWMA chart: the values joined in
// order, the centre line, the limits and the signalling points circled in
// the alarm colour.
func ControlChart(c ChartData) ([]byte, error) {
	n := len(c.Values)
	if n == 0 {
		return nil, fmt.Errorf("control chart %q: no points", c.Title)
	}
	if len(c.Labels) != 0 && len(c.Labels) != n {
		return nil, fmt.Errorf("control chart %q: %d labels for %d points", c.Title, len(c.Labels), n)
	}
	if err := finite("control chart "+c.Title, c.Values); err != nil {
		return nil, err
	}
	if math.IsNaN(c.Centre) || math.IsInf(c.Centre, 0) {
		return nil, fmt.Errorf("control chart %q: centre line is %v", c.Title, c.Centre)
	}
	limit := func(ls []float64, which string) ([]float64, error) {
		switch len(ls) {
		case 0:
			return nil, nil
		case 1:
			out := make([]float64, n)
			for i := range out {
				out[i] = ls[0]
			}
			return out, nil
		case n:
			return ls, nil
		}
		return nil, fmt.Errorf("control chart %q: %d %s limits for %d points (want 1 or %d)", c.Title, len(ls), which, n, n)
	}
	lo, err := limit(c.Lower, "lower")
	if err != nil {
		return nil, err
	}
	up, err := limit(c.Upper, "upper")
	if err != nil {
		return nil, err
	}
	for _, s := range c.Signals {
		if s < 0 || s >= n {
			return nil, fmt.Errorf("control chart %q: signal at point %d of %d", c.Title, s+1, n)
		}
	}
	p := newPlot(c.Title, c.XLabel, axisLabel(c.Quantity, c.Unit))
	pts := make(plotter.XYs, n)
	for i, v := range c.Values {
		pts[i] = plotter.XY{X: float64(i), Y: v}
	}
	name := c.Name
	if name == "" {
		name = "value"
	}
	ln, sc, err := plotter.NewLinePoints(pts)
	if err != nil {
		return nil, err
	}
	ln.LineStyle = draw.LineStyle{Color: palette[0], Width: vg.Points(1)}
	sc.GlyphStyle = draw.GlyphStyle{Color: palette[0], Radius: vg.Points(2), Shape: draw.CircleGlyph{}}
	cl, err := plotter.NewLine(plotter.XYs{{X: -0.5, Y: c.Centre}, {X: float64(n) - 0.5, Y: c.Centre}})
	if err != nil {
		return nil, err
	}
	cl.LineStyle = draw.LineStyle{Color: ink, Width: vg.Points(0.9)}
	p.Add(cl)
	p.Legend.Add("centre line", cl)
	first := true
	for _, ls := range [][]float64{lo, up} {
		for _, seg := range stepSegments(ls) {
			l, err := plotter.NewLine(seg)
			if err != nil {
				return nil, err
			}
			l.LineStyle = draw.LineStyle{Color: alarm, Width: vg.Points(1), Dashes: dashes[1]}
			p.Add(l)
			if first {
				p.Legend.Add("control limits", l)
				first = false
			}
		}
	}
	p.Add(ln, sc)
	p.Legend.Add(name, ln, sc)
	if len(c.Signals) > 0 {
		sig := make(plotter.XYs, len(c.Signals))
		for i, s := range c.Signals {
			sig[i] = pts[s]
		}
		s, err := plotter.NewScatter(sig)
		if err != nil {
			return nil, err
		}
		s.GlyphStyle = draw.GlyphStyle{Color: alarm, Radius: vg.Points(5), Shape: draw.RingGlyph{}}
		p.Add(s)
		p.Legend.Add(fmt.Sprintf("signal (%d)", len(c.Signals)), s)
	}
	labels := c.Labels
	if len(labels) == 0 {
		labels = make([]string, n)
		for i := range labels {
			labels[i] = fmt.Sprint(i + 1)
		}
	}
	labels = shortLabels(thin(labels, 24))
	p.NominalX(labels...)
	rotateIfCrowded(p, labels)
	p.X.Min, p.X.Max = -0.5, float64(n)-0.5
	padY(p, 0.3)
	return renderSVG(p, plotWidth, plotHeight)
}

// maxTickLabel is the longest category label drawn on an axis, in
// characters; longer names are cut with an ellipsis (tables beside the
// figure give them in full).
const maxTickLabel = 14

// shortLabels cuts long category labels so that they cannot crowd out the
// plot.
func shortLabels(labels []string) []string {
	out := make([]string, len(labels))
	for i, l := range labels {
		r := []rune(l)
		if len(r) > maxTickLabel {
			l = string(r[:maxTickLabel-1]) + "…"
		}
		out[i] = l
	}
	return out
}

// thin blanks labels so that at most about max are shown.
func thin(labels []string, max int) []string {
	if len(labels) <= max {
		return labels
	}
	step := (len(labels) + max - 1) / max
	out := make([]string, len(labels))
	for i := range labels {
		if i%step == 0 {
			out[i] = labels[i]
		}
	}
	return out
}

// stepSegments draws per-point limits as horizontal steps centred on each
// point, broken where a limit is NaN.
func stepSegments(ls []float64) []plotter.XYs {
	var segs []plotter.XYs
	var cur plotter.XYs
	for i, v := range ls {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			if len(cur) > 0 {
				segs = append(segs, cur)
				cur = nil
			}
			continue
		}
		cur = append(cur, plotter.XY{X: float64(i) - 0.5, Y: v}, plotter.XY{X: float64(i) + 0.5, Y: v})
	}
	if len(cur) > 0 {
		segs = append(segs, cur)
	}
	return segs
}

// OCCurve is one operating characteristic curve: the probability of
// accepting a lot, Pa, at each lot fraction nonconforming P (0..1).
type OCCurve struct {
	Label string
	P     []float64
	Pa    []float64
}

// OCData is what OCPlot draws.
type OCData struct {
	Title  string
	Curves []OCCurve
	Lines  []RefLine // vertical lines at fractions nonconforming (e.g. AQL, LTPD), values 0..1
	LogX   bool      // fraction axis on a logarithmic scale (all fractions positive)
}

// OCPlot draws operating characteristic curves (Pa against lot fraction
// nonconforming, shown in percent) for variables and attributes plans.
func OCPlot(d OCData) ([]byte, error) {
	if len(d.Curves) == 0 {
		return nil, fmt.Errorf("OC plot %q: no curves", d.Title)
	}
	if err := finiteRefs("OC plot "+d.Title, d.Lines); err != nil {
		return nil, err
	}
	p := newPlot(d.Title, "lot fraction nonconforming [%]", "probability of acceptance Pa")
	xmax := 0.0
	for i, c := range d.Curves {
		if len(c.P) != len(c.Pa) || len(c.P) < 2 {
			return nil, fmt.Errorf("OC plot %q, curve %q: need matching P and Pa with at least 2 points (got %d, %d)", d.Title, c.Label, len(c.P), len(c.Pa))
		}
		if err := finite("OC curve "+c.Label, c.P); err != nil {
			return nil, err
		}
		if err := finite("OC curve "+c.Label, c.Pa); err != nil {
			return nil, err
		}
		pts := make(plotter.XYs, len(c.P))
		for j := range c.P {
			if c.P[j] < 0 || c.P[j] > 1 || c.Pa[j] < 0 || c.Pa[j] > 1 {
				return nil, fmt.Errorf("OC plot %q, curve %q: point %d (%g, %g) is outside 0..1", d.Title, c.Label, j+1, c.P[j], c.Pa[j])
			}
			pts[j] = plotter.XY{X: 100 * c.P[j], Y: c.Pa[j]}
			xmax = math.Max(xmax, 100*c.P[j])
		}
		l, err := plotter.NewLine(pts)
		if err != nil {
			return nil, err
		}
		l.LineStyle = lineStyle(i)
		p.Add(l)
		p.Legend.Add(c.Label, l)
	}
	for i, r := range d.Lines {
		l, err := plotter.NewLine(plotter.XYs{{X: 100 * r.Value, Y: 0}, {X: 100 * r.Value, Y: 1}})
		if err != nil {
			return nil, err
		}
		l.LineStyle = draw.LineStyle{Color: refColor(i + 1), Width: vg.Points(0.9), Dashes: dashes[2]}
		p.Add(l)
		p.Legend.Add(r.Label, l)
		xmax = math.Max(xmax, 100*r.Value)
	}
	p.X.Min, p.X.Max = 0, xmax
	if d.LogX {
		xmin := math.Inf(1)
		for _, c := range d.Curves {
			for _, v := range c.P {
				if v <= 0 {
					return nil, fmt.Errorf("OC plot %q: a logarithmic axis needs positive fractions (got %g)", d.Title, v)
				}
				xmin = math.Min(xmin, 100*v)
			}
		}
		p.X.Scale = plot.LogScale{}
		p.X.Tick.Marker = logPercentTicks{}
		p.X.Min = xmin
	}
	p.Y.Min, p.Y.Max = 0, 1.02
	return renderSVG(p, plotWidth, plotHeight)
}

// TrendSeries is one line of a trend plot; NaN marks a period without data
// (the line is broken there).
type TrendSeries struct {
	Label  string
	Values []float64
}

// TrendData is what TrendPlot draws.
type TrendData struct {
	Title    string
	Quantity string
	Unit     string
	Periods  []string // e.g. quarters "2025-Q1"
	Series   []TrendSeries
	Lines    []RefLine // horizontal reference lines (spec minimum, Ppk 1.33)
}

// TrendPlot draws one line per series (for example the quarterly mean or
// Ppk of each supplier) over the periods.
func TrendPlot(d TrendData) ([]byte, error) {
	n := len(d.Periods)
	if n == 0 || len(d.Series) == 0 {
		return nil, fmt.Errorf("trend plot %q: no periods or no series", d.Title)
	}
	if err := finiteRefs("trend plot "+d.Title, d.Lines); err != nil {
		return nil, err
	}
	p := newPlot(d.Title, "period", axisLabel(d.Quantity, d.Unit))
	any := false
	for i, s := range d.Series {
		if len(s.Values) != n {
			return nil, fmt.Errorf("trend plot %q, series %q: %d values for %d periods", d.Title, s.Label, len(s.Values), n)
		}
		var all plotter.XYs
		var segs []plotter.XYs
		var cur plotter.XYs
		for j, v := range s.Values {
			if math.IsInf(v, 0) {
				return nil, fmt.Errorf("trend plot %q, series %q: value %d is infinite", d.Title, s.Label, j+1)
			}
			if math.IsNaN(v) {
				if len(cur) > 0 {
					segs = append(segs, cur)
					cur = nil
				}
				continue
			}
			pt := plotter.XY{X: float64(j), Y: v}
			cur = append(cur, pt)
			all = append(all, pt)
		}
		if len(cur) > 0 {
			segs = append(segs, cur)
		}
		if len(all) == 0 {
			continue
		}
		any = true
		ls := lineStyle(i)
		var first *plotter.Line
		for _, seg := range segs {
			if len(seg) < 2 {
				continue
			}
			l, err := plotter.NewLine(seg)
			if err != nil {
				return nil, err
			}
			l.LineStyle = ls
			p.Add(l)
			if first == nil {
				first = l
			}
		}
		sc, err := plotter.NewScatter(all)
		if err != nil {
			return nil, err
		}
		sc.GlyphStyle = glyphStyle(i)
		p.Add(sc)
		if first != nil {
			p.Legend.Add(s.Label, first, sc)
		} else {
			p.Legend.Add(s.Label, sc)
		}
	}
	if !any {
		return nil, fmt.Errorf("trend plot %q: every value is missing", d.Title)
	}
	for i, r := range d.Lines {
		l, err := plotter.NewLine(plotter.XYs{{X: -0.5, Y: r.Value}, {X: float64(n) - 0.5, Y: r.Value}})
		if err != nil {
			return nil, err
		}
		l.LineStyle = draw.LineStyle{Color: refColor(i), Width: vg.Points(1.1), Dashes: dashes[2]}
		p.Add(l)
		p.Legend.Add(r.Label, l)
	}
	periods := shortLabels(d.Periods)
	p.NominalX(periods...)
	rotateIfCrowded(p, periods)
	p.X.Min, p.X.Max = -0.5, float64(n)-0.5
	padY(p, 0.35)
	return renderSVG(p, plotWidth, plotHeight)
}
