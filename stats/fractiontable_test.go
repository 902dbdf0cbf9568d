package stats

import (
	"math"
	"math/rand/v2"
	"sync"
	"testing"
)

// TestFactorsTailFractionBoundMatchesDirect checks the interpolated
// fraction bounds (fractiontable.go) against the direct solve over sizes
// from 2 to 2001, three confidences, both sides and margins from -6 to 40
// (fractions from near 1 down to underflow). The direct solve is itself
// checked against scipy.stats.nct in nonconforming_test.go; this test is
// the interpolation error alone. Tolerance: 1e-11 relative on the fraction
// where it is above 1e-300 (an error of 1e-13 in the noncentrality moves
// the fraction by at most about 40 times that, relative, at the smallest
// fractions), and 1e-13 in the noncentrality itself.
func TestFactorsTailFractionBoundMatchesDirect(t *testing.T) {
	r := rand.New(rand.NewPCG(12, 13))
	f := NewFactors()
	worst, worstD, tested := 0.0, 0.0, 0
	for _, n := range []int{2, 3, 4, 5, 10, 30, 50, 100, 200, 1000, 2001} {
		for _, g := range []float64{0.90, 0.95, 0.99} {
			for _, upper := range []bool{true, false} {
				for range 60 {
					q := -6 + 46*r.Float64()*r.Float64()
					got, err := f.TailFractionBound(n, q, g, upper)
					want, err2 := TailFractionBound(n, q, g, upper)
					if err != nil || err2 != nil {
						t.Fatalf("n %d q %g: %v / %v", n, q, err, err2)
					}
					if want > 1e-300 {
						e := math.Abs(got-want) / want
						worst = math.Max(worst, e)
						if e > 1e-11 {
							t.Errorf("n %d q %.6g gamma %g upper %v: interpolated %.17g, direct %.17g (rel %.2e)", n, q, g, upper, got, want, e)
						}
						// The noncentralities behind them.
						dg, dw := -math.Sqrt(float64(n))*normalQuantile(got), -math.Sqrt(float64(n))*normalQuantile(want)
						if want < 0.5 && got < 0.5 {
							ed := math.Abs(dg-dw) / math.Max(1, math.Abs(dw))
							if !math.IsNaN(ed) {
								worstD = math.Max(worstD, ed)
							}
						}
						tested++
					} else if got > 1e-290 {
						t.Errorf("n %d q %g: interpolated %g where the direct solve underflows (%g)", n, q, got, want)
					}
				}
			}
		}
	}
	t.Logf("%d cases: worst relative difference %.2e in the fraction, %.2e in the noncentrality", tested, worst, worstD)
	f.mu.Lock()
	defer f.mu.Unlock()
	direct, built := 0, 0
	for _, tab := range f.frac {
		for i := range tab.panels {
			p := &tab.panels[i]
			p.once.Do(func() {}) // panels never used stay unbuilt
			if p.coef != [fracNodes]float64{} {
				built++
				if !p.ok {
					direct++
				}
			}
		}
	}
	t.Logf("%d panels built, %d of them left to the direct solve by their checks", built, direct)
	if direct > built/10 {
		t.Errorf("%d of %d panels failed their checks: the interpolation is not doing its job", direct, built)
	}
}

// TestFactorsTailFractionBoundConcurrent: many goroutines on one cache get
// the same values as one (the panels are built once).
func TestFactorsTailFractionBoundConcurrent(t *testing.T) {
	qs := []float64{-1.2, 0.3, 1.7, 2.9, 4.4, 7.5}
	one := NewFactors()
	want := make([]float64, len(qs))
	for i, q := range qs {
		want[i], _ = one.TailFractionBound(12, q, 0.95, true)
	}
	f := NewFactors()
	var wg sync.WaitGroup
	for range 8 {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i, q := range qs {
				if got, _ := f.TailFractionBound(12, q, 0.95, true); got != want[i] {
					t.Errorf("q %g: %g concurrently, %g alone", q, got, want[i])
				}
			}
		}()
	}
	wg.Wait()
}

// BenchmarkFactorsTailFractionBound: the typical acceptance inputs of
// BenchmarkTailFractionBound through the interpolating cache (panels built
// in the first iterations).
func BenchmarkFactorsTailFractionBound(b *testing.B) {
	f := NewFactors()
	qs := make([]float64, 640)
	r := rand.New(rand.NewPCG(1, 2))
	for i := range qs {
		qs[i] = 1 + 4*r.Float64()
	}
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := f.TailFractionBound(50, qs[i%len(qs)], 0.95, i%2 == 0); err != nil {
			b.Fatal(err)
		}
	}
}
