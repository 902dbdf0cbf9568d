package reduce

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// roCurve is a fitted Ramberg-Osgood relation in the form of Hill:
// strain = e0 + stress/E + c stress^m, over working points lo..hi-1.
type roCurve struct {
	E, e0, c, m float64
	relSE       float64 // relative standard error of E (all four parameters free)
	resid       float64 // residual SD of the stress [MPa]
	r2          float64 // coefficient of determination of the stress
	lo, hi      int
}

// huberK is the tuning constant of Huber's weights in noise SDs: 1.345
// gives 95 % efficiency for normal noise (Huber, Annals of Mathematical
// Statistics 35, 1964; Holland and Welsch 1977).
const huberK = 1.345

// Exponent range searched by the Ramberg-Osgood fit: below 2 the curve
// bends from the start (no metal), above 200 it is a sharp corner.
const (
	roMinExp = 2.0
	roMaxExp = 200.0
)

// roSolve fits strain = b0 + b1 u + b2 u^m, u = stress/sRef (u below 0
// taken as 0 in the power), by weighted least squares for a fixed
// exponent m over points lo..hi-1, weights w (nil: 1). It returns the
// coefficients and the weighted sum of squared residuals.
func roSolve(x, s []float64, lo, hi int, sRef, m float64, w []float64) (b [3]float64, sse float64, ok bool) {
	var A [3][]float64
	for r := range A {
		A[r] = make([]float64, 4)
	}
	for i := lo; i < hi; i++ {
		u := s[i] / sRef
		f := [3]float64{1, u, math.Pow(math.Max(u, 0), m)}
		wi := 1.0
		if w != nil {
			wi = w[i-lo]
		}
		for r := 0; r < 3; r++ {
			for k := 0; k < 3; k++ {
				A[r][k] += wi * f[r] * f[k]
			}
			A[r][3] += wi * f[r] * x[i]
		}
	}
	if !gaussJordan3(&A) {
		return b, 0, false
	}
	for r := 0; r < 3; r++ {
		b[r] = A[r][3] / A[r][r]
	}
	for i := lo; i < hi; i++ {
		u := s[i] / sRef
		e := x[i] - (b[0] + b[1]*u + b[2]*math.Pow(math.Max(u, 0), m))
		wi := 1.0
		if w != nil {
			wi = w[i-lo]
		}
		sse += wi * e * e
	}
	return b, sse, true
}

// fitRO fits the Ramberg-Osgood relation as Hill wrote it,
// strain = e0 + stress/E + c stress^m (Ramberg and Osgood, NACA TN 902,
// 1943; Hill, NACA TN 927, 1944; the form used for stainless steel in
// EN 1993-1-4 Annex C, from memory), to the working points lo..hi-1. For
// a given exponent the strain is linear in e0, 1/E and c and is fitted by
// weighted least squares, each point weighted by the inverse square of
// the fitted curve's slope d(strain)/d(stress) there, so that the
// residuals are those of the stress, which carries the noise, and, given
// the record's noise SD, by Huber's weight (1 within 1.345 noise SDs,
// falling as 1.345 SDs over the residual beyond: iteratively reweighted
// least squares, Huber 1964, Holland and Welsch 1977), so that a point
// off the curve by less than the glitch threshold weighs little. The
// exponent minimises the residual sum of squares: a log-spaced grid from
// 2 to 200, then golden-section search (Kiefer 1953; Press et al.,
// Numerical Recipes, 3rd ed., section 10.2) between the grid neighbours
// of the best; the weights are updated and the search repeated twice.
// The modulus is the tangent at zero stress, E, as ASTM E111 defines the
// tangent modulus at a point of a fitted curve. Its standard error is
// from the covariance of all four parameters (Gauss-Newton: the residual
// variance times the inverse of J'WJ, J the derivatives of the strain
// with respect to e0, 1/E, c and m; gonum mat).
func fitRO(x, s []float64, lo, hi int, noise float64) (rc roCurve, ok bool) {
	n := hi - lo
	if n < 8 {
		return rc, false
	}
	sRef := 0.0
	for i := lo; i < hi; i++ {
		sRef = math.Max(sRef, s[i])
	}
	if !(sRef > 0) {
		return rc, false
	}
	var w []float64
	var b [3]float64
	m := 0.0
	for pass := 0; pass < 3; pass++ {
		obj := func(t float64) float64 {
			_, sse, ok := roSolve(x, s, lo, hi, sRef, math.Exp(t), w)
			if !ok {
				return math.Inf(1)
			}
			return sse
		}
		const grid = 24
		t0, t1 := math.Log(roMinExp), math.Log(roMaxExp)
		ts := make([]float64, grid)
		best := 0
		bestV := math.Inf(1)
		for k := range ts {
			ts[k] = t0 + (t1-t0)*float64(k)/float64(grid-1)
			if v := obj(ts[k]); v < bestV {
				best, bestV = k, v
			}
		}
		a, c := ts[max(0, best-1)], ts[min(grid-1, best+1)]
		const gr = 0.6180339887498949
		p, q := c-gr*(c-a), a+gr*(c-a)
		fp, fq := obj(p), obj(q)
		for it := 0; it < 40 && c-a > 1e-6; it++ {
			if fp < fq {
				c, q, fq = q, p, fp
				p = c - gr*(c-a)
				fp = obj(p)
			} else {
				a, p, fp = p, q, fq
				q = a + gr*(c-a)
				fq = obj(q)
			}
		}
		m = math.Exp((a + c) / 2)
		var good bool
		b, _, good = roSolve(x, s, lo, hi, sRef, m, w)
		if !good || !(b[1] > 0) {
			return rc, false
		}
		// Weights: inverse square of d(strain)/d(stress) [per MPa], times
		// Huber's weight of the stress residual.
		nw := make([]float64, n)
		for i := lo; i < hi; i++ {
			u := math.Max(s[i]/sRef, 0)
			d := (b[1] + b[2]*m*math.Pow(u, m-1)) / sRef
			if !(d > 0) {
				d = b[1] / sRef
			}
			nw[i-lo] = 1 / (d * d)
			if noise > 0 {
				r := math.Abs(x[i]-(b[0]+b[1]*s[i]/sRef+b[2]*math.Pow(u, m))) / d
				if r > huberK*noise {
					nw[i-lo] *= huberK * noise / r
				}
			}
		}
		w = nw
	}
	if !(b[2] >= 0) {
		return rc, false // stiffening: a toe, not gradual yield
	}
	// Residuals, fit quality and the covariance of (e0, b1, b2, m).
	J := mat.NewDense(n, 4, nil)
	var sse, sw, sws, sws2 float64
	for i := lo; i < hi; i++ {
		u := math.Max(s[i]/sRef, 0)
		um := math.Pow(u, m)
		lu := 0.0
		if u > 0 {
			lu = math.Log(u)
		}
		e := x[i] - (b[0] + b[1]*s[i]/sRef + b[2]*um)
		// The stress residual, without Huber's weight, for the fit
		// quality and the standard error.
		d := (b[1] + b[2]*m*math.Pow(u, m-1)) / sRef
		if !(d > 0) {
			d = b[1] / sRef
		}
		wi := 1 / (d * d)
		sse += wi * e * e
		sw += 1
		sws += s[i]
		sws2 += s[i] * s[i]
		sq := math.Sqrt(wi)
		J.SetRow(i-lo, []float64{sq, sq * s[i] / sRef, sq * um, sq * b[2] * um * lu})
	}
	var jtj mat.SymDense
	jtj.SymOuterK(1, J.T())
	var chol mat.Cholesky
	if !chol.Factorize(&jtj) {
		return rc, false
	}
	var cov mat.SymDense
	if err := chol.InverseTo(&cov); err != nil {
		return rc, false
	}
	v := sse / float64(n-4)
	rc = roCurve{E: sRef / b[1], e0: b[0], c: b[2] / math.Pow(sRef, m), m: m,
		relSE: math.Sqrt(v*math.Max(0, cov.At(1, 1))) / b[1], resid: math.Sqrt(v), lo: lo, hi: hi}
	sst := sws2 - sws*sws/sw
	rc.r2 = 1 - sse/sst
	return rc, rc.E > 0 && !math.IsNaN(rc.relSE)
}

// gradualFit tries the Ramberg-Osgood fit (fitRO) from the start of the
// straight window lin (the toe left out as there) to the point where the
// plastic strain after the straight line first reaches one and a half
// times the offset, within the loading branch x[0..iEnd]; a lower start
// (a bound of elasticGrid below the window's) is taken when its modulus
// agrees with the first fit's within two of that fit's standard errors.
// The fit must leave stress residuals no larger than the straight
// window's bound (twice the noise plus 0.2 % of the stress span): a curve
// of another form is left to the straight window. It is then taken
// instead of the straight line when the relative standard error of its
// modulus is smaller than the straight window's combined error (standard
// error of the slope and half its change across the window), or when the
// two moduli differ by more than three combined standard errors (the
// straight window of a gradually yielding material can lie in the plastic
// range, where the slope is low but straight within the noise). The rule
// is this package's own. It returns the index range used and true when
// taken.
func (res *Result) gradualFit(x, s []float64, lnFirst, lnLast []int, lin window, linErr float64, iEnd int, off float64) (lo, hi int, taken bool) {
	E0, a0 := res.Fit.Slope, res.Fit.Intercept
	hi = lin.lo
	for hi <= iEnd && x[hi]-(s[hi]-a0)/E0 < 1.5*off {
		hi++
	}
	if hi <= lin.hi {
		return 0, 0, false
	}
	top := 0.0
	for i := 0; i <= iEnd; i++ {
		top = math.Max(top, s[i])
	}
	// The fit starts where the straight window starts (a toe, where the
	// slope rises, is left out as there); a lower start gives more points
	// near zero stress and is taken when its modulus agrees with that of
	// the fit from the straight window's start within two of that fit's
	// standard errors (a toe would pull it lower).
	ok := false
	var rc roCurve
	first := func(a float64) int {
		i := 0
		for i < hi && s[i] < a*top {
			i++
		}
		return i
	}
	adequate := func(c roCurve, l int) bool {
		return c.resid <= 2*res.Noise+0.002*math.Abs(s[hi-1]-s[l])
	}
	start := lin.a
	lo = lin.lo
	if c, good := fitRO(x, s, lo, hi, res.Noise); good && adequate(c, lo) {
		rc, ok = c, true
	}
	if !ok {
		return 0, 0, false
	}
	for _, a := range elasticGrid {
		if a >= lin.a {
			break
		}
		l := first(a)
		if l >= lin.lo {
			break
		}
		c, good := fitRO(x, s, l, hi, res.Noise)
		if good && adequate(c, l) && math.Abs(c.E-rc.E) <= 2*rc.relSE*rc.E {
			rc, lo, start = c, l, a
			break
		}
	}
	// The straight window is kept when it is the more precise and agrees
	// with the curve's tangent at zero stress within three combined
	// standard errors.
	agree := math.Abs(E0-rc.E) <= 3*rc.E*math.Hypot(rc.relSE, linErr)
	if rc.relSE >= linErr && agree {
		return 0, 0, false
	}
	from, to := math.Inf(1), math.Inf(-1)
	for i := lo; i < hi; i++ {
		from, to = math.Min(from, s[i]), math.Max(to, s[i])
	}
	res.Fit = Fit{Slope: rc.E, Intercept: -rc.E * rc.e0, R2: rc.r2, ResidualSD: rc.resid, N: hi - lo, From: from, To: to,
		FirstLine: lnFirst[lo], LastLine: lnLast[hi-1]}
	why := "it is more precise than"
	if !agree {
		why = "its modulus departs by more than three combined standard errors from that of"
	}
	res.FitMethod = fmt.Sprintf("tangent at zero stress of a Ramberg-Osgood curve (the strain as the sum of a strain offset, the stress over the modulus and a multiple of a power of the stress; Ramberg and Osgood, NACA TN 902; Hill, NACA TN 927; the tangent modulus of ASTM E111) fitted by least squares in stress to the %d points from %.4g to %.4g MPa (from %.0f %% of the loading branch's top stress %.4g MPa to a plastic strain of %.3g %%): power %.3g, residual SD %.3g MPa, R² %.6f, standard error of the modulus %.3g %%; taken because %s the straight window from %.0f %% to %.0f %% of the top stress (modulus %.4g GPa, combined error %.3g %%)",
		hi-lo, from, to, 100*start, top, 150*off, rc.m, rc.resid, rc.r2, 100*rc.relSE, why, 100*lin.a, 100*lin.b, E0/1000, 100*linErr)
	return lo, hi, true
}
