package stats

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"
)

// smallSample draws a random small sample (n = 2..10) from one of several
// positive populations, sometimes rounded so that ties occur.
func smallSample(rng *rand.Rand, n int) ([]float64, string) {
	x := make([]float64, n)
	kind := rng.IntN(5)
	shape := 2 + 28*rng.Float64()
	for i := range x {
		switch kind {
		case 0:
			x[i] = 100 + 5*rng.NormFloat64()
		case 1: // Weibull, shape 2 to 30
			x[i] = 100 * math.Pow(rng.ExpFloat64(), 1/shape)
		case 2:
			x[i] = math.Exp(4.6 + 0.2*rng.NormFloat64())
		case 3:
			x[i] = 50 + 10*rng.Float64()
		case 4: // rounded normal: ties
			x[i] = math.Round(200 + 2*rng.NormFloat64())
		}
	}
	return x, []string{"normal", "weibull", "lognormal", "uniform", "rounded"}[kind]
}

var (
	propContents = []float64{0.80, 0.90, 0.95, 0.99}
	propConfs    = []float64{0.90, 0.95, 0.99}
)

// TestBoundsMonotoneSmallSamples: over random small samples (n = 2..10)
// and every bound method, the bound never rises when the content or the
// confidence rises (a larger fraction above it, or more confidence, can
// only lower a one-sided lower tolerance bound; common practice, and the
// defining property of the tolerance factors: Owen 1968 for k, Thoman,
// Bain and Antle 1970 for the Weibull pivot, Hanson and Koopmans 1964).
// The Hanson-Koopmans rank is held fixed across the grid (the handbook
// rank applies at one level only; see TestBasisOrderSmallSamples for
// what the procedure applies at its two levels).
func TestBoundsMonotoneSmallSamples(t *testing.T) {
	rng := rand.New(rand.NewPCG(16, 2026))
	type method struct {
		name  string
		minN  int
		bound func(x []float64, p, g float64) (Bound, error)
	}
	methods := []method{
		{"normal", 2, NormalLowerBound},
		{"lognormal", 2, LognormalLowerBound},
		{"nonparametric (rank n)", 2, func(x []float64, p, g float64) (Bound, error) {
			return NonparametricLowerBound(x, p, g, NonparametricOptions{HKRank: len(x)})
		}},
		{"nonparametric (rank 2)", 2, func(x []float64, p, g float64) (Bound, error) {
			return NonparametricLowerBound(x, p, g, NonparametricOptions{HKRank: 2})
		}},
		{"anova (2 lots)", 4, func(x []float64, p, g float64) (Bound, error) {
			h := len(x) / 2
			return ANOVALowerBound([][]float64{x[:h], x[h:]}, p, g)
		}},
	}
	checked := 0
	check := func(m string, x []float64, grid [][]float64) {
		t.Helper()
		for i, p := range propContents {
			for j, g := range propConfs {
				v := grid[i][j]
				if math.IsNaN(v) {
					continue
				}
				checked++
				if i > 0 && !math.IsNaN(grid[i-1][j]) && v > grid[i-1][j]*(1+1e-12)+1e-300 {
					t.Errorf("%s %v: bound %.10g at content %g above %.10g at %g (confidence %g)", m, x, v, p, grid[i-1][j], propContents[i-1], g)
				}
				if j > 0 && !math.IsNaN(grid[i][j-1]) && v > grid[i][j-1]*(1+1e-12)+1e-300 {
					t.Errorf("%s %v: bound %.10g at confidence %g above %.10g at %g (content %g)", m, x, v, g, grid[i][j-1], propConfs[j-1], p)
				}
			}
		}
	}
	for rep := range 63 {
		n := 2 + rep%9
		x, kind := smallSample(rng, n)
		ms := methods
		if rep%7 == 1 && n >= 3 {
			// The exact Weibull bound (Monte Carlo, same seed at every
			// level, so the same simulated samples).
			ms = append(ms, method{"weibull-exact", 3, func(x []float64, p, g float64) (Bound, error) {
				return WeibullLowerBound(x, p, g, WeibullMCOptions{Sims: 1000, Seed: 9})
			}})
		}
		for _, m := range ms {
			if n < m.minN {
				continue
			}
			grid := make([][]float64, len(propContents))
			for i, p := range propContents {
				grid[i] = make([]float64, len(propConfs))
				for j, g := range propConfs {
					b, err := m.bound(x, p, g)
					grid[i][j] = math.NaN()
					if err == nil {
						grid[i][j] = b.Value
					}
				}
			}
			check(fmt.Sprintf("%s (%s sample)", m.name, kind), x, grid)
		}
	}
	if checked < 3000 {
		t.Errorf("only %d bounds checked", checked)
	}
}

// TestHansonKoopmansBasisOrder: the procedure's Hanson-Koopmans A-basis
// value (rank n, content 0.99) is never above its B-basis value (handbook
// rank r of CMH-17-1G Table 8.5.14, content 0.90), for any data: in logs
// both are ln x(1) - (k - 1) d with d = ln x(r) - ln x(1) and d(n) >= d(r),
// so it suffices that k_A(n, n) >= k_B(n, r) >= 1 for n = 2..28.
func TestHansonKoopmansBasisOrder(t *testing.T) {
	for n := 2; n <= 28; n++ {
		rb := HansonKoopmansRank(n, 0.90, 0.95)
		ra := HansonKoopmansRank(n, 0.99, 0.95)
		kb, err1 := HansonKoopmansK(n, rb, 0.90, 0.95)
		ka, err2 := HansonKoopmansK(n, ra, 0.99, 0.95)
		if err1 != nil || err2 != nil || ra != n || !(ka >= kb) || !(kb >= 1) {
			t.Errorf("n=%d: A rank %d k %.4f, B rank %d k %.4f (%v %v)", n, ra, ka, rb, kb, err1, err2)
		}
	}
}
