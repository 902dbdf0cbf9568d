package stats

import (
	"fmt"
	"math"
)

// Equivalence of a sample to a normal baseline from its mean and its
// smallest value (Vangel 2002, "Lot acceptance and compliance testing using
// the sample mean and an extremum", Technometrics 44(3):242-249; the same
// test is CMH-17-1G Vol. 1 section 8.4.1). A sample of n values passes when
//
//	xbar >= mu - kMean*sigma   and   x_(1) >= mu - kMin*sigma,
//
// mu and sigma the baseline mean and SD (treated as known). For a sample
// from the baseline itself the probability of passing is
//
//	P(Z_(1) >= -kMin, Zbar >= -kMean)
//	  = Q(-kMin)^n * P(sum Y_i < n (kMin - kMean) is false),
//
// Z standard normal, Q = 1 - Phi, and Y_i = Z_i + kMin given Z_i >= -kMin
// (independent truncated normals on [0, inf)). The distribution of sum Y_i
// is obtained by repeated numerical convolution of the truncated normal
// density (the joint distribution of mean and minimum of Vangel 2002,
// section 2, evaluated here on a grid).

// MeanMinPassProb returns the probability that n independent N(shift, 1)
// values pass the mean-and-minimum test with factors kMean and kMin
// (formula above, with the baseline standardised to mean 0 and SD 1).
//
// Numerics: the convolutions are trapezoid sums on a uniform grid over
// [0, n (kMin - kMean)] (h = s0/M) for M = 150, 300 and 600 points, combined
// by Romberg extrapolation (errors in even powers of h, Euler-Maclaurin), so
// the result is accurate to about 1e-9 (checked against scipy.integrate
// quadrature for n = 2, 3 and against Monte Carlo; see
// stats/equivalence_test.go).
func MeanMinPassProb(n int, kMean, kMin, shift float64) (float64, error) {
	if n < 1 || n > 200 {
		return math.NaN(), fmt.Errorf("mean-min test: n = %d outside 1..200: %w", n, ErrDomain)
	}
	for _, v := range []float64{kMean, kMin, shift} {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return math.NaN(), fmt.Errorf("mean-min test: non-finite factor: %w", ErrNonFinite)
		}
	}
	c := -kMin - shift // truncation point for standard normal W = Z - shift
	q := normalCDF(-c) // P(W >= c)
	all := math.Pow(q, float64(n))
	if n == 1 {
		// mean and minimum coincide.
		return normalCDF(math.Min(kMean, kMin) + shift), nil
	}
	s0 := float64(n) * (kMin - kMean)
	if s0 <= 0 || all == 0 {
		return all, nil
	}
	var g [3]float64
	for i, m := range []int{150, 300, 600} {
		g[i] = truncSumCDF(n, c, s0, m)
	}
	// Romberg: h^2 then h^4 elimination.
	r1 := (4*g[1] - g[0]) / 3
	r2 := (4*g[2] - g[1]) / 3
	cdf := (16*r2 - r1) / 15
	cdf = math.Min(1, math.Max(0, cdf))
	return all * (1 - cdf), nil
}

// truncSumCDF returns P(Y_1 + ... + Y_n < s0) for iid Y with density
// phi(y + c)/Q(c) on [0, inf), by trapezoid convolution on m intervals.
func truncSumCDF(n int, c, s0 float64, m int) float64 {
	h := s0 / float64(m)
	qc := normalCDF(-c)
	g := make([]float64, m+1)
	for j := range g {
		y := float64(j)*h + c
		g[j] = math.Exp(-0.5*y*y) / math.Sqrt(2*math.Pi) / qc
	}
	f := append([]float64(nil), g...)
	next := make([]float64, m+1)
	for k := 2; k <= n; k++ {
		for i := 0; i <= m; i++ {
			if i == 0 {
				next[0] = 0
				continue
			}
			s := 0.5 * (f[0]*g[i] + f[i]*g[0])
			for j := 1; j < i; j++ {
				s += f[j] * g[i-j]
			}
			next[i] = h * s
		}
		f, next = next, f
	}
	s := 0.5 * (f[0] + f[m])
	for j := 1; j < m; j++ {
		s += f[j]
	}
	return h * s
}

// EquivalenceFactors holds the two factors of the mean-and-minimum test.
type EquivalenceFactors struct {
	N     int
	Alpha float64 // probability that a sample from the baseline fails
	KMin  float64 // minimum individual: x_(1) >= mu - KMin*sigma
	KMean float64 // mean: xbar >= mu - KMean*sigma
	// AlphaEach is the probability that a baseline sample fails each
	// criterion on its own (the two are equal by construction).
	AlphaEach float64
}

// MeanMinFactors returns the factors of the mean-and-minimum equivalence
// test for n values at overall level alpha: the pair (kMin, kMean) for
// which a sample from the baseline fails the minimum criterion and the mean
// criterion each with the same probability a* (Vangel 2002; CMH-17-1G
// section 8.4.1), and fails at least one with probability alpha:
//
//	kMean = z_(a*) / sqrt(n),   kMin = -Phi^-1(1 - (1 - a*)^(1/n)),
//	1 - MeanMinPassProb(n, kMean, kMin, 0) = alpha,
//
// a* found by bisection in (alpha/2, alpha] to 1e-12 relative.
func MeanMinFactors(n int, alpha float64) (EquivalenceFactors, error) {
	if n < 2 || n > 200 {
		return EquivalenceFactors{}, fmt.Errorf("equivalence factors: n = %d outside 2..200: %w", n, ErrDomain)
	}
	if !(alpha > 0 && alpha < 0.5) {
		return EquivalenceFactors{}, fmt.Errorf("equivalence factors: alpha %g not in (0, 0.5): %w", alpha, ErrDomain)
	}
	rn := math.Sqrt(float64(n))
	factors := func(a float64) (km, kn float64) {
		km = -normalQuantile(a) / rn
		// 1 - (1-a)^(1/n) without cancellation.
		p := -math.Expm1(math.Log1p(-a) / float64(n))
		kn = -normalQuantile(p)
		return km, kn
	}
	fail := func(a float64) (float64, error) {
		km, kn := factors(a)
		pass, err := MeanMinPassProb(n, km, kn, 0)
		return 1 - pass, err
	}
	lo, hi := alpha/2, alpha
	for range 200 {
		mid := 0.5 * (lo + hi)
		f, err := fail(mid)
		if err != nil {
			return EquivalenceFactors{}, err
		}
		if f > alpha {
			hi = mid
		} else {
			lo = mid
		}
		if hi-lo <= 1e-12*hi {
			break
		}
	}
	a := 0.5 * (lo + hi)
	km, kn := factors(a)
	return EquivalenceFactors{N: n, Alpha: alpha, KMin: kn, KMean: km, AlphaEach: a}, nil
}
