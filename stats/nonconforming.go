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
// in delta; the root is found on a bracket by the Illinois method (to 1e-12
// in delta). The upper bound is at most 1 - p exactly when xbar - k s >= L for
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
	f := func(d float64) float64 { return NoncentralTCDF(t, df, d) - target }
	// F decreases in delta from 1 to 0. Grow a bracket around t in steps
	// of the approximate spread of T, sqrt(1 + t^2/(2 df)) (Johnson, Kotz
	// and Balakrishnan vol. 2, 31.7), so the CDF is never asked for
	// probabilities far out in its tails.
	sd := math.Sqrt(1 + t*t/(2*df))
	step := 1.5 * sd
	lo, hi := t-step, t+step
	for i := 0; f(lo) < 0; i++ {
		if i > 40 {
			return math.NaN(), fmt.Errorf("noncentrality not bracketed below (t=%g df=%g)", t, df)
		}
		hi = lo
		lo -= step
		step *= 1.6
	}
	step = 1.5 * sd
	for i := 0; f(hi) > 0; i++ {
		if i > 40 {
			return math.NaN(), fmt.Errorf("noncentrality not bracketed above (t=%g df=%g)", t, df)
		}
		lo = hi
		hi += step
		step *= 1.6
	}
	// Illinois (modified regula falsi; Dowell and Jarratt 1971, BIT
	// 11:168) on the bracket: superlinear, and never leaves the bracket.
	flo, fhi := f(lo), f(hi)
	side := 0
	for range 200 {
		if flo == 0 {
			return lo, nil
		}
		if fhi == 0 {
			return hi, nil
		}
		x := (lo*fhi - hi*flo) / (fhi - flo)
		if !(x > lo && x < hi) {
			x = 0.5 * (lo + hi)
		}
		fx := f(x)
		if fx > 0 { // root above x
			lo, flo = x, fx
			if side == -1 {
				fhi /= 2
			}
			side = -1
		} else {
			hi, fhi = x, fx
			if side == 1 {
				flo /= 2
			}
			side = 1
		}
		if hi-lo <= 1e-12*math.Max(1, math.Abs(x)) || fx == 0 {
			return x, nil
		}
	}
	return 0.5 * (lo + hi), nil
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
	t, err := NoncentralTQuantile(gamma, float64(n-1), 0)
	if err != nil {
		return math.NaN(), fmt.Errorf("mean lower bound: %w", err)
	}
	return xbar - t*s/math.Sqrt(float64(n)), nil
}
