package stats

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mathext"
)

// One-sided acceptance sampling plans for a fraction nonconforming p
// beyond a single specification limit.
//
// Variables plan (n, k), sigma unknown: take n items, accept when
// (xbar - L)/s >= k (or (U - xbar)/s >= k). With T = sqrt(n)(xbar - L)/s,
// T is noncentral t with n-1 degrees of freedom and noncentrality
// sqrt(n) z_(1-p), so the operating characteristic is exactly
//
//	Pa(p) = P(T >= k sqrt(n)) = 1 - F_T(k sqrt(n); n-1, sqrt(n) z_(1-p))
//
// (Owen 1968, Technometrics 10:445, section 5; Schilling and Neubauer,
// "Acceptance Sampling in Quality Control", 2nd ed., ch. on variables plans;
// Montgomery, "Introduction to Statistical Quality Control", variables
// sampling chapter).
//
// Attributes plan (n, c): accept when at most c of n items are
// nonconforming; Pa(p) = P(X <= c), X binomial(n, p) = I_(1-p)(n-c, c+1)
// (regularised incomplete beta; Abramowitz and Stegun 26.5.24).

func checkRisks(p1, p2, alpha, beta float64) error {
	for _, v := range []float64{p1, p2, alpha, beta} {
		if !(v > 0 && v < 1) {
			return fmt.Errorf("sampling plan: %g is not a probability in (0, 1): %w", v, ErrDomain)
		}
	}
	if !(p1 < p2) {
		return fmt.Errorf("sampling plan: AQL %g must be below RQL %g: %w", p1, p2, ErrDomain)
	}
	if alpha+beta >= 1 {
		return fmt.Errorf("sampling plan: producer's risk %g plus consumer's risk %g must be below 1: %w", alpha, beta, ErrDomain)
	}
	return nil
}

// VariablesAcceptProb returns Pa(p) of the one-sided variables plan (n, k)
// with sigma unknown: NoncentralTSurvival(k sqrt(n), n-1, sqrt(n) z_(1-p))
// (formula above).
func VariablesAcceptProb(n int, k, p float64) (float64, error) {
	if n < 2 {
		return math.NaN(), fmt.Errorf("variables plan: n = %d, need at least 2: %w", n, ErrTooFew)
	}
	if !(p > 0 && p < 1) || math.IsNaN(k) || math.IsInf(k, 0) {
		return math.NaN(), fmt.Errorf("variables plan: p %g must be in (0, 1) and k finite: %w", p, ErrDomain)
	}
	rn := math.Sqrt(float64(n))
	return NoncentralTSurvival(k*rn, float64(n-1), -normalQuantile(p)*rn), nil
}

// AttributesAcceptProb returns Pa(p) = P(X <= c), X ~ binomial(n, p),
// computed as I_(1-p)(n-c, c+1) with gonum mathext.RegIncBeta (checked
// against scipy.stats.binom.cdf).
func AttributesAcceptProb(n, c int, p float64) (float64, error) {
	if n < 1 || c < 0 {
		return math.NaN(), fmt.Errorf("attributes plan: n = %d, c = %d: %w", n, c, ErrDomain)
	}
	if !(p >= 0 && p <= 1) {
		return math.NaN(), fmt.Errorf("attributes plan: p %g not in [0, 1]: %w", p, ErrDomain)
	}
	if c >= n || p == 0 {
		return 1, nil
	}
	if p == 1 {
		return 0, nil
	}
	return mathext.RegIncBeta(float64(n-c), float64(c+1), 1-p), nil
}

// WallisPlan returns the approximate variables plan (sigma unknown) of
// Wallis (1947, in Eisenhart, Hastay and Wallis, "Techniques of Statistical
// Analysis", ch. 1):
//
//	k = (z_p1 z_beta + z_p2 z_alpha) / (z_alpha + z_beta)
//	n = (1 + k^2/2) ((z_alpha + z_beta) / (z_p1 - z_p2))^2
//
// with z_x the upper x quantile of the standard normal. n is not rounded.
func WallisPlan(p1, p2, alpha, beta float64) (n, k float64, err error) {
	if err := checkRisks(p1, p2, alpha, beta); err != nil {
		return math.NaN(), math.NaN(), err
	}
	z := func(x float64) float64 { return -normalQuantile(x) }
	k = (z(p1)*z(beta) + z(p2)*z(alpha)) / (z(alpha) + z(beta))
	r := (z(alpha) + z(beta)) / (z(p1) - z(p2))
	return (1 + k*k/2) * r * r, k, nil
}

// VariablesPlan is a one-sided variables sampling plan, sigma unknown.
type VariablesPlan struct {
	N            int
	K            float64 // acceptance constant used (= KMax)
	KMin, KMax   float64 // every k in [KMin, KMax] meets both risks at N
	ProducerRisk float64 // 1 - Pa(p1) at (N, K)
	ConsumerRisk float64 // Pa(p2) at (N, K)
}

// MaxPlanN bounds the sample sizes searched by the plan designers.
const MaxPlanN = 100000

// DesignVariablesPlan returns the smallest n (and its k) of a one-sided
// variables plan with sigma unknown such that Pa(p1) >= 1 - alpha and
// Pa(p2) <= beta, computed exactly from the noncentral t: at each n the k
// meeting the producer's risk are k <= KMax = t'_alpha(n-1, sqrt(n) z_(1-p1))
// / sqrt(n) and those meeting the consumer's risk are k >= KMin =
// t'_(1-beta)(n-1, sqrt(n) z_(1-p2)) / sqrt(n) (t' the noncentral t quantile,
// NoncentralTQuantile); n is the first with KMin <= KMax, found by stepping
// up from two below the Wallis approximation (then down while feasible).
// K = KMax, which holds the producer's risk at alpha exactly and gives the
// consumer the most protection the plan allows.
func DesignVariablesPlan(p1, p2, alpha, beta float64) (VariablesPlan, error) {
	wn, _, err := WallisPlan(p1, p2, alpha, beta)
	if err != nil {
		return VariablesPlan{}, err
	}
	bounds := func(n int) (kmin, kmax float64, err error) {
		rn := math.Sqrt(float64(n))
		df := float64(n - 1)
		hi, err := NoncentralTQuantile(alpha, df, -normalQuantile(p1)*rn)
		if err != nil {
			return 0, 0, err
		}
		lo, err := NoncentralTQuantile(1-beta, df, -normalQuantile(p2)*rn)
		if err != nil {
			return 0, 0, err
		}
		return lo / rn, hi / rn, nil
	}
	feasible := func(n int) (bool, error) {
		lo, hi, err := bounds(n)
		return lo <= hi, err
	}
	n := max(2, int(math.Floor(wn))-2)
	ok, err := feasible(n)
	if err != nil {
		return VariablesPlan{}, err
	}
	if ok {
		for n > 2 {
			ok, err := feasible(n - 1)
			if err != nil {
				return VariablesPlan{}, err
			}
			if !ok {
				break
			}
			n--
		}
	} else {
		for {
			n++
			if n > MaxPlanN {
				return VariablesPlan{}, fmt.Errorf("variables plan: no plan with n <= %d", MaxPlanN)
			}
			ok, err := feasible(n)
			if err != nil {
				return VariablesPlan{}, err
			}
			if ok {
				break
			}
		}
	}
	kmin, kmax, err := bounds(n)
	if err != nil {
		return VariablesPlan{}, err
	}
	pl := VariablesPlan{N: n, K: kmax, KMin: kmin, KMax: kmax}
	a1, _ := VariablesAcceptProb(n, kmax, p1)
	a2, _ := VariablesAcceptProb(n, kmax, p2)
	pl.ProducerRisk, pl.ConsumerRisk = 1-a1, a2
	return pl, nil
}

// AttributesPlan is a single-sampling attributes plan.
type AttributesPlan struct {
	N, C         int
	ProducerRisk float64 // 1 - Pa(p1)
	ConsumerRisk float64 // Pa(p2)
}

// DesignAttributesPlan returns the single-sampling plan (n, c) with the
// smallest acceptance number c, and for it the smallest n, such that
// Pa(p2) <= beta and Pa(p1) >= 1 - alpha (binomial; the usual search, e.g.
// Guenther 1969, "Use of the binomial, hypergeometric and Poisson tables to
// obtain sampling plans", J. Quality Technology 1:105). For each c the
// smallest n with Pa(p2) <= beta is found by bisection (Pa decreases in n);
// c is increased until that n also meets the producer's risk.
func DesignAttributesPlan(p1, p2, alpha, beta float64) (AttributesPlan, error) {
	if err := checkRisks(p1, p2, alpha, beta); err != nil {
		return AttributesPlan{}, err
	}
	pa := func(n, c int, p float64) float64 { v, _ := AttributesAcceptProb(n, c, p); return v }
	for c := 0; c < MaxPlanN; c++ {
		lo, hi := c+1, c+1
		for pa(hi, c, p2) > beta {
			lo = hi
			hi *= 2
			if hi > 4*MaxPlanN {
				return AttributesPlan{}, fmt.Errorf("attributes plan: no plan with n <= %d", MaxPlanN)
			}
		}
		for hi-lo > 1 {
			mid := (lo + hi) / 2
			if pa(mid, c, p2) > beta {
				lo = mid
			} else {
				hi = mid
			}
		}
		n := hi
		if pa(lo, c, p2) <= beta {
			n = lo
		}
		if a1 := pa(n, c, p1); a1 >= 1-alpha {
			return AttributesPlan{N: n, C: c, ProducerRisk: 1 - a1, ConsumerRisk: pa(n, c, p2)}, nil
		}
		if n > MaxPlanN {
			break
		}
	}
	return AttributesPlan{}, fmt.Errorf("attributes plan: no plan with n <= %d", MaxPlanN)
}

// ToleranceBoundPassProb returns the probability that a normal sample of
// n values yields a one-sided (p, gamma) tolerance bound on the right side
// of a limit, xbar - k s >= L (or xbar + k s <= U), when the population
// mean lies margin standard deviations inside the limit
// (margin = (mu - L)/sigma or (U - mu)/sigma). With k = NormalK(n, p, gamma)
// and T = sqrt(n)(xbar - L)/s noncentral t (n-1 df, noncentrality
// sqrt(n) margin),
//
//	P = P(T >= k sqrt(n)) = NoncentralTSurvival(k sqrt(n), n-1, sqrt(n) margin)
//
// (Owen 1968, Technometrics 10:445, section 5: the power of the
// tolerance-bound test). At margin = z_p it equals 1 - gamma for every n.
func ToleranceBoundPassProb(n int, p, gamma, margin float64) (float64, error) {
	if math.IsNaN(margin) || math.IsInf(margin, 0) {
		return math.NaN(), fmt.Errorf("tolerance pass probability: margin %g not finite: %w", margin, ErrNonFinite)
	}
	k, err := NormalK(n, p, gamma)
	if err != nil {
		return math.NaN(), err
	}
	rn := math.Sqrt(float64(n))
	return NoncentralTSurvival(k*rn, float64(n-1), margin*rn), nil
}
