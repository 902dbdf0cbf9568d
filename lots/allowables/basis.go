package allowables

import (
	"errors"
	"fmt"
	"math"
	"sort"
	"strings"

	"lotproof/lots"
	"lotproof/stats"
)

// bound computes one level's bound by the named method over the lots'
// values (each method's formula and source are in its stats doc comment).
func bound(method string, values [][]float64, l Level, opt Options) (stats.Bound, error) {
	all := flatten(values)
	switch method {
	case Normal:
		return stats.NormalLowerBound(all, l.Content, l.Confidence)
	case Lognormal:
		return stats.LognormalLowerBound(all, l.Content, l.Confidence)
	case Weibull:
		// At the two usual levels the exact pivotal factor from the
		// built-in table up to 100 values and the handbook closed form
		// above (stats.WeibullBasisV); the exact pivotal factor by Monte
		// Carlo at any other level.
		if b, err := stats.WeibullBasisLowerBound(all, l.Content, l.Confidence); err == nil || !errors.Is(err, stats.ErrDomain) {
			return b, err
		}
		fallthrough
	case WeibullExact:
		return stats.WeibullLowerBound(all, l.Content, l.Confidence, stats.WeibullMCOptions{Sims: opt.Sims, Seed: opt.Seed})
	case Nonparametric:
		// The order statistic when n is large enough for the level,
		// otherwise Hanson-Koopmans with the handbook's rank
		// (stats.HansonKoopmansRank).
		return stats.NonparametricLowerBound(all, l.Content, l.Confidence, stats.NonparametricOptions{})
	case HansonKoop:
		return hansonKoopmans(all, l)
	case ANOVA:
		return stats.ANOVALowerBound(values, l.Content, l.Confidence)
	case RandomEffects:
		// A named choice, never the automatic one: the lot-aware bound of
		// the one-way random-effects model by generalized pivots
		// (stats.RandomEffectsLowerBound), normal lots.
		return stats.RandomEffectsLowerBound(values, l.Content, l.Confidence, stats.GPQOptions{Sims: opt.Sims, Seed: opt.Seed})
	case RandomEffectsWeibull:
		// The random-effects bound on the logarithms with Weibull values
		// within lots (stats.RandomEffectsLowerBounds).
		logs, err := logValues(values)
		if err != nil {
			return stats.Bound{}, err
		}
		bs, err := stats.RandomEffectsLowerBounds(logs, []float64{l.Content}, l.Confidence, stats.WithinSEV,
			stats.GPQOptions{Sims: opt.Sims, Seed: opt.Seed, SEVTables: []stats.SEVTable{sevTable(1 - l.Content)}})
		if err != nil {
			return stats.Bound{}, err
		}
		return expBound(bs[0]), nil
	}
	return stats.Bound{}, fmt.Errorf("unknown method %q", method)
}

// computeBasis computes the A- and B-basis values of r by r.Method. The
// nonparametric methods use the order statistic where n is large enough
// for the level and Hanson-Koopmans below that (A-basis below 299 values,
// B-basis below 29; CMH-17-1G 8.3.4.5), as stats.NonparametricLowerBound
// decides; the method actually used is recorded per level. The lot-aware
// method (the default) takes, per level, the lowest of the handbook bound
// and the lot-aware bounds (lotAwareBounds).
func computeBasis(r *Result, opt Options) error {
	var guards map[string][]candidate
	if r.Method == LotAware {
		guards = lotAwareBounds(r, opt)
	}
	for _, lv := range []struct {
		name string
		l    Level
		dst  *Basis
		val  *lots.Float
	}{{"A", opt.A, &r.A, &r.ABasis}, {"B", opt.B, &r.B, &r.BBasis}} {
		method := r.Method
		if method == LotAware {
			method = r.AutoMethod
		}
		b, err := bound(method, r.values, lv.l, opt)
		if r.Method == LotAware {
			// The lowest of the handbook bound and the lot-aware bounds:
			// its coverage is at least the largest of their coverages (the
			// lowest lies below the percentile whenever any of them does).
			for _, c := range guards[lv.name] {
				switch {
				case c.err != nil:
					r.step(lv.name+"-basis: "+c.words, math.NaN(), math.NaN(), "not defined", c.err.Error())
				case err != nil || c.b.Value < b.Value:
					why := "lower than the " + method + " bound"
					if err != nil {
						why = "the " + method + " bound is not defined"
					}
					r.step(lv.name+"-basis: "+c.words, c.b.Value, math.NaN(), c.b.Method+" bound used", why)
					b, err, method = c.b, nil, c.b.Method
				default:
					r.step(lv.name+"-basis: "+c.words, c.b.Value, b.Value, method+" bound kept", "the "+c.words+" bound is not lower")
				}
			}
			if err == nil {
				if lv.name == "B" {
					r.usedB = method
				}
			}
		}
		if err == nil && b.Method != "" {
			method = b.Method
		}
		*lv.dst = Basis{Value: lots.NaN, Factor: lots.NaN, MCStdErr: lots.NaN, Content: lv.l.Content, Confidence: lv.l.Confidence}
		*lv.val = lots.NaN
		if err != nil {
			// A bound that is not defined (too few values for the level)
			// is reported as missing with the reason, not as an error,
			// when the other level can still be given.
			lv.dst.Note = err.Error()
			r.step(lv.name+"-basis", math.NaN(), math.NaN(), "not defined", err.Error())
			r.warn("no %s-basis value: %v", lv.name, err)
			continue
		}
		lv.dst.Value, lv.dst.Factor, lv.dst.Method = lots.Float(b.Value), lots.Float(b.Factor), method
		if b.MCStdErr > 0 {
			lv.dst.MCStdErr = lots.Float(b.MCStdErr)
		}
		if method != r.Method {
			lv.dst.Note = "by " + method
		}
		for _, n := range b.Notes {
			if n != stats.DesignValueCaution && !strings.Contains(lv.dst.Note, n) {
				lv.dst.Note = strings.TrimPrefix(lv.dst.Note+"; "+n, "; ")
			}
		}
		*lv.val = lots.Float(b.Value)
		for k, v := range b.Params {
			r.Parameters[paramKey(k)] = lots.Float(v)
		}
		reason := fmt.Sprintf("%s method, n %d, content %g, confidence %g", method, b.N, lv.l.Content, lv.l.Confidence)
		if !math.IsNaN(b.Factor) {
			reason += fmt.Sprintf(", factor %.5g", b.Factor)
		}
		if b.MCStdErr > 0 {
			reason += fmt.Sprintf(", Monte Carlo standard error %.3g (%d samples, seed %d)", b.MCStdErr, int(b.Params["sims"]), uint64(b.Params["seed"]))
		}
		if ps := paramText(b.Params); ps != "" {
			reason += "; " + ps
		}
		r.step(lv.name+"-basis", b.Value, math.NaN(), fmt.Sprintf("%.5g", b.Value), reason)
	}
	if math.IsNaN(float64(r.ABasis)) && math.IsNaN(float64(r.BBasis)) {
		return fmt.Errorf("neither an A- nor a B-basis value is defined by the %s method: %s", r.Method, r.B.Note)
	}
	return nil
}

func paramText(p map[string]float64) string {
	keys := make([]string, 0, len(p))
	for k := range p {
		if k == "sims" || k == "seed" {
			continue // stated with the Monte Carlo standard error
		}
		keys = append(keys, k)
	}
	sort.Strings(keys)
	var parts []string
	for _, k := range keys {
		parts = append(parts, fmt.Sprintf("%s %.6g", paramWord(k), p[k]))
	}
	return strings.Join(parts, ", ")
}

// hansonKoopmans is the Hanson-Koopmans (1964) bound x_(r) (x_(1)/x_(r))^k
// whatever n (the forced method; the automatic choice uses it only below
// the order-statistic minimum), with the handbook's r
// (stats.HansonKoopmansRank) and k from stats.HansonKoopmansK.
func hansonKoopmans(x []float64, l Level) (stats.Bound, error) {
	n := len(x)
	if n < 2 {
		return stats.Bound{}, fmt.Errorf("the Hanson-Koopmans bound needs at least 2 values")
	}
	s := append([]float64(nil), x...)
	sort.Float64s(s)
	if s[0] <= 0 {
		return stats.Bound{}, fmt.Errorf("the Hanson-Koopmans bound needs positive values (smallest %g)", s[0])
	}
	r := stats.HansonKoopmansRank(n, l.Content, l.Confidence)
	k, err := stats.HansonKoopmansK(n, r, l.Content, l.Confidence)
	if err != nil {
		return stats.Bound{}, err
	}
	return stats.Bound{Value: s[r-1] * math.Pow(s[0]/s[r-1], k), Factor: k, Method: HansonKoop, N: n,
		Content: l.Content, Confidence: l.Confidence, Params: map[string]float64{"x1": s[0], "xr": s[r-1], "rank": float64(r)}}, nil
}
