package allowables

import (
	"errors"
	"fmt"
	"math"
	"strings"

	"lotproof/stats"
)

// Minimum sample sizes of the order-statistic bounds at the usual levels
// (the smallest n whose lowest value is a bound: 1 - p^n >= gamma):
// 29 for B-basis and 299 for A-basis (CMH-17-1G 8.3.4.5; common practice).
const (
	minNonparamB = 29
	minNonparamA = 299
)

// chooseMethod makes the automatic choice and records it:
//
//  1. With two or more lots, the k-sample Anderson-Darling test at
//     LotAlpha: when the lots differ, the ANOVA method.
//  2. Otherwise the lots are pooled and the distributions are tried in the
//     order of preference Weibull, normal, lognormal (CMH-17-1G 8.3.4): the
//     first whose Anderson-Darling OSL exceeds OSLMin is used.
//  3. When none fits: the nonparametric order-statistic bound when n >= 29,
//     otherwise the Hanson-Koopmans bound.
func chooseMethod(r *Result, opt Options) (string, error) {
	if r.Lots >= 2 {
		ks, err := stats.KSampleAD(r.values, opt.LotAlpha)
		if err != nil {
			r.step("lot comparison (k-sample Anderson-Darling)", math.NaN(), math.NaN(), "not possible: lots pooled", err.Error())
			r.warn("the lots could not be compared (%v); they were pooled without a test", err)
		} else {
			decision := "lots indistinguishable: pooled"
			if ks.Differ {
				decision = "lots differ: ANOVA method"
			}
			r.step("lot comparison (k-sample Anderson-Darling)", ks.Statistic, ks.Critical, decision,
				fmt.Sprintf("k-sample Anderson-Darling statistic %.4f against critical value %.4f at alpha %g (Scholz and Stephens 1987; %d lots, %d values; standardized %.3f, %s)",
					ks.Statistic, ks.Critical, opt.LotAlpha, ks.K, ks.N, ks.Standardized, pText(ks.PValue, ks.PValueNote)))
			if ks.Differ {
				if r.Lots < FewLotsANOVA {
					r.warn("the lots differ and only %d lots were tested: the ANOVA method's between-lot variance rests on %d lots and its bound is very uncertain; common practice asks for at least %d", r.Lots, r.Lots, FewLotsANOVA)
				}
				return ANOVA, nil
			}
		}
	} else {
		r.step("lot comparison", math.NaN(), math.NaN(), "one lot only: no comparison",
			"the k-sample test needs two or more lots")
	}
	r.pooled = true
	all := flatten(r.values)
	type cand struct {
		name string
		test func([]float64) (stats.ADResult, error)
	}
	chosen := ""
	untested := 0
	for _, c := range []cand{{Weibull, stats.ADWeibull}, {Normal, stats.ADNormal}, {Lognormal, stats.ADLognormal}} {
		label := "goodness of fit: " + c.name + " (Anderson-Darling)"
		if (c.name == Weibull || c.name == Lognormal) && r.Min <= 0 {
			r.step(label, math.NaN(), opt.OSLMin, "not tested", "the "+c.name+" distribution needs positive values")
			continue
		}
		ad, err := c.test(all)
		if errors.Is(err, stats.ErrTooFew) {
			// Too few values for the rule's OSL (stats.ADNormalMinN): the
			// distribution is not assumed without a test.
			untested++
			r.step(label, math.NaN(), opt.OSLMin, "not enough values for a goodness-of-fit test", err.Error())
			continue
		}
		if err != nil {
			r.step(label, math.NaN(), opt.OSLMin, "not tested", err.Error())
			continue
		}
		fits := ad.OSL > opt.OSLMin
		decision := "rejected"
		switch {
		case fits && chosen == "":
			decision = "fits: chosen"
			chosen = c.name
		case fits:
			decision = "fits (a preferred distribution was already chosen)"
		}
		r.step(label, ad.OSL, opt.OSLMin, decision,
			fmt.Sprintf("OSL %.4f (A2 %.4f, modified %.4f, n %d); accepted when the OSL exceeds %g", ad.OSL, ad.Statistic, ad.Adjusted, ad.N, opt.OSLMin))
	}
	if chosen != "" {
		r.shape = chosen
		return chosen, nil
	}
	why := "no distribution fits"
	if untested > 0 {
		why = "no distribution fits or could be tested"
		r.warn("with %d values not every distribution can be checked by the Anderson-Darling test (normal and lognormal need at least %d values, Weibull at least %d); a distribution that cannot be checked is not assumed", r.N, stats.ADNormalMinN, stats.ADWeibullMinN)
	}
	if r.N >= minNonparamB {
		r.step("distribution choice", float64(r.N), minNonparamB, why+": nonparametric",
			fmt.Sprintf("order-statistic bound; n = %d is at least %d", r.N, minNonparamB))
		return Nonparametric, nil
	}
	r.step("distribution choice", float64(r.N), minNonparamB, why+": Hanson-Koopmans",
		fmt.Sprintf("distribution-free bound; n = %d is below %d, too few for the order-statistic B-basis bound", r.N, minNonparamB))
	return HansonKoop, nil
}

// pText is "p 0.1234", or the note when the p-value lies outside the
// tabulated range (the note says "p-value ...").
func pText(p float64, note string) string {
	if note != "" {
		return note
	}
	return fmt.Sprintf("p %.4f", p)
}

// campaignWarnings adds the warnings about the size and shape of the
// campaign (thresholds: see MinLotsB and the rest).
func campaignWarnings(r *Result) {
	if r.Lots == 1 {
		r.warn("all values come from one lot: the bounds describe that lot, not the lot-to-lot variation of production")
	}
	if short := shortfall(r, MinLotsB, MinSpecimensB); short != "" {
		r.warn("%s: common practice asks for at least %d lots and %d specimens for a B-basis value (CMH-17-1G Vol. 1 section 2.3)", short, MinLotsB, MinSpecimensB)
	}
	if short := shortfall(r, MinLotsA, MinSpecimensA); short != "" {
		r.warn("%s: common practice asks for at least %d lots and %d specimens for an A-basis value (CMH-17-1G Vol. 1 section 2.3; MMPDS asks for 100 observations from 10 lots for metals)", short, MinLotsA, MinSpecimensA)
	}
	min := float64(r.Min)
	if a := float64(r.ABasis); !math.IsNaN(a) && a > min {
		r.warn("the A-basis value %.4g lies above the lowest observed value %.4g: the fitted lower tail is lighter than the data suggest; check the low values and the distribution", a, min)
	}
	if b, sd := float64(r.BBasis), float64(r.SD); !math.IsNaN(b) && b > min+sd {
		r.warn("the B-basis value %.4g lies more than one standard deviation above the lowest observed value %.4g", b, min)
	}
	for _, v := range []struct {
		name  string
		value float64
	}{{"A", float64(r.ABasis)}, {"B", float64(r.BBasis)}} {
		if !math.IsNaN(v.value) && v.value <= 0 {
			r.warn("the %s-basis value is not positive: the data cannot support a %s-basis value by this method", v.name, v.name)
		}
	}
}

// shortfall says which of the campaign's counts fall short, or "".
func shortfall(r *Result, minLots, minN int) string {
	var parts []string
	if r.Lots < minLots {
		parts = append(parts, fmt.Sprintf("only %d lots", r.Lots))
	}
	if r.N < minN {
		parts = append(parts, fmt.Sprintf("only %d specimens", r.N))
	}
	return strings.Join(parts, " and ")
}
