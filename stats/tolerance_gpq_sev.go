package stats

import (
	"fmt"
	"math"
	"math/rand/v2"

	"gonum.org/v1/gonum/stat/distuv"
)

// Within-lot error distributions of the one-way random-effects model.
const (
	WithinNormal = "normal" // values normal about their lot's mean
	WithinSEV    = "sev"    // values smallest-extreme-value about their lot's location: logarithms of Weibull values
)

// sevExcessKurtosis is the excess kurtosis of the smallest (and largest)
// extreme value distribution, 12/5 (Johnson, Kotz and Balakrishnan,
// Continuous Univariate Distributions vol. 2, chapter 22).
const sevExcessKurtosis = 2.4

// eulerGamma is the Euler-Mascheroni constant, the negated mean of the
// standard smallest extreme value distribution.
const eulerGamma = 0.57721566490153286061

// RandomEffectsLowerBounds gives, from one set of generalized pivots, the
// one-sided lower tolerance bounds at the contents ps and confidence gamma
// of the one-way random-effects model y_ij = μ + τ_i + σ_e e_ij with
// τ_i ~ N(0, σ_τ²) and within-lot errors e_ij of mean 0 and variance 1
// that are either normal (within = WithinNormal; then the bound is that of
// RandomEffectsLowerBound, Krishnamoorthy and Mathew 2004, Technometrics
// 46(1):44-52) or standardized smallest-extreme-value (within =
// WithinSEV): e = (G + γ_E)/(π/√6) with G of distribution function
// 1 - exp(-e^g), so that exp(y) is a Weibull value times a lognormal lot
// factor (the logarithm of a two-parameter Weibull variable is smallest
// extreme value; Lawless, Statistical Models and Methods for Lifetime Data,
// 2nd ed., section 1.3). The pivots are those of RandomEffectsLowerBound:
//
//	R_e = SS_e / (c U_e²),  R_m = SS_ȳ / U_τ²,  R_τ = max(0, R_m - R_e/n_h),
//	R_q = ȳ - Z sqrt(R_m / a) + sqrt(R_τ + R_e) q_{1-p}(R_τ / (R_τ + R_e)),
//
// where q_α(ρ) is the α-quantile of sqrt(ρ) Z' + sqrt(1 - ρ) e (Z' standard
// normal): z_α for normal errors, for SEV errors the quantile of the
// convolution, computed by Simpson's rule and the Illinois method at
// ρ = 0, 0.2, ..., 1 and interpolated linearly between them. For normal errors
// U_e² ~ χ²(N - a) and c = 1. For SEV errors the within-lot sum of squares
// is no longer a scaled χ²(N - a): its variance is
// σ_e⁴ Σ_i (n_i - 1)² (2/(n_i - 1) + κ/n_i) with the SEV excess kurtosis
// κ = 12/5 (the variance of a sample variance, e.g. Kendall and Stuart,
// The Advanced Theory of Statistics vol. 1, section 10.5), so it is
// matched by c χ²(ν) with the same mean and variance, ν = 2 (N - a)² / V,
// c = (N - a)/ν (Satterthwaite 1946, Biometrics Bulletin 2:110-114). The
// lot means are taken as normal (their own kurtosis is κ/n_i). The bound
// at content p is the (1 - γ) quantile of R_q; its Monte Carlo standard
// error is from the distribution-free interval for a quantile, as in
// RandomEffectsLowerBound. With SEV errors the data are the logarithms of
// the values; the caller exponentiates. Not exact: the coverage is
// measured by the campaign planner's grid.
//
// Needs at least 2 groups, N > a, finite values not all equal.
func RandomEffectsLowerBounds(groups [][]float64, ps []float64, gamma float64, within string, opt GPQOptions) ([]Bound, error) {
	for _, p := range ps {
		if err := checkLevels(p, gamma); err != nil {
			return nil, err
		}
	}
	if within != WithinNormal && within != WithinSEV {
		return nil, fmt.Errorf("%w: unknown within-lot distribution %q", ErrDomain, within)
	}
	a := len(groups)
	if a < 2 {
		return nil, fmt.Errorf("random-effects bound needs at least 2 groups, have %d: %w", a, ErrTooFew)
	}
	N := 0
	var ybar, invN, sse, vss float64
	means := make([]float64, a)
	for i, g := range groups {
		if len(g) == 0 {
			return nil, fmt.Errorf("random-effects bound: group %d is empty: %w", i+1, ErrTooFew)
		}
		if err := checkFinite(g); err != nil {
			return nil, fmt.Errorf("random-effects bound: %w", err)
		}
		m, v := meanVar(g)
		if len(g) == 1 {
			v = 0
		}
		means[i] = m
		n1 := float64(len(g) - 1)
		sse += n1 * v
		vss += 2*n1 + sevExcessKurtosis*n1*n1/float64(len(g))
		ybar += m
		invN += 1 / float64(len(g))
		N += len(g)
	}
	if N <= a {
		return nil, fmt.Errorf("random-effects bound needs more values (%d) than groups (%d): %w", N, a, ErrTooFew)
	}
	ybar /= float64(a)
	nh := float64(a) / invN
	var ssy float64
	for _, m := range means {
		ssy += (m - ybar) * (m - ybar)
	}
	if sse == 0 && ssy == 0 {
		return nil, fmt.Errorf("random-effects bound: all values equal: %w", ErrZeroSpread)
	}
	sims := opt.Sims
	if sims == 0 {
		sims = 10000
	}
	if sims < 1000 {
		return nil, fmt.Errorf("%w: random-effects bound needs at least 1000 pivots (got %d)", ErrDomain, sims)
	}
	df := float64(N - a)
	c := 1.0
	if within == WithinSEV {
		nu := 2 * df * df / vss
		c, df = df/nu, nu
	}
	// q[k][j]: the (1-p_k)-quantile of the standardized sum at ρ = j/5.
	const grid = sevTableSize - 1
	q := make([]SEVTable, len(ps))
	for k, p := range ps {
		switch {
		case within == WithinNormal:
			for j := range q[k] {
				q[k][j] = -distuv.UnitNormal.Quantile(p)
			}
		case len(opt.SEVTables) == len(ps):
			q[k] = opt.SEVTables[k]
		default:
			q[k] = NewSEVTable(1 - p)
		}
	}
	stream := uint64(0x6770710a) // RandomEffectsLowerBound's stream: the same pivots
	if within == WithinSEV {
		stream = 0x6770710b
	}
	src := rand.NewPCG(opt.Seed, stream)
	rng := rand.New(src)
	ut := distuv.ChiSquared{K: float64(a - 1), Src: src}
	ue := distuv.ChiSquared{K: df, Src: src}
	r := make([][]float64, len(ps))
	for k := range r {
		r[k] = make([]float64, sims)
	}
	for s := 0; s < sims; s++ {
		z := rng.NormFloat64()
		re := sse / (c * ue.Rand())
		rm := ssy / ut.Rand()
		rt := math.Max(0, rm-re/nh)
		loc := ybar - z*math.Sqrt(rm/float64(a))
		sd := math.Sqrt(rt + re)
		x := 0.0
		if sd > 0 {
			x = grid * rt / (rt + re)
		}
		j := min(int(x), grid-1)
		f := x - float64(j)
		for k := range ps {
			r[k][s] = loc + sd*(q[k][j]+f*(q[k][j+1]-q[k][j]))
		}
	}
	qq := 1 - gamma
	j := int(math.Floor(qq * float64(sims)))
	if j >= sims {
		j = sims - 1
	}
	d := int(math.Ceil(1.96 * math.Sqrt(float64(sims)*qq*(1-qq))))
	lo, hi := max(j-d, 0), min(j+d, sims-1)
	out := make([]Bound, len(ps))
	sdHat := math.Sqrt(math.Max(0, ssy/float64(a-1)-sse/float64(N-a)/nh) + sse/float64(N-a))
	for k, p := range ps {
		v := r[k]
		SelectKth(v, j)
		SelectKth(v[:j], lo)
		if hi > j {
			SelectKth(v[j+1:], hi-j-1)
		}
		se := (v[hi] - v[lo]) / (2 * 1.96)
		b := Bound{Value: v[j], Factor: math.NaN(), Method: "random-effects", N: N, Content: p, Confidence: gamma,
			Params: map[string]float64{"lotMeanAverage": ybar, "withinSS": sse, "lotMeanSS": ssy, "harmonicLotSize": nh,
				"groups": float64(a), "sims": float64(sims), "seed": float64(opt.Seed)},
			MCStdErr: se,
			Notes:    []string{fmt.Sprintf("generalized pivotal quantity for the one-way random-effects model, %d pivots", sims)}}
		if within == WithinNormal && sdHat > 0 {
			b.Factor = (ybar - v[j]) / sdHat
		}
		if within == WithinSEV {
			b.Method = "random-effects-sev"
			b.Params["withinDF"] = df
			b.Notes = []string{fmt.Sprintf("generalized pivotal quantity for the one-way random-effects model with smallest-extreme-value errors within lots, %d pivots", sims)}
		}
		out[k] = b
	}
	return out, nil
}

const sevTableSize = 6

// SEVTable holds the α-quantiles of sqrt(ρ) Z + sqrt(1 - ρ) e (standard
// normal Z, standardized smallest extreme value e) at ρ = 0, 0.2, ..., 1,
// as RandomEffectsLowerBounds interpolates them (sevNormalQuantile).
type SEVTable [sevTableSize]float64

// NewSEVTable computes the table for α.
func NewSEVTable(alpha float64) SEVTable {
	var t SEVTable
	for j := range t {
		t[j] = sevNormalQuantile(alpha, float64(j)/(sevTableSize-1))
	}
	return t
}

// sevNormalQuantile is the α-quantile of X = sqrt(ρ) Z + sqrt(1 - ρ) e,
// Z standard normal and e standardized smallest extreme value (mean 0,
// variance 1). At ρ = 1 it is z_α, at ρ = 0 the SEV quantile
// (ln(-ln(1-α)) + γ_E)/(π/√6). In between, P(X ≤ x) is integrated by
// composite Simpson's rule (64 intervals) over the variable whose
// coefficient is the larger (so the other enters through a smooth
// distribution function), and x is found by the Illinois method
// (Dowell and Jarratt 1971, BIT 11) to 1e-9.
func sevNormalQuantile(alpha, rho float64) float64 {
	cs := math.Pi / math.Sqrt(6)
	zq := distuv.UnitNormal.Quantile(alpha)
	sq := (math.Log(-math.Log1p(-alpha)) + eulerGamma) / cs
	if rho >= 1 {
		return zq
	}
	if rho <= 0 {
		return sq
	}
	a, b := math.Sqrt(rho), math.Sqrt(1-rho)
	sevCDF := func(s float64) float64 { return -math.Expm1(-math.Exp(cs*s - eulerGamma)) }
	const n = 64
	cdf := func(x float64) float64 {
		var sum float64
		if a >= b {
			// Over the SEV variable g (G standard SEV, e = (g + γ_E)/cs):
			// ∫ f_G(g) Φ((x - b e)/a) dg over g in [-20, 3].
			lo, hi := -20.0, 3.0
			h := (hi - lo) / n
			for i := 0; i <= n; i++ {
				g := lo + float64(i)*h
				f := math.Exp(g-math.Exp(g)) * distuv.UnitNormal.CDF((x-b*(g+eulerGamma)/cs)/a)
				sum += simpsonWeight(i, n) * f
			}
			return sum * h / 3
		}
		// Over the normal variable: ∫ φ(z) F_e((x - a z)/b) dz, z in [-9, 9].
		lo, hi := -9.0, 9.0
		h := (hi - lo) / n
		for i := 0; i <= n; i++ {
			z := lo + float64(i)*h
			sum += simpsonWeight(i, n) * distuv.UnitNormal.Prob(z) * sevCDF((x-a*z)/b)
		}
		return sum * h / 3
	}
	// A bracket one unit beyond the two pure quantiles.
	x0, x1 := math.Min(zq, sq)-1, math.Max(zq, sq)+1
	f0, f1 := cdf(x0)-alpha, cdf(x1)-alpha
	side := 0
	for i := 0; i < 100 && math.Abs(x1-x0) > 1e-9; i++ {
		x := (x0*f1 - x1*f0) / (f1 - f0)
		fx := cdf(x) - alpha
		if fx*f1 > 0 {
			x1, f1 = x, fx
			if side == -1 {
				f0 /= 2
			}
			side = -1
		} else {
			x0, f0 = x, fx
			if side == 1 {
				f1 /= 2
			}
			side = 1
		}
		if fx == 0 {
			return x
		}
	}
	return (x0 + x1) / 2
}

func simpsonWeight(i, n int) float64 {
	switch {
	case i == 0 || i == n:
		return 1
	case i%2 == 1:
		return 4
	}
	return 2
}
