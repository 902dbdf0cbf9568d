package stats

import (
	"fmt"
	"math"
)

// ADResult is the outcome of an Anderson-Darling goodness-of-fit test with
// parameters estimated from the sample.
type ADResult struct {
	Statistic float64 // A², the unmodified Anderson-Darling statistic
	Adjusted  float64 // AD*, the small-sample-modified statistic
	OSL       float64 // observed significance level (approximate p-value)
	N         int
	// Warnings notes conditions under which the OSL approximation is less
	// reliable (very small n).
	Warnings []string
}

// adFromLogs returns A² = -n - (1/n) Σ_{i=1..n} (2i-1) [ln F(x_(i)) + ln(1-F(x_(n+1-i)))]
// given, for the sorted sample, lnF[i] = ln F(x_(i+1)) and lnS[i] = ln(1-F(x_(i+1))).
// Anderson & Darling (1954), J. Amer. Statist. Assoc. 49, 765-769;
// computing form as in D'Agostino & Stephens (1986), Goodness-of-Fit
// Techniques, eq. 4.2.
func adFromLogs(lnF, lnS []float64) float64 {
	n := len(lnF)
	var s float64
	for i := 0; i < n; i++ {
		s += float64(2*i+1) * (lnF[i] + lnS[n-1-i])
	}
	return -float64(n) - s/float64(n)
}

// logPhi returns ln Φ(z) for the standard normal CDF Φ, accurate in the far
// lower tail where Φ itself underflows (asymptotic series, Abramowitz &
// Stegun 26.2.12).
func logPhi(z float64) float64 {
	if z > -35 {
		return math.Log(0.5 * math.Erfc(-z/math.Sqrt2))
	}
	z2 := z * z
	// ln[φ(z)/|z| (1 - 1/z² + 3/z⁴ - 15/z⁶)]
	series := 1 - 1/z2 + 3/(z2*z2) - 15/(z2*z2*z2)
	return -z2/2 - math.Log(-z) - 0.5*math.Log(2*math.Pi) + math.Log(series)
}

// adNormalStat computes A² for the normal model with mean and SD (n-1)
// estimated from x, and the fit of x - x[0].
func adNormalStat(x []float64) (float64, NormalFit, error) {
	// Fit on x - x[0] (exact for close values) so that z keeps its
	// accuracy when the spread is tiny relative to the level.
	y := shifted(x)
	f, err := FitNormal(y)
	if err != nil {
		return 0, f, err
	}
	s := sortedCopy(y)
	lnF := make([]float64, len(s))
	lnS := make([]float64, len(s))
	for i, v := range s {
		z := (v - f.Mu) / f.Sigma
		lnF[i] = logPhi(z)
		lnS[i] = logPhi(-z)
	}
	return adFromLogs(lnF, lnS), f, nil
}

// normalOSL is the CMH-17-1G Vol. 1 section 8.3.4 (normal model) rule:
// AD* = (1 + 4/n - 25/n²) A², OSL = 1/(1 + exp(-0.48 + 0.78 ln AD* + 4.58 AD*)).
// The modification factor is Stephens (1974), J. Amer. Statist. Assoc. 69,
// 730-737 (case 3: mean and variance estimated); the logistic OSL curve
// reproduces Stephens' upper-tail critical values 0.656, 0.787, 0.918,
// 1.092 (10, 5, 2.5, 1 %) to about ±0.001 in probability.
// Callers ensure n >= ADNormalMinN, where the factor is positive.
func normalOSL(a2 float64, n int) (adj, osl float64) {
	nf := float64(n)
	adj = (1 + 4/nf - 25/(nf*nf)) * a2
	return adj, logisticOSL(adj, -0.48, 0.78, 4.58)
}

// weibullOSL is the CMH-17-1G Vol. 1 section 8.3.4 (Weibull model) rule:
// AD* = (1 + 0.2/√n) A², OSL = 1/(1 + exp(-0.10 + 1.24 ln AD* + 4.48 AD*)).
// The modification and critical values are those for the extreme-value
// distribution with both parameters estimated (Stephens 1977, Biometrika 64,
// 583-588; D'Agostino & Stephens 1986 Table 4.17: 0.637, 0.757, 0.877, 1.038
// at 10, 5, 2.5, 1 %), which covers the Weibull through ln x (Lawless 2003,
// section 10.1).
func weibullOSL(a2 float64, n int) (adj, osl float64) {
	adj = (1 + 0.2/math.Sqrt(float64(n))) * a2
	return adj, logisticOSL(adj, -0.10, 1.24, 4.48)
}

func logisticOSL(adj, c0, c1, c2 float64) float64 {
	if adj <= 0 {
		return 1
	}
	return 1 / (1 + math.Exp(c0+c1*math.Log(adj)+c2*adj))
}

// ADNormalMinN is the fewest values for which ADNormal and ADLognormal
// give an OSL. The CMH-17-1G factor 1 + 4/n - 25/n² is negative for
// n <= 3 (n² + 4n - 25 < 0), so no OSL exists there, and for 4 <= n <= 7
// the rule is defined but far from its nominal level: by simulation of
// normal samples (testdata/stats/make_ad_small_ref.py, numpy and scipy,
// 200,000 samples per n) the chance that a normal sample gets OSL <= 0.05
// is 0.000 at n = 4, 0.001 at n = 5, 0.013 at n = 6, 0.026 at n = 7,
// 0.037 at n = 8 and 0.051 at n = 10. Stephens' percentage points of the
// modified statistic are stated for n >= 8 (Stephens 1974, J. Amer.
// Statist. Assoc. 69, 730-737; from memory). Below 8 values the tests
// return ErrTooFew ("not enough values for a goodness-of-fit test").
const ADNormalMinN = 8

// ADWeibullMinN is the fewest values for which ADWeibull gives an OSL: the
// factor 1 + 0.2/√n stays positive, and by simulation of Weibull samples
// (make_ad_small_ref.py, 20,000 per n) the Weibull rule keeps roughly its
// level at small n: chance of OSL <= 0.05 about 0.013 at n = 3, 0.040 at
// n = 4, 0.047 at n = 5. Three values is the fewest a two-parameter
// maximum-likelihood fit with a residual can use.
const ADWeibullMinN = 3

// errADTooFew is the refusal of a goodness-of-fit test on too few values.
func errADTooFew(model string, n, min int) error {
	return fmt.Errorf("not enough values for a goodness-of-fit test: the Anderson-Darling %s rule needs at least %d values, have %d: %w", model, min, n, ErrTooFew)
}

// adWarnings flags very small samples: the modified-statistic percentage
// points of Stephens (1974, 1977) are stated for n >= 8 or so (from
// memory; common practice is to treat the OSL as rough below that).
func adWarnings(n int) []string {
	if n < 8 {
		return []string{fmt.Sprintf("n = %d: the small-sample OSL approximation is rough below n = 8", n)}
	}
	return nil
}

// ADNormal tests whether x comes from a normal distribution whose mean and
// standard deviation are estimated from x (mean, SD with divisor n-1).
//
// A² = -n - (1/n) Σ (2i-1) [ln Φ(z_(i)) + ln(1 - Φ(z_(n+1-i)))], z = (x - x̄)/s
// (Anderson & Darling 1954; D'Agostino & Stephens 1986 section 4.8, case 3).
// AD* = (1 + 4/n - 25/n²) A² and OSL = 1/(1 + exp(-0.48 + 0.78 ln AD* +
// 4.58 AD*)) (CMH-17-1G Vol. 1 section 8.3.4; factor from Stephens 1974).
// The usual decision rule rejects normality when OSL <= 0.05.
//
// It needs at least ADNormalMinN (8) finite values that are not all equal;
// with fewer it returns ErrTooFew (see ADNormalMinN for why).
func ADNormal(x []float64) (ADResult, error) {
	if len(x) < ADNormalMinN {
		return ADResult{}, errADTooFew("normal", len(x), ADNormalMinN)
	}
	a2, _, err := adNormalStat(x)
	if err != nil {
		return ADResult{}, fmt.Errorf("anderson-darling normal: %w", err)
	}
	adj, osl := normalOSL(a2, len(x))
	return ADResult{Statistic: a2, Adjusted: adj, OSL: osl, N: len(x), Warnings: adWarnings(len(x))}, nil
}

// ADLognormal tests whether x comes from a lognormal distribution: the
// normal test of ADNormal applied to ln x (CMH-17-1G Vol. 1 section 8.3.4,
// lognormal model), with the same AD* and OSL formulas.
//
// It needs at least ADNormalMinN (8) finite, strictly positive values, not
// all equal; with fewer it returns ErrTooFew.
func ADLognormal(x []float64) (ADResult, error) {
	if len(x) < ADNormalMinN {
		return ADResult{}, errADTooFew("lognormal", len(x), ADNormalMinN)
	}
	lx, err := logs(x, "anderson-darling lognormal")
	if err != nil {
		return ADResult{}, err
	}
	a2, _, err := adNormalStat(lx)
	if err != nil {
		return ADResult{}, fmt.Errorf("anderson-darling lognormal: %w", err)
	}
	adj, osl := normalOSL(a2, len(x))
	return ADResult{Statistic: a2, Adjusted: adj, OSL: osl, N: len(x), Warnings: adWarnings(len(x))}, nil
}

// ADWeibull tests whether x comes from a two-parameter Weibull distribution
// with shape β and scale α estimated by maximum likelihood (FitWeibull).
//
// With w_(i) = (x_(i)/α)^β, F = 1 - exp(-w):
// A² = -n - (1/n) Σ (2i-1) [ln(1 - exp(-w_(i))) - w_(n+1-i)]
// (CMH-17-1G Vol. 1 section 8.3.4, Weibull model; equivalently the
// extreme-value test of D'Agostino & Stephens 1986 section 4.10 applied to
// ln x, Lawless 2003 section 10.1). AD* = (1 + 0.2/√n) A² and
// OSL = 1/(1 + exp(-0.10 + 1.24 ln AD* + 4.48 AD*)).
//
// It needs at least 3 finite, strictly positive values with at least 2
// distinct.
func ADWeibull(x []float64) (ADResult, error) {
	if len(x) < ADWeibullMinN {
		return ADResult{}, errADTooFew("Weibull", len(x), ADWeibullMinN)
	}
	f, err := FitWeibull(x)
	if err != nil {
		return ADResult{}, fmt.Errorf("anderson-darling weibull: %w", err)
	}
	s := sortedCopy(x)
	lnF := make([]float64, len(s))
	lnS := make([]float64, len(s))
	la := math.Log(f.Scale)
	for i, v := range s {
		lnw := f.Shape * (math.Log(v) - la)
		w := math.Exp(lnw)
		lnS[i] = -w
		if lnw < -30 {
			lnF[i] = lnw - w/2 // ln(1-e^{-w}) = ln w - w/2 + O(w²)
		} else {
			lnF[i] = math.Log(-math.Expm1(-w))
		}
	}
	a2 := adFromLogs(lnF, lnS)
	if math.IsNaN(a2) || math.IsInf(a2, 0) {
		return ADResult{}, fmt.Errorf("anderson-darling weibull: statistic not finite")
	}
	adj, osl := weibullOSL(a2, len(x))
	return ADResult{Statistic: a2, Adjusted: adj, OSL: osl, N: len(x), Warnings: adWarnings(len(x))}, nil
}
