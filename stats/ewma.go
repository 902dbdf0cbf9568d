package stats

import (
	"fmt"
	"math"
)

// EWMAPoint is one point of an EWMA chart.
type EWMAPoint struct {
	Z            float64 // the EWMA statistic after this observation
	Lower, Upper float64 // exact (time-varying) control limits at this point
}

// EWMA computes the exponentially weighted moving average of x and its
// exact control limits (Roberts 1959, Technometrics 1, 239-250; Lucas and
// Saccucci 1990, Technometrics 32, 1-12; Montgomery, Introduction to
// Statistical Quality Control, 7th ed., §9.2.1, eqs. 9.22-9.24):
//
//	z_0 = μ0,  z_i = λ·x_i + (1-λ)·z_{i-1}
//	limits_i = μ0 ± L·σ·sqrt( λ/(2-λ) · [1 - (1-λ)^(2i)] )
//
// μ0 and σ are the target and the standard deviation of the individual
// observations (from a baseline). Lucas and Saccucci tabulate L for given
// in-control run lengths; λ = 0.2 with L near 3 is common practice
// (Montgomery §9.2.2 gives L = 2.962 for λ = 0.2 at ARL0 ≈ 500).
// Requires 0 < λ <= 1, L > 0, σ > 0.
func EWMA(x []float64, mu0, sigma, lambda, L float64) ([]EWMAPoint, error) {
	if err := checkFinite(x); err != nil {
		return nil, err
	}
	if !(lambda > 0 && lambda <= 1) {
		return nil, fmt.Errorf("EWMA weight λ = %v not in (0, 1]: %w", lambda, errCtlDomain)
	}
	if !(L > 0) || math.IsInf(L, 0) || !(sigma > 0) || math.IsInf(sigma, 0) || math.IsNaN(mu0) || math.IsInf(mu0, 0) {
		return nil, fmt.Errorf("EWMA needs finite μ0, positive σ and L (got %v, %v, %v): %w", mu0, sigma, L, errCtlDomain)
	}
	out := make([]EWMAPoint, len(x))
	z := mu0
	q := 1 - lambda
	for i, v := range x {
		z = lambda*v + q*z
		w := L * sigma * math.Sqrt(lambda/(2-lambda)*(1-math.Pow(q, 2*float64(i+1))))
		out[i] = EWMAPoint{Z: z, Lower: mu0 - w, Upper: mu0 + w}
	}
	return out, nil
}
