package stats

import (
	"cmp"
	"fmt"
	"math"
	"slices"
)

// KSampleADResult is the outcome of the k-sample Anderson-Darling test.
type KSampleADResult struct {
	Statistic    float64 // A²akN, the tie-adjusted (midrank) statistic, eq. 7 of Scholz & Stephens (1987)
	Standardized float64 // T = (A²akN - (k-1)) / σ_N
	Critical     float64 // critical value of Statistic at Alpha: (k-1) + σ_N t_{k-1}(Alpha)
	PValue       float64 // approximate p-value from the interpolated percentage points
	Alpha        float64 // significance level of Critical and Differ
	K, N         int     // number of samples, total number of values
	Differ       bool    // Statistic > Critical: the samples do not come from one population

	SigmaN float64 // σ_N, standard deviation of A²kN under the null hypothesis (eq. 4)
	// PValueNote is set when T lies outside the tabulated range and PValue
	// is only a bound (0.25 from above, 0.001 from below).
	PValueNote string
	// Handbook form, CMH-17-1G Vol. 1 section 8.3.2.2: ADK = A²akN/(k-1) is
	// compared with ADC = 1 + (σ_N/(k-1)) (1.645 + 0.678/√(k-1) - 0.362/(k-1)).
	// Those coefficients are Scholz & Stephens' row for α = 0.05, so
	// HandbookDiffer is the decision at α = 0.05 whatever Alpha is.
	ADK, ADC       float64
	HandbookDiffer bool
}

// Scholz & Stephens (1987) Table 1 interpolation coefficients for the upper
// percentage points t_m(α) = b0 + b1/√m + b2/m of the standardized
// statistic, m = k-1 (α = 0.25 ... 0.01 from the paper; 0.005 and 0.001 as
// extended in Debian python3-scipy 1.10 anderson_ksamp, whose
// output the tests compare against).
var (
	ksLevels = []float64{0.25, 0.1, 0.05, 0.025, 0.01, 0.005, 0.001}
	ksB0     = []float64{0.675, 1.281, 1.645, 1.96, 2.326, 2.573, 3.085}
	ksB1     = []float64{-0.245, 0.25, 0.678, 1.149, 1.822, 2.364, 3.615}
	ksB2     = []float64{-0.105, -0.305, -0.362, -0.391, -0.396, -0.345, -0.154}
)

// ksCriticalPoints returns t_m(α) for the tabulated α levels.
func ksCriticalPoints(m float64) []float64 {
	t := make([]float64, len(ksLevels))
	for i := range t {
		t[i] = ksB0[i] + ksB1[i]/math.Sqrt(m) + ksB2[i]/m
	}
	return t
}

// ksLogLevelFit fits ln α = c0 + c1 t + c2 t² by least squares through the
// tabulated points (the interpolation used by scipy.stats.anderson_ksamp;
// Scholz & Stephens 1987 section 5 interpolate the tabulated points
// similarly).
func ksLogLevelFit(t []float64) [3]float64 {
	// Normal equations in the centred variable s = t - tbar.
	var tbar float64
	for _, v := range t {
		tbar += v
	}
	tbar /= float64(len(t))
	var a [3][4]float64
	for i, v := range t {
		s := v - tbar
		p := [3]float64{1, s, s * s}
		y := math.Log(ksLevels[i])
		for r := 0; r < 3; r++ {
			for c := 0; c < 3; c++ {
				a[r][c] += p[r] * p[c]
			}
			a[r][3] += p[r] * y
		}
	}
	// Gaussian elimination with partial pivoting on the 3x4 system.
	for c := 0; c < 3; c++ {
		piv := c
		for r := c + 1; r < 3; r++ {
			if math.Abs(a[r][c]) > math.Abs(a[piv][c]) {
				piv = r
			}
		}
		a[c], a[piv] = a[piv], a[c]
		for r := c + 1; r < 3; r++ {
			f := a[r][c] / a[c][c]
			for cc := c; cc < 4; cc++ {
				a[r][cc] -= f * a[c][cc]
			}
		}
	}
	var q [3]float64
	for r := 2; r >= 0; r-- {
		s := a[r][3]
		for c := r + 1; c < 3; c++ {
			s -= a[r][c] * q[c]
		}
		q[r] = s / a[r][r]
	}
	// Back to powers of t: q0 + q1 (t-tb) + q2 (t-tb)².
	return [3]float64{q[0] - q[1]*tbar + q[2]*tbar*tbar, q[1] - 2*q[2]*tbar, q[2]}
}

func polyLog(c [3]float64, t float64) float64 { return c[0] + c[1]*t + c[2]*t*t }

// ksCriticalT returns t_m(α): the tabulated row when α is a tabulated
// level, else the root of the interpolating fit between the extreme
// tabulated points.
func ksCriticalT(m, alpha float64) (float64, error) {
	pts := ksCriticalPoints(m)
	for i, l := range ksLevels {
		if math.Abs(alpha-l) <= 1e-12 {
			return pts[i], nil
		}
	}
	if !(alpha > 0.001 && alpha < 0.25) {
		return 0, fmt.Errorf("alpha %v outside the tabulated range [0.001, 0.25]", alpha)
	}
	c := ksLogLevelFit(pts)
	target := math.Log(alpha)
	lo, hi := pts[0], pts[len(pts)-1]
	for i := 0; i < 200; i++ {
		mid := (lo + hi) / 2
		if polyLog(c, mid) > target {
			lo = mid
		} else {
			hi = mid
		}
	}
	return (lo + hi) / 2, nil
}

// ksSigmaN returns σ_N² for k samples of sizes n (total N), Scholz &
// Stephens (1987) eq. 4:
//
//	σ² = (aN³ + bN² + cN + d) / ((N-1)(N-2)(N-3)),
//	a = (4g-6)(k-1) + (10-6g)H,
//	b = (2g-4)k² + 8hk + (2g-14h-4)H - 8h + 4g - 6,
//	c = (6h+2g-2)k² + (4h-4g+6)k + (2h-6)H + 4h,
//	d = (2h+6)k² - 4hk,
//
// with H = Σ 1/n_i, h = Σ_{i=1}^{N-1} 1/i, g = Σ_{i=1}^{N-2} Σ_{j=i+1}^{N-1} 1/((N-i) j).
func ksSigmaN2(sizes []int) float64 {
	k := float64(len(sizes))
	N := 0
	var H float64
	for _, n := range sizes {
		N += n
		H += 1 / float64(n)
	}
	// hpre[i] = Σ_{j=1}^{i} 1/j.
	hpre := make([]float64, N)
	for i := 1; i < N; i++ {
		hpre[i] = hpre[i-1] + 1/float64(i)
	}
	h := hpre[N-1]
	var g float64
	for i := 1; i <= N-2; i++ {
		g += (h - hpre[i]) / float64(N-i)
	}
	Nf := float64(N)
	a := (4*g-6)*(k-1) + (10-6*g)*H
	b := (2*g-4)*k*k + 8*h*k + (2*g-14*h-4)*H - 8*h + 4*g - 6
	c := (6*h+2*g-2)*k*k + (4*h-4*g+6)*k + (2*h-6)*H + 4*h
	d := (2*h+6)*k*k - 4*h*k
	return (a*Nf*Nf*Nf + b*Nf*Nf + c*Nf + d) / ((Nf - 1) * (Nf - 2) * (Nf - 3))
}

type labelled struct {
	v float64
	g int
}

// ksPrepare checks the groups and returns the pooled values sorted with
// their group labels, the group sizes and N.
func ksPrepare(groups [][]float64) ([]labelled, []int, error) {
	if len(groups) < 2 {
		return nil, nil, fmt.Errorf("%d samples, need at least 2: %w", len(groups), ErrTooFew)
	}
	sizes := make([]int, len(groups))
	n := 0
	for _, g := range groups {
		n += len(g)
	}
	all := make([]labelled, 0, n)
	for i, g := range groups {
		if len(g) == 0 {
			return nil, nil, fmt.Errorf("sample %d is empty: %w", i, ErrTooFew)
		}
		if err := checkFinite(g); err != nil {
			return nil, nil, fmt.Errorf("sample %d: %w", i, err)
		}
		sizes[i] = len(g)
		for _, v := range g {
			all = append(all, labelled{v, i})
		}
	}
	if len(all) < 5 {
		return nil, nil, fmt.Errorf("%d values in all, need at least 5: %w", len(all), ErrTooFew)
	}
	// By value, ties by sample: the order a stable sort by value gives,
	// since the values of one sample were appended in order and tied
	// values of one sample are indistinguishable.
	slices.SortFunc(all, func(a, b labelled) int {
		if c := cmp.Compare(a.v, b.v); c != 0 {
			return c
		}
		return cmp.Compare(a.g, b.g)
	})
	if all[0].v == all[len(all)-1].v {
		return nil, nil, fmt.Errorf("all values are equal: %w", ErrZeroSpread)
	}
	return all, sizes, nil
}

// a2akN computes Scholz & Stephens (1987) eq. 7, the midrank statistic
// for data with ties:
//
//	A²akN = (N-1)/N² Σ_i (1/n_i) Σ_{j=1}^{L} l_j (N M_aij - n_i B_aj)² / (B_aj (N - B_aj) - N l_j/4)
//
// over the L distinct values z*_j with multiplicities l_j, where
// M_aij = (number in sample i < z*_j) + f_ij/2 and B_aj = (number in all
// < z*_j) + l_j/2.
func a2akN(all []labelled, sizes []int) float64 {
	N := float64(len(all))
	k := len(sizes)
	cum := make([]float64, k) // count in sample i strictly below the current block
	f := make([]float64, k)
	inner := make([]float64, k)
	var below float64
	for s := 0; s < len(all); {
		e := s
		for e < len(all) && all[e].v == all[s].v {
			f[all[e].g]++
			e++
		}
		l := float64(e - s)
		ba := below + l/2
		den := ba*(N-ba) - N*l/4
		for i := 0; i < k; i++ {
			m := cum[i] + f[i]/2
			d := N*m - float64(sizes[i])*ba
			inner[i] += l * d * d / den
		}
		for j := s; j < e; j++ {
			cum[all[j].g]++
			f[all[j].g] = 0
		}
		below += l
		s = e
	}
	var a float64
	for i := 0; i < k; i++ {
		a += inner[i] / float64(sizes[i])
	}
	return a * (N - 1) / (N * N)
}

// a2kN computes the Scholz & Stephens (1987) statistic without the
// midrank adjustment, in the form of their eq. 6 extended to ties:
//
//	A²kN = (1/N) Σ_i (1/n_i) Σ_{j=1}^{L-1} l_j (N M_ij - n_i B_j)² / (B_j (N - B_j))
//
// over the distinct values z*_j with multiplicities l_j, M_ij = number in
// sample i <= z*_j, B_j = number in all <= z*_j. Without ties it is eq. 6.
func a2kN(all []labelled, sizes []int) float64 {
	N := float64(len(all))
	k := len(sizes)
	cum := make([]float64, k)
	inner := make([]float64, k)
	var B float64
	for s := 0; s < len(all); {
		e := s
		for e < len(all) && all[e].v == all[s].v {
			cum[all[e].g]++
			e++
		}
		if e == len(all) {
			break
		}
		l := float64(e - s)
		B += l
		for i := 0; i < k; i++ {
			d := N*cum[i] - float64(sizes[i])*B
			inner[i] += l * d * d / (B * (N - B))
		}
		s = e
	}
	var a float64
	for i := 0; i < k; i++ {
		a += inner[i] / float64(sizes[i])
	}
	return a / N
}

// KSampleAD tests whether k samples come from one common (unspecified)
// continuous population: the k-sample Anderson-Darling test of Scholz and
// Stephens (1987), "K-sample Anderson-Darling tests", J. Amer. Statist.
// Assoc. 82, 918-924.
//
// The statistic is the midrank version A²akN (eq. 7), which handles ties;
// its null mean is k-1 and its variance σ_N² (eq. 4). The standardized
// statistic is T = (A²akN - (k-1))/σ_N, compared with the percentage points
// t_m(α) = b0 + b1/√m + b2/m, m = k-1 (Table 1 coefficients): the samples
// differ when A²akN > (k-1) + σ_N t_m(α), i.e. T > t_m(α). Alpha must lie in
// [0.001, 0.25]; levels between the tabulated ones use the interpolation
// below. The p-value interpolates ln α quadratically in t through the
// tabulated points (as scipy.stats.anderson_ksamp does); outside the table
// it is reported as the bound 0.25 or 0.001 with PValueNote set.
//
// The result also carries the CMH-17-1G Vol. 1 section 8.3.2.2 form of the
// same test (ADK, ADC, HandbookDiffer; see KSampleADResult).
//
// It needs at least 2 non-empty samples of finite values, at least 5
// values in all, and at least 2 distinct values.
func KSampleAD(groups [][]float64, alpha float64) (KSampleADResult, error) {
	all, sizes, err := ksPrepare(groups)
	if err != nil {
		return KSampleADResult{}, fmt.Errorf("k-sample anderson-darling: %w", err)
	}
	k := len(sizes)
	m := float64(k - 1)
	tcrit, err := ksCriticalT(m, alpha)
	if err != nil {
		return KSampleADResult{}, fmt.Errorf("k-sample anderson-darling: %w", err)
	}
	s2 := ksSigmaN2(sizes)
	if !(s2 > 0) {
		return KSampleADResult{}, fmt.Errorf("k-sample anderson-darling: null variance %v not positive", s2)
	}
	sigma := math.Sqrt(s2)
	a := a2akN(all, sizes)
	r := KSampleADResult{
		Statistic: a, Standardized: (a - m) / sigma, Critical: m + sigma*tcrit,
		Alpha: alpha, K: k, N: len(all), SigmaN: sigma,
	}
	r.Differ = r.Statistic > r.Critical
	pts := ksCriticalPoints(m)
	switch {
	case r.Standardized < pts[0]:
		r.PValue = ksLevels[0]
		r.PValueNote = "p-value above 0.25 (outside the tabulated range); 0.25 reported"
	case r.Standardized > pts[len(pts)-1]:
		r.PValue = ksLevels[len(ksLevels)-1]
		r.PValueNote = "p-value below 0.001 (outside the tabulated range); 0.001 reported"
	default:
		r.PValue = math.Exp(polyLog(ksLogLevelFit(pts), r.Standardized))
	}
	r.ADK = a / m
	r.ADC = 1 + sigma/m*(1.645+0.678/math.Sqrt(m)-0.362/m)
	r.HandbookDiffer = r.ADK > r.ADC
	return r, nil
}
