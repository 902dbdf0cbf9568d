package stats

import (
	"fmt"
	"math"
	"math/rand/v2"
	"sort"

	"gonum.org/v1/gonum/stat/distuv"
)

// GPQOptions control the Monte Carlo evaluation of a generalized pivotal
// quantity.
type GPQOptions struct {
	Sims int    // pivots drawn; 0 means 10,000
	Seed uint64 // the result depends only on the data, the levels, Sims and Seed
}

// RandomEffectsLowerBound is the one-sided lower tolerance bound for the
// one-way random-effects model y_ij = μ + τ_i + e_ij, τ_i ~ N(0, σ_τ²),
// e_ij ~ N(0, σ_e²), for the population of individual values
// N(μ, σ_τ² + σ_e²), by the generalized pivotal quantity (GPQ) of
// Krishnamoorthy and Mathew (2004), "One-sided tolerance limits in balanced
// and unbalanced one-way random models based on generalized confidence
// intervals", Technometrics 46(1):44-52 (see also Liao, Lin and Iyer 2005,
// Technometrics 47(3):323-335). With a groups, group means ȳ_i, their
// unweighted mean ȳ, the harmonic mean group size n_h, the sum of squares
// of the group means SS_ȳ = Σ (ȳ_i - ȳ)² and the within-group sum of
// squares SS_e (N - a degrees of freedom), and independent Z ~ N(0, 1),
// U_τ² ~ χ²(a-1), U_e² ~ χ²(N-a):
//
//	R_e  = SS_e / U_e²                                (pivot of σ_e²)
//	R_m  = SS_ȳ / U_τ²                                (pivot of σ_τ² + σ_e²/n_h)
//	R_τ  = max(0, R_m - R_e / n_h)                    (pivot of σ_τ²)
//	R_q  = ȳ - Z sqrt(R_m / a) - z_p sqrt(R_τ + R_e)  (pivot of μ - z_p σ)
//
// and the bound is the (1 - γ) quantile of R_q over Sims draws. For
// unequal group sizes SS_ȳ/(σ_τ² + σ_e²/n_h) is taken as χ²(a-1), the
// approximation of Thomas and Hultquist (1978), Annals of Statistics 6,
// as in Krishnamoorthy and Mathew's unbalanced case. The coverage is close
// to γ but not exact; it is conservative when σ_τ² is small relative to
// σ_e² and with few groups (measured by the campaign planner's grid).
// The Monte Carlo standard error is from the distribution-free confidence
// interval for a quantile (order statistics j ± 1.96 sqrt(Sims q(1-q))),
// divided by 2 × 1.96.
//
// Needs at least 2 groups, N > a, finite values not all equal.
func RandomEffectsLowerBound(groups [][]float64, p, gamma float64, opt GPQOptions) (Bound, error) {
	if err := checkLevels(p, gamma); err != nil {
		return Bound{}, err
	}
	a := len(groups)
	if a < 2 {
		return Bound{}, fmt.Errorf("random-effects bound needs at least 2 groups, have %d: %w", a, ErrTooFew)
	}
	N := 0
	var ybar, invN, sse float64
	means := make([]float64, a)
	for i, g := range groups {
		if len(g) == 0 {
			return Bound{}, fmt.Errorf("random-effects bound: group %d is empty: %w", i+1, ErrTooFew)
		}
		if err := checkFinite(g); err != nil {
			return Bound{}, fmt.Errorf("random-effects bound: %w", err)
		}
		m, v := meanVar(g)
		if len(g) == 1 {
			v = 0
		}
		means[i] = m
		sse += float64(len(g)-1) * v
		ybar += m
		invN += 1 / float64(len(g))
		N += len(g)
	}
	if N <= a {
		return Bound{}, fmt.Errorf("random-effects bound needs more values (%d) than groups (%d): %w", N, a, ErrTooFew)
	}
	ybar /= float64(a)
	nh := float64(a) / invN
	var ssy float64
	for _, m := range means {
		ssy += (m - ybar) * (m - ybar)
	}
	if sse == 0 && ssy == 0 {
		return Bound{}, fmt.Errorf("random-effects bound: all values equal: %w", ErrZeroSpread)
	}
	sims := opt.Sims
	if sims == 0 {
		sims = 10000
	}
	if sims < 1000 {
		return Bound{}, fmt.Errorf("%w: random-effects bound needs at least 1000 pivots (got %d)", ErrDomain, sims)
	}
	zp := distuv.UnitNormal.Quantile(p)
	src := rand.NewPCG(opt.Seed, 0x6770710a)
	rng := rand.New(src)
	ut := distuv.ChiSquared{K: float64(a - 1), Src: src}
	ue := distuv.ChiSquared{K: float64(N - a), Src: src}
	r := make([]float64, sims)
	for s := range r {
		z := rng.NormFloat64()
		re := sse / ue.Rand()
		rm := ssy / ut.Rand()
		rt := math.Max(0, rm-re/nh)
		r[s] = ybar - z*math.Sqrt(rm/float64(a)) - zp*math.Sqrt(rt+re)
	}
	sort.Float64s(r)
	q := 1 - gamma
	j := int(math.Floor(q * float64(sims)))
	if j >= sims {
		j = sims - 1
	}
	d := int(math.Ceil(1.96 * math.Sqrt(float64(sims)*q*(1-q))))
	lo, hi := max(j-d, 0), min(j+d, sims-1)
	se := (r[hi] - r[lo]) / (2 * 1.96)
	sdHat := math.Sqrt(math.Max(0, ssy/float64(a-1)-sse/float64(N-a)/nh) + sse/float64(N-a))
	factor := math.NaN()
	if sdHat > 0 {
		factor = (ybar - r[j]) / sdHat
	}
	return Bound{Value: r[j], Factor: factor, Method: "random-effects", N: N, Content: p, Confidence: gamma,
		Params: map[string]float64{"lotMeanAverage": ybar, "withinSS": sse, "lotMeanSS": ssy, "harmonicLotSize": nh,
			"groups": float64(a), "sims": float64(sims), "seed": float64(opt.Seed)},
		MCStdErr: se,
		Notes:    []string{fmt.Sprintf("generalized pivotal quantity for the one-way random-effects model, %d pivots", sims)}}, nil
}
