package stats

// GPQOptions control the Monte Carlo evaluation of a generalized pivotal
// quantity.
type GPQOptions struct {
	Sims int    // pivots drawn; 0 means 10,000
	Seed uint64 // the result depends only on the data, the levels, Sims and Seed

	// SEVTables, when given, are the tables NewSEVTable(1 - p) for the
	// contents p of RandomEffectsLowerBounds with SEV errors, in the same
	// order (a caller that computes many bounds at the same levels makes
	// them once); nil: computed on each call.
	SEVTables []SEVTable
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
	b, err := RandomEffectsLowerBounds(groups, []float64{p}, gamma, WithinNormal, opt)
	if err != nil {
		return Bound{}, err
	}
	return b[0], nil
}
