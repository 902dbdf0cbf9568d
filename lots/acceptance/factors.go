package acceptance

import (
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
}

type kKey struct {
	n        int
	p, gamma float64
}

type kVal struct {
	k   float64
	err error
}

func newFactors() *factors { return &factors{k: map[kKey]kVal{}} }

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

// meanLowerBound is stats.MeanLowerBound.
func (f *factors) meanLowerBound(n int, mean, sd, gamma float64) (float64, error) {
	return stats.MeanLowerBound(n, mean, sd, gamma)
}
