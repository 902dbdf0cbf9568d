package stats

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mathext"
)

// Fraction of a normal population beyond a one-sided limit, estimated from
// a sample mean xbar and sample standard deviation s (divisor n-1) of n
// values. The functions below take the standardised margin
//
//	q = (xbar - L) / s   for a lower limit L (fraction below L), or
//	q = (U - xbar) / s   for an upper limit U (fraction above U),
//
// so both sides are handled by one formula.

// checkMargin validates n and q.
func checkMargin(what string, n int, q float64) error {
	if n < 2 {
		return fmt.Errorf("%s: n = %d, need at least 2: %w", what, n, ErrTooFew)
	}
	if math.IsNaN(q) || math.IsInf(q, 0) {
		return fmt.Errorf("%s: margin %g is not finite: %w", what, q, ErrNonFinite)
	}
	return nil
}

// TailFractionMVUE returns the minimum-variance unbiased estimate of the
// fraction of a normal population beyond a one-sided limit, for sigma
// unknown (Lieberman and Resnikoff 1955, "Sampling plans for inspection by
// variables", JASA 50:457-516; the same estimator is used in ANSI/ASQ Z1.9,
// "Form 2" estimate with the standard-deviation method):
//
//	B = max(0, min(1, 1/2 - q sqrt(n) / (2 (n-1))))
//	p_hat = I_B((n-2)/2, (n-2)/2)
//
// with I the regularised incomplete beta function (gonum mathext.RegIncBeta,
// checked against scipy.special.betainc in stats/nonconforming_test.go).
//
// At n = 2 the beta parameters are 0 and the formula is taken in its limit
// a -> 0, where Beta(a, a) puts mass 1/2 at each of 0 and 1: p_hat = 0, 1/2
// or 1 as q > 1/sqrt2, -1/sqrt2 < q < 1/sqrt2 or q < -1/sqrt2. This is the
// Rao-Blackwell estimator E[1(X_1 < L) | xbar, s] (Lehmann and Casella,
// Theory of Point Estimation, 2nd ed., section 2.2): given xbar and s the
// first value is either of xbar -+ s/sqrt2 (the two observations) with
// probability 1/2, so
//
//	p_hat = 1/2 [1(xbar - s/sqrt2 < L) + 1(xbar + s/sqrt2 < L)],
//
// the fraction of the two values beyond the limit. A value exactly at the
// limit is not beyond it: margins within 1e-12 of -+1/sqrt2 (a value at the
// limit, up to rounding in xbar and s) count as not beyond.
func TailFractionMVUE(n int, q float64) (float64, error) {
	if err := checkMargin("tail fraction MVUE", n, q); err != nil {
		return math.NaN(), err
	}
	if n == 2 {
		const h, eps = 1 / math.Sqrt2, 1e-12
		p := 0.0
		if q < h-eps {
			p += 0.5
		}
		if q < -h-eps {
			p += 0.5
		}
		return p, nil
	}
	fn := float64(n)
	b := 0.5 - q*math.Sqrt(fn)/(2*(fn-1))
	if b <= 0 {
		return 0, nil
	}
	if b >= 1 {
		return 1, nil
	}
	a := (fn - 2) / 2
	return mathext.RegIncBeta(a, a, b), nil
}

// TailFractionBound returns a one-sided confidence bound at confidence
// gamma on the fraction P of a normal population beyond a one-sided limit
// (an upper bound when upper is true, else a lower bound), from the margin
// q = (xbar - L)/s of n values.
//
// T = sqrt(n) q has the noncentral t distribution with n-1 degrees of
// freedom and noncentrality delta = sqrt(n) z_(1-P) (Owen 1968,
// Technometrics 10:445, section 5; Johnson, Kotz and Balakrishnan vol. 2,
// 31.4). The upper bound solves F_T(sqrt(n) q; n-1, delta_U) = gamma for
// delta_U and returns Phi(-delta_U / sqrt(n)); the lower bound solves
// F_T(...; delta_L) = 1 - gamma. F_T is stats.NoncentralTCDF, decreasing
// in delta; the root is found by safeguarded Halley steps using the first
// and second derivatives in delta from the same quadrature pass (a focused
// trapezoidal rule with its own error check, else the checked route of
// NoncentralTCDF), about 2 to 3 CDF passes per call (see
// solveNoncentralityCount). The upper bound is at most 1 - p exactly when xbar - k s >= L for
// the one-sided (p, gamma) normal tolerance factor k (the two are the same
// test).
func TailFractionBound(n int, q, gamma float64, upper bool) (float64, error) {
	if err := checkMargin("tail fraction bound", n, q); err != nil {
		return math.NaN(), err
	}
	if !(gamma > 0 && gamma < 1) {
		return math.NaN(), fmt.Errorf("tail fraction bound: confidence %g not in (0, 1): %w", gamma, ErrDomain)
	}
	target := gamma
	if !upper {
		target = 1 - gamma
	}
	delta, err := solveNoncentrality(math.Sqrt(float64(n))*q, float64(n-1), target)
	if err != nil {
		return math.NaN(), fmt.Errorf("tail fraction bound: %w", err)
	}
	return normalCDF(-delta / math.Sqrt(float64(n))), nil
}

// solveNoncentrality returns delta with NoncentralTCDF(t, df, delta) = target.
func solveNoncentrality(t, df, target float64) (float64, error) {
	delta, _, err := solveNoncentralityCount(t, df, target)
	return delta, err
}

// ncSolveStats counts the work of one solve: CDF passes by the focused
// quadrature (ntfocus.go) and by the checked route (ntDF.pass, used when a
// focused pass fails its error check), and integrand evaluations in all.
type ncSolveStats struct{ focused, checked, evals int }

// solveNoncentralityCount is solveNoncentrality reporting its work.
//
// g(delta) = F - target (or (1 - target) - (1 - F) when target > 1/2, so
// that the smaller tail carries the accuracy) decreases in delta, with
// g' = -D and g” = -E, D = integral h(w) phi(x) dw and
// E = integral h(w) x phi(x) dw (x = t e^w - delta), which the same
// quadrature pass integrates alongside F. Steps:
//  1. start from the normal approximation of T (S approx N(1, 1/(2 df)):
//     F approx Phi((t - delta)/sd), sd = sqrt(1 + t^2/(2 df)); Johnson,
//     Kotz and Balakrishnan vol. 2, 31.7), delta0 = t - z_target sd;
//  2. Halley steps (cubic convergence; Press et al. 2007, Numerical
//     Recipes 3rd ed., section 9.4.2) on CDF passes by the focused
//     trapezoidal quadrature, whose own error check keeps them at about
//     1e-13 relative or better; a pass that fails the check is redone by
//     the checked route and followed by a Newton step;
//  3. safeguards: a bracket [lo, hi] with g(lo) > 0 > g(hi) is kept from
//     every pass, a step leaving it is replaced by bisection, and while the
//     bracket is open steps are at most 4 sd.
//
// It stops when a Halley step is below 1e-6 or a Newton step below 1e-9
// (relative to max(1, |delta|); the error left is of the order of the cube
// or square of the step), or the bracket is below 1e-12 relative. Typical
// acceptance inputs take 2 to 3 passes (BenchmarkTailFractionBound).
func solveNoncentralityCount(t, df, target float64) (float64, ncSolveStats, error) {
	var st ncSolveStats
	useUpper := target > 0.5
	pr := ntProblem{f: df, t: t, logc: ntLogNorm(df), wantPDF: true, byDelta: true, upper: useUpper}
	var q *ntDF // checked route, made on first use
	mode := 0.0
	// g, -g' and -g'' at delta (E NaN after a checked pass).
	g := func(delta float64) (gx, D, E float64) {
		pr.delta = delta
		pr.evals = 0
		c, d, e, m, ok := pr.focused(mode, 0.4)
		st.evals += pr.evals
		if ok {
			st.focused++
			mode = m
			if useUpper {
				return (1 - target) - c, d, e
			}
			return c - target, d, e
		}
		if q == nil {
			nd := newNTDF(df)
			q = &nd
		}
		r := q.pass(t, delta, true, true, false)
		st.checked++
		st.evals += r.evals
		if useUpper {
			return (1 - target) - r.upper, r.d, math.NaN()
		}
		return r.lower - target, r.d, math.NaN()
	}
	sd := math.Sqrt(1 + t*t/(2*df))
	maxStep := 4 * sd
	scale := func(x float64) float64 { return math.Max(1, math.Abs(x)) }
	x := t - normalQuantile(target)*sd
	lo, hi := math.Inf(-1), math.Inf(1)
	expand := maxStep
	dx, dxOld := math.Inf(1), math.Inf(1) // the last two steps taken
	for range 200 {
		gx, D, E := g(x)
		if gx == 0 {
			return x, st, nil
		}
		if gx > 0 { // root above x
			lo = x
		} else {
			hi = x
		}
		nx := math.NaN()
		if D > 0 && !math.IsInf(D, 0) {
			step := gx / D // Newton: x - g/g'
			tol := 1e-9
			// Halley only near the root, where it corrects Newton by less
			// than a factor 2; far out (tiny tails) it can crawl.
			if r := gx * E / (2 * D * D); !math.IsNaN(E) && math.Abs(r) <= 0.5 {
				step /= 1 + r // = 2 g D / (2 D^2 + g E), Halley
				tol = 1e-6
			}
			if math.Abs(step) <= tol*scale(x) && x+step >= lo && x+step <= hi {
				return x + step, st, nil
			}
			step = math.Max(-maxStep, math.Min(maxStep, step))
			nx = x + step
		}
		// Bisect when the step leaves the bracket or is not at most half the
		// step before last (slow progress; as in Press et al. 2007, rtsafe).
		open := math.IsInf(lo, 0) || math.IsInf(hi, 0)
		if math.IsNaN(nx) || nx <= lo || nx >= hi || (!open && math.Abs(nx-x) > 0.5*math.Abs(dxOld)) {
			nx = bracketStep(lo, hi, &expand)
		}
		if !open && hi-lo <= 1e-12*scale(nx) {
			return 0.5 * (lo + hi), st, nil
		}
		dxOld, dx = dx, nx-x
		x = nx
	}
	return math.NaN(), st, fmt.Errorf("noncentrality not found (t=%g df=%g)", t, df)
}

func normalCDF(z float64) float64 { return 0.5 * math.Erfc(-z/math.Sqrt2) }

// normalQuantile returns Phi^-1(p).
func normalQuantile(p float64) float64 { return -math.Sqrt2 * math.Erfcinv(2*p) }

// MeanLowerBound returns the one-sided lower confidence bound at
// confidence gamma on a normal mean from n values with mean xbar and sample
// standard deviation s: xbar - t_(gamma, n-1) s / sqrt(n) (Student 1908;
// NIST/SEMATECH e-Handbook of Statistical Methods, section 7.2.2.1). The t
// quantile is NoncentralTQuantile with delta = 0, checked against
// Newton-refined scipy.stats.t quantiles to 1e-11; gonum distuv.StudentsT.Quantile was found off
// by up to 2.3e-9 relative there, so it is not used.
// For an upper bound on the mean use xbar + (xbar - MeanLowerBound(...)).
func MeanLowerBound(n int, xbar, s, gamma float64) (float64, error) {
	return meanLowerBoundWith(n, xbar, s, gamma, meanBoundT)
}

// meanBoundT returns t_(gamma, n-1), the gamma quantile of Student's t with
// n-1 degrees of freedom (NoncentralTQuantile with delta = 0).
func meanBoundT(n int, gamma float64) (float64, error) {
	return NoncentralTQuantile(gamma, float64(n-1), 0)
}

// meanLowerBoundWith is MeanLowerBound with the t quantile from tq (called
// only with n >= 2 and gamma in (0, 1), gamma != 0.5).
func meanLowerBoundWith(n int, xbar, s, gamma float64, tq func(int, float64) (float64, error)) (float64, error) {
	if n < 2 {
		return math.NaN(), fmt.Errorf("mean lower bound: n = %d, need at least 2: %w", n, ErrTooFew)
	}
	if math.IsNaN(xbar) || math.IsInf(xbar, 0) || math.IsNaN(s) || math.IsInf(s, 0) || s < 0 {
		return math.NaN(), fmt.Errorf("mean lower bound: mean %g and SD %g must be finite, SD >= 0: %w", xbar, s, ErrNonFinite)
	}
	if !(gamma > 0 && gamma < 1) {
		return math.NaN(), fmt.Errorf("mean lower bound: confidence %g not in (0, 1): %w", gamma, ErrDomain)
	}
	if gamma == 0.5 {
		return xbar, nil // the median of t is 0
	}
	t, err := tq(n, gamma)
	if err != nil {
		return math.NaN(), fmt.Errorf("mean lower bound: %w", err)
	}
	return xbar - t*s/math.Sqrt(float64(n)), nil
}
