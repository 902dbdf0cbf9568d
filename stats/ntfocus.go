package stats

import "math"

// Focused quadrature for the noncentral t CDF, used by NormalKTable and the
// fraction-bound solver (solveNoncentralityCount).
//
// The small-tail integrand of ntProblem, c(w) = h(w) Phi(y(w)) with
// y(w) = +-(delta - t e^w), is log-concave in w (h is; Phi is log-concave
// and increasing, y is concave), hence unimodal. Instead of covering the
// whole window of h with equal panels, the mode w_m of ln c is found by
// Newton's method, the curvature there gives a scale sigma, the interval is
// widened from w_m -+ 8.6 sigma until ln c has dropped by at least 37 at
// both ends, and the trapezoidal rule with a step of a fraction of sigma is
// applied. Each result carries its own error check (see focused); callers fall
// back to the checked route (ntDF.pass) when it fails. Tests compare the
// two routes: TestNormalKTableMatchesNormalK,
// TestSolveNoncentralityMatchesIllinois.

// focusLog returns ln c(w) (up to the constant logc) and, if deriv, its
// first two derivatives. sgn = +1 for the upper tail (Phi(delta - t e^w)),
// -1 for the lower tail (Phi(t e^w - delta)).
func (p *ntProblem) focusLog(w, sgn float64, deriv bool) (l, l1, l2 float64) {
	e := math.Exp(w)
	e2 := e * e
	l = 0.5 * p.f * ntTwoWMinusExpm1(2*w, e2-1)
	y := sgn * (p.delta - p.t*e)
	var lp, r float64 // ln Phi(y) and R(y) = phi(y)/Phi(y)
	if y > -10 {
		ec := math.Erfc(-y / math.Sqrt2)
		lp = math.Log(0.5 * ec)
		r = math.Sqrt(2/math.Pi) * math.Exp(-0.5*y*y) / ec
	} else {
		// Asymptotic series of the Mills ratio (Abramowitz & Stegun
		// 26.2.12): Phi(y) = phi(y)/(-y) (1 - 1/y^2 + 3/y^4 - 15/y^6 ...).
		z := 1 / (y * y)
		s := 1 - z*(1-z*(3-z*15))
		lp = -0.5*y*y - 0.5*math.Log(2*math.Pi) - math.Log(-y) + math.Log(s)
		r = -y / s
	}
	if !deriv {
		return l + lp, 0, 0
	}
	yp := -sgn * p.t * e // y'(w); y'' = y'
	dr := -r * (y + r)   // R'(y)
	return l + lp, p.f*(1-e2) + r*yp, -2*p.f*e2 + dr*yp*yp + r*yp
}

// focused integrates c and the derivative integrand over the focused
// interval (ln c at least 37 below its peak value at both ends, so that
// what lies outside is below 1e-16 relative) by the trapezoidal rule with
// step h = hs sigma (hs = 0.4 or 0.5), which converges
// geometrically for integrands analytic in a strip and negligible at both
// ends (Trefethen and Weideman 2014, "The exponentially convergent
// trapezoidal rule", SIAM Review 56:385, section 5). The rule with step 2h
// uses every other node, so the two give an error check at no cost: the
// error of the step-h rule behaves like C times the square of their
// relative difference (C below 0.2 where we measured it, the typical
// acceptance inputs of BenchmarkTailFractionBound), and the result is
// accepted (ok) only if that difference is below 1e-7. w0 is a starting
// point for the mode (0 if unknown); the mode found is returned for use as
// the next start.
func (p *ntProblem) focused(w0, hs float64) (c, d, e, mode float64, ok bool) {
	sgn := 1.0
	if !p.upper {
		sgn = -1
	}
	// Mode: damped Newton; ln c is concave.
	w := w0
	var l, l1, l2 float64
	for it := 0; ; it++ {
		l, l1, l2 = p.focusLog(w, sgn, true)
		if !(l2 < 0) || math.IsNaN(l1) || math.IsNaN(l) || it > 60 {
			return 0, 0, 0, 0, false
		}
		step := -l1 / l2
		lim := 8 / math.Sqrt(-l2) // at most 8 local standard deviations
		if math.Abs(step) > lim {
			step = math.Copysign(lim, step)
		}
		if math.Abs(step) <= 0.05/math.Sqrt(-l2) {
			break // close enough: the rule needs a centre, not the exact mode
		}
		w += step
	}
	sigma := 1 / math.Sqrt(-l2)
	// Ends: ln c at least 37 below its value at the mode.
	const drop = 37
	// From 8.6 sigma (where a Gaussian has dropped by 37), move out along
	// the tangent of ln c: as ln c is concave it lies below its tangents,
	// so the point where the tangent has dropped by 37 is at or beyond the
	// true end.
	end := func(dir float64) float64 {
		d := 8.6 * sigma
		for range 60 {
			le, l1e, _ := p.focusLog(w+dir*d, sgn, true)
			if l-le >= drop || math.IsNaN(le) {
				return d
			}
			slope := -dir * l1e // rate of drop per unit distance outward
			if slope > 0 {
				d += math.Min((drop-(l-le))/slope, d) * 1.0000001
			} else {
				d *= 1.5
			}
		}
		return math.NaN()
	}
	dL, dR := end(-1), end(1)
	if math.IsNaN(dL) || math.IsNaN(dR) {
		return 0, 0, 0, 0, false
	}
	// Step hs times the smallest local scale 1/sqrt(-(ln c)'') among the
	// mode and the points 1, 2 and 3 sigma either side where the integrand
	// is still above e^-25 of its peak: the curvature can grow away from
	// the mode (e.g. where the chi factor falls off on the right for few
	// degrees of freedom), and a step fitted to the mode alone can then
	// pass the step-2h check while being too coarse (found at 1 degree of
	// freedom: 1.5e-7 relative error with a passing check). If the check
	// still fails, the step is halved once.
	local := sigma
	for _, off := range [6]float64{-1, 1, -2, 2, -3, 3} {
		if lo, _, l2o := p.focusLog(w+off*sigma, sgn, true); l2o < 0 && l-lo < 25 {
			local = math.Min(local, 1/math.Sqrt(-l2o))
		}
	}
	c, d, e, ok = p.trapezoid(w, sgn, dL, dR, hs*local)
	if !ok {
		c, d, e, ok = p.trapezoid(w, sgn, dL, dR, 0.5*hs*local)
	}
	if !ok {
		return 0, 0, 0, 0, false
	}
	return c, d, e, w, true
}

// trapezoid applies the trapezoidal rule with step h on [w - dL, w + dR]
// (nodes on the grid w + i h) and checks it against the rule with step 2h.
func (p *ntProblem) trapezoid(w, sgn, dL, dR, h float64) (c, d, e float64, ok bool) {
	var c2 float64 // every other node: the rule with step 2h
	// e^w at node i = 8a + j is exp(w + 8 a h) exp(j h): one exp per 8
	// nodes plus 8 per pass, each factor correctly rounded to about an ulp.
	var r [8]float64
	for j := range r {
		r[j] = math.Exp(float64(j) * h)
	}
	if !((dL+dR)/h < 4000) { // not worth it (or NaN): the checked route instead
		return 0, 0, 0, false
	}
	i0, i1 := -int(math.Ceil(dL/h)), int(math.Ceil(dR/h))
	anchor, aPrev := 0.0, math.MinInt
	for i := i0; i <= i1; i++ {
		a := i >> 3 // floor(i/8)
		if a != aPrev {
			anchor, aPrev = math.Exp(w+float64(8*a)*h), a
		}
		even := i%2 == 0
		ci, di, ei := p.evalFocused(w+float64(i)*h, anchor*r[i-8*a], sgn, (even || p.byDelta) && p.wantPDF)
		c += ci
		d += di
		e += ei
		if even {
			c2 += ci
		}
	}
	dh := h // derivative integrals: on every node for a root finder in delta
	if !p.byDelta {
		dh = 2 * h // on every other node: the density only steers Newton steps
	}
	c, d, e, c2 = c*h, d*dh, e*dh, c2*2*h
	return c, d, e, c > 0 && math.Abs(c-c2) <= 1e-7*c
}

// evalFocused is eval for the focused rule (s = e^w given): the small-tail integrand c
// (sgn as in focusLog) and, if wantD, the density integrand in t,
// h(w) e^w phi(t e^w - delta), which only steers Newton steps stopped at
// a step below 1e-10, so trapezoid integrates it on every other node (the
// step-2h rule, accurate to about 1e-7 relative or better). With byDelta,
// d is h(w) phi(x) = -dF/d(delta) and e = h(w) x phi(x) = -d2F/d(delta)2,
// x = t e^w - delta, integrated on every node (the Halley steps of the
// fraction-bound solver stop at 1e-6, so d must be accurate).
func (p *ntProblem) evalFocused(w, s, sgn float64, wantD bool) (c, d, e float64) {
	p.evals++
	var g float64 // 2w - expm1(2w)
	if x := 2 * w; math.Abs(x) < 0.05 {
		// Taylor series to x^12 (the rest is below 1e-24 relative).
		for j := 10; j >= 0; j-- {
			g = g*x + ntInvFact[j]
		}
		g *= -x * x
	} else {
		g = ntTwoWMinusExpm1(x, s*s-1) // s*s-1 is used only for |2w| >= 0.25
	}
	lh := p.logc + 0.5*p.f*g
	if lh < -745 {
		return 0, 0, 0
	}
	h := math.Exp(lh)
	x := p.t*s - p.delta
	c = h * 0.5 * math.Erfc(sgn*x/math.Sqrt2)
	if wantD {
		hphi := h * math.Exp(-0.5*x*x) * (1 / math.Sqrt(2*math.Pi))
		if p.byDelta {
			d, e = hphi, hphi*x
		} else {
			d = hphi * s
		}
	}
	return c, d, e
}
