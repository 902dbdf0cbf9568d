package stats

import (
	"math"
	"testing"
)

// solveNoncentralityIllinois is the root finder TailFractionBound used
// before the Halley solver (bracket grown in steps of the approximate
// spread of T, then the Illinois method to 1e-12 in delta; Dowell and
// Jarratt 1971, BIT 11:168), kept here as the baseline for the benchmark
// and the cross-check below. It counts CDF passes and integrand evaluations.
func solveNoncentralityIllinois(t, df, target float64) (float64, ncSolveStats) {
	var st ncSolveStats
	q := newNTDF(df)
	f := func(d float64) float64 {
		r := q.pass(t, d, false, false, false)
		st.checked++
		st.evals += r.evals
		return r.lower - target
	}
	sd := math.Sqrt(1 + t*t/(2*df))
	step := 1.5 * sd
	lo, hi := t-step, t+step
	for i := 0; f(lo) < 0; i++ {
		if i > 40 {
			return math.NaN(), st
		}
		hi = lo
		lo -= step
		step *= 1.6
	}
	step = 1.5 * sd
	for i := 0; f(hi) > 0; i++ {
		if i > 40 {
			return math.NaN(), st
		}
		lo = hi
		hi += step
		step *= 1.6
	}
	flo, fhi := f(lo), f(hi)
	side := 0
	for range 200 {
		if flo == 0 {
			return lo, st
		}
		if fhi == 0 {
			return hi, st
		}
		x := (lo*fhi - hi*flo) / (fhi - flo)
		if !(x > lo && x < hi) {
			x = 0.5 * (lo + hi)
		}
		fx := f(x)
		if fx > 0 {
			lo, flo = x, fx
			if side == -1 {
				fhi /= 2
			}
			side = -1
		} else {
			hi, fhi = x, fx
			if side == 1 {
				flo /= 2
			}
			side = 1
		}
		if hi-lo <= 1e-12*math.Max(1, math.Abs(x)) || fx == 0 {
			return x, st
		}
	}
	return 0.5 * (lo + hi), st
}

// ncBenchCases are typical acceptance inputs: lot sizes 3 to 100 and
// standardised margins q = (mean - limit)/SD from a lot below its limit to
// one far above it, at the usual confidence levels, both tails.
func ncBenchCases() (cases []struct {
	n         int
	q, gamma  float64
	upperTail bool
}) {
	for _, n := range []int{3, 4, 5, 6, 8, 10, 12, 15, 20, 25, 30, 40, 50, 60, 80, 100} {
		for _, q := range []float64{-0.5, 0.5, 1.0, 1.5, 2.0, 2.5, 3.0, 4.0, 5.0, 7.0} {
			for _, g := range []float64{0.90, 0.95} {
				for _, up := range []bool{true, false} {
					cases = append(cases, struct {
						n         int
						q, gamma  float64
						upperTail bool
					}{n, q, g, up})
				}
			}
		}
	}
	return cases
}

// TestSolveNoncentralityMatchesIllinois: the Halley solver and the former
// Illinois solver (both on the same CDF) give the same fraction bounds to
// 1e-10 relative (or 1e-16 absolute) on the typical acceptance grid and at
// larger n; both stop at about 1e-12 in delta.
func TestSolveNoncentralityMatchesIllinois(t *testing.T) {
	cases := ncBenchCases()
	for _, n := range []int{2, 200, 1000, 10000} {
		for _, q := range []float64{-3, 0, 1, 2.5, 6} {
			for _, up := range []bool{true, false} {
				cases = append(cases, struct {
					n         int
					q, gamma  float64
					upperTail bool
				}{n, q, 0.99, up})
			}
		}
	}
	worst := 0.0
	for _, c := range cases {
		target := c.gamma
		if !c.upperTail {
			target = 1 - c.gamma
		}
		rn := math.Sqrt(float64(c.n))
		dNew, st, err := solveNoncentralityCount(rn*c.q, float64(c.n-1), target)
		if err != nil {
			t.Fatal(err)
		}
		dOld, _ := solveNoncentralityIllinois(rn*c.q, float64(c.n-1), target)
		pNew, pOld := normalCDF(-dNew/rn), normalCDF(-dOld/rn)
		e := math.Abs(pNew-pOld) / pOld
		if math.Abs(pNew-pOld) > 1e-16 {
			worst = math.Max(worst, e)
		}
		if math.Abs(pNew-pOld) > 1e-16+1e-10*pOld {
			t.Errorf("n=%d q=%g gamma=%g upper=%v: Halley %.15g (delta %.15g, %d+%d passes), Illinois %.15g (delta %.15g)",
				c.n, c.q, c.gamma, c.upperTail, pNew, dNew, st.focused, st.checked, pOld, dOld)
		}
	}
	t.Logf("%d cases, worst relative difference %.2g", len(cases), worst)
}

// TestSolveNoncentralityExtremes: far-out margins and tiny samples (where
// the start is poor and the tails are tiny) converge, to the same bound as
// the Illinois solver within 1e-9 relative.
func TestSolveNoncentralityExtremes(t *testing.T) {
	for _, n := range []int{2, 3, 1000, 100000} {
		for _, q := range []float64{-20, -5, 0, 10, 30} {
			for _, g := range []float64{0.5001, 0.999} {
				for _, up := range []bool{true, false} {
					target := g
					if !up {
						target = 1 - g
					}
					rn := math.Sqrt(float64(n))
					dNew, st, err := solveNoncentralityCount(rn*q, float64(n-1), target)
					if err != nil {
						t.Fatalf("n=%d q=%g target=%g: %v", n, q, target, err)
					}
					dOld, _ := solveNoncentralityIllinois(rn*q, float64(n-1), target)
					pNew, pOld := normalCDF(-dNew/rn), normalCDF(-dOld/rn)
					if math.Abs(pNew-pOld) > 1e-300+1e-9*pOld {
						t.Errorf("n=%d q=%g target=%g: %.15g (%d+%d passes), Illinois %.15g", n, q, target, pNew, st.focused, st.checked, pOld)
					}
				}
			}
		}
	}
}

// BenchmarkTailFractionBound solves the fraction bound for the typical
// acceptance grid (ncBenchCases, 640 solves per op is reported per solve),
// with the Halley solver on focused passes and, for comparison in the same run, the former
// Illinois solver. Metrics: ns per solve, CDF passes per solve (rough and
// checked), integrand evaluations per solve.
func BenchmarkTailFractionBound(b *testing.B) {
	cases := ncBenchCases()
	type solver func(t, df, target float64) (float64, ncSolveStats)
	for _, s := range []struct {
		name string
		f    solver
	}{
		{"halley", func(t, df, target float64) (float64, ncSolveStats) {
			d, st, err := solveNoncentralityCount(t, df, target)
			if err != nil {
				b.Fatal(err)
			}
			return d, st
		}},
		{"illinois", solveNoncentralityIllinois},
	} {
		b.Run(s.name, func(b *testing.B) {
			var tot ncSolveStats
			solves := 0
			for b.Loop() {
				for _, c := range cases {
					target := c.gamma
					if !c.upperTail {
						target = 1 - c.gamma
					}
					rn := math.Sqrt(float64(c.n))
					_, st := s.f(rn*c.q, float64(c.n-1), target)
					tot.focused += st.focused
					tot.checked += st.checked
					tot.evals += st.evals
					solves++
				}
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(solves), "ns/solve")
			b.ReportMetric(float64(tot.focused+tot.checked)/float64(solves), "passes/solve")
			b.ReportMetric(float64(tot.checked)/float64(solves), "checked-passes/solve")
			b.ReportMetric(float64(tot.evals)/float64(solves), "evals/solve")
		})
	}
}
