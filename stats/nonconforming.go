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
// in delta; the root is found by safeguarded Newton steps using the
// derivative in delta from the same quadrature pass, a rough phase on an
// unchecked rule first and checked passes at the end (about 3 rough and 1
// checked pass per call; see solveNoncentralityCount). The upper bound is at most 1 - p exactly when xbar - k s >= L for
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

// ncSolveStats counts the work of one solve: CDF passes on the rough
// (unchecked 16-point) rule and on the checked rule, and integrand
// evaluations in all.
type ncSolveStats struct{ rough, precise, evals int }

// solveNoncentralityCount is solveNoncentrality reporting its work.
//
// g(delta) = F - target (or (1 - target) - (1 - F) when target > 1/2, so
// that the smaller tail carries the accuracy) decreases in delta with
// derivative -D, D = integral h(w) phi(t e^w - delta) dw, which the same
// quadrature pass integrates alongside F (see ntDF.pass). Steps:
//  1. start from the normal approximation of T (S approx N(1, 1/(2 df)):
//     F approx Phi((t - delta)/sd), sd = sqrt(1 + t^2/(2 df)); Johnson,
//     Kotz and Balakrishnan vol. 2, 31.7), delta0 = t - z_target sd;
//  2. rough phase: Newton steps on the unchecked 16-point rule until the
//     step is below 1e-7 (relative to max(1, |delta|));
//  3. precise phase: one checked pass at the rough root and a Newton step
//     with the rough derivative, accepted when below 1e-9 (the error left
//     is of the order of its square); otherwise safeguarded Newton on
//     checked passes inside a bracket [lo, hi] with g(lo) > 0 > g(hi),
//     with bisection whenever a step leaves it and steps of at most 4 sd
//     while the bracket is open. Stops at a step below 1e-9 or a bracket
//     below 1e-12 (relative), as the Illinois solver it replaces did.
func solveNoncentralityCount(t, df, target float64) (float64, ncSolveStats, error) {
	var st ncSolveStats
	q := newNTDF(df)
	useUpper := target > 0.5
	g := func(delta float64, rough, wantD bool) (float64, float64) {
		r := q.pass(t, delta, wantD, true, rough)
		st.evals += r.evals
		if rough {
			st.rough++
		} else {
			st.precise++
		}
		if useUpper {
			return (1 - target) - r.upper, r.d
		}
		return r.lower - target, r.d
	}
	sd := math.Sqrt(1 + t*t/(2*df))
	maxStep := 4 * sd
	scale := func(x float64) float64 { return math.Max(1, math.Abs(x)) }
	x0 := t - normalQuantile(target)*sd

	// Rough phase.
	x := x0
	dRough := math.NaN()
	for range 20 {
		gx, d := g(x, true, true)
		if !(d > 0) || math.IsInf(d, 0) || math.IsNaN(gx) {
			x = x0
			break
		}
		step := gx / d
		if math.Abs(step) > maxStep { // far from the root: leave it to the safeguarded phase
			x = x0
			break
		}
		x += step
		if math.Abs(step) <= 1e-7*scale(x) {
			dRough = d
			break
		}
	}
	// Checked passes without the derivative, stepping with the rough one
	// (a stale-derivative Newton: each step shrinks the error by the
	// relative error of the rough derivative, about 1e-6 or better).
	lo, hi := math.Inf(-1), math.Inf(1)
	if dRough > 0 {
		prev := math.Inf(1)
		for range 4 {
			gx, _ := g(x, false, false)
			if gx == 0 {
				return x, st, nil
			}
			if gx > 0 { // root above x
				lo = x
			} else {
				hi = x
			}
			step := gx / dRough
			if math.Abs(step) <= 1e-9*scale(x) && x+step >= lo && x+step <= hi {
				return x + step, st, nil
			}
			inside := x+step > lo && x+step < hi
			if inside {
				x += step
			}
			if math.Abs(step) > 0.01*prev || !inside {
				break // not converging fast: safeguarded Newton below
			}
			prev = math.Abs(step)
		}
	}

	// Precise phase: safeguarded Newton on a bracket.
	expand := maxStep
	for range 200 {
		gx, d := g(x, false, true)
		if gx == 0 {
			return x, st, nil
		}
		if gx > 0 { // root above x
			lo = x
		} else {
			hi = x
		}
		nx := math.NaN()
		if d > 0 && !math.IsInf(d, 0) {
			step := gx / d
			if math.Abs(step) <= 1e-9*scale(x) && x+step >= lo && x+step <= hi {
				return x + step, st, nil
			}
			step = math.Max(-maxStep, math.Min(maxStep, step))
			nx = x + step
		}
		if math.IsNaN(nx) || nx <= lo || nx >= hi {
			switch {
			case math.IsInf(lo, -1):
				nx = hi - expand
				expand *= 2
			case math.IsInf(hi, 1):
				nx = lo + expand
				expand *= 2
			default:
				nx = 0.5 * (lo + hi)
			}
		}
		if !math.IsInf(lo, 0) && !math.IsInf(hi, 0) && hi-lo <= 1e-12*scale(nx) {
			return 0.5 * (lo + hi), st, nil
		}
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
