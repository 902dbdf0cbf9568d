package stats

import "testing"

// BenchmarkNormalKTable computes the full one-sided normal factor table,
// n = 2..100,000 at the A-basis (0.99/0.95) and B-basis (0.90/0.95) levels
// (199,998 factors per iteration).
func BenchmarkNormalKTable(b *testing.B) {
	for b.Loop() {
		for _, p := range []float64{0.99, 0.90} {
			for n := 2; n <= 100000; n++ {
				if _, err := NormalK(n, p, 0.95); err != nil {
					b.Fatal(err)
				}
			}
		}
	}
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
