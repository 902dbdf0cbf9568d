package stats

import (
	"errors"
	"math"
	"sync"
	"testing"
)

// TestFactorsCacheSameBits: the cached factors are the uncached functions'
// values bit for bit (the uncached functions are checked against scipy and
// mpmath in tolerance_test.go, noncentral_ref_test.go and
// nonconforming_test.go), on first and later calls.
func TestFactorsCacheSameBits(t *testing.T) {
	var c Factors // zero value is ready
	for _, n := range []int{2, 3, 10, 57, 1000} {
		for _, p := range []float64{0.90, 0.99} {
			for _, g := range []float64{0.5, 0.90, 0.95} {
				want, err := NormalK(n, p, g)
				if err != nil {
					t.Fatal(err)
				}
				wantM, err := MeanLowerBound(n, 10, 2, g)
				if err != nil {
					t.Fatal(err)
				}
				for range 2 {
					got, err := c.NormalK(n, p, g)
					if err != nil || math.Float64bits(got) != math.Float64bits(want) {
						t.Errorf("k(%d, %g, %g): cached %v (%v), direct %v", n, p, g, got, err, want)
					}
					gotM, err := c.MeanLowerBound(n, 10, 2, g)
					if err != nil || math.Float64bits(gotM) != math.Float64bits(wantM) {
						t.Errorf("mean bound(%d, %g): cached %v (%v), direct %v", n, g, gotM, err, wantM)
					}
				}
			}
		}
	}
	if len(c.k) != 5*2*3 || len(c.t) != 5*2 { // gamma 0.5 needs no t quantile
		t.Errorf("cache sizes %d and %d, want 30 and 10", len(c.k), len(c.t))
	}
}

// TestFactorsCacheErrors: bad arguments give the same errors as the
// uncached functions and are not stored.
func TestFactorsCacheErrors(t *testing.T) {
	c := NewFactors()
	if _, err := c.NormalK(1, 0.9, 0.95); !errors.Is(err, ErrTooFew) {
		t.Errorf("n = 1: %v", err)
	}
	if _, err := c.NormalK(5, math.NaN(), 0.95); !errors.Is(err, ErrDomain) {
		t.Errorf("NaN content: %v", err)
	}
	if _, err := c.MeanT(1, 0.95); !errors.Is(err, ErrTooFew) {
		t.Errorf("t, n = 1: %v", err)
	}
	if _, err := c.MeanT(5, 1); !errors.Is(err, ErrDomain) {
		t.Errorf("t, gamma = 1: %v", err)
	}
	if _, err := c.MeanLowerBound(5, 1, -1, 0.95); !errors.Is(err, ErrNonFinite) {
		t.Errorf("negative SD: %v", err)
	}
	if len(c.k)+len(c.t) != 0 {
		t.Errorf("bad arguments were cached: %d entries", len(c.k)+len(c.t))
	}
}

// TestFactorsCacheConcurrent: many goroutines asking for the same and
// different keys get the direct values (run with -race to check locking).
func TestFactorsCacheConcurrent(t *testing.T) {
	c := NewFactors()
	ns := []int{3, 5, 8, 13, 21}
	want := map[int]float64{}
	for _, n := range ns {
		want[n], _ = NormalK(n, 0.99, 0.95)
	}
	var wg sync.WaitGroup
	errs := make(chan string, 64)
	for w := range 16 {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range 20 {
				n := ns[(w+i)%len(ns)]
				k, err := c.NormalK(n, 0.99, 0.95)
				if err != nil || k != want[n] {
					errs <- "mismatch"
					return
				}
			}
		}()
	}
	wg.Wait()
	close(errs)
	for e := range errs {
		t.Error(e)
	}
}

// BenchmarkFactorsCache: a cached k for a typical lot size against the
// direct computation.
func BenchmarkFactorsCache(b *testing.B) {
	b.Run("cached", func(b *testing.B) {
		c := NewFactors()
		for b.Loop() {
			if _, err := c.NormalK(12, 0.99, 0.95); err != nil {
				b.Fatal(err)
			}
		}
	})
	b.Run("direct", func(b *testing.B) {
		for b.Loop() {
			if _, err := NormalK(12, 0.99, 0.95); err != nil {
				b.Fatal(err)
			}
		}
	})
}
