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
	relSE       float64     // relative standard error of E (all four parameters free)
	info        modulusInfo // the fit's information, for the weight of points left out (refineRO only)
	resid       float64     // residual SD of the stress [MPa]
	r2          float64     // coefficient of determination of the stress
	lo, hi      int
}

// huberK is the tuning constant of Huber's weights in noise SDs: 1.345
// gives 95 % efficiency for normal noise (Huber, Annals of Mathematical
// Statistics 35, 1964; Holland and Welsch 1977).
const huberK = 1.345

// bisquareK is the tuning constant of Tukey's biweight in noise SDs:
// 4.685 gives 95 % efficiency for normal noise (Beaton and Tukey,
// Technometrics 16, 1974; Holland and Welsch 1977).
const bisquareK = 4.685

// Exponent range searched by the Ramberg-Osgood fit: below 2 the curve
// bends from the start (no metal), above 200 it is a sharp corner.
const (
	roMinExp = 2.0
	roMaxExp = 200.0
)

// roSolve fits strain = b0 + b1 u + b2 u^m, u = stress/sRef (u below 0
// taken as 0 in the power), by weighted least squares for a fixed
// exponent m over points lo..hi-1, weights w (nil: 1). lu holds ln u of
// each point (u above 0) and pw receives u^m = exp(m ln u). It returns
// the coefficients and the weighted sum of squared residuals.
func roSolve(x, s []float64, lo, hi int, sRef, m float64, w, lu, pw []float64) (b [3]float64, sse float64, ok bool) {
	var A [3][]float64
	for r := range A {
		A[r] = make([]float64, 4)
	}
	for i := lo; i < hi; i++ {
		u := s[i] / sRef
		p := 0.0
		if u > 0 {
			p = math.Exp(m * lu[i-lo])
		}
		pw[i-lo] = p
		f := [3]float64{1, u, p}
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
		e := x[i] - (b[0] + b[1]*s[i]/sRef + b[2]*pw[i-lo])
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
	lu, pw := make([]float64, n), make([]float64, n)
	for i := lo; i < hi; i++ {
		if u := s[i] / sRef; u > 0 {
			lu[i-lo] = math.Log(u)
		}
	}
	for pass := 0; pass < 3; pass++ {
		obj := func(t float64) float64 {
			_, sse, ok := roSolve(x, s, lo, hi, sRef, math.Exp(t), w, lu, pw)
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
		b, _, good = roSolve(x, s, lo, hi, sRef, m, w, lu, pw)
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
// The window is then cut at the curve's own proof strength, the first
// point whose plastic strain after the fitted curve's elastic line,
// strain - e0 - stress/E, reaches the offset, and fitted again: the
// two-stage curves of stainless steel (Mirambell and Real, Journal of
// Constructional Steel Research 54, 2000; Rasmussen, same journal 59,
// 2003) follow one power up to the 0.2 % proof strength and another
// beyond, and a single power fitted past it pulls the tangent at zero
// stress low (by 0.4 % on a clean curve of that form fitted to 0.3 %
// plastic strain).
// The fit must leave stress residuals no larger than the straight
// window's bound (twice the noise plus 0.2 % of the stress span): a curve
// of another form is left to the straight window. The curve found is then
// fitted again in the stress (refineRO, the maximum-likelihood fit when
// the noise is on the force) and extended over the longest window of
// roReach on which it still holds: residuals within the same bound, and a
// modulus that differs from that of the first window by at most three
// standard deviations of the difference, sqrt(SE1^2 - SE2^2) for the
// nested fits (the variance of the difference of an efficient estimate and
// a less efficient one, Hausman, Econometrica 46, 1978), at least half
// SE1. The longer window pins the power and its multiple, and so the
// tangent at zero stress: on a gradually yielding record of 500 points
// with noise of 0.2 % of Rm the standard error of the modulus falls from
// about 1 % to 0.6 %. The curve is taken instead of the straight line
// when the relative standard error of its modulus is smaller than the
// straight window's combined error (standard error of the slope and half
// its change across the window), or when the two moduli differ by more
// than three combined standard errors (the straight window of a gradually
// yielding material can lie in the plastic range, where the slope is low
// but straight within the noise). The rules are this package's own. It
// returns the index range used and true when taken.
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
		if good && adequate(c, l) && math.Abs(c.E-rc.E) <= 3*rc.E*math.Sqrt(math.Max(rc.relSE*rc.relSE-c.relSE*c.relSE, rc.relSE*rc.relSE/4)) {
			rc, lo, start = c, l, a
			break
		}
	}
	// The first window ends at the curve's own proof strength: the first
	// point whose plastic strain after the fitted curve's elastic line,
	// strain - e0 - stress/E, reaches the offset. A curve that changes its
	// power there, as stainless steels do (Rasmussen, Journal of
	// Constructional Steel Research 59, 2003; Mirambell and Real, same
	// journal 54, 2000), is one power only below it.
	firstEnd := 1.5 * off
	h := lo
	for h < hi && x[h]-rc.e0-s[h]/rc.E < off {
		h++
	}
	if h > lin.hi && h < hi {
		if c, good := fitRO(x, s, lo, h, res.Noise); good && adequate(c, lo) {
			rc, hi, firstEnd = c, h, off
		}
	}
	// The fit in stress (refineRO) from the curve found, on the same
	// points; then on longer windows, as long as the curve holds.
	if c, good := refineRO(x, s, span(lo, hi, hi, 1), res.Noise, rc); good && adequate(c, lo) {
		rc = c
	}
	// The extension stops before the first step (force or extension),
	// beyond which the curve is shifted.
	last := iEnd
	for _, g := range res.steps {
		for last >= hi && x[last] >= g.at {
			last--
		}
	}
	n, end, reach := hi-lo, 100*firstEnd, ""
	for _, pe := range roReach {
		h := last + 1
		if pe <= 1 {
			for h = hi; h <= last && x[h]-rc.e0-s[h]/rc.E < pe; h++ {
			}
		}
		if h <= hi+roReachMin {
			continue
		}
		step := max(1, (h-hi+roReachPoints-1)/roReachPoints)
		c, good := refineRO(x, s, span(lo, hi, h, step), res.Noise, rc)
		if good && c.resid <= 2*res.Noise+0.002*math.Abs(s[h-1]-s[lo]) && math.Abs(c.E-rc.E) <= 3*rc.E*math.Sqrt(math.Max(rc.relSE*rc.relSE-c.relSE*c.relSE, rc.relSE*rc.relSE/4)) {
			rc, n = c, hi-lo+(h-hi+step-1)/step
			end = 100 * (x[h-1] - c.e0 - s[h-1]/c.E)
			if step > 1 {
				reach = fmt.Sprintf(", every %d%s point beyond %.3g %%", step, ordinal(step), 100*firstEnd)
			}
			hi = h
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
	res.modInfo = rc.info
	res.Fit = Fit{Slope: rc.E, Intercept: -rc.E * rc.e0, R2: rc.r2, ResidualSD: rc.resid, SlopeRelSE: rc.relSE, N: n, From: from, To: to,
		FirstLine: lnFirst[lo], LastLine: lnLast[hi-1]}
	res.fitSpan = hi - lo
	why := fmt.Sprintf("it is more precise than the straight window from %.0f %% to %.0f %% of the top stress (modulus %.4g GPa, combined error %.3g %%)", 100*lin.a, 100*lin.b, E0/1000, 100*linErr)
	switch {
	case math.IsInf(linErr, 1):
		why = fmt.Sprintf("no window of the loading branch is straight (the lowest, from %.0f %% to %.0f %% of the top stress, has a slope change of %.2f %% across it)", 100*lin.a, 100*lin.b, 100*lin.curve)
	case !agree:
		why = fmt.Sprintf("its modulus departs by more than three combined standard errors from that of the straight window from %.0f %% to %.0f %% of the top stress (modulus %.4g GPa, combined error %.3g %%)", 100*lin.a, 100*lin.b, E0/1000, 100*linErr)
	}
	res.FitMethod = fmt.Sprintf("tangent at zero stress of a Ramberg-Osgood curve (the strain as the sum of a strain offset, the stress over the modulus and a multiple of a power of the stress; Ramberg and Osgood, NACA TN 902; Hill, NACA TN 927; the tangent modulus of ASTM E111) fitted by least squares in stress, the strain taken as exact (Levenberg-Marquardt), to %d points from %.4g to %.4g MPa (from %.0f %% of the loading branch's top stress %.4g MPa to a plastic strain of %.3g %%%s): power %.3g, residual SD %.3g MPa, R² %.6f, standard error of the modulus %.3g %%; taken because %s",
		n, from, to, 100*start, top, end, reach, rc.m, rc.resid, rc.r2, 100*rc.relSE, why)
	return lo, hi, true
}

// roReach are the plastic strains (fractions; above 1: the whole
// loading branch) to which the Ramberg-Osgood fit is extended, longest
// first, when the curve holds there: its residuals stay within the
// straight window's bound and its modulus within three standard
// deviations of the difference from the fit of the first window (up to
// the offset, see gradualFit). A longer window pins the
// power and its multiple, and so the tangent at zero stress, more
// tightly. Beyond the first window at most roReachPoints points are used
// (every k-th), which bounds the work on dense records; an extension of
// roReachMin points or fewer is not tried.
var roReach = []float64{2, 0.05, 0.02, 0.01, 0.006}

const (
	roReachPoints = 2000
	roReachMin    = 10
)

// span lists the indices lo..hi-1 and every step-th of hi..end-1.
func span(lo, hi, end, step int) []int {
	idx := make([]int, 0, hi-lo+(end-hi)/step+1)
	for i := lo; i < hi; i++ {
		idx = append(idx, i)
	}
	for i := hi; i < end; i += step {
		idx = append(idx, i)
	}
	return idx
}

func ordinal(k int) string {
	switch {
	case k%100 >= 11 && k%100 <= 13:
		return "th"
	case k%10 == 1:
		return "st"
	case k%10 == 2:
		return "nd"
	case k%10 == 3:
		return "rd"
	}
	return "th"
}

// roInverse returns the stress u (in units of sRef) on the curve
// strain = b0 + b1 u + b2 u^m (power taken as 0 below u = 0) at strain x,
// and the slope d(strain)/du there, by Newton's method from u0.
func roInverse(b [3]float64, m, x, u0 float64) (u, d float64) {
	u = u0
	for it := 0; it < 30; it++ {
		g, d := b[0]+b[1]*u-x, b[1]
		if u > 0 {
			p := math.Exp((m - 1) * math.Log(u)) // u^(m-1)
			g += b[2] * p * u
			d += b[2] * m * p
		}
		step := g / d
		u -= step
		if math.Abs(step) <= 1e-12*math.Max(1e-3, math.Abs(u)) {
			break
		}
	}
	d = b[1]
	if u > 0 {
		d += b[2] * m * math.Exp((m-1)*math.Log(u))
	}
	return u, d
}

// refineRO fits the Ramberg-Osgood relation of fitRO, strain = b0 + b1 u
// + b2 u^m with u = stress/sRef, to the points lo..hi-1 by nonlinear
// least squares in the stress, which carries the noise (the strain is
// taken as exact): the residual of a point is its stress less the
// curve's stress at its strain (found by Newton's method), so the fit is
// the maximum-likelihood fit for normal force noise. The four parameters
// (b0, b1, b2, m) are found by the Levenberg-Marquardt method (Levenberg
// 1944; Marquardt, J. SIAM 11, 1963; the scaled damping of Press et al.,
// Numerical Recipes, 3rd ed., section 15.5) from the start rc, each point
// weighted by Huber's weight of its residual given the noise SD. The
// standard error of the modulus is from the covariance sigma^2 (J'WJ)^-1
// at the solution (J the derivatives of the curve's stress with respect
// to the parameters; gonum mat).
func refineRO(x, s []float64, idx []int, noise float64, rc roCurve) (roCurve, bool) {
	n := len(idx)
	if n < 8 {
		return rc, false
	}
	sRef := 0.0
	for _, i := range idx {
		sRef = math.Max(sRef, s[i])
	}
	if !(sRef > 0) {
		return rc, false
	}
	p := [4]float64{rc.e0, sRef / rc.E, rc.c * math.Pow(sRef, rc.m), rc.m}
	// r, J: residuals and derivative rows at p; rt, Jt at a trial point.
	r, rt := make([]float64, n), make([]float64, n)
	J, Jt := make([]float64, 4*n), make([]float64, 4*n)
	// ua, ut: the curve's stress (in sRef) at each point's strain, at p
	// and at the trial point; Newton's method starts from ua.
	ua, ut := make([]float64, n), make([]float64, n)
	for k, i := range idx {
		ua[k] = s[i] / sRef
	}
	w := make([]float64, n)
	for k := range w {
		w[k] = 1
	}
	// eval fills rt and Jt at q and returns the weighted sum of squares.
	eval := func(q [4]float64) (float64, bool) {
		if !(q[1] > 0) || !(q[2] >= 0) || q[3] < roMinExp || q[3] > roMaxExp {
			return math.Inf(1), false
		}
		b := [3]float64{q[0], q[1], q[2]}
		sse := 0.0
		for k, i := range idx {
			u, d := roInverse(b, q[3], x[i], ua[k])
			if !(d > 0) || math.IsNaN(u) {
				return math.Inf(1), false
			}
			e := s[i] - sRef*u
			rt[k], ut[k] = e, u
			sse += w[k] * e * e
			um, lu := 0.0, 0.0
			if u > 0 {
				lu = math.Log(u)
				um = math.Exp(q[3] * lu)
			}
			f := -sRef / d
			row := Jt[4*k : 4*k+4]
			row[0], row[1], row[2], row[3] = f, f*u, f*um, f*q[2]*um*lu
		}
		return sse, true
	}
	// huber sets Huber's weights from the residuals r and returns the
	// weighted sum of squares.
	bisq := false
	huber := func() float64 {
		sse := 0.0
		for k := range w {
			w[k] = 1
			switch a := math.Abs(r[k]); {
			case noise <= 0:
			case bisq:
				u := a / (bisquareK * noise)
				w[k] = 0
				if u < 1 {
					w[k] = (1 - u*u) * (1 - u*u)
				}
			case a > huberK*noise:
				w[k] = huberK * noise / a
			}
			sse += w[k] * r[k] * r[k]
		}
		return sse
	}
	if _, ok := eval(p); !ok {
		return rc, false
	}
	r, rt, J, Jt, ua, ut = rt, r, Jt, J, ut, ua
	sse := huber()
	// normal accumulates J'WJ and J'Wr at p.
	normal := func() (a [4][4]float64, g [4]float64) {
		for k := 0; k < n; k++ {
			row := J[4*k : 4*k+4]
			for i := 0; i < 4; i++ {
				g[i] += w[k] * row[i] * r[k]
				for c := i; c < 4; c++ {
					a[i][c] += w[k] * row[i] * row[c]
				}
			}
		}
		return a, g
	}
	sym := func(a [4][4]float64, damp float64) *mat.SymDense {
		d := mat.NewSymDense(4, nil)
		for i := 0; i < 4; i++ {
			for c := i; c < 4; c++ {
				d.SetSym(i, c, a[i][c])
			}
			d.SetSym(i, i, a[i][i]*(1+damp))
		}
		return d
	}
	lambda := 1e-3
	for it := 0; it < 50; it++ {
		a, g := normal()
		gv := mat.NewVecDense(4, g[:])
		improved, conv := false, false
		for try := 0; try < 12 && !improved; try++ {
			var ch mat.Cholesky
			var dlt mat.VecDense
			if !ch.Factorize(sym(a, lambda)) || ch.SolveVecTo(&dlt, gv) != nil {
				lambda *= 10
				continue
			}
			q := p
			for i := 0; i < 4; i++ {
				q[i] += dlt.AtVec(i)
			}
			v, ok := eval(q)
			if !ok || v > sse {
				lambda *= 10
				continue
			}
			conv = sse-v <= 1e-8*sse
			for i := 0; i < 4; i++ {
				if math.Abs(dlt.AtVec(i)) > 1e-7*(math.Abs(p[i])+p[1]) {
					break
				}
				conv = conv || i == 3
			}
			p = q
			r, rt, J, Jt, ua, ut = rt, r, Jt, J, ut, ua
			lambda = math.Max(lambda/10, 1e-9)
			improved = true
			sse = huber()
		}
		if !improved || conv {
			if bisq || noise <= 0 {
				break
			}
			bisq = true
			sse = huber()
		}
	}
	// Covariance at the solution.
	a, _ := normal()
	var ch mat.Cholesky
	if !ch.Factorize(sym(a, 0)) {
		return rc, false
	}
	var cov mat.SymDense
	if err := ch.InverseTo(&cov); err != nil {
		return rc, false
	}
	var sst, sm, ssr float64
	for _, i := range idx {
		sm += s[i]
	}
	sm /= float64(n)
	for k, i := range idx {
		sst += (s[i] - sm) * (s[i] - sm)
		ssr += r[k] * r[k]
	}
	v := sse / float64(n-4)
	out := roCurve{E: sRef / p[1], e0: p[0], c: p[2] / math.Pow(sRef, p[3]), m: p[3],
		relSE: math.Sqrt(v*math.Max(0, cov.At(1, 1))) / p[1], resid: math.Sqrt(ssr / float64(n-4)), lo: idx[0], hi: idx[n-1] + 1}
	out.r2 = 1 - ssr/sst
	out.info = modulusInfo{dim: 4, k: 1, v: v, scale: p[1], xlo: x[idx[0]], xhi: x[idx[n-1]]}
	for i := 0; i < 4; i++ {
		for c := i; c < 4; c++ {
			out.info.a[i][c], out.info.a[c][i] = a[i][c], a[i][c]
		}
	}
	b, m := [3]float64{p[0], p[1], p[2]}, p[3]
	out.info.row = func(xs float64) (r [4]float64, ok bool) {
		u, d := roInverse(b, m, xs, math.Max(0, (xs-b[0])/b[1]))
		if !(d > 0) || math.IsNaN(u) {
			return r, false
		}
		um, lu := 0.0, 0.0
		if u > 0 {
			lu = math.Log(u)
			um = math.Exp(m * lu)
		}
		f := -sRef / d
		return [4]float64{f, f * u, f * um, f * b[2] * um * lu}, true
	}
	return out, out.E > 0 && !math.IsNaN(out.relSE)
}
