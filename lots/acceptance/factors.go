package acceptance

import (
	"math"
	"sync"

	"lotproof/stats"
)

// factors remembers, for one judgement, the figures that depend only on
// the number of specimens and the specification's content and confidence,
// so that 20,000 lots of 50 specimens compute them once, not 20,000 times.
// It is safe for concurrent use. (A cache in package stats can replace it:
// only these two methods use it.)
type factors struct {
	mu sync.Mutex
	k  map[kKey]kVal
	t  map[kKey]float64 // t quantile of the mean bound, by (n, 0, gamma)
}

type kKey struct {
	n        int
	p, gamma float64
}

type kVal struct {
	k   float64
	err error
}

func newFactors() *factors { return &factors{k: map[kKey]kVal{}, t: map[kKey]float64{}} }

// normalK is stats.NormalK, remembered.
func (f *factors) normalK(n int, p, gamma float64) (float64, error) {
	key := kKey{n, p, gamma}
	f.mu.Lock()
	v, ok := f.k[key]
	f.mu.Unlock()
	if !ok {
		v.k, v.err = stats.NormalK(n, p, gamma)
		f.mu.Lock()
		f.k[key] = v
		f.mu.Unlock()
	}
	return v.k, v.err
}

// meanLowerBound is stats.MeanLowerBound, mean - t s / sqrt(n) with t the
// gamma quantile of Student's t with n-1 degrees of freedom, with t
// remembered: the first call for an (n, gamma) goes to stats (which also
// checks the arguments), later ones use the same t in the same expression,
// so the result is the same to the last bit (TestFactorsSameAsStats).
func (f *factors) meanLowerBound(n int, mean, sd, gamma float64) (float64, error) {
	key := kKey{n: n, gamma: gamma}
	f.mu.Lock()
	t, ok := f.t[key]
	f.mu.Unlock()
	if ok && !math.IsNaN(mean) && !math.IsInf(mean, 0) && !math.IsNaN(sd) && !math.IsInf(sd, 0) && sd >= 0 {
		return mean - t*sd/math.Sqrt(float64(n)), nil
	}
	b, err := stats.MeanLowerBound(n, mean, sd, gamma)
	if err != nil || gamma == 0.5 {
		return b, err
	}
	t, err = stats.NoncentralTQuantile(gamma, float64(n-1), 0)
	if err == nil {
		f.mu.Lock()
		f.t[key] = t
		f.mu.Unlock()
	}
	return b, nil
}
