package stats

import (
	"fmt"
	"math"
	"math/rand/v2"
	"runtime"
	"slices"
	"sync"
)

// WeibullMCOptions controls the Monte Carlo evaluation of the exact
// (pivotal) Weibull tolerance factor.
type WeibullMCOptions struct {
	Sims    int    // number of simulated samples; 0 means 10,000
	Seed    uint64 // master seed; the result depends only on (n, p, gamma, Sims, Seed)
	Workers int    // goroutines; 0 means runtime.GOMAXPROCS(0). Does not change the result.

	fit func([]float64) (WeibullFit, error) // tests only: replaces FitWeibull
}

// WeibullFactor is the Monte Carlo tolerance factor of WeibullPivotFactor.
type WeibullFactor struct {
	V        float64 // factor in the handbook form B = q exp(-V/(beta sqrt n))
	C        float64 // same factor on the log scale: ln B = ln(alpha) - C/beta
	StdErrV  float64 // Monte Carlo standard error of V
	Sims     int
	Seed     uint64
	Failures int // simulated samples whose maximum-likelihood fit failed (see WeibullMCMaxFailFraction)
}

// WeibullMCMaxFailFraction is the largest fraction of simulated samples
// whose fit may fail before WeibullPivotFactor gives up: 0.1%. A failed fit
// is counted as the largest possible value of the pivotal statistic, which
// can only raise the factor (lower the bound): with at most this fraction
// failed, the confidence level actually delivered lies between gamma and
// gamma + 0.001, an error on the safe side and of the order of the Monte
// Carlo error of the level itself at the usual 10,000 simulations
// (sqrt(gamma (1 - gamma)/10000) = 0.0022 at gamma = 0.95). More failures
// than that point to a problem with the fit, not bad luck, so they are an
// error. In practice failures are very rare (about one in 1,000,000
// samples of 30 from Exp(1)).
const WeibullMCMaxFailFraction = 0.001

// weibullMCChunk is the fixed number of simulations per chunk. Chunk i uses
// its own PCG stream seeded from (master seed, i) through SplitMix64, so the
// set of simulated values, and hence the result, does not depend on how
// chunks are spread over goroutines.
const weibullMCChunk = 256

// splitMix64 is the SplitMix64 output function (Steele, Lea and Flood 2014,
// "Fast splittable pseudorandom number generators", OOPSLA), used to derive
// well-separated per-chunk seeds from the master seed.
func splitMix64(x uint64) uint64 {
	x += 0x9e3779b97f4a7c15
	x = (x ^ (x >> 30)) * 0xbf58476d1ce4e5b9
	x = (x ^ (x >> 27)) * 0x94d049bb133111eb
	return x ^ (x >> 31)
}

// WeibullPivotFactor returns the exact tolerance factor for the
// two-parameter Weibull distribution from the pivotal quantities of the
// maximum-likelihood estimates (Thoman, Bain and Antle 1970, "Maximum
// likelihood estimation, exact confidence intervals for reliability, and
// tolerance limits in the Weibull distribution", Technometrics 12(2):363-371;
// Lawless 2003, Statistical Models and Methods for Lifetime Data, 2nd ed.,
// section 5.2.2), evaluated by seeded Monte Carlo.
//
// With u = ln alpha, b = 1/beta and MLEs u^, b^, the content-p lower quantile
// is y_p = u + b w_p with w_p = ln(-ln p), and (u^ - y_p)/b^ has a
// distribution free of (u, b). Simulating samples of size n from the standard
// Weibull (alpha = beta = 1, i.e. Exp(1)) and taking the gamma quantile C of
// (u*^ - w_p)/b*^ gives the bound ln B = u^ - C b^, i.e.
//
//	B = alpha^ exp(-C/beta^) = q^ exp(-V/(beta^ sqrt n)),
//	q^ = alpha^ (-ln p)^(1/beta^),  V = sqrt(n) (C + w_p)
//
// (the form of CMH-17-1G Vol. 1 section 8.3.4.3.2). The quantile is the
// order statistic of rank ceil(gamma*Sims); its standard error comes from
// the distribution-free 95% interval of order statistics of rank
// gamma*Sims -+ 1.96 sqrt(Sims gamma (1-gamma)), divided by 2*1.96. Exact up to
// Monte Carlo error. Needs n >= 3 (the MLE of two parameters from 2 points is
// degenerate too often to be useful). A simulated sample whose fit fails is
// counted (Failures) as the largest value of the statistic, which errs on
// the safe side; more than WeibullMCMaxFailFraction of them is an error.
func WeibullPivotFactor(n int, p, gamma float64, opt WeibullMCOptions) (WeibullFactor, error) {
	if err := checkLevels(p, gamma); err != nil {
		return WeibullFactor{}, err
	}
	if n < 3 {
		//lint:ignore ST1005 error text begins with a proper name (Weibull)
		return WeibullFactor{}, fmt.Errorf("Weibull pivotal bound needs n >= 3, have %d: %w", n, ErrTooFew)
	}
	sims := opt.Sims
	if sims == 0 {
		sims = 10000
	}
	if sims < 100 {
		return WeibullFactor{}, fmt.Errorf("%w: Weibull Monte Carlo needs at least 100 simulations, got %d", ErrDomain, sims)
	}
	workers := opt.Workers
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	wp := math.Log(-math.Log(p))
	fitW := opt.fit
	if fitW == nil {
		fitW = FitWeibull
	}
	stat := make([]float64, sims)
	nChunks := (sims + weibullMCChunk - 1) / weibullMCChunk
	fails := make([]int, nChunks)
	var wg sync.WaitGroup
	next := make(chan int)
	for range min(workers, nChunks) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			x := make([]float64, n)
			for c := range next {
				rng := rand.New(rand.NewPCG(splitMix64(opt.Seed), splitMix64(opt.Seed^splitMix64(uint64(c)+1))))
				lo := c * weibullMCChunk
				hi := min(lo+weibullMCChunk, sims)
				for s := lo; s < hi; s++ {
					for i := range x {
						x[i] = rng.ExpFloat64()
					}
					fit, err := fitW(x)
					if err != nil {
						fails[c]++
						stat[s] = math.Inf(1) // the largest value: conservative
						continue
					}
					stat[s] = (math.Log(fit.Scale) - wp) * fit.Shape
				}
			}
		}()
	}
	for c := range nChunks {
		next <- c
	}
	close(next)
	wg.Wait()
	nf := 0
	for _, f := range fails {
		nf += f
	}
	if float64(nf) > WeibullMCMaxFailFraction*float64(sims) {
		//lint:ignore ST1005 error text begins with a proper name (Weibull)
		return WeibullFactor{Failures: nf, Sims: sims, Seed: opt.Seed}, fmt.Errorf("Weibull Monte Carlo: %d of %d simulated fits failed, more than the %g%% allowed", nf, sims, 100*WeibullMCMaxFailFraction)
	}
	slices.Sort(stat)
	M := float64(sims)
	idx := func(r float64) int { return min(max(int(math.Ceil(r))-1, 0), sims-1) }
	C := stat[idx(gamma*M)]
	h := 1.959963984540054 * math.Sqrt(M*gamma*(1-gamma))
	se := (stat[idx(gamma*M+h)] - stat[idx(gamma*M-h)]) / (2 * 1.959963984540054)
	if math.IsInf(C, 0) || math.IsInf(se, 0) {
		//lint:ignore ST1005 error text begins with a proper name (Weibull)
		return WeibullFactor{Failures: nf, Sims: sims, Seed: opt.Seed}, fmt.Errorf("Weibull Monte Carlo: %d of %d simulated fits failed, too many for confidence %g (use more simulations)", nf, sims, gamma)
	}
	rn := math.Sqrt(float64(n))
	return WeibullFactor{V: rn * (C + wp), C: C, StdErrV: rn * se, Sims: sims, Seed: opt.Seed, Failures: nf}, nil
}

// WeibullLowerBound fits the two-parameter Weibull distribution by maximum
// likelihood (FitWeibull) and returns the exact pivotal lower tolerance bound
// B = alpha^ exp(-C/beta^) of WeibullPivotFactor, with its Monte Carlo
// standard error se(B) = B se(V)/(beta^ sqrt n). Exact for Weibull data up to
// Monte Carlo error (Thoman, Bain and Antle 1970).
func WeibullLowerBound(x []float64, p, gamma float64, opt WeibullMCOptions) (Bound, error) {
	if err := checkLevels(p, gamma); err != nil {
		return Bound{}, err
	}
	if len(x) < 3 {
		//lint:ignore ST1005 error text begins with a proper name (Weibull)
		return Bound{}, fmt.Errorf("Weibull bound needs at least 3 values, have %d: %w", len(x), ErrTooFew)
	}
	if _, err := FitWeibull(x); err != nil {
		return Bound{}, err
	}
	f, err := WeibullPivotFactor(len(x), p, gamma, opt)
	if err != nil {
		return Bound{}, err
	}
	return WeibullLowerBoundWithFactor(x, p, gamma, f)
}

// WeibullLowerBoundWithFactor is WeibullLowerBound with a factor already
// computed by WeibullPivotFactor for the same n, p and gamma (the factor
// depends on nothing else, so one simulation serves every sample of that
// size).
func WeibullLowerBoundWithFactor(x []float64, p, gamma float64, f WeibullFactor) (Bound, error) {
	if err := checkLevels(p, gamma); err != nil {
		return Bound{}, err
	}
	fit, err := FitWeibull(x)
	if err != nil {
		return Bound{}, err
	}
	rn := math.Sqrt(float64(len(x)))
	v := fit.Scale * math.Exp(-f.C/fit.Shape)
	b := Bound{
		Value: v, Factor: f.V, Method: "weibull-pivotal-mc", N: len(x), Content: p, Confidence: gamma,
		Params: map[string]float64{"shape": fit.Shape, "scale": fit.Scale, "C": f.C,
			"q": fit.Scale * math.Pow(-math.Log(p), 1/fit.Shape), "sims": float64(f.Sims), "seed": float64(f.Seed)},
		MCStdErr: v * f.StdErrV / (fit.Shape * rn),
		Notes: []string{fmt.Sprintf("exact pivotal method (Thoman, Bain and Antle 1970) by Monte Carlo: %d simulations, seed %d", f.Sims, f.Seed),
			DesignValueCaution},
	}
	if f.Failures > 0 {
		b.Params["failedFits"] = float64(f.Failures)
		b.Notes = append(b.Notes[:1:1], fmt.Sprintf("%d of %d simulated fits failed and were counted as the largest value (on the safe side; up to %g%% allowed)", f.Failures, f.Sims, 100*WeibullMCMaxFailFraction), DesignValueCaution)
	}
	return b, nil
}

// WeibullApproxV returns the closed-form approximation of the Weibull
// tolerance factor V used in aircraft-materials handbook practice
// (CMH-17-1G Vol. 1 section 8.3.4.3.2; MMPDS section 9.6.1.2; formulas
// quoted from memory):
//
//	B-basis (p = 0.90, gamma = 0.95): V_B = 3.803 + exp(1.79 - 0.516 ln n + 5.1/(n-1))
//	A-basis (p = 0.99, gamma = 0.95): V_A = 6.649 + exp(2.55 - 0.526 ln n + 4.76/n)
//
// for use in B = q^ exp(-V/(beta^ sqrt n)), q^ = alpha^ (-ln p)^(1/beta^)
// (-ln 0.90 = 0.10536, -ln 0.99 = 0.01005). Only these two levels exist.
// The constants 3.803 and 6.649 are the large-n limits 1.645 sqrt(Var) of
// the pivot's asymptotic normal distribution (Lawless 2003, section
// 5.2.2: Var = 1.1087 - 2 w_p 0.2570 + w_p^2 0.6079, w_p = ln(-ln p)).
// Measured against the exact pivotal factor (the embedded table of
// WeibullBasisV, 200,000 simulations per n up to 30): conservative (V too
// large) at small n, B-basis +155% at n = 3, +62% at n = 4, +19% at n = 6,
// +5% at n = 10; A-basis +11% at n = 3, +2% at n = 10; within about 1-2%
// either side from n = 15 on. At n = 3 the B-basis V exceeds the A-basis V
// by so much that the closed-form A-basis value lies above the B-basis
// value for any data; the design values therefore use WeibullBasisV, which
// takes the exact factor up to n = 100. n must be at least 3 (the same
// minimum as the maximum-likelihood fit behind the bound).
func WeibullApproxV(n int, p, gamma float64) (float64, error) {
	if n < 3 {
		//lint:ignore ST1005 error text begins with a proper name (Weibull)
		return math.NaN(), fmt.Errorf("Weibull approximate factor needs n >= 3, have %d: %w", n, ErrTooFew)
	}
	fn := float64(n)
	switch {
	case p == 0.90 && gamma == 0.95:
		return 3.803 + math.Exp(1.79-0.516*math.Log(fn)+5.1/(fn-1)), nil
	case p == 0.99 && gamma == 0.95:
		return 6.649 + math.Exp(2.55-0.526*math.Log(fn)+4.76/fn), nil
	}
	return math.NaN(), fmt.Errorf("%w: the handbook Weibull approximation exists only for p = 0.90 or 0.99 at gamma = 0.95 (use WeibullLowerBound)", ErrDomain)
}

// WeibullApproxLowerBound returns B = q^ exp(-V/(beta^ sqrt n)) with the
// handbook approximation V of WeibullApproxV and the MLE fit of x
// (CMH-17-1G Vol. 1 section 8.3.4.3.2). Kept for comparison: the design
// values use WeibullBasisLowerBound, which is exact at small n.
func WeibullApproxLowerBound(x []float64, p, gamma float64) (Bound, error) {
	V, err := WeibullApproxV(len(x), p, gamma)
	if err != nil {
		return Bound{}, err
	}
	fit, err := FitWeibull(x)
	if err != nil {
		return Bound{}, err
	}
	q := fit.Scale * math.Pow(-math.Log(p), 1/fit.Shape)
	v := q * math.Exp(-V/(fit.Shape*math.Sqrt(float64(len(x)))))
	return Bound{
		Value: v, Factor: V, Method: "weibull-approx", N: len(x), Content: p, Confidence: gamma,
		Params: map[string]float64{"shape": fit.Shape, "scale": fit.Scale, "q": q},
		Notes:  []string{"handbook closed-form approximation of the Weibull factor (CMH-17-1G 8.3.4.3.2)", DesignValueCaution},
	}, nil
}

// weibullTableRow is one entry of the embedded exact factor table
// (weibulltable.go, written by go run ./stats/internal/weibullgen).
type weibullTableRow struct {
	N       int
	Sims    int
	VB, SeB float64 // B-basis (content 0.90, confidence 0.95) factor and its Monte Carlo standard error
	VA, SeA float64 // A-basis (content 0.99, confidence 0.95)
}

// WeibullBasisFactor is the Weibull tolerance factor at the A- or B-basis
// level and where it comes from.
type WeibullBasisFactor struct {
	V      float64 // factor in B = q^ exp(-V/(beta^ sqrt n))
	StdErr float64 // Monte Carlo standard error of V; 0 for the closed form
	Exact  bool    // from the embedded table of exact factors
	Sims   int     // simulations behind a tabulated factor
	Seed   uint64  // seed of a tabulated factor
}

// WeibullBasisV returns the Weibull tolerance factor V for
// B = q^ exp(-V/(beta^ sqrt n)) at the B-basis (p = 0.90) or A-basis
// (p = 0.99) level, confidence gamma = 0.95:
//
//   - 3 <= n <= 100: the exact pivotal factor of WeibullPivotFactor
//     (Thoman, Bain and Antle 1970, Technometrics 12:363-371; Lawless 2003,
//     section 5.2.2) from an embedded table computed once by seeded Monte
//     Carlo (weibulltable.go, written by go run ./stats/internal/weibullgen:
//     200,000 simulations for n <= 30, 50,000 above, both levels from the
//     same samples so that the A-basis factor always gives the lower
//     bound), with its Monte Carlo standard error;
//   - n > 100: the handbook closed form of WeibullApproxV (CMH-17-1G Vol. 1
//     section 8.3.4.3.2), which is within about 1-2% of the exact factor
//     there and tends to the exact large-n limit.
//
// The closed form is not used below n = 100 because it is conservative by
// 20% and more for the B-basis below n = 7 and, at n = 3, makes the A-basis
// value exceed the B-basis value (see WeibullApproxV). The tabulated values
// were checked against an independent numpy/scipy simulation
// (testdata/tolerance/gen_weibull_small.py, weibull_factor_small.json).
func WeibullBasisV(n int, p, gamma float64) (WeibullBasisFactor, error) {
	if n < 3 {
		//lint:ignore ST1005 error text begins with a proper name (Weibull)
		return WeibullBasisFactor{}, fmt.Errorf("Weibull factor needs n >= 3, have %d: %w", n, ErrTooFew)
	}
	a := p == 0.99 && gamma == 0.95
	if !a && !(p == 0.90 && gamma == 0.95) {
		return WeibullBasisFactor{}, fmt.Errorf("%w: the tabulated Weibull factor exists only for p = 0.90 or 0.99 at gamma = 0.95 (use WeibullLowerBound)", ErrDomain)
	}
	if n <= weibullTableMaxN {
		r := weibullTable[n-3]
		f := WeibullBasisFactor{V: r.VB, StdErr: r.SeB, Exact: true, Sims: r.Sims, Seed: weibullTableSeed}
		if a {
			f.V, f.StdErr = r.VA, r.SeA
		}
		return f, nil
	}
	v, err := WeibullApproxV(n, p, gamma)
	return WeibullBasisFactor{V: v}, err
}

// WeibullBasisLowerBound returns B = q^ exp(-V/(beta^ sqrt n)) with the
// factor V of WeibullBasisV and the maximum-likelihood fit of x
// (FitWeibull): the exact pivotal bound for n <= 100, the handbook closed
// form above (CMH-17-1G Vol. 1 section 8.3.4.3.2). For a tabulated factor
// the Monte Carlo standard error of the bound is B se(V)/(beta^ sqrt n).
// Only the A- and B-basis levels (p = 0.99 or 0.90, gamma = 0.95) exist
// (ErrDomain otherwise; use WeibullLowerBound).
func WeibullBasisLowerBound(x []float64, p, gamma float64) (Bound, error) {
	f, err := WeibullBasisV(len(x), p, gamma)
	if err != nil {
		return Bound{}, err
	}
	fit, err := FitWeibull(x)
	if err != nil {
		return Bound{}, err
	}
	rn := math.Sqrt(float64(len(x)))
	q := fit.Scale * math.Pow(-math.Log(p), 1/fit.Shape)
	v := q * math.Exp(-f.V/(fit.Shape*rn))
	b := Bound{Value: v, Factor: f.V, Method: "weibull-approx", N: len(x), Content: p, Confidence: gamma,
		Params: map[string]float64{"shape": fit.Shape, "scale": fit.Scale, "q": q},
		Notes:  []string{"handbook closed-form approximation of the Weibull factor (CMH-17-1G 8.3.4.3.2)", DesignValueCaution}}
	if f.Exact {
		b.Method = "weibull-table"
		b.MCStdErr = v * f.StdErr / (fit.Shape * rn)
		b.Params["sims"], b.Params["seed"] = float64(f.Sims), float64(f.Seed)
		b.Notes[0] = fmt.Sprintf("exact pivotal Weibull factor (Thoman, Bain and Antle 1970) from the built-in table for 3 to %d values (%d simulations, seed %d)", weibullTableMaxN, f.Sims, f.Seed)
	}
	return b, nil
}
