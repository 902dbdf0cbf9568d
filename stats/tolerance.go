package stats

import (
	"fmt"
	"math"
	"runtime"
	"sync"
)

// Bound is a one-sided lower tolerance bound with everything needed to audit
// it: with confidence Confidence, at least a fraction Content of the
// population lies above Value.
type Bound struct {
	Value      float64            // the lower tolerance bound
	Factor     float64            // the tolerance factor used (k, V, Hanson-Koopmans k, ...)
	Method     string             // short method name, e.g. "normal", "weibull-mc"
	N          int                // number of observations used
	Content    float64            // p: population fraction above the bound
	Confidence float64            // gamma
	Params     map[string]float64 // intermediate values (mean, sd, shape, rank, ...)
	MCStdErr   float64            // Monte Carlo standard error of Value (0 when exact)
	Notes      []string           // decisions and cautions
}

// checkLevels validates content p and confidence gamma, both in (0, 1).
func checkLevels(p, gamma float64) error {
	if !(p > 0 && p < 1) {
		return fmt.Errorf("%w: content %g not in (0, 1)", ErrDomain, p)
	}
	if !(gamma > 0 && gamma < 1) {
		return fmt.Errorf("%w: confidence %g not in (0, 1)", ErrDomain, gamma)
	}
	return nil
}

// normQuantile returns the standard normal quantile z_p = -sqrt(2) erfcinv(2p).
func normQuantile(p float64) float64 { return -math.Sqrt2 * math.Erfcinv(2*p) }

// NormalK returns the exact one-sided tolerance factor for a normal sample of
// size n: with confidence gamma, at least a fraction p of the population
// exceeds xbar - k s, where
//
//	k(n, p, gamma) = t'_gamma(n-1, z_p sqrt(n)) / sqrt(n),
//
// t'_gamma(df, delta) the gamma quantile of the noncentral t distribution
// (Owen 1968, Technometrics 10:445, section 4; Natrella 1963, NBS Handbook 91,
// Table A-7; CMH-17-1G Vol. 1 section 8.3.4.3.1; MMPDS section 9.6.1). Exact
// for normal data; the noncentral t quantile is computed by
// NoncentralTQuantile. Accuracy: better than 1e-11 relative for n = 2 to
// 100,000 against mpmath and scipy references (testdata/tolerance).
func NormalK(n int, p, gamma float64) (float64, error) {
	if n < 2 {
		return math.NaN(), fmt.Errorf("%w: normal tolerance factor needs n >= 2, got %d", ErrTooFew, n)
	}
	if err := checkLevels(p, gamma); err != nil {
		return math.NaN(), err
	}
	rn := math.Sqrt(float64(n))
	t, err := NoncentralTQuantile(gamma, float64(n-1), normQuantile(p)*rn)
	if err != nil {
		return math.NaN(), err
	}
	return t / rn, nil
}

// DesignValueCaution is attached to every bound: statistical values support,
// and never replace, the governing specification and engineering judgement.
const DesignValueCaution = "statistical bound only: it supports, and never replaces, the governing specification, regulations, local codes and licensed engineering judgement"

// NormalLowerBound returns the one-sided lower tolerance bound xbar - k s for
// a sample assumed normal, with k = NormalK(n, p, gamma) (exact for normal
// data; Owen 1968; CMH-17-1G section 8.3.4.3.1). Needs n >= 2, finite values
// and s > 0.
func NormalLowerBound(x []float64, p, gamma float64) (Bound, error) {
	if err := checkLevels(p, gamma); err != nil {
		return Bound{}, err
	}
	if len(x) < 2 {
		return Bound{}, fmt.Errorf("%w: normal bound needs at least 2 values, got %d", ErrTooFew, len(x))
	}
	if err := checkFinite(x); err != nil {
		return Bound{}, err
	}
	m, s := meanSD(x)
	if !(s > 0) {
		return Bound{}, fmt.Errorf("normal bound: %w", ErrZeroSpread)
	}
	k, err := NormalK(len(x), p, gamma)
	if err != nil {
		return Bound{}, err
	}
	return Bound{
		Value: m - k*s, Factor: k, Method: "normal", N: len(x), Content: p, Confidence: gamma,
		Params: map[string]float64{"mean": m, "sd": s},
		Notes:  []string{"exact for normally distributed data (noncentral t factor)", DesignValueCaution},
	}, nil
}

// LognormalLowerBound applies the normal method to ln x and reports the bound
// on the original scale: exp(mean(ln x) - k sd(ln x)) (CMH-17-1G section
// 8.3.4.3.3; Krishnamoorthy and Mathew 2009, Statistical Tolerance Regions,
// section 2.6). Exact for lognormal data since the exponential is monotone.
// All values must be > 0.
func LognormalLowerBound(x []float64, p, gamma float64) (Bound, error) {
	if err := checkFinite(x); err != nil {
		return Bound{}, err
	}
	y := make([]float64, len(x))
	for i, v := range x {
		if !(v > 0) {
			return Bound{}, fmt.Errorf("%w: lognormal bound needs positive values, value %d is %g", ErrDomain, i, v)
		}
		y[i] = math.Log(v)
	}
	b, err := NormalLowerBound(y, p, gamma)
	if err != nil {
		return Bound{}, err
	}
	return Bound{
		Value: math.Exp(b.Value), Factor: b.Factor, Method: "lognormal", N: b.N, Content: p, Confidence: gamma,
		Params: map[string]float64{"logMean": b.Params["mean"], "logSD": b.Params["sd"], "logBound": b.Value},
		Notes:  []string{"normal method applied to natural logarithms; bound transformed back with exp", DesignValueCaution},
	}, nil
}

// normalKTableChunk is the number of consecutive sizes NormalKTable
// computes in one piece (each piece starts afresh, so the result does not
// depend on how pieces are spread over goroutines), and normalKTableMinN
// the size below which it calls NormalK itself (so that the usual tables,
// n up to 100, are bit for bit the factors NormalK gives everywhere else;
// the cost is a few milliseconds).
const (
	normalKTableChunk = 1024
	normalKTableMinN  = 101
)

// NormalKTable returns NormalK(n, p, gamma) for every n in ns (each n >= 2),
// computed faster for tables and to the same accuracy: for n up to 100 it
// calls NormalK. Above, a decade of sizes with at least kPanelMinSizes
// entries is interpolated in 1/sqrt(n) through exact factors at Chebyshev
// points, with two checks (normalkpanel.go); other sizes solve the same
// equation (the gamma quantile of the noncentral t, NormalK's formula) by
// Newton steps on the CDF and density from the focused trapezoidal
// quadrature (ntfocus.go; each CDF is accepted only when its built-in
// error check passes, otherwise NormalK is used), starting from a
// quadratic extrapolation of the factors of the preceding sizes. Values
// agree with NormalK to about 1e-14 relative
// (TestNormalKTableMatchesNormalK) and with the mpmath and scipy
// references to the same tolerance as NormalK. The per-size work is spread
// over runtime.GOMAXPROCS(0) goroutines in fixed pieces of consecutive
// entries; the result is the same for any number of goroutines.
func NormalKTable(ns []int, p, gamma float64) ([]float64, error) {
	if err := checkLevels(p, gamma); err != nil {
		return nil, err
	}
	for _, n := range ns {
		if n < 2 {
			return nil, fmt.Errorf("%w: normal tolerance factor needs n >= 2, got %d", ErrTooFew, n)
		}
	}
	out := make([]float64, len(ns))
	// Decades of sizes with many entries: interpolated (normalkpanel.go).
	count := map[int]int{}
	for _, n := range ns {
		if n >= kPanelBase {
			count[kPanelOf(n)]++
		}
	}
	panels := map[int]*kPanel{}
	for j, c := range count {
		if c >= kPanelMinSizes {
			if kp, ok := buildKPanel(j, p, gamma); ok {
				panels[j] = &kp
			}
		}
	}
	rest := make([]int, 0, len(ns)) // indices left to the per-size route
	for i, n := range ns {
		if kp := panels[kPanelOf(max(n, kPanelBase))]; n >= kPanelBase && kp != nil {
			out[i] = kp.at(n)
		} else {
			rest = append(rest, i)
		}
	}
	if len(rest) < len(ns) {
		sub := make([]int, len(rest))
		for i, r := range rest {
			sub[i] = ns[r]
		}
		ks, err := normalKTableEach(sub, p, gamma)
		if err != nil {
			return nil, err
		}
		for i, r := range rest {
			out[r] = ks[i]
		}
		return out, nil
	}
	return normalKTableEach(ns, p, gamma)
}

// normalKTableEach is NormalKTable by the per-size route alone.
func normalKTableEach(ns []int, p, gamma float64) ([]float64, error) {
	out := make([]float64, len(ns))
	nChunks := (len(ns) + normalKTableChunk - 1) / normalKTableChunk
	errs := make([]error, nChunks)
	next := make(chan int)
	var wg sync.WaitGroup
	for range min(runtime.GOMAXPROCS(0), nChunks) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for c := range next {
				lo := c * normalKTableChunk
				hi := min(lo+normalKTableChunk, len(ns))
				_, errs[c] = normalKRun(ns[lo:hi], p, gamma, out[lo:hi])
			}
		}()
	}
	for c := range nChunks {
		next <- c
	}
	close(next)
	wg.Wait()
	for _, err := range errs {
		if err != nil {
			return nil, err
		}
	}
	return out, nil
}

// normalKRun fills out[i] with the factor for ns[i], warm-starting each
// size from the previous ones, and returns how many came from the fast
// (focused) route.
func normalKRun(ns []int, p, gamma float64, out []float64) (fast int, err error) {
	zp := normQuantile(p)
	zg := normQuantile(gamma)
	var prevN [3]float64 // last sizes solved by the fast route (most recent first)
	var prevK [3]float64
	have := 0
	mode := 0.0
	for i, n := range ns {
		k, m, ok := math.NaN(), 0.0, false
		if n >= normalKTableMinN {
			// Start: quadratic extrapolation in n from the last three
			// fast-route factors, else the normal approximation of
			// NoncentralTQuantile.
			var k0 float64
			fn := float64(n)
			switch {
			case have >= 3:
				x0, x1, x2 := prevN[0], prevN[1], prevN[2]
				k0 = prevK[0]*(fn-x1)*(fn-x2)/((x0-x1)*(x0-x2)) +
					prevK[1]*(fn-x0)*(fn-x2)/((x1-x0)*(x1-x2)) +
					prevK[2]*(fn-x0)*(fn-x1)/((x2-x0)*(x2-x1))
			default:
				rn := math.Sqrt(fn)
				delta := zp * rn
				a := 1 - zg*zg/(2*(fn-1))
				k0 = (delta + zg) / rn
				if disc := delta*delta - a*(delta*delta-zg*zg); a > 0.05 && disc >= 0 {
					if zg >= 0 {
						k0 = (delta + math.Sqrt(disc)) / a / rn
					} else {
						k0 = (delta - math.Sqrt(disc)) / a / rn
					}
				}
			}
			k, m, ok = normalKFocused(n, zp, gamma, k0, mode)
		}
		if !ok {
			k, err = NormalK(n, p, gamma)
			if err != nil {
				return fast, err
			}
			have = 0
		} else {
			fast++
			mode = m
			prevN[2], prevN[1], prevN[0] = prevN[1], prevN[0], float64(n)
			prevK[2], prevK[1], prevK[0] = prevK[1], prevK[0], k
			have++
		}
		out[i] = k
	}
	return fast, nil
}

// normalKFocused solves F(t; n-1, zp sqrt n) = gamma for t = k sqrt n by
// Newton steps from k0 on focused-quadrature CDF passes, stopping (as
// NoncentralTQuantile does) when the step is below 1e-10 relative. ok is
// false if a pass fails its error check or the iteration misbehaves; the
// caller then uses NormalK.
func normalKFocused(n int, zp, gamma, k0, mode float64) (k, modeOut float64, ok bool) {
	f := float64(n - 1)
	rn := math.Sqrt(float64(n))
	pr := ntProblem{f: f, delta: zp * rn, logc: ntLogNorm(f), wantPDF: true, upper: gamma > 0.5}
	x := k0 * rn
	for range 6 {
		pr.t = x
		c, d, _, m, good := pr.focused(mode, 0.5)
		if !good || !(d > 0) {
			return 0, 0, false
		}
		mode = m
		// F(x) - gamma from the small tail.
		fx := c - gamma
		if pr.upper {
			fx = (1 - gamma) - c
		}
		step := fx / d
		if math.Abs(step) > 0.5*math.Abs(x) {
			return 0, 0, false
		}
		x -= step
		if math.Abs(step) <= 1e-10*math.Abs(x) {
			return x / rn, mode, true
		}
	}
	return 0, 0, false
}
