package stats

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mathext"
	"gonum.org/v1/gonum/stat/distuv"
)

// MNRResult is one step of the maximum normed residual test.
type MNRResult struct {
	Index    int     // index of the most extreme value in the caller's slice
	Value    float64 // that value
	MNR      float64 // max |x_i - x̄| / s
	Critical float64 // critical value C at the chosen alpha
	Outlier  bool    // MNR > Critical
}

// tUpperQuantile returns the t value with upper-tail probability q
// (0 < q < 1/2) for Student's t with df degrees of freedom: the root of
// S(t) = ½ I_{df/(df+t²)}(df/2, 1/2) = q (Abramowitz & Stegun 26.7.1 with
// 26.5), S evaluated with gonum's mathext.RegIncBeta. The tail probability
// is passed directly so that q far below 1e-16 keeps its accuracy (gonum's
// StudentsT.Quantile takes p = 1-q), and the root is found by Newton's
// method on ln S(t) - ln q, safeguarded by bisection inside a bracket
// (Press et al., Numerical Recipes 3rd ed. section 9.4), started from
// mathext.InvRegIncBeta — alone good to only ~2e-9 here and failing
// outright for df ≳ 1e5 — or from the Cornish-Fisher normal
// approximation t ≈ z + (z³ + z)/(4 df) when that start is unusable.
// Checked against mpmath in outlier_test.go.
func tUpperQuantile(q, df float64) float64 {
	if !(q > 0 && q < 0.5) || !(df > 0) {
		return math.NaN()
	}
	surv := func(t float64) float64 { return 0.5 * mathext.RegIncBeta(df/2, 0.5, df/(df+t*t)) }
	lq := math.Log(q)
	y := mathext.InvRegIncBeta(df/2, 0.5, 2*q)
	t := math.Sqrt(df * (1 - y) / y)
	if !(t > 0) || math.IsInf(t, 0) || math.Abs(math.Log(surv(t))-lq) > 0.7 {
		z := math.Sqrt2 * math.Erfcinv(2*q)
		t = z + (z*z*z+z)/(4*df)
	}
	// Bracket [lo, hi] with S(lo) > q > S(hi); S(0) = 1/2 > q.
	lo, hi := 0.0, t
	for i := 0; surv(hi) > q; i++ {
		lo = hi
		hi *= 2
		if i > 2000 || math.IsInf(hi, 0) {
			return math.NaN()
		}
	}
	dist := distuv.StudentsT{Mu: 0, Sigma: 1, Nu: df}
	for i := 0; i < 200; i++ {
		s := surv(t)
		if s > q {
			lo = t
		} else {
			hi = t
		}
		f := math.Log(s) - lq
		d := -dist.Prob(t) / s // d/dt ln S(t)
		next := t - f/d
		if !(next > lo && next < hi) || !(d < 0) || math.IsNaN(next) {
			next = lo + (hi-lo)/2
		}
		if math.Abs(next-t) <= 1e-15*t || hi-lo <= 1e-15*hi {
			return next
		}
		t = next
	}
	return t
}

// MNRCritical returns the critical value of the maximum normed residual for
// n values at significance level alpha (CMH-17-1G Vol. 1 section 8.3.3;
// the Bonferroni form of Grubbs' two-sided test, Grubbs 1969,
// Technometrics 11, 1-21; ASTM E178):
//
//	C = (n-1)/√n · sqrt(t² / (n - 2 + t²)),
//
// t the upper alpha/(2n) quantile of Student's t with n-2 degrees of
// freedom. It needs n >= 3 and 0 < alpha < 1.
func MNRCritical(n int, alpha float64) (float64, error) {
	if n < 3 {
		return 0, fmt.Errorf("mnr critical value: n = %d, need at least 3: %w", n, ErrTooFew)
	}
	if !(alpha > 0 && alpha < 1) {
		return 0, fmt.Errorf("mnr critical value: alpha %v not in (0, 1)", alpha)
	}
	nf := float64(n)
	t := tUpperQuantile(alpha/(2*nf), nf-2)
	t2 := t * t
	c := (nf - 1) / math.Sqrt(nf) * math.Sqrt(t2/(nf-2+t2))
	if math.IsNaN(c) {
		return 0, fmt.Errorf("mnr critical value: numerical failure for n = %d, alpha = %v", n, alpha)
	}
	return c, nil
}

// MaxNormedResidual applies the maximum normed residual test once
// (CMH-17-1G Vol. 1 section 8.3.3; Grubbs 1969): MNR = max_i |x_i - x̄|/s
// with s the sample SD (n-1), compared with MNRCritical(n, alpha). The
// value is an outlier when MNR > C. Ties for the most extreme value are
// resolved to the lowest index. Nothing is removed.
//
// It needs at least 3 finite values that are not all equal, and 0 < alpha < 1.
func MaxNormedResidual(x []float64, alpha float64) (MNRResult, error) {
	return maxNormedResidualWith(x, alpha, MNRCritical)
}

// maxNormedResidualWith is MaxNormedResidual with the critical value from
// crit (MNRCritical or a cache of it).
func maxNormedResidualWith(x []float64, alpha float64, crit func(n int, alpha float64) (float64, error)) (MNRResult, error) {
	if len(x) < 3 {
		return MNRResult{}, fmt.Errorf("max normed residual: %d values, need at least 3: %w", len(x), ErrTooFew)
	}
	if err := checkFinite(x); err != nil {
		return MNRResult{}, fmt.Errorf("max normed residual: %w", err)
	}
	c, err := crit(len(x), alpha)
	if err != nil {
		return MNRResult{}, err
	}
	// Work on x - x[0] (exact when the values are close), so that the
	// mean of data varying in the last bits is not rounded away.
	y := shifted(x)
	m, sd := meanSD(y)
	if math.IsInf(sd, 0) || math.IsNaN(sd) || math.IsNaN(m) || math.IsInf(m, 0) {
		return MNRResult{}, fmt.Errorf("max normed residual: values too large: %w", ErrNonFinite)
	}
	if sd == 0 {
		return MNRResult{}, fmt.Errorf("max normed residual: all values equal: %w", ErrZeroSpread)
	}
	// Half deviations cannot overflow for finite data.
	idx, hmax := 0, -1.0
	for i, v := range y {
		if d := math.Abs(v/2 - m/2); d > hmax {
			idx, hmax = i, d
		}
	}
	r := MNRResult{Index: idx, Value: x[idx], MNR: 2 * (hmax / sd), Critical: c}
	r.Outlier = r.MNR > r.Critical
	return r, nil
}

// ScreenOutliers flags outliers by the maximum normed residual test
// (MaxNormedResidual). With iterative false the test is applied once. With
// iterative true, after each flagged value the test is repeated on the
// values not yet flagged, until no further outlier is found or fewer than
// 3 values remain (the sequential use described in CMH-17-1G Vol. 1
// section 8.3.3). It returns only the flagged results, in the order found,
// with indices into x; x itself is never changed and nothing is deleted —
// whether a flagged value is excluded is the caller's (documented) decision.
func ScreenOutliers(x []float64, alpha float64, iterative bool) ([]MNRResult, error) {
	return screenOutliersWith(x, alpha, iterative, MNRCritical)
}

// screenOutliersWith is ScreenOutliers with the critical values from crit.
func screenOutliersWith(x []float64, alpha float64, iterative bool, crit func(n int, alpha float64) (float64, error)) ([]MNRResult, error) {
	r, err := maxNormedResidualWith(x, alpha, crit)
	if err != nil {
		return nil, err
	}
	var out []MNRResult
	if !r.Outlier {
		return out, nil
	}
	out = append(out, r)
	if !iterative {
		return out, nil
	}
	// Remaining values and their original indices.
	idx := make([]int, 0, len(x))
	for i := range x {
		if i != r.Index {
			idx = append(idx, i)
		}
	}
	for len(idx) >= 3 {
		y := make([]float64, len(idx))
		for j, i := range idx {
			y[j] = x[i]
		}
		r, err := maxNormedResidualWith(y, alpha, crit)
		if err != nil {
			// All remaining values equal: nothing more to flag.
			break
		}
		if !r.Outlier {
			break
		}
		orig := idx[r.Index]
		r.Index = orig
		out = append(out, r)
		idx = removeIndex(idx, orig)
	}
	return out, nil
}

func removeIndex(idx []int, v int) []int {
	out := make([]int, 0, len(idx)-1)
	for _, i := range idx {
		if i != v {
			out = append(out, i)
		}
	}
	return out
}

// shifted returns x - x[0] when that is finite for every value, else a
// copy of x.
func shifted(x []float64) []float64 {
	y := make([]float64, len(x))
	for i, v := range x {
		y[i] = v - x[0]
		if math.IsInf(y[i], 0) {
			copy(y, x)
			return y
		}
	}
	return y
}
