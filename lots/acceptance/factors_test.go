package acceptance

import (
	"math"
	"testing"

	"lotproof/stats"
)

// The remembered factors are stats.NormalK and stats.MeanLowerBound to the
// last bit, on the first call and on later ones, and errors are the same.
func TestFactorsSameAsStats(t *testing.T) {
	f := newFactors()
	for pass := 0; pass < 2; pass++ {
		for _, n := range []int{1, 2, 3, 5, 10, 50, 1000} {
			for _, g := range []float64{0.5, 0.9, 0.95, 0.99} {
				for _, x := range [][2]float64{{1000, 12.5}, {-3.25, 0.001}, {930, 0}, {1e6, 3e4}, {math.NaN(), 1}, {1, math.Inf(1)}} {
					got, gerr := f.meanLowerBound(n, x[0], x[1], g)
					want, werr := stats.MeanLowerBound(n, x[0], x[1], g)
					if (gerr == nil) != (werr == nil) || math.Float64bits(got) != math.Float64bits(want) && !(math.IsNaN(got) && math.IsNaN(want)) {
						t.Errorf("pass %d, mean bound n=%d gamma=%g %v: %v (%v), stats %v (%v)", pass, n, g, x, got, gerr, want, werr)
					}
				}
				got, gerr := f.normalK(n, 0.9, g)
				want, werr := stats.NormalK(n, 0.9, g)
				if (gerr == nil) != (werr == nil) || math.Float64bits(got) != math.Float64bits(want) && !(math.IsNaN(got) && math.IsNaN(want)) {
					t.Errorf("pass %d, k n=%d gamma=%g: %v (%v), stats %v (%v)", pass, n, g, got, gerr, want, werr)
				}
			}
		}
	}
}
