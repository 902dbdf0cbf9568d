package stats

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/integrate/quad"
	"gonum.org/v1/gonum/stat/distuv"
)

// C4 is the bias-correction constant of the sample standard deviation of
// n normal values, E[s] = c4·σ:
//
//	c4(n) = sqrt(2/(n-1)) · Γ(n/2) / Γ((n-1)/2)
//
// (Montgomery, Introduction to Statistical Quality Control, 7th ed.,
// §6.3.1 and Appendix VI; ASTM MNL 7A, Part 2, Table 49). Evaluated with
// log-gamma so it stays accurate for large n. Requires n >= 2.
func C4(n int) (float64, error) {
	if n < 2 {
		return math.NaN(), fmt.Errorf("c4 needs n >= 2, got %d: %w", n, ErrTooFew)
	}
	a, _ := math.Lgamma(float64(n) / 2)
	b, _ := math.Lgamma(float64(n-1) / 2)
	return math.Sqrt(2/float64(n-1)) * math.Exp(a-b), nil
}

// D2 is the mean of the relative range W = R/σ of n independent normal
// values (Montgomery, 7th ed., §6.2.1 and Appendix VI; ASTM MNL 7A Table
// 49):
//
//	d2(n) = ∫ [1 - Φ(x)^n - (1-Φ(x))^n] dx over the real line
//
// (the expected range, Tippett 1925, Biometrika 17, 364-387). Integrated
// with 200-point Gauss-Legendre quadrature over [-12, 12] (the integrand
// is below 1e-30 outside). Requires 2 <= n <= 1000.
func D2(n int) (float64, error) {
	if n < 2 || n > 1000 {
		return math.NaN(), fmt.Errorf("d2 needs 2 <= n <= 1000, got %d: %w", n, errCtlDomain)
	}
	nf := float64(n)
	f := func(x float64) float64 {
		lo := distuv.UnitNormal.CDF(x)
		hi := distuv.UnitNormal.Survival(x)
		return 1 - math.Pow(lo, nf) - math.Pow(hi, nf)
	}
	return quad.Fixed(f, -12, 12, 200, nil, 0), nil
}

// ChartConstants are the control-chart factors for subgroups of size N
// (Montgomery, 7th ed., Appendix VI; ASTM MNL 7A, Part 3, Table 49):
//
//	A2 = 3/(d2·√n)                  X-bar chart from the mean range
//	A3 = 3/(c4·√n)                  X-bar chart from the mean SD
//	B3 = max(0, 1 - 3·√(1-c4²)/c4)  S chart lower factor
//	B4 = 1 + 3·√(1-c4²)/c4          S chart upper factor
//	E2 = 3/d2                       individuals chart from the mean moving
//	                                range of span N (N = 2: E2 = 2.660)
type ChartConstants struct {
	N                  int
	C4, D2             float64
	A2, A3, B3, B4, E2 float64
}

// ChartFactors computes the ChartConstants for subgroup size n >= 2.
func ChartFactors(n int) (ChartConstants, error) {
	c4, err := C4(n)
	if err != nil {
		return ChartConstants{}, err
	}
	d2, err := D2(n)
	if err != nil {
		return ChartConstants{}, err
	}
	rn := math.Sqrt(float64(n))
	k := 3 * math.Sqrt(1-c4*c4) / c4
	return ChartConstants{
		N: n, C4: c4, D2: d2,
		A2: 3 / (d2 * rn), A3: 3 / (c4 * rn),
		B3: math.Max(0, 1-k), B4: 1 + k, E2: 3 / d2,
	}, nil
}

// Limits are the centre line and control limits of a chart.
type Limits struct {
	Center, Lower, Upper float64
	Sigma                float64 // the estimated standard deviation of the plotted value
}

// IndividualsLimits computes the limits of an individuals chart from a
// baseline series x (in time order), with σ estimated from the average
// moving range of span two (Montgomery, 7th ed., §6.4, eq. 6.33; ASTM MNL
// 7A, Part 3, §23):
//
//	MR_i = |x_i - x_{i-1}|,  MRbar = mean of the n-1 moving ranges
//	σ̂ = MRbar/d2,  d2 = d2(2) = 2/√π ≈ 1.128
//	centre = x̄,  limits = x̄ ± 3·σ̂ = x̄ ± E2·MRbar
//
// It returns the limits and MRbar. Needs at least two values and a
// non-zero moving range.
func IndividualsLimits(x []float64) (Limits, float64, error) {
	if len(x) < 2 {
		return Limits{}, math.NaN(), fmt.Errorf("an individuals chart needs at least 2 baseline values, got %d: %w", len(x), ErrTooFew)
	}
	if err := checkFinite(x); err != nil {
		return Limits{}, math.NaN(), err
	}
	mean, _ := meanVar(x)
	mr := 0.0
	for i := 1; i < len(x); i++ {
		mr += math.Abs(x[i] - x[i-1])
	}
	mr /= float64(len(x) - 1)
	if mr == 0 {
		return Limits{}, 0, fmt.Errorf("the baseline values do not vary: %w", ErrZeroSpread)
	}
	// d2(2) = 2/√π exactly (the mean of |Z1 - Z2| for two standard normals).
	sigma := mr / (2 / math.Sqrt(math.Pi))
	return Limits{Center: mean, Lower: mean - 3*sigma, Upper: mean + 3*sigma, Sigma: sigma}, mr, nil
}

// SChartLimits computes the limits of an S chart for subgroups of size n
// from the centre line sbar (Montgomery, 7th ed., §6.3.1, eq. 6.27 and
// §6.3.2 for variable sample size; ASTM MNL 7A, Part 3, Table 2):
//
//	centre = sbar,  LCL = B3(n)·sbar,  UCL = B4(n)·sbar
//
// Sigma is the standard deviation of s about its mean, sbar·√(1-c4²)/c4.
func SChartLimits(sbar float64, n int) (Limits, error) {
	if math.IsNaN(sbar) || math.IsInf(sbar, 0) || sbar <= 0 {
		//lint:ignore ST1005 error text begins with the name of a chart (S chart)
		return Limits{}, fmt.Errorf("S chart centre %v must be a positive number: %w", sbar, errCtlDomain)
	}
	c4, err := C4(n)
	if err != nil {
		return Limits{}, err
	}
	k := 3 * math.Sqrt(1-c4*c4) / c4 // B3 = max(0, 1-k), B4 = 1+k
	return Limits{Center: sbar, Lower: math.Max(0, 1-k) * sbar, Upper: (1 + k) * sbar, Sigma: sbar * k / 3}, nil
}

// PooledSBar is the S chart centre line for subgroups of unequal sizes,
// Montgomery, 7th ed., §6.3.2, eq. 6.31:
//
//	sbar = sqrt( Σ (n_i - 1)·s_i² / Σ (n_i - 1) )
//
// For equal sizes use the plain average of the s_i (eq. 6.27), which
// MeanSBar computes.
func PooledSBar(s []float64, n []int) (float64, error) {
	if len(s) != len(n) {
		panic("stats: PooledSBar: s and n differ in length")
	}
	if err := checkFinite(s); err != nil {
		return math.NaN(), err
	}
	num, den := 0.0, 0.0
	for i := range s {
		if n[i] < 2 {
			continue
		}
		num += float64(n[i]-1) * s[i] * s[i]
		den += float64(n[i] - 1)
	}
	if den == 0 {
		return math.NaN(), fmt.Errorf("no subgroup has two or more values: %w", ErrTooFew)
	}
	return math.Sqrt(num / den), nil
}

// MeanSBar is the average of subgroup standard deviations (Montgomery,
// 7th ed., §6.3.1, eq. 6.27: sbar = (1/m) Σ s_i).
func MeanSBar(s []float64) (float64, error) {
	if len(s) == 0 {
		return math.NaN(), fmt.Errorf("no subgroup standard deviations: %w", ErrTooFew)
	}
	if err := checkFinite(s); err != nil {
		return math.NaN(), err
	}
	m, _ := meanVar(s)
	return m, nil
}

// RunSignal is one firing of a run rule at index Index of a series.
type RunSignal struct {
	Rule  int // 1..4 (see WesternElectric)
	Index int // the point at which the rule fired (the last point of the run)
	Side  int // +1 above the centre line, -1 below
}

// WesternElectric applies the four zone rules of the Western Electric
// Statistical Quality Control Handbook (1956, §1B; also Montgomery, 7th
// ed., §5.3.6, Table 5.1) to a series x with centre line c and standard
// deviation sigma of the plotted value:
//
//	rule 1: one point beyond 3σ from the centre line;
//	rule 2: two of three consecutive points beyond 2σ, on the same side;
//	rule 3: four of five consecutive points beyond 1σ, on the same side;
//	rule 4: eight consecutive points on the same side of the centre line.
//
// A rule fires at the last point of the run that completes it, and that
// point must itself be on the run's side (beyond the zone for rules 2
// and 3). Points equal to the centre line break runs of rule 4.
func WesternElectric(x []float64, c, sigma float64) ([]RunSignal, error) {
	if err := checkFinite(x); err != nil {
		return nil, err
	}
	if !(sigma > 0) || math.IsInf(sigma, 0) || math.IsNaN(c) || math.IsInf(c, 0) {
		return nil, fmt.Errorf("run rules need a finite centre and a positive sigma (got %v, %v): %w", c, sigma, errCtlDomain)
	}
	z := make([]float64, len(x))
	for i, v := range x {
		z[i] = (v - c) / sigma
	}
	var out []RunSignal
	count := func(i, span int, side int, beyond float64) int {
		k := 0
		for j := i - span + 1; j <= i; j++ {
			if float64(side)*z[j] > beyond {
				k++
			}
		}
		return k
	}
	for i := range z {
		side := 1
		if z[i] < 0 {
			side = -1
		}
		if math.Abs(z[i]) > 3 {
			out = append(out, RunSignal{Rule: 1, Index: i, Side: side})
		}
		if i >= 2 && float64(side)*z[i] > 2 && count(i, 3, side, 2) >= 2 {
			out = append(out, RunSignal{Rule: 2, Index: i, Side: side})
		}
		if i >= 4 && float64(side)*z[i] > 1 && count(i, 5, side, 1) >= 4 {
			out = append(out, RunSignal{Rule: 3, Index: i, Side: side})
		}
		if i >= 7 && z[i] != 0 && count(i, 8, side, 0) == 8 {
			out = append(out, RunSignal{Rule: 4, Index: i, Side: side})
		}
	}
	return out, nil
}

// WelchResult is a two-sample Welch t-test.
type WelchResult struct {
	T, DF, P   float64 // statistic, Welch-Satterthwaite degrees of freedom, two-sided p-value
	MeanA      float64
	MeanB      float64
	Difference float64 // MeanB - MeanA
}

// WelchT tests the equality of two means without assuming equal
// variances (Welch 1947, Biometrika 34, 28-35; degrees of freedom by
// Satterthwaite 1946):
//
//	t  = (x̄_b - x̄_a) / sqrt(s_a²/n_a + s_b²/n_b)
//	ν  = (s_a²/n_a + s_b²/n_b)² / [ (s_a²/n_a)²/(n_a-1) + (s_b²/n_b)²/(n_b-1) ]
//	p  = 2·P(T_ν > |t|)
//
// Each sample needs two values; both must not be without spread.
func WelchT(a, b []float64) (WelchResult, error) {
	if len(a) < 2 || len(b) < 2 {
		//lint:ignore ST1005 error text begins with a proper name (Welch's t-test)
		return WelchResult{}, fmt.Errorf("Welch's t-test needs 2 values per sample (got %d and %d): %w", len(a), len(b), ErrTooFew)
	}
	if err := checkFinite(a); err != nil {
		return WelchResult{}, err
	}
	if err := checkFinite(b); err != nil {
		return WelchResult{}, err
	}
	ma, va := meanVar(a)
	mb, vb := meanVar(b)
	qa, qb := va/float64(len(a)), vb/float64(len(b))
	se2 := qa + qb
	if se2 == 0 {
		return WelchResult{}, fmt.Errorf("neither sample varies: %w", ErrZeroSpread)
	}
	t := (mb - ma) / math.Sqrt(se2)
	df := se2 * se2 / (qa*qa/float64(len(a)-1) + qb*qb/float64(len(b)-1))
	p := 2 * distuv.StudentsT{Mu: 0, Sigma: 1, Nu: df}.Survival(math.Abs(t))
	return WelchResult{T: t, DF: df, P: p, MeanA: ma, MeanB: mb, Difference: mb - ma}, nil
}

// errCtlDomain is wrapped by errors for arguments outside a function's domain.
var errCtlDomain = errors.New("argument out of range")

// IndividualsLimitsMedianMR is IndividualsLimits with σ estimated from the
// median moving range, which resists single wild values in a trial
// baseline (Montgomery, Introduction to Statistical Quality Control, 7th
// ed., §6.4, "the median moving range"; Bryce, Gaudard and Joiner 1997,
// Quality Engineering 10, 331-341):
//
//	σ̂ = median(MR_i) / d4,  d4 = √2·Φ⁻¹(0.75) ≈ 0.954
//
// (the median of |Z1 - Z2| for two independent standard normals); the
// centre line is the mean of x. It returns the limits and the median MR.
func IndividualsLimitsMedianMR(x []float64) (Limits, float64, error) {
	if len(x) < 2 {
		return Limits{}, math.NaN(), fmt.Errorf("an individuals chart needs at least 2 baseline values, got %d: %w", len(x), ErrTooFew)
	}
	if err := checkFinite(x); err != nil {
		return Limits{}, math.NaN(), err
	}
	mr := make([]float64, len(x)-1)
	for i := 1; i < len(x); i++ {
		mr[i-1] = math.Abs(x[i] - x[i-1])
	}
	med := medianSorted(sortedCopy(mr))
	if med == 0 {
		return Limits{}, 0, fmt.Errorf("the median moving range is zero: %w", ErrZeroSpread)
	}
	mean, _ := meanVar(x)
	sigma := med / MedianMRConstant()
	return Limits{Center: mean, Lower: mean - 3*sigma, Upper: mean + 3*sigma, Sigma: sigma}, med, nil
}

// MedianMRConstant is d4 = √2·Φ⁻¹(0.75), the median of the moving range
// of span two of unit-variance normal values.
func MedianMRConstant() float64 { return math.Sqrt2 * distuv.UnitNormal.Quantile(0.75) }

// LotMeanSigmas returns the standard deviation of the mean of a lot of n
// values for each n in sizes, under the one-way random-effects model
// (Montgomery, Design and Analysis of Experiments, 8th ed., section 3.9):
//
//	Var(lot mean) = σ_b² + σ_w²/n
//
// with σ_w the within-lot standard deviation (sigmaWithin) and σ_b the
// between-lot one. The moving-range sigma of the baseline lot means
// (sigmaMeans) estimates the average of that variance over the baseline
// lots, σ_b² + σ_w² h with h the mean of 1/n_j over the baseline sizes
// baseN, so
//
//	σ̂_b² = max(0, sigmaMeans² - σ_w² h),  σ_i = sqrt(σ̂_b² + σ_w²/n_i).
//
// When σ̂_b = 0 this is the x-bar chart with variable sample size,
// limits centre ± 3σ/√n_i (Montgomery, Introduction to Statistical Quality
// Control, 7th ed., section 6.3.2); with equal sizes n it is
// max(sigmaMeans, σ_w/√n). It also returns σ̂_b and the root-mean-square
// sigma over the baseline lots, sqrt(σ̂_b² + σ_w² h) = max(sigmaMeans,
// σ_w √h), the single sigma for statistics that average over lots (an
// approximation, exact for equal sizes).
func LotMeanSigmas(sigmaMeans, sigmaWithin float64, baseN, sizes []int) (sigmas []float64, between, rms float64, err error) {
	if !(sigmaMeans >= 0) || !(sigmaWithin >= 0) || math.IsInf(sigmaMeans, 0) || math.IsInf(sigmaWithin, 0) {
		return nil, math.NaN(), math.NaN(), fmt.Errorf("lot-mean sigmas need finite, non-negative sigmas (got %v, %v): %w", sigmaMeans, sigmaWithin, errCtlDomain)
	}
	if len(baseN) == 0 {
		return nil, math.NaN(), math.NaN(), fmt.Errorf("lot-mean sigmas need the baseline lot sizes: %w", ErrTooFew)
	}
	h := 0.0
	for _, n := range baseN {
		if n < 1 {
			return nil, math.NaN(), math.NaN(), fmt.Errorf("lot size %d: %w", n, errCtlDomain)
		}
		h += 1 / float64(n)
	}
	h /= float64(len(baseN))
	w2 := sigmaWithin * sigmaWithin
	b2 := math.Max(0, sigmaMeans*sigmaMeans-w2*h)
	sigmas = make([]float64, len(sizes))
	for i, n := range sizes {
		if n < 1 {
			return nil, math.NaN(), math.NaN(), fmt.Errorf("lot size %d: %w", n, errCtlDomain)
		}
		sigmas[i] = math.Sqrt(b2 + w2/float64(n))
	}
	return sigmas, math.Sqrt(b2), math.Sqrt(b2 + w2*h), nil
}
