package reduce

import (
	"fmt"
	"math"
	"sort"

	"gonum.org/v1/gonum/mat"
)

// elasticGrid are the window bounds of the automatic elastic fit, as
// fractions of the loading branch's top stress: fine at low stress, where
// a material that yields gradually is still straight, coarser above.
var elasticGrid = []float64{0, 0.01, 0.02, 0.03, 0.04, 0.05, 0.06, 0.07, 0.08, 0.1, 0.12, 0.14, 0.16, 0.18, 0.2,
	0.25, 0.3, 0.35, 0.4, 0.45, 0.5, 0.55, 0.6, 0.65, 0.7, 0.75, 0.8, 0.85, 0.9, 0.95, 1}

// Straightness limits of a window: the tangent slope may change across it
// by at most linCurve (relative) or, when the noise hides more, by three
// standard errors of that change but never more than linCurveMax.
//
// A window starts at most maxStart of the top stress up: above it lies
// plastic flow for every metal (the elastic range of a sharply yielding
// metal starts near zero; a toe rarely reaches a third of the top).
const (
	maxStart    = 0.35
	linCurve    = 0.005
	linCurveMax = 0.1
)

type window struct {
	lo, hi  int
	a, b    float64 // bounds as fractions of the top stress
	slope   float64
	se      float64 // standard error of the slope
	curve   float64 // relative change of the tangent slope across the window
	curveSE float64
	resid   float64 // residual SD of the line
}

// fitWindow fits the line and the parabola stress = c0 + c1 u + c2 u^2,
// u = (strain - centre)/halfwidth, to points lo..hi-1 (ordinary least
// squares; the parabola by the 3x3 normal equations, Gauss-Jordan with
// partial pivoting, whose inverse gives the standard error of c2).
func fitWindow(x, s []float64, lo, hi int) (w window, ok bool) {
	m := hi - lo
	if m < 5 {
		return w, false
	}
	xc, hw := (x[lo]+x[hi-1])/2, (x[hi-1]-x[lo])/2
	if !(hw > 0) {
		return w, false
	}
	var q quadSums
	var sy, syy float64
	for i := lo; i < hi; i++ {
		q.add((x[i]-xc)/hw, s[i])
		sy += s[i]
		syy += s[i] * s[i]
	}
	S, T := &q.S, &q.T
	fm := float64(m)
	// Line in u: slope_u = Suy/Suu (centred).
	suu := S[2] - S[1]*S[1]/fm
	suy := T[1] - S[1]*T[0]/fm
	syyc := syy - sy*sy/fm
	if !(suu > 0) {
		return w, false
	}
	bu := suy / suu
	sse := math.Max(0, syyc-bu*suy)
	w.resid = math.Sqrt(sse / (fm - 2))
	w.slope = bu / hw
	w.se = math.Sqrt(sse/(fm-2)/suu) / hw
	// Parabola.
	A := [3][]float64{{S[0], S[1], S[2], 1, 0, 0}, {S[1], S[2], S[3], 0, 1, 0}, {S[2], S[3], S[4], 0, 0, 1}}
	if !gaussJordan3(&A) {
		return w, false
	}
	var c [3]float64
	var inv [3][3]float64
	for r := 0; r < 3; r++ {
		for k := 0; k < 3; k++ {
			inv[r][k] = A[r][3+k] / A[r][r]
		}
	}
	for r := 0; r < 3; r++ {
		c[r] = inv[r][0]*T[0] + inv[r][1]*T[1] + inv[r][2]*T[2]
	}
	sse2 := syy - (c[0]*T[0] + c[1]*T[1] + c[2]*T[2])
	if fm > 3 {
		sse2 = math.Max(0, sse2)
	}
	v2 := sse2 / math.Max(1, fm-3)
	if !(c[1] > 0) {
		return w, false
	}
	// The tangent slope is (c1 + 2 c2 u)/hw: it changes by 4 c2 across.
	w.curve = 4 * c[2] / c[1]
	w.curveSE = 4 * math.Sqrt(v2*math.Max(0, inv[2][2])) / c[1]
	w.lo, w.hi = lo, hi
	return w, w.slope > 0
}

// autoElastic finds the elastic window on the loading branch x[0..iEnd]
// (strain increasing, the working points): every window between two
// bounds of elasticGrid (fractions of the branch's top stress) with at
// least 5 points is fitted; a window is straight when the tangent slope
// of a least-squares parabola changes across it by less than 0.5 % (or,
// where the noise hides more, by less than three standard errors of that
// change, at most 3 %) and the straight line leaves residuals no larger
// than twice the noise plus 0.2 % of the window's stress span. Of the
// straight windows the one whose slope has the smallest standard error is
// taken: the widest that the curvature allows. Toe slack (slope rising)
// and plastic flow (slope falling) both make a window curved, so a
// material that yields gradually gets a narrow low window and one that
// yields sharply a wide one. ASTM E111 asks for the least-squares line
// over the range where stress is proportional to strain and for a check
// of its straightness; this search and its limits are this package's own.
// When no window is straight, the lowest window of at least 5 points
// (the first of the search) is kept in res.seed for the Ramberg-Osgood
// fit (see gradualFit) and the warning in res.noLinear.
func (res *Result) autoElastic(x, s []float64, iEnd int) (w window, ok bool) {
	n := iEnd + 1
	top := s[0]
	for i := 0; i < n; i++ {
		top = math.Max(top, s[i])
	}
	runMax := make([]float64, n)
	for i := 0; i < n; i++ {
		runMax[i] = s[i]
		if i > 0 && runMax[i-1] > s[i] {
			runMax[i] = runMax[i-1]
		}
	}
	first := func(thr float64) int { return sort.SearchFloat64s(runMax, thr) }
	best := -1
	var cands []window
	for ai := 0; ai < len(elasticGrid)-1 && elasticGrid[ai] <= maxStart; ai++ {
		a := elasticGrid[ai]
		l := first(a * top)
		for bi := ai + 1; bi < len(elasticGrid); bi++ {
			b := elasticGrid[bi]
			h := first(b*top + 1e-12)
			if bi == len(elasticGrid)-1 {
				h = n
			}
			cw, good := fitWindow(x, s, l, h)
			if !good {
				continue
			}
			if res.seed.hi == 0 {
				res.seed, res.seed.a, res.seed.b = cw, a, b
			}
			lim := math.Min(linCurveMax, math.Max(linCurve, 3*cw.curveSE))
			span := s[h-1] - s[l]
			if math.Abs(cw.curve) > lim || cw.resid > 2*res.Noise+0.002*math.Abs(span) {
				continue
			}
			cw.a, cw.b = a, b
			cands = append(cands, cw)
		}
	}
	// The elastic slope is the steepest: windows well below the largest
	// lower confidence limit of a slope (slope less two standard errors)
	// lie in the plastic range.
	emax := 0.0
	for _, c := range cands {
		emax = math.Max(emax, c.slope-2*c.se)
	}
	// The combined error: the relative standard error of the slope (at
	// least 0.01 %, so that on clean records the widest of the exact
	// windows wins) and half the relative slope change across the window
	// (the bias of a least-squares slope on a curved stretch).
	score := func(c window) float64 {
		r := math.Max(c.se/c.slope, 1e-4)
		b := c.curve / 2
		return r*r + b*b
	}
	for i, c := range cands {
		if c.slope < 0.7*emax {
			continue
		}
		if best < 0 {
			best = i
			continue
		}
		sc, sb := score(c), score(cands[best])
		if sc < sb*(1-1e-3) || (sc <= sb*(1+1e-3) && c.hi-c.lo > cands[best].hi-cands[best].lo) {
			best = i
		}
	}
	if best < 0 {
		res.noLinear = fmt.Sprintf("no linear region found: no part of the loading branch (%d points up to %.4g MPa) is straight (the slope changes by more than %.1f %% across every window of at least 5 points, or the points scatter about the line by more than twice the noise); give --modulus-range to fix it by hand", n, top, 100*linCurve)
		return w, false
	}
	w = cands[best]
	res.lin, res.linErr = w, math.Sqrt(score(w))
	res.FitMethod = fmt.Sprintf("least squares over the straight window with the smallest combined error (standard error of the slope and half the slope change across the window): %.0f %% to %.0f %% of the loading branch's top stress %.4g MPa (slope change across the window %.2f %%, limit %.2f %%)",
		100*w.a, 100*w.b, top, 100*w.curve, 100*math.Min(linCurveMax, math.Max(linCurve, 3*w.curveSE)))
	return w, true
}

// modulusInfo is what the modulus fit taken knows of its own precision:
// the information matrix J'WJ of its parameters at the solution (the
// straight line: intercept and slope; the Ramberg-Osgood fit: b0, b1, b2
// and m, see refineRO), the residual variance v, the index k of the
// parameter the modulus rests on and its value, the derivative row of a
// point at a given strain, and the strain range of the points fitted.
type modulusInfo struct {
	dim      int // 0: none
	a        [4][4]float64
	v        float64
	k        int
	scale    float64
	row      func(strain float64) ([4]float64, bool)
	xlo, xhi float64
}

// shift is the standard deviation, relative to the modulus, of the change
// of the modulus that points at the given strains (each of weight w)
// would bring if they were fitted too: sqrt(v ((A^-1)_kk - (A'^-1)_kk))
// with A the information matrix of the fit and A' = A + w sum r r' with
// the points' derivative rows r. It is the variance of the difference of
// two nested least-squares estimates, the efficient one less the other
// (Hausman, Econometrica 46, 1978); it does not depend on the values the
// points would have had, only on where they lie. Points outside the
// fit's strain range add nothing.
func (mi modulusInfo) shift(strains []float64, w float64) float64 {
	if mi.dim == 0 || !(mi.v > 0) || mi.scale == 0 {
		return 0
	}
	d := mi.dim
	a0 := mat.NewSymDense(d, nil)
	a1 := mat.NewSymDense(d, nil)
	for i := 0; i < d; i++ {
		for c := i; c < d; c++ {
			a0.SetSym(i, c, mi.a[i][c])
			a1.SetSym(i, c, mi.a[i][c])
		}
	}
	added := false
	for _, xs := range strains {
		if xs < mi.xlo || xs > mi.xhi {
			continue
		}
		r, ok := mi.row(xs)
		if !ok {
			continue
		}
		added = true
		for i := 0; i < d; i++ {
			for c := i; c < d; c++ {
				a1.SetSym(i, c, a1.At(i, c)+w*r[i]*r[c])
			}
		}
	}
	if !added {
		return 0
	}
	var c0, c1 mat.Cholesky
	if !c0.Factorize(a0) || !c1.Factorize(a1) {
		return 0
	}
	var i0, i1 mat.SymDense
	if c0.InverseTo(&i0) != nil || c1.InverseTo(&i1) != nil {
		return 0
	}
	return math.Sqrt(mi.v*math.Max(0, i0.At(mi.k, mi.k)-i1.At(mi.k, mi.k))) / math.Abs(mi.scale)
}
