package allowables

import (
	"fmt"
	"math"
	"sync"

	"lotproof/stats"
)

var levelNames = [2]string{"A", "B"}

// candidate is one lot-aware bound at one level.
type candidate struct {
	words string // for the audit trail
	b     stats.Bound
	err   error
}

// lotAwareBounds are the bounds the lot-aware method compares with the
// handbook bound, per level ("A", "B"), with two or more lots:
//
//   - the random-effects bound of normal lots on the values
//     (stats.RandomEffectsLowerBounds, normal within lots);
//   - the random-effects bound on the logarithms of the values with
//     Weibull values within lots (smallest extreme value on the log
//     scale) and a lognormal lot factor, when every value is positive.
func lotAwareBounds(r *Result, opt Options) map[string][]candidate {
	out := map[string][]candidate{}
	if r.Lots < 2 {
		return out
	}
	for i, c := range reBounds(r.values, opt, stats.WithinNormal) {
		out[levelNames[i]] = append(out[levelNames[i]], c)
	}
	if logs, err := logValues(r.values); err == nil {
		for i, c := range reBounds(logs, opt, stats.WithinSEV) {
			if c.err == nil {
				c.b = expBound(c.b)
			}
			out[levelNames[i]] = append(out[levelNames[i]], c)
		}
	}
	return out
}

// reBounds are the random-effects bounds at the A and B levels, from one
// set of pivots when the two confidences are equal.
func reBounds(values [][]float64, opt Options, within string) [2]candidate {
	words := "random effects, normal lots"
	method := RandomEffects
	if within == stats.WithinSEV {
		words = "random effects, Weibull lots"
		method = RandomEffectsWeibull
	}
	var out [2]candidate
	g := stats.GPQOptions{Sims: LotAwareSims(opt.Sims), Seed: opt.Seed}
	levels := []Level{opt.A, opt.B}
	if opt.A.Confidence == opt.B.Confidence {
		if within == stats.WithinSEV {
			g.SEVTables = []stats.SEVTable{sevTable(1 - opt.A.Content), sevTable(1 - opt.B.Content)}
		}
		bs, err := stats.RandomEffectsLowerBounds(values, []float64{opt.A.Content, opt.B.Content}, opt.A.Confidence, within, g)
		for i := range out {
			out[i] = candidate{words: words, err: err}
			if err == nil {
				out[i].b = bs[i]
				out[i].b.Method = method
			}
		}
		return out
	}
	for i, l := range levels {
		g.SEVTables = nil
		if within == stats.WithinSEV {
			g.SEVTables = []stats.SEVTable{sevTable(1 - l.Content)}
		}
		bs, err := stats.RandomEffectsLowerBounds(values, []float64{l.Content}, l.Confidence, within, g)
		out[i] = candidate{words: words, err: err}
		if err == nil {
			out[i].b = bs[0]
			out[i].b.Method = method
		}
	}
	return out
}

// logValues are the natural logarithms of the values, an error when one
// is not positive.
func logValues(values [][]float64) ([][]float64, error) {
	logs := make([][]float64, len(values))
	for i, v := range values {
		logs[i] = make([]float64, len(v))
		for j, x := range v {
			if !(x > 0) {
				return nil, fmt.Errorf("the random-effects bound on the logarithms needs positive values (lot %d has %g)", i+1, x)
			}
			logs[i][j] = math.Log(x)
		}
	}
	return logs, nil
}

// expBound turns a bound on the logarithms into one on the values (the
// Monte Carlo standard error by the delta method).
func expBound(b stats.Bound) stats.Bound {
	b.Params["logBound"] = b.Value
	b.Value = math.Exp(b.Value)
	b.MCStdErr *= b.Value
	b.Method = RandomEffectsWeibull
	return b
}

// LotAwareSims is the number of pivots the lot-aware bounds draw: four
// tenths of the Monte Carlo samples asked for (4,000 by default), at least
// 1,000. Their Monte Carlo error is small beside the bounds' own sampling
// spread, and the default runs on every analysis and every simulated
// campaign.
func LotAwareSims(sims int) int { return max(1000, sims*2/5) }

// sevTables holds stats.NewSEVTable per tail probability: a pure function
// of its argument, computed once per level for all analyses.
var sevTables sync.Map // float64 -> stats.SEVTable

func sevTable(alpha float64) stats.SEVTable {
	if t, ok := sevTables.Load(alpha); ok {
		return t.(stats.SEVTable)
	}
	t := stats.NewSEVTable(alpha)
	sevTables.Store(alpha, t)
	return t
}
