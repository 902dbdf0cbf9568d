package reduce

import (
	"bytes"
	"errors"
	"image/color"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgsvg"
)

// maxPlotPoints bounds the points drawn for the curve (every k-th point is
// drawn, always with the maximum and the last point) so the SVG stays small.
const maxPlotPoints = 1500

// PlotSVG draws the engineering stress-strain curve of a result (strain in
// %, stress in MPa) with the elastic fit line, the offset line and the
// proof and tensile points marked, as an SVG document (fonts not
// embedded). The same result gives the same bytes.
func PlotSVG(r *Result) ([]byte, error) {
	if r == nil || len(r.Strain) < 2 {
		return nil, errors.New("plot: the result has no curve")
	}
	p := plot.New()
	for _, f := range []*font.Font{&p.Title.TextStyle.Font, &p.X.Label.TextStyle.Font, &p.Y.Label.TextStyle.Font,
		&p.X.Tick.Label.Font, &p.Y.Tick.Label.Font, &p.Legend.TextStyle.Font} {
		f.Typeface, f.Variant = "Liberation", "Sans" // the report's sans-serif, not gonum's default serif
	}
	p.Title.Text = r.ID
	p.X.Label.Text = "engineering strain [%]"
	p.Y.Label.Text = "engineering stress [MPa]"
	p.Legend.Top = false
	p.Legend.Left = false
	p.Add(plotter.NewGrid())

	step := (len(r.Strain) + maxPlotPoints - 1) / maxPlotPoints
	iMax := argmax(r.Stress)
	var curve plotter.XYs
	for i := 0; i < len(r.Strain); i++ {
		if i%step == 0 || i == iMax || i == len(r.Strain)-1 {
			curve = append(curve, plotter.XY{X: 100 * r.Strain[i], Y: r.Stress[i]})
		}
	}
	l, err := plotter.NewLine(curve)
	if err != nil {
		return nil, err
	}
	l.Color = color.RGBA{R: 20, G: 60, B: 140, A: 255}
	l.Width = vg.Points(1.2)
	p.Add(l)
	p.Legend.Add("curve", l)

	top := r.Stress[iMax]
	if r.FitOK {
		E := r.Fit.Slope
		yEnd := math.Min(top, 1.05*valueOr(r.Proof, top))
		fit, err := plotter.NewLine(plotter.XYs{{X: 0, Y: 0}, {X: 100 * yEnd / E, Y: yEnd}})
		if err != nil {
			return nil, err
		}
		fit.Color = color.RGBA{R: 200, G: 90, B: 20, A: 255}
		fit.Dashes = []vg.Length{vg.Points(4), vg.Points(2)}
		p.Add(fit)
		p.Legend.Add("elastic fit", fit)
		ol, err := plotter.NewLine(plotter.XYs{{X: 100 * r.Offset, Y: 0}, {X: 100 * (r.Offset + yEnd/E), Y: yEnd}})
		if err != nil {
			return nil, err
		}
		ol.Color = color.RGBA{R: 110, G: 110, B: 110, A: 255}
		ol.Dashes = []vg.Length{vg.Points(2), vg.Points(2)}
		p.Add(ol)
		p.Legend.Add("offset line", ol)
	}
	mark := func(x, y float64, name string, shape draw.GlyphDrawer, c color.Color) error {
		if math.IsNaN(x) || math.IsNaN(y) {
			return nil
		}
		s, err := plotter.NewScatter(plotter.XYs{{X: 100 * x, Y: y}})
		if err != nil {
			return err
		}
		s.GlyphStyle.Shape = shape
		s.GlyphStyle.Color = c
		s.GlyphStyle.Radius = vg.Points(3.5)
		p.Add(s)
		p.Legend.Add(name, s)
		return nil
	}
	if err := mark(r.ProofStrain, r.Proof, "proof", draw.CircleGlyph{}, color.RGBA{R: 200, G: 30, B: 30, A: 255}); err != nil {
		return nil, err
	}
	if err := mark(r.TensileStrain, r.Tensile, "tensile", draw.SquareGlyph{}, color.RGBA{R: 20, G: 130, B: 40, A: 255}); err != nil {
		return nil, err
	}
	p.X.Min, p.Y.Min = 0, 0
	p.Y.Max = 1.08 * top
	c := vgsvg.New(vg.Points(480), vg.Points(320))
	p.Draw(draw.New(c))
	var b bytes.Buffer
	if _, err := c.WriteTo(&b); err != nil {
		return nil, err
	}
	return b.Bytes(), nil
}

func valueOr(v, alt float64) float64 {
	if math.IsNaN(v) {
		return alt
	}
	return v
}
