package stats

import (
	"fmt"
	"math"
)

// Bound is a one-sided lower tolerance bound with everything needed to audit
// it: with confidence Confidence, at least a fraction Content of the
// population lies above Value.
type Bound struct {
	Value      float64            // the lower tolerance bound
	Factor     float64            // the tolerance factor used (k, V, Hanson-Koopmans k, ...)
	Method     string             // short method name, e.g. "normal", "weibull-mc"
	N          int                // number of observations used
	Content    float64            // p: population fraction above the bound
	Confidence float64            // gamma
	Params     map[string]float64 // intermediate values (mean, sd, shape, rank, ...)
	MCStdErr   float64            // Monte Carlo standard error of Value (0 when exact)
	Notes      []string           // decisions and cautions
}

// checkLevels validates content p and confidence gamma, both in (0, 1).
func checkLevels(p, gamma float64) error {
	if !(p > 0 && p < 1) {
		return fmt.Errorf("%w: content %g not in (0, 1)", ErrDomain, p)
	}
	if !(gamma > 0 && gamma < 1) {
		return fmt.Errorf("%w: confidence %g not in (0, 1)", ErrDomain, gamma)
	}
	return nil
}

// normQuantile returns the standard normal quantile z_p = -sqrt(2) erfcinv(2p).
func normQuantile(p float64) float64 { return -math.Sqrt2 * math.Erfcinv(2*p) }

// NormalK returns the exact one-sided tolerance factor for a normal sample of
// size n: with confidence gamma, at least a fraction p of the population
// exceeds xbar - k s, where
//
//	k(n, p, gamma) = t'_gamma(n-1, z_p sqrt(n)) / sqrt(n),
//
// t'_gamma(df, delta) the gamma quantile of the noncentral t distribution
// (Owen 1968, Technometrics 10:445, section 4; Natrella 1963, NBS Handbook 91,
// Table A-7; CMH-17-1G Vol. 1 section 8.3.4.3.1; MMPDS section 9.6.1). Exact
// for normal data; the noncentral t quantile is computed by
// NoncentralTQuantile. Accuracy: better than 1e-11 relative for n = 2 to
// 100,000 against mpmath and scipy references (testdata/tolerance).
func NormalK(n int, p, gamma float64) (float64, error) {
	if n < 2 {
		return math.NaN(), fmt.Errorf("%w: normal tolerance factor needs n >= 2, got %d", ErrTooFew, n)
	}
	if err := checkLevels(p, gamma); err != nil {
		return math.NaN(), err
	}
	rn := math.Sqrt(float64(n))
	t, err := NoncentralTQuantile(gamma, float64(n-1), normQuantile(p)*rn)
	if err != nil {
		return math.NaN(), err
	}
	return t / rn, nil
}

// DesignValueCaution is attached to every bound: statistical values support,
// and never replace, the governing specification and engineering judgement.
const DesignValueCaution = "statistical bound only: it supports, and never replaces, the governing specification, regulations, local codes and licensed engineering judgement"

// NormalLowerBound returns the one-sided lower tolerance bound xbar - k s for
// a sample assumed normal, with k = NormalK(n, p, gamma) (exact for normal
// data; Owen 1968; CMH-17-1G section 8.3.4.3.1). Needs n >= 2, finite values
// and s > 0.
func NormalLowerBound(x []float64, p, gamma float64) (Bound, error) {
	if err := checkLevels(p, gamma); err != nil {
		return Bound{}, err
	}
	if len(x) < 2 {
		return Bound{}, fmt.Errorf("%w: normal bound needs at least 2 values, got %d", ErrTooFew, len(x))
	}
	if err := checkFinite(x); err != nil {
		return Bound{}, err
	}
	m, s := meanSD(x)
	if !(s > 0) {
		return Bound{}, fmt.Errorf("normal bound: %w", ErrZeroSpread)
	}
	k, err := NormalK(len(x), p, gamma)
	if err != nil {
		return Bound{}, err
	}
	return Bound{
		Value: m - k*s, Factor: k, Method: "normal", N: len(x), Content: p, Confidence: gamma,
		Params: map[string]float64{"mean": m, "sd": s},
		Notes:  []string{"exact for normally distributed data (noncentral t factor)", DesignValueCaution},
	}, nil
}

// LognormalLowerBound applies the normal method to ln x and reports the bound
// on the original scale: exp(mean(ln x) - k sd(ln x)) (CMH-17-1G section
// 8.3.4.3.3; Krishnamoorthy and Mathew 2009, Statistical Tolerance Regions,
// section 2.6). Exact for lognormal data since the exponential is monotone.
// All values must be > 0.
func LognormalLowerBound(x []float64, p, gamma float64) (Bound, error) {
	if err := checkFinite(x); err != nil {
		return Bound{}, err
	}
	y := make([]float64, len(x))
	for i, v := range x {
		if !(v > 0) {
			return Bound{}, fmt.Errorf("%w: lognormal bound needs positive values, value %d is %g", ErrDomain, i, v)
		}
		y[i] = math.Log(v)
	}
	b, err := NormalLowerBound(y, p, gamma)
	if err != nil {
		return Bound{}, err
	}
	return Bound{
		Value: math.Exp(b.Value), Factor: b.Factor, Method: "lognormal", N: b.N, Content: p, Confidence: gamma,
		Params: map[string]float64{"logMean": b.Params["mean"], "logSD": b.Params["sd"], "logBound": b.Value},
		Notes:  []string{"normal method applied to natural logarithms; bound transformed back with exp", DesignValueCaution},
	}, nil
}
