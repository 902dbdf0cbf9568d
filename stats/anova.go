package stats

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mathext"
)

// ANOVAResult is the one-way analysis of variance table.
type ANOVAResult struct {
	SSB, SSW, SST float64 // between-group, within-group and total sums of squares
	MSB, MSW      float64 // mean squares SSB/DFB, SSW/DFW
	F, P          float64 // F = MSB/MSW and its upper-tail probability under F(DFB, DFW)
	DFB, DFW, N   int     // k-1, N-k, total count
	Means         []float64
	Sizes         []int
}

// fSurvival returns P(F > f) for the F(d1, d2) distribution as the
// regularized incomplete beta function I_{d2/(d2+d1 f)}(d2/2, d1/2)
// (Abramowitz & Stegun 26.6.2), evaluated directly rather than as 1 - CDF
// so that small p-values keep their relative accuracy. Where that gives
// p > 1/2 the complement 1 - I_{d1 f/(d2+d1 f)}(d1/2, d2/2) is used
// instead, as gonum's mathext.RegIncBeta loses up to ~4e-9 near p = 1 for
// b = 1/2 and large a (F = 1e-6, d1 = 1, d2 = 1e5). Checked against mpmath
// (and scipy.stats.f.sf) in anova_test.go.
func fSurvival(f, d1, d2 float64) float64 {
	if f <= 0 {
		return 1
	}
	if math.IsInf(f, 1) {
		return 0
	}
	p := mathext.RegIncBeta(d2/2, d1/2, d2/(d2+d1*f))
	if p > 0.5 {
		return 1 - mathext.RegIncBeta(d1/2, d2/2, d1*f/(d2+d1*f))
	}
	return p
}

// checkGroups validates groups for the one-way layout.
func checkGroups(groups [][]float64, what string) (N int, err error) {
	if len(groups) < 2 {
		return 0, fmt.Errorf("%s: %d groups, need at least 2: %w", what, len(groups), ErrTooFew)
	}
	for i, g := range groups {
		if len(g) == 0 {
			return 0, fmt.Errorf("%s: group %d is empty: %w", what, i, ErrTooFew)
		}
		if err := checkFinite(g); err != nil {
			return 0, fmt.Errorf("%s: group %d: %w", what, i, err)
		}
		N += len(g)
	}
	if N-len(groups) < 1 {
		return 0, fmt.Errorf("%s: every group has one value, no within-group degrees of freedom: %w", what, ErrTooFew)
	}
	return N, nil
}

// OneWayANOVA computes the one-way analysis of variance for k groups of
// possibly unequal sizes n_i (N = Σ n_i):
//
//	SSB = Σ n_i (x̄_i - x̄)²,  SSW = Σ_i Σ_j (x_ij - x̄_i)²,  SST = Σ (x_ij - x̄)²
//	MSB = SSB/(k-1),  MSW = SSW/(N-k),  F = MSB/MSW,  P = P(F(k-1, N-k) > F)
//
// (e.g. Montgomery, Design and Analysis of Experiments, ch. 3; CMH-17-1G
// Vol. 1 section 8.3 uses the same table for the between-batch variance,
// subsection 8.3.5.2 from memory). Means and sums of squares use the corrected two-pass algorithm
// (Chan, Golub & LeVeque 1983) after shifting all data by the first value,
// which reaches the NIST StRD one-way ANOVA certified values (see tests).
//
// It needs at least 2 non-empty groups of finite values with N > k, and
// some within-group variation (MSW > 0); otherwise it returns an error.
func OneWayANOVA(groups [][]float64) (ANOVAResult, error) {
	N, err := checkGroups(groups, "one-way anova")
	if err != nil {
		return ANOVAResult{}, err
	}
	k := len(groups)
	shift := groups[0][0]
	all := make([]float64, 0, N)
	r := ANOVAResult{DFB: k - 1, DFW: N - k, N: N, Means: make([]float64, k), Sizes: make([]int, k)}
	gm := make([]float64, k)
	for i, g := range groups {
		y := make([]float64, len(g))
		for j, v := range g {
			y[j] = v - shift
		}
		all = append(all, y...)
		m, v := meanVar(y)
		gm[i] = m
		if len(y) > 1 {
			r.SSW += v * float64(len(y)-1)
		}
		r.Sizes[i] = len(g)
		r.Means[i] = m + shift
	}
	grand, tv := meanVar(all)
	r.SST = tv * float64(N-1)
	for i := range groups {
		d := gm[i] - grand
		r.SSB += float64(r.Sizes[i]) * d * d
	}
	if math.IsInf(r.SST, 0) || math.IsNaN(r.SST) || math.IsInf(r.SSW, 0) || math.IsInf(r.SSB, 0) {
		return ANOVAResult{}, fmt.Errorf("one-way anova: values too large, sums overflow: %w", ErrNonFinite)
	}
	if r.SSW == 0 {
		return ANOVAResult{}, fmt.Errorf("one-way anova: no variation within groups, F undefined: %w", ErrZeroSpread)
	}
	r.MSB = r.SSB / float64(r.DFB)
	r.MSW = r.SSW / float64(r.DFW)
	r.F = r.MSB / r.MSW
	if math.IsInf(r.F, 0) || math.IsNaN(r.F) {
		return ANOVAResult{}, fmt.Errorf("one-way anova: within-group variation negligible against between-group (F overflows): %w", ErrZeroSpread)
	}
	r.P = fSurvival(r.F, float64(r.DFB), float64(r.DFW))
	return r, nil
}

// LeveneResult is the outcome of Levene's test for equal variances.
type LeveneResult struct {
	F, P     float64
	DF1, DF2 int
}

// Levene tests whether k groups have equal variances by Levene's test with
// median centring (Brown & Forsythe 1974, "Robust tests for the equality of
// variances", J. Amer. Statist. Assoc. 69, 364-367; CMH-17-1G Vol. 1
// section 8.3 uses this form, subsection 8.3.2.3 from memory): the one-way ANOVA F statistic of
// z_ij = |x_ij - median_i|,
//
//	F = [(N-k) Σ n_i (z̄_i - z̄)²] / [(k-1) Σ_i Σ_j (z_ij - z̄_i)²]
//
// referred to F(k-1, N-k). A small P means the variances differ.
//
// It needs at least 2 non-empty groups, N > k, and some variation of the
// z_ij within groups (groups of two values each have none).
func Levene(groups [][]float64) (LeveneResult, error) {
	if _, err := checkGroups(groups, "levene"); err != nil {
		return LeveneResult{}, err
	}
	z := make([][]float64, len(groups))
	for i, g := range groups {
		s := sortedCopy(g)
		med := medianSorted(s)
		z[i] = make([]float64, len(g))
		for j, v := range g {
			z[i][j] = math.Abs(v - med)
		}
	}
	a, err := OneWayANOVA(z)
	if err != nil {
		return LeveneResult{}, fmt.Errorf("levene: absolute deviations from the group medians: %w", err)
	}
	return LeveneResult{F: a.F, P: a.P, DF1: a.DFB, DF2: a.DFW}, nil
}
