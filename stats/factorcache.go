package stats

import (
	"fmt"
	"math"
	"sync"
)

// Factors is a cache of the factors that depend only on the sample size and
// the levels, not on the data: the normal tolerance factor k(n, p, gamma)
// of NormalK and the Student t quantile t_(gamma, n-1) behind
// MeanLowerBound. Each is computed once per key, on first use, and every
// later call with the same key returns the same value (bit for bit the
// value the uncached function returns). It also holds, per (n, confidence,
// side), the interpolant behind its TailFractionBound (fractiontable.go;
// about 4.5 KB per key, panels built on first use), which agrees with the
// direct solve to about 1e-13 relative. Callers that judge many lots create
// one Factors (NewFactors or the zero value) and share it.
//
// A Factors is safe for concurrent use by many goroutines: a key being
// computed by one goroutine makes the others asking for it wait for that
// result rather than compute it again. The package keeps no cache of its
// own; the caller owns the Factors and its lifetime. Memory grows by about
// 100 bytes per distinct key (for lot acceptance: distinct lot sizes times
// the levels in use), so it stays small; make a new Factors to drop it.
type Factors struct {
	mu   sync.Mutex
	kp   map[factorKey]*kPanelEntry // per (panel, p, gamma): NormalKNear's interpolants
	k    map[factorKey]*factorEntry
	t    map[factorKey]*factorEntry
	frac map[fracKey]*fracTable
	mnr  map[factorKey]*factorEntry
}

type factorKey struct {
	n        int
	p, gamma float64
}

type factorEntry struct {
	once sync.Once
	v    float64
	err  error
}

// NewFactors returns an empty cache (the zero value works as well).
func NewFactors() *Factors { return &Factors{} }

// get returns the entry for key in *m, creating it.
func (c *Factors) get(m *map[factorKey]*factorEntry, key factorKey) *factorEntry {
	c.mu.Lock()
	defer c.mu.Unlock()
	if *m == nil {
		*m = map[factorKey]*factorEntry{}
	}
	e := (*m)[key]
	if e == nil {
		e = &factorEntry{}
		(*m)[key] = e
	}
	return e
}

// NormalK returns NormalK(n, p, gamma), computed once per (n, p, gamma).
// Arguments NormalK rejects are passed through uncached (so that, e.g., NaN
// levels cannot grow the cache).
func (c *Factors) NormalK(n int, p, gamma float64) (float64, error) {
	if n < 2 || checkLevels(p, gamma) != nil {
		return NormalK(n, p, gamma)
	}
	e := c.get(&c.k, factorKey{n, p, gamma})
	e.once.Do(func() { e.v, e.err = NormalK(n, p, gamma) })
	return e.v, e.err
}

type kPanelEntry struct {
	once sync.Once
	ok   bool
	kp   kPanel
}

// NormalKNear returns the one-sided normal tolerance factor for (n, p,
// gamma) from the interpolant over n's decade of sizes (normalkpanel.go)
// for n above 100, which agrees with NormalK to about 1e-14 relative
// (at most kPanelCheckTol, checked when the panel is built), and from
// NormalK below (cached) or where an interpolant fails its checks. It is
// for searches that compare many factors with a margin (the specimens an
// undecided lot would need): each decade costs 16 exact factors once,
// every further size a polynomial evaluation instead of a noncentral t
// quantile.
func (c *Factors) NormalKNear(n int, p, gamma float64) (float64, error) {
	if n < kPanelBase || checkLevels(p, gamma) != nil {
		return c.NormalK(n, p, gamma)
	}
	j := kPanelOf(n)
	key := factorKey{j, p, gamma}
	c.mu.Lock()
	if c.kp == nil {
		c.kp = map[factorKey]*kPanelEntry{}
	}
	e := c.kp[key]
	if e == nil {
		e = &kPanelEntry{}
		c.kp[key] = e
	}
	c.mu.Unlock()
	e.once.Do(func() { e.kp, e.ok = buildKPanel(j, p, gamma) })
	if !e.ok {
		return c.NormalK(n, p, gamma)
	}
	return e.kp.at(n), nil
}

// MeanT returns t_(gamma, n-1), the gamma quantile of Student's t with n-1
// degrees of freedom used by MeanLowerBound (same method and accuracy),
// computed once per (n, gamma). Needs n >= 2 and gamma in (0, 1).
func (c *Factors) MeanT(n int, gamma float64) (float64, error) {
	if n < 2 {
		return math.NaN(), fmt.Errorf("%w: t quantile needs n >= 2, got %d", ErrTooFew, n)
	}
	if !(gamma > 0 && gamma < 1) {
		return math.NaN(), fmt.Errorf("%w: confidence %g not in (0, 1)", ErrDomain, gamma)
	}
	e := c.get(&c.t, factorKey{n, 0, gamma})
	e.once.Do(func() { e.v, e.err = meanBoundT(n, gamma) })
	return e.v, e.err
}

// MeanLowerBound returns MeanLowerBound(n, xbar, s, gamma) (the same value,
// bit for bit) with the t quantile taken from the cache.
func (c *Factors) MeanLowerBound(n int, xbar, s, gamma float64) (float64, error) {
	return meanLowerBoundWith(n, xbar, s, gamma, c.MeanT)
}

// MNRCritical returns MNRCritical(n, alpha) (bit for bit), computed once
// per (n, alpha).
func (c *Factors) MNRCritical(n int, alpha float64) (float64, error) {
	if n < 3 || !(alpha > 0 && alpha < 1) {
		return MNRCritical(n, alpha)
	}
	e := c.get(&c.mnr, factorKey{n, alpha, 0})
	e.once.Do(func() { e.v, e.err = MNRCritical(n, alpha) })
	return e.v, e.err
}

// ScreenOutliers returns ScreenOutliers(x, alpha, iterative) (the same
// results) with the critical values taken from the cache.
func (c *Factors) ScreenOutliers(x []float64, alpha float64, iterative bool) ([]MNRResult, error) {
	return screenOutliersWith(x, alpha, iterative, c.MNRCritical)
}
