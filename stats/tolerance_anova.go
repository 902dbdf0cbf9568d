package stats

import (
	"fmt"
	"math"
)

// ANOVALowerBound returns the one-sided lower tolerance bound for data in
// groups (batches, lots) whose means differ, by the one-way random-effects
// ANOVA method of CMH-17-1G Vol. 1 section 8.3.5.2 (after Vangel 1992,
// "New methods for one-sided tolerance limits for a one-way balanced
// random-effects ANOVA model", Technometrics 34(2):176-185), with the
// handbook's effective group size for unbalanced groups:
//
//	N = sum n_i, k = number of groups,
//	MSB, MSW from the one-way ANOVA (OneWayANOVA),
//	n' = (N - sum n_i^2 / N) / (k - 1)                 (effective group size)
//	S  = sqrt( MSB/n' + (n'-1)/n' * MSW )              (population sd estimate)
//	u  = MSB / MSW,  w = sqrt( u / (u + n' - 1) )
//	k0 = NormalK(N, p, gamma),  k1 = NormalK(k, p, gamma)
//	T  = ( k0 - k1/sqrt(n') + (k1 - k0) w ) / ( 1 - 1/sqrt(n') )
//	bound = grand mean - T S.
//
// T runs from k0 (no between-group variance, u = 1) to k1 (between-group
// variance dominant, u -> infinity). When MSB <= MSW the between-group
// variance component is estimated as zero and, as the handbook directs, the
// groups are pooled and the normal method on all N values is used
// (NormalLowerBound); a note says so. The factor is Vangel's approximation,
// not exact. Coverage measured by the harness (BenchmarkCoverage, 10,000
// samples, nominal 0.95, B-basis): 0.944 for 5 lots of 6 with equal
// between- and within-lot standard deviations (slightly liberal), 0.953 for
// 5 lots of 6 with the between-lot one 4 times the within-lot one, 0.958 for
// 8 lots of 4 with it one third (conservative; the pooled branch is often
// taken there). With few groups the bound is governed by k1 for a tiny
// sample and is very conservative (common practice: at least 3, preferably
// 5 or more groups).
//
// Needs at least 2 groups, each with at least 1 value, N > k, finite values.
func ANOVALowerBound(groups [][]float64, p, gamma float64) (Bound, error) {
	if err := checkLevels(p, gamma); err != nil {
		return Bound{}, err
	}
	if len(groups) < 2 {
		return Bound{}, fmt.Errorf("ANOVA bound needs at least 2 groups, have %d: %w", len(groups), ErrTooFew)
	}
	a, err := OneWayANOVA(groups)
	if err != nil {
		return Bound{}, fmt.Errorf("ANOVA bound: %w", err)
	}
	k := len(groups)
	N := a.N
	var sumN2 float64
	all := make([]float64, 0, N)
	for _, g := range groups {
		sumN2 += float64(len(g)) * float64(len(g))
		all = append(all, g...)
	}
	nEff := (float64(N) - sumN2/float64(N)) / float64(k-1)
	var grand float64
	for _, v := range all {
		grand += v
	}
	grand /= float64(N)
	params := map[string]float64{
		"grandMean": grand, "MSB": a.MSB, "MSW": a.MSW, "F": a.F, "pANOVA": a.P,
		"groups": float64(k), "effectiveGroupSize": nEff,
	}
	if !(a.MSB > a.MSW) {
		b, err := NormalLowerBound(all, p, gamma)
		if err != nil {
			return Bound{}, err
		}
		b.Method = "anova-pooled"
		for key, v := range params {
			b.Params[key] = v
		}
		b.Notes = append([]string{fmt.Sprintf(
			"between-group mean square (%.6g) is not larger than within-group (%.6g): between-group variance estimated as zero; groups pooled and the normal method used on all %d values (CMH-17-1G 8.3.5.2)",
			a.MSB, a.MSW, N)}, b.Notes...)
		return b, nil
	}
	if !(nEff > 1) {
		return Bound{}, fmt.Errorf("ANOVA bound: effective group size %.4g must exceed 1 (need replicates within groups): %w", nEff, ErrTooFew)
	}
	S := math.Sqrt(a.MSB/nEff + (nEff-1)/nEff*a.MSW)
	u := a.MSB / a.MSW
	w := math.Sqrt(u / (u + nEff - 1))
	k0, err := NormalK(N, p, gamma)
	if err != nil {
		return Bound{}, err
	}
	k1, err := NormalK(k, p, gamma)
	if err != nil {
		return Bound{}, err
	}
	rn := math.Sqrt(nEff)
	T := (k0 - k1/rn + (k1-k0)*w) / (1 - 1/rn)
	params["S"] = S
	params["u"] = u
	params["w"] = w
	params["k0"] = k0
	params["k1"] = k1
	notes := []string{"one-way random-effects ANOVA bound (CMH-17-1G 8.3.5.2, Vangel 1992 approximation)"}
	if k < 5 {
		notes = append(notes, fmt.Sprintf("only %d groups: the factor is dominated by k1 for a sample of %d and the bound is very conservative", k, k))
	}
	notes = append(notes, DesignValueCaution)
	return Bound{
		Value: grand - T*S, Factor: T, Method: "anova", N: N, Content: p, Confidence: gamma,
		Params: params, Notes: notes,
	}, nil
}
