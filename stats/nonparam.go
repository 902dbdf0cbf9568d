package stats

import (
	"fmt"
	"math"
	"slices"

	"gonum.org/v1/gonum/mathext"
)

// BinomialUpperTail returns P(X >= r) for X ~ Binomial(n, q), computed as the
// regularized incomplete beta function I_q(r, n-r+1) (Abramowitz & Stegun
// 26.5.24; gonum mathext.RegIncBeta, checked against scipy.stats.binom.sf).
func BinomialUpperTail(n, r int, q float64) float64 {
	switch {
	case r <= 0:
		return 1
	case r > n:
		return 0
	case q <= 0:
		return 0
	case q >= 1:
		return 1
	}
	return mathext.RegIncBeta(float64(r), float64(n-r+1), q)
}

// OrderStatisticRank returns the rank r (1 = smallest) of the order statistic
// x_(r) that is a one-sided lower tolerance bound with content p and
// confidence gamma: the largest r with
//
//	P(Binomial(n, 1-p) >= r) >= gamma,
//
// since x_(r) lies below the (1-p) population quantile exactly when at least
// r observations do (Wilks 1941, Ann. Math. Statist. 12:91; CMH-17-1G Vol. 1
// section 8.3.4.5.1 and Table 8.5.12; MMPDS section 9.6.2). Distribution-free
// for continuous populations; the achieved confidence (returned) is at least
// gamma, so the bound is conservative by the discreteness of r. If even
// r = 1 does not reach gamma, i.e. p^n > 1 - gamma, the error wraps ErrTooFew
// and names the minimum n (29 for B-basis, 299 for A-basis).
func OrderStatisticRank(n int, p, gamma float64) (r int, achieved float64, err error) {
	if err := checkLevels(p, gamma); err != nil {
		return 0, 0, err
	}
	if n < 1 {
		return 0, 0, fmt.Errorf("order statistic bound: n = %d: %w", n, ErrTooFew)
	}
	q := 1 - p
	if BinomialUpperTail(n, 1, q) < gamma {
		return 0, 0, fmt.Errorf("order statistic bound at content %g, confidence %g needs n >= %d, have %d: %w",
			p, gamma, OrderStatisticMinN(p, gamma), n, ErrTooFew)
	}
	// The tail decreases in r: bisect for the largest r with tail >= gamma.
	lo, hi := 1, n // tail(lo) >= gamma; tail(hi+1) < gamma (tail(n+1) = 0)
	for lo < hi {
		mid := lo + (hi-lo+1)/2
		if BinomialUpperTail(n, mid, q) >= gamma {
			lo = mid
		} else {
			hi = mid - 1
		}
	}
	return lo, BinomialUpperTail(n, lo, q), nil
}

// OrderStatisticMinN returns the smallest n for which the smallest
// observation is a lower tolerance bound with content p and confidence
// gamma: the least n with 1 - p^n >= gamma, n = ceil(ln(1-gamma)/ln p)
// (Wilks 1941; CMH-17-1G section 8.3.4.5.1: 29 for B-basis, 299 for A-basis).
func OrderStatisticMinN(p, gamma float64) int {
	n := int(math.Ceil(math.Log(1-gamma)/math.Log(p) - 1e-9))
	for n > 1 && 1-math.Pow(p, float64(n-1)) >= gamma {
		n--
	}
	for 1-math.Pow(p, float64(n)) < gamma {
		n++
	}
	return n
}

// hkMiss returns the probability that the Hanson-Koopmans bound
// x_(r) (x_(1)/x_(r))^k misses content p, evaluated for the uniform(0,1)
// population, the boundary case of Hanson and Koopmans (1964):
//
//	P(miss) = n!/((r-1)!(n-r)!) * int_q^1 v^(r-1) (1-v)^(n-r) (1 - (q/v)^(1/k))^(r-1) dv,
//
// q = 1 - p. (Derivation: with U_(1) = u, U_(r) = v, the bound is below q
// iff u <= v (q/v)^(1/k); integrating the joint density of (U_(1), U_(r))
// over u leaves this one-dimensional integral.) u = 1/k is passed in.
func hkMiss(n, r int, q, u float64) float64 {
	lgN, _ := math.Lgamma(float64(n + 1))
	lgA, _ := math.Lgamma(float64(r))
	lgB, _ := math.Lgamma(float64(n - r + 1))
	lc := lgN - lgA - lgB
	lq := math.Log(q)
	f := func(v float64) float64 {
		if v <= q || v >= 1 {
			return 0
		}
		lv := math.Log(v)
		w := -math.Expm1(u * (lq - lv)) // 1 - (q/v)^u
		if w <= 0 {
			return 0
		}
		return math.Exp(lc + float64(r-1)*(lv+math.Log(w)) + float64(n-r)*math.Log1p(-v))
	}
	// The Beta(r, n-r+1) factor is concentrated near its mean with standard
	// deviation about sqrt(r (n-r+1))/n^1.5; break the range there so that
	// the adaptive rule cannot step over the peak when n is large.
	fn := float64(n)
	mean := float64(r) / (fn + 1)
	sd := math.Sqrt(float64(r)*float64(n-r+1)/((fn+1)*(fn+1)*(fn+2))) + 1e-300
	pts := []float64{q}
	for j := -12; j <= 12; j++ {
		if v := mean + float64(j)*sd; v > pts[len(pts)-1] && v < 1 {
			pts = append(pts, v)
		}
	}
	pts = append(pts, 1)
	var sum float64
	for i := 1; i < len(pts); i++ {
		sum += adaptiveGK15(f, pts[i-1], pts[i], 1e-16, 0)
	}
	return sum
}

// hkRankB is the order statistic r of the B-basis Hanson-Koopmans bound
// (p = 0.90, gamma = 0.95) for n = 2..28, as tabulated with its factors in
// CMH-17-1G Vol. 1 Table 8.5.14 (from memory; the factors HansonKoopmansK
// gives for these (n, r) reproduce the table's k column to its three
// decimals, see nonparam_test.go).
var hkRankB = [...]int{2: 2, 3: 3, 4: 4, 5: 4, 6: 5, 7: 5, 8: 6, 9: 6, 10: 6, 11: 7, 12: 7, 13: 7, 14: 8, 15: 8,
	16: 8, 17: 8, 18: 9, 19: 9, 20: 10, 21: 10, 22: 10, 23: 11, 24: 11, 25: 11, 26: 11, 27: 11, 28: 12}

// HansonKoopmansRank is the order statistic r the Hanson-Koopmans bound
// uses: the handbook's tabulated r for the B-basis level (p = 0.90,
// gamma = 0.95) and n <= 28 (hkRankB), and the largest value, r = n,
// otherwise (the A-basis table of CMH-17-1G Table 8.5.15 uses r = n for
// the n remembered here).
func HansonKoopmansRank(n int, p, gamma float64) int {
	if p == 0.90 && gamma == 0.95 && n >= 2 && n < len(hkRankB) {
		return hkRankB[n]
	}
	return n
}

// HansonKoopmansK returns the factor k of the Hanson-Koopmans (1964) lower
// tolerance bound
//
//	B = x_(r) * (x_(1) / x_(r))^k,   1 < r <= n,
//
// with content p and confidence gamma (Hanson, D. L. and Koopmans, L. H.,
// "Tolerance limits for the class of distributions with increasing hazard
// rates", Ann. Math. Statist. 35(4), 1964, 1561-1570; CMH-17-1G Vol. 1 section
// 8.3.4.5.2, Tables 8.5.14 (B-basis, r = n) and 8.5.15 (A-basis)). k solves
// P(miss) = 1 - gamma with P(miss) from hkMiss, evaluated for the uniform
// population, where the coverage is exact; it is conservative for
// populations whose lower tail is thinner on the log scale than the
// uniform's (coverage harness, n = 10, nominal 0.95: about 0.99 for a
// Weibull population of shape 12 and 0.997 for a normal one), and can be
// liberal for heavier ones.
// Published factors (CMH-17-1G Tables 8.5.14 and 8.5.15, r = n) are
// reproduced: see nonparam_test.go. k = 1 (B = x_(1)) is returned when x_(1) alone
// already reaches gamma, i.e. when n is large enough for the order-statistic
// bound. Root found by bisection on u = 1/k in (0, 1) to 1e-14 in u.
func HansonKoopmansK(n, r int, p, gamma float64) (float64, error) {
	if err := checkLevels(p, gamma); err != nil {
		return math.NaN(), err
	}
	if n < 2 {
		return math.NaN(), fmt.Errorf("Hanson-Koopmans bound needs n >= 2, have %d: %w", n, ErrTooFew)
	}
	if r < 2 || r > n {
		return math.NaN(), fmt.Errorf("%w: Hanson-Koopmans rank r = %d must satisfy 2 <= r <= n = %d", ErrDomain, r, n)
	}
	q := 1 - p
	target := 1 - gamma
	if math.Pow(p, float64(n)) <= target { // u = 1: P(miss) = P(x_(1) > q) = p^n
		return 1, nil
	}
	lo, hi := 0.0, 1.0 // hkMiss increases in u
	for hi-lo > 1e-14*hi {
		mid := 0.5 * (lo + hi)
		if hkMiss(n, r, q, mid) > target {
			hi = mid
		} else {
			lo = mid
		}
	}
	return 2 / (lo + hi), nil
}

// adaptiveGK15 integrates f over [a, b] by recursive bisection with the
// 7/15-point Gauss-Kronrod pair (Piessens et al. 1983, QUADPACK QK15 rule
// and error estimate), to absolute tolerance tol (depth capped at 40).
func adaptiveGK15(f func(float64) float64, a, b, tol float64, depth int) float64 {
	m := 0.5 * (a + b)
	h := 0.5 * (b - a)
	fc := f(m)
	resK := fc * gk15wk[7]
	resG := fc * gk15wg[3]
	resAbs := math.Abs(resK)
	var f1, f2 [7]float64
	for j := range 7 {
		x := h * gk15x[j]
		f1[j], f2[j] = f(m-x), f(m+x)
		resK += gk15wk[j] * (f1[j] + f2[j])
		resAbs += gk15wk[j] * (math.Abs(f1[j]) + math.Abs(f2[j]))
		if j%2 == 1 {
			resG += gk15wg[j/2] * (f1[j] + f2[j])
		}
	}
	mean := 0.5 * resK
	resAsc := gk15wk[7] * math.Abs(fc-mean)
	for j := range 7 {
		resAsc += gk15wk[j] * (math.Abs(f1[j]-mean) + math.Abs(f2[j]-mean))
	}
	err := math.Abs((resK - resG) * h)
	if resAsc != 0 && err != 0 {
		err = resAsc * h * math.Min(1, math.Pow(200*err/(resAsc*h), 1.5))
	}
	err = math.Max(err, 50*ntEps*resAbs*h)
	if err <= tol || err <= 100*ntEps*math.Abs(resK*h) || depth >= 40 {
		return resK * h
	}
	return adaptiveGK15(f, a, m, tol/2, depth+1) + adaptiveGK15(f, m, b, tol/2, depth+1)
}

// NonparametricOptions selects the Hanson-Koopmans rank for small samples.
type NonparametricOptions struct {
	// HKRank is r for the Hanson-Koopmans bound (2 <= r <= n); 0 means
	// the handbook's choice: HansonKoopmansRank.
	HKRank int
}

// NonparametricLowerBound returns a distribution-free one-sided lower
// tolerance bound: the order statistic x_(r) of OrderStatisticRank when n is
// large enough (CMH-17-1G section 8.3.4.5.1), otherwise the Hanson-Koopmans
// bound x_(r) (x_(1)/x_(r))^k (section 8.3.4.5.2), which needs n >= 2 and
// positive data. The order-statistic bound is conservative (achieved
// confidence >= gamma, reported in Params["achievedConfidence"]); the
// Hanson-Koopmans bound is exact for a uniform population, conservative for
// populations with thinner lower tails on the log scale (normal, Weibull),
// and can be liberal for heavier lower tails.
func NonparametricLowerBound(x []float64, p, gamma float64, opt NonparametricOptions) (Bound, error) {
	if err := checkLevels(p, gamma); err != nil {
		return Bound{}, err
	}
	if err := checkFinite(x); err != nil {
		return Bound{}, err
	}
	n := len(x)
	if n < 2 {
		return Bound{}, fmt.Errorf("nonparametric bound needs n >= 2 (Hanson-Koopmans), have %d: %w", n, ErrTooFew)
	}
	s := slices.Clone(x)
	slices.Sort(s)
	if nmin := OrderStatisticMinN(p, gamma); n >= nmin {
		r, ach, err := OrderStatisticRank(n, p, gamma)
		if err != nil {
			return Bound{}, err
		}
		return Bound{
			Value: s[r-1], Factor: float64(r), Method: "order-statistic", N: n, Content: p, Confidence: gamma,
			Params: map[string]float64{"rank": float64(r), "achievedConfidence": ach, "minN": float64(nmin)},
			Notes: []string{fmt.Sprintf("distribution-free: rank %d order statistic (achieved confidence %.6f)", r, ach),
				DesignValueCaution},
		}, nil
	}
	if s[0] <= 0 {
		return Bound{}, fmt.Errorf("%w: Hanson-Koopmans bound needs positive values, smallest is %g", ErrDomain, s[0])
	}
	r := opt.HKRank
	if r == 0 {
		r = HansonKoopmansRank(n, p, gamma)
	}
	k, err := HansonKoopmansK(n, r, p, gamma)
	if err != nil {
		return Bound{}, err
	}
	v := s[r-1] * math.Pow(s[0]/s[r-1], k)
	return Bound{
		Value: v, Factor: k, Method: "hanson-koopmans", N: n, Content: p, Confidence: gamma,
		Params: map[string]float64{"rank": float64(r), "x1": s[0], "xr": s[r-1], "minNOrderStatistic": float64(OrderStatisticMinN(p, gamma))},
		Notes: []string{fmt.Sprintf("n = %d is below %d, the minimum for an order-statistic bound: Hanson-Koopmans bound used", n, OrderStatisticMinN(p, gamma)),
			"Hanson-Koopmans: exact for a uniform population, conservative for thinner lower tails (normal, Weibull), can be liberal for heavier ones",
			DesignValueCaution},
	}, nil
}
