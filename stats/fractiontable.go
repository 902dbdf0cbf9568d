package stats

import (
	"math"
	"sync"
)

// Interpolated fraction bounds for many lots of the same size.
//
// TailFractionBound solves F_T(t; df, delta) = target for delta by
// quadrature passes of the noncentral t CDF (about 2 to 3 per call). For a
// fixed df = n-1 and target, the root delta(t) is an analytic function of
// t (the implicit function theorem: F_T is analytic in t and delta and
// strictly decreasing in delta), so over the variable u = asinh(t / s0),
// s0 = sqrt(2 df), the remainder
//
//	r(u) = delta(t) - delta0(t),  delta0(t) = t - z_target sqrt(1 + t^2/(2 df))
//
// (delta0 the normal approximation of Johnson, Kotz and Balakrishnan vol.
// 2, 31.7, which the solver also starts from) is smooth and slowly varying.
// r is interpolated on panels of width fracPanelWidth in u by the
// polynomial through fracNodes Chebyshev points of the first kind, each
// node value solved by solveNoncentrality, and evaluated by Clenshaw's
// recurrence (Trefethen, Approximation Theory and Approximation Practice,
// SIAM 2013, chapters 3 and 8; Press et al. 2007, Numerical Recipes 3rd
// ed., section 5.8). A panel is built on first use. It is kept only if it
// passes two checks, else every value in it is solved directly:
//   - the last two Chebyshev coefficients are below fracCoefTol max(1, |delta|)
//     (for an analytic function the coefficients decay geometrically and
//     the last ones bound the error, Trefethen chapter 8);
//   - at one point off the nodes the interpolant agrees with a direct solve
//     to fracCheckTol max(1, |delta|).
//
// Measured (TestFactorsTailFractionBoundMatchesDirect): agreement with the
// direct solve to about 1e-14 in delta over df 1 to 2000.
const (
	fracPanelWidth = 0.5
	fracNodes      = 16
	fracUMax       = 8.0 // |u| beyond this: solved directly
	fracPanels     = int(2 * fracUMax / fracPanelWidth)
	fracCoefTol    = 1e-13
	fracCheckTol   = 1e-12
)

type fracKey struct {
	n      int
	target float64
}

type fracTable struct {
	z      float64 // z_target, for delta0
	panels [fracPanels]fracPanel
}

// fracDelta0 is delta0(t) above, for z = z_target and df degrees of freedom.
func fracDelta0(t, z, df float64) float64 { return t - z*math.Sqrt(1+t*t/(2*df)) }

type fracPanel struct {
	once sync.Once
	ok   bool
	chebSeries
}

// chebSeries is a Chebyshev series of fracNodes terms on [-1, 1].
type chebSeries struct {
	coef [fracNodes]float64
}

// fracCos[k][j] = cos(pi k (j + 1/2) / m): the Chebyshev points of the
// first kind are x_j = fracCos[1][j] and the discrete cosine transform
// gives the coefficients (Numerical Recipes section 5.8, chebft).
var fracCos = func() (c [fracNodes][fracNodes]float64) {
	for k := range c {
		for j := range c[k] {
			c[k][j] = math.Cos(math.Pi * float64(k) * (float64(j) + 0.5) / fracNodes)
		}
	}
	return c
}()

// TailFractionBound returns TailFractionBound(n, q, gamma, upper) (see
// there) from the interpolant above, built once per (n, gamma, side) and
// panel; it agrees with the direct solve to about 1e-14 in the
// noncentrality. Arguments the direct function rejects, and margins beyond
// the interpolated range, are passed to it.
func (c *Factors) TailFractionBound(n int, q, gamma float64, upper bool) (float64, error) {
	if checkMargin("tail fraction bound", n, q) != nil || !(gamma > 0 && gamma < 1) {
		return TailFractionBound(n, q, gamma, upper)
	}
	target := gamma
	if !upper {
		target = 1 - gamma
	}
	df := float64(n - 1)
	s0 := math.Sqrt(2 * df)
	t := math.Sqrt(float64(n)) * q
	u := math.Asinh(t / s0)
	if !(math.Abs(u) < fracUMax) {
		return TailFractionBound(n, q, gamma, upper)
	}
	j := int(math.Floor((u + fracUMax) / fracPanelWidth))
	if j < 0 || j >= fracPanels {
		return TailFractionBound(n, q, gamma, upper)
	}
	tab := c.fracTable(fracKey{n, target})
	p := &tab.panels[j]
	a := -fracUMax + float64(j)*fracPanelWidth
	p.once.Do(func() { p.build(a, s0, df, target, tab.z) })
	if !p.ok {
		return TailFractionBound(n, q, gamma, upper)
	}
	delta := p.eval(2*(u-a)/fracPanelWidth-1) + fracDelta0(t, tab.z, df)
	return normalCDF(-delta / math.Sqrt(float64(n))), nil
}

func (c *Factors) fracTable(key fracKey) *fracTable {
	c.mu.Lock()
	defer c.mu.Unlock()
	if c.frac == nil {
		c.frac = map[fracKey]*fracTable{}
	}
	t := c.frac[key]
	if t == nil {
		t = &fracTable{z: normalQuantile(key.target)}
		c.frac[key] = t
	}
	return t
}

// build solves the remainder at the panel's Chebyshev points on
// [a, a + fracPanelWidth] in u, forms the coefficients and checks them.
func (p *fracPanel) build(a, s0, df, target, z float64) {
	tAt := func(x float64) float64 { return s0 * math.Sinh(a+0.5*fracPanelWidth*(x+1)) }
	var f [fracNodes]float64
	scale := 1.0
	for j := range f {
		t := tAt(fracCos[1][j])
		d, err := solveNoncentrality(t, df, target)
		if err != nil || math.IsNaN(d) || math.IsInf(d, 0) {
			return
		}
		f[j] = d - fracDelta0(t, z, df)
		scale = math.Max(scale, math.Abs(d))
	}
	p.fit(&f)
	if math.Abs(p.coef[fracNodes-1])+math.Abs(p.coef[fracNodes-2]) > fracCoefTol*scale {
		return
	}
	const x = 0.2718 // off every node
	t := tAt(x)
	d, err := solveNoncentrality(t, df, target)
	if err != nil || !(math.Abs(p.eval(x)+fracDelta0(t, z, df)-d) <= fracCheckTol*math.Max(1, math.Abs(d))) {
		return
	}
	p.ok = true
}

// fit sets the coefficients of the polynomial through the values f at
// the Chebyshev points fracCos[1] (the discrete cosine transform).
func (p *chebSeries) fit(f *[fracNodes]float64) {
	for k := range p.coef {
		s := 0.0
		for j := range f {
			s += f[j] * fracCos[k][j]
		}
		p.coef[k] = 2 * s / fracNodes
	}
}

// eval sums the Chebyshev series at x in [-1, 1] by Clenshaw's recurrence.
func (p *chebSeries) eval(x float64) float64 {
	var b1, b2 float64
	for k := fracNodes - 1; k >= 1; k-- {
		b1, b2 = 2*x*b1-b2+p.coef[k], b1
	}
	return x*b1 - b2 + 0.5*p.coef[0]
}
