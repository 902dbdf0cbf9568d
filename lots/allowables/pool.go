package allowables

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/stat/distuv"

	"lotproof/lots"
	"lotproof/stats"
)

// poolConditions tries to pool one property's results across test
// conditions by the pooled coefficient-of-variation method for data from
// several environments (CMH-17-1G Vol. 1 chapter 8, pooling across
// environments; normalized form). Each condition's values are divided by
// that condition's mean; pooling is justified when
//
//   - every condition's lots were pooled (no lot effect; the pooled method
//     has no between-lot term),
//   - Levene's test (median-centred, Brown and Forsythe 1974) finds the
//     normalized variances equal at LeveneAlpha, and
//   - the pooled normalized values pass the Anderson-Darling normality test
//     (OSL above PoolOSLMin): the same, normal, shape in every condition.
//
// Then, with N values in m conditions, the pooled CV is
//
//	cv_p = sqrt( Σ (n_i - 1) (s_i / x̄_i)² / (N - m) ),
//
// and the bound of condition i is x̄_i (1 - K_i cv_p) with
// K_i = t'_γ(N - m, z_p √n_i) / √n_i, the one-sided tolerance factor with
// the pooled degrees of freedom (Odeh and Owen 1980 form with ν = N - m).
// The unpooled results stay beside the pooled ones.
func poolConditions(res []Result, idx []int, opt Options) {
	var conds []string
	var norm [][]float64
	N := 0
	var why string
	for _, i := range idx {
		r := &res[i]
		conds = append(conds, r.Condition)
		all := flatten(r.values)
		if !r.pooled && why == "" {
			why = fmt.Sprintf("the lots differ at %s (ANOVA method), and the pooled method has no between-lot term", condName(r.Condition))
		}
		if float64(r.Mean) <= 0 && why == "" {
			why = fmt.Sprintf("the mean at %s is not positive, so the values cannot be normalized", condName(r.Condition))
		}
		y := make([]float64, len(all))
		for j, v := range all {
			y[j] = v / float64(r.Mean)
		}
		norm = append(norm, y)
		N += len(y)
	}
	stepAll := func(name string, stat, thr float64, decision, reason string) {
		for _, i := range idx {
			res[i].step(name, stat, thr, decision, reason)
		}
	}
	if why != "" {
		stepAll("pooling across conditions", math.NaN(), math.NaN(), "not pooled", why)
		return
	}
	lev, err := stats.Levene(norm)
	if err != nil {
		stepAll("pooling across conditions: equal normalized variances (Levene)", math.NaN(), opt.LeveneAlpha, "not pooled", err.Error())
		return
	}
	equal := lev.P > opt.LeveneAlpha
	decision := "normalized variances equal"
	if !equal {
		decision = "normalized variances differ: not pooled"
	}
	stepAll("pooling across conditions: equal normalized variances (Levene)", lev.P, opt.LeveneAlpha, decision,
		fmt.Sprintf("median-centred Levene F %.4f on %d and %d degrees of freedom, p %.4f; equal when p exceeds %g", lev.F, lev.DF1, lev.DF2, lev.P, opt.LeveneAlpha))
	if !equal {
		return
	}
	ad, err := stats.ADNormal(flatten(norm))
	if err != nil {
		stepAll("pooling across conditions: normality of the pooled normalized values", math.NaN(), opt.PoolOSLMin, "not pooled", err.Error())
		return
	}
	normal := ad.OSL > opt.PoolOSLMin
	decision = "normal: pooled"
	if !normal {
		decision = "not normal: not pooled"
	}
	stepAll("pooling across conditions: normality of the pooled normalized values (Anderson-Darling)", ad.OSL, opt.PoolOSLMin, decision,
		fmt.Sprintf("OSL %.4f on %d normalized values; accepted when the OSL exceeds %g", ad.OSL, ad.N, opt.PoolOSLMin))
	if !normal {
		return
	}
	m := len(idx)
	df := N - m
	var ss float64
	for _, y := range norm {
		s, _ := stats.Describe(y)
		ss += float64(len(y)-1) * s.SD * s.SD
	}
	cv := math.Sqrt(ss / float64(df))
	for _, i := range idx {
		r := &res[i]
		kA, errA := pooledK(r.N, df, opt.A)
		kB, errB := pooledK(r.N, df, opt.B)
		p := &Pooled{Conditions: conds, N: N, CV: lots.Float(cv), DF: df, ABasis: lots.NaN, BBasis: lots.NaN, AFactor: lots.NaN, BFactor: lots.NaN}
		if errA == nil {
			p.AFactor, p.ABasis = lots.Float(kA), lots.Float(float64(r.Mean)*(1-kA*cv))
		}
		if errB == nil {
			p.BFactor, p.BBasis = lots.Float(kB), lots.Float(float64(r.Mean)*(1-kB*cv))
		}
		r.Pooled = p
		r.step("pooled design values", cv, math.NaN(), fmt.Sprintf("A %.4g, B %.4g (pooled over %d conditions)", float64(p.ABasis), float64(p.BBasis), m),
			fmt.Sprintf("pooled CV %.5f on %d degrees of freedom; K_A %.4f, K_B %.4f from the noncentral t with n = %d", cv, df, float64(p.AFactor), float64(p.BFactor), r.N))
	}
}

// pooledK is the one-sided tolerance factor for n values whose SD is
// estimated on df degrees of freedom: K = t'_γ(df, z_p √n)/√n.
func pooledK(n, df int, l Level) (float64, error) {
	zp := distuv.UnitNormal.Quantile(l.Content)
	sn := math.Sqrt(float64(n))
	t, err := stats.NoncentralTQuantile(l.Confidence, float64(df), zp*sn)
	if err != nil {
		return math.NaN(), err
	}
	return t / sn, nil
}

func condName(c string) string {
	if c == "" {
		return "the unnamed condition"
	}
	return c
}
