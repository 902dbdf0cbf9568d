package stats

import (
	"runtime"
	"testing"
)

// BenchmarkNormalKTable computes the full one-sided normal factor table,
// n = 2..100,000 at the A-basis (0.99/0.95) and B-basis (0.90/0.95) levels
// (199,998 factors per iteration): "table" by NormalKTable (what `factors`
// uses; all cores, so compare CPU time, not wall time, when cores differ),
// "table-1core" the same on one goroutine, and "each" by NormalK one at a
// time (the former route). Metric: ns per factor (wall clock).
func BenchmarkNormalKTable(b *testing.B) {
	var ns []int
	for n := 2; n <= 100000; n++ {
		ns = append(ns, n)
	}
	table := func(b *testing.B) {
		for b.Loop() {
			for _, p := range []float64{0.99, 0.90} {
				if _, err := NormalKTable(ns, p, 0.95); err != nil {
					b.Fatal(err)
				}
			}
		}
		b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N*2*len(ns)), "ns/factor")
	}
	b.Run("table", table)
	b.Run("table-1core", func(b *testing.B) {
		prev := runtime.GOMAXPROCS(1)
		defer runtime.GOMAXPROCS(prev)
		table(b)
	})
	b.Run("each", func(b *testing.B) {
		for b.Loop() {
			for _, p := range []float64{0.99, 0.90} {
				for _, n := range ns {
					if _, err := NormalK(n, p, 0.95); err != nil {
						b.Fatal(err)
					}
				}
			}
		}
		b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N*2*len(ns)), "ns/factor")
	})
}

// BenchmarkWeibullPivot30 computes the exact Weibull factor for n = 30 from
// 10,000 simulations (all cores).
func BenchmarkWeibullPivot30(b *testing.B) {
	for b.Loop() {
		if _, err := WeibullPivotFactor(30, 0.90, 0.95, WeibullMCOptions{Sims: 10000, Seed: 1}); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkWeibullPivot30OneCore is the same with one worker.
func BenchmarkWeibullPivot30OneCore(b *testing.B) {
	for b.Loop() {
		if _, err := WeibullPivotFactor(30, 0.90, 0.95, WeibullMCOptions{Sims: 10000, Seed: 1, Workers: 1}); err != nil {
			b.Fatal(err)
		}
	}
}
