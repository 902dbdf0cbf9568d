package acceptance

import (
	"math"
	"sync"

	"lotproof/stats"
)

// mnrCritical remembers the critical value of the maximum normed residual
// test at OutlierAlpha per number of values (it depends on n only), so
// that most lots skip the screen's own computation of it.
type mnrCritical struct {
	mu sync.Mutex
	c  map[int]float64
}

func (m *mnrCritical) get(n int) (float64, bool) {
	m.mu.Lock()
	c, ok := m.c[n]
	m.mu.Unlock()
	if ok {
		return c, true
	}
	c, err := stats.MNRCritical(n, OutlierAlpha)
	if err != nil {
		return 0, false
	}
	m.mu.Lock()
	if m.c == nil {
		m.c = map[int]float64{}
	}
	m.c[n] = c
	m.mu.Unlock()
	return c, true
}

// clearlyNoOutlier reports whether the largest normed residual
// max|x_i - mean|/SD of vals is below the critical value by a clear margin
// (a relative 1e-9, far beyond rounding), so that stats.ScreenOutliers
// would flag nothing. When it is not clear (near the critical value, zero
// spread, a failure) the caller runs the screen itself, which decides.
func (m *mnrCritical) clearlyNoOutlier(vals []float64) bool {
	n := len(vals)
	c, ok := m.get(n)
	if !ok {
		return false
	}
	mean := 0.0
	for _, v := range vals {
		mean += v
	}
	mean /= float64(n)
	ss, dev := 0.0, 0.0
	for _, v := range vals {
		d := v - mean
		ss += d * d
		dev = math.Max(dev, math.Abs(d))
	}
	sd := math.Sqrt(ss / float64(n-1))
	if !(sd > 0) || math.IsInf(sd, 0) {
		return false
	}
	return dev/sd < c*(1-1e-9)
}
