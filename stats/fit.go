package stats

import (
	"fmt"
	"math"
)

// NormalFit holds the parameters of a normal distribution fitted to data.
type NormalFit struct {
	Mu    float64 // sample mean
	Sigma float64 // sample standard deviation, divisor n-1
}

// FitNormal fits a normal distribution by the usual unbiased-variance
// estimates: Mu = (1/n) Σ x_i, Sigma = sqrt(Σ (x_i - Mu)² / (n-1)) (the
// sample statistics used for the normal model in CMH-17-1G Vol. 1 section
// 8.3, normal model; note Sigma is not the maximum-likelihood value, which divides
// by n). Computed with the corrected two-pass algorithm (Chan, Golub &
// LeVeque 1983).
//
// It needs at least 2 finite values that are not all equal.
func FitNormal(x []float64) (NormalFit, error) {
	if len(x) < 2 {
		return NormalFit{}, fmt.Errorf("normal fit: %d values, need at least 2: %w", len(x), ErrTooFew)
	}
	if err := checkFinite(x); err != nil {
		return NormalFit{}, fmt.Errorf("normal fit: %w", err)
	}
	m, sd := meanSD(x)
	if math.IsInf(sd, 0) || math.IsNaN(sd) || math.IsInf(m, 0) || math.IsNaN(m) {
		return NormalFit{}, fmt.Errorf("normal fit: values too large, sums overflow: %w", ErrNonFinite)
	}
	if sd == 0 {
		return NormalFit{}, fmt.Errorf("normal fit: all values equal: %w", ErrZeroSpread)
	}
	return NormalFit{Mu: m, Sigma: sd}, nil
}

// LognormalFit holds the parameters of a lognormal distribution: the mean
// and standard deviation of ln x.
type LognormalFit struct {
	Mu    float64 // mean of ln x
	Sigma float64 // standard deviation of ln x, divisor n-1
}

// FitLognormal fits a lognormal distribution by the normal fit of the
// natural logarithms: Mu = (1/n) Σ ln x_i, Sigma = sqrt(Σ (ln x_i - Mu)² /
// (n-1)) (CMH-17-1G Vol. 1 section 8.3, lognormal model: the normal method
// applied to ln x).
//
// It needs at least 2 finite, strictly positive values whose logarithms
// are not all equal.
func FitLognormal(x []float64) (LognormalFit, error) {
	lx, err := logs(x, "lognormal fit")
	if err != nil {
		return LognormalFit{}, err
	}
	m, v := meanVar(lx)
	if v == 0 {
		return LognormalFit{}, fmt.Errorf("lognormal fit: all values equal: %w", ErrZeroSpread)
	}
	return LognormalFit{Mu: m, Sigma: math.Sqrt(v)}, nil
}

// logs checks x (at least 2 finite positive values) and returns ln x.
func logs(x []float64, what string) ([]float64, error) {
	if len(x) < 2 {
		return nil, fmt.Errorf("%s: %d values, need at least 2: %w", what, len(x), ErrTooFew)
	}
	if err := checkFinite(x); err != nil {
		return nil, fmt.Errorf("%s: %w", what, err)
	}
	lx := make([]float64, len(x))
	for i, v := range x {
		if v <= 0 {
			return nil, fmt.Errorf("%s: value %d is %v, must be > 0", what, i, v)
		}
		lx[i] = math.Log(v)
	}
	return lx, nil
}

// WeibullFit holds a two-parameter Weibull fit, F(x) = 1 - exp(-(x/Scale)^Shape).
type WeibullFit struct {
	Shape      float64 // β
	Scale      float64 // α
	Iterations int     // root-finder iterations used for the shape
}

// FitWeibull fits the two-parameter Weibull distribution
// F(x) = 1 - exp(-(x/α)^β) by maximum likelihood.
//
// The shape β is the root of the profile likelihood equation
// (Lawless, Statistical Models and Methods for Lifetime Data, 2nd ed. 2003,
// section 5.2.2; also CMH-17-1G Vol. 1 section 8.3, Weibull model):
//
//	g(β) = Σ x_i^β ln x_i / Σ x_i^β - 1/β - (1/n) Σ ln x_i = 0
//
// and the scale follows in closed form, α = ((1/n) Σ x_i^β)^(1/β).
// g is strictly increasing in β, tends to -∞ as β→0 and to
// max ln x - mean ln x > 0 as β→∞, so the root is unique whenever the data
// hold at least two distinct values. The data are scaled by their maximum
// before logs are taken (g is invariant under x → c·x), u_i = ln(x_i/max x),
// with ln(x/m) = log1p((x-m)/m) when x >= m/2 (x-m is then exact,
// Sterbenz's lemma) and ln(f_x/f_m) + (e_x-e_m) ln 2 from the binary
// exponents otherwise; so values that differ in the last digit, and
// subnormal values (whose logarithm Go computes inexactly on some
// platforms, golang/go#56600), keep their spread. The spread test itself is
// exact: min x < max x. The root is
// bracketed by doubling/halving from the Menon (1963) starting value
// β0 = π/(sd(ln x)·sqrt 6) and then found by Newton's method safeguarded by
// bisection (Press et al., Numerical Recipes 3rd ed. section 9.4, rtsafe),
// to full double precision.
//
// It needs at least 2 finite, strictly positive values, not all equal.
func FitWeibull(x []float64) (WeibullFit, error) {
	if len(x) < 2 {
		return WeibullFit{}, fmt.Errorf("weibull fit: %d values, need at least 2: %w", len(x), ErrTooFew)
	}
	if err := checkFinite(x); err != nil {
		return WeibullFit{}, fmt.Errorf("weibull fit: %w", err)
	}
	xmin, xmax := x[0], x[0]
	for i, v := range x {
		if v <= 0 {
			return WeibullFit{}, fmt.Errorf("weibull fit: value %d is %v, must be > 0", i, v)
		}
		xmin, xmax = math.Min(xmin, v), math.Max(xmax, v)
	}
	if xmin == xmax {
		return WeibullFit{}, fmt.Errorf("weibull fit: need at least 2 distinct values: %w", ErrZeroSpread)
	}
	n := float64(len(x))
	// u_i = ln(x_i / max x) <= 0.
	u := make([]float64, len(x))
	for i, v := range x {
		u[i] = logRatio(v, xmax)
	}
	ubar, uvar := meanVar(u)
	if uvar == 0 || ubar == 0 {
		return WeibullFit{}, fmt.Errorf("weibull fit: need at least 2 distinct values: %w", ErrZeroSpread)
	}
	w := make([]float64, len(u))
	// g returns g(β) and g'(β) = [Σw u²/Σw - (Σw u/Σw)²] + 1/β², w = exp(β u).
	g := func(b float64) (float64, float64) {
		var sw, swu float64
		for i, ui := range u {
			w[i] = math.Exp(b * ui)
			sw += w[i]
			swu += w[i] * ui
		}
		m1 := swu / sw
		var sv float64
		for i, ui := range u {
			d := ui - m1
			sv += w[i] * d * d
		}
		return m1 - ubar - 1/b, sv/sw + 1/(b*b)
	}
	b0 := math.Pi / (math.Sqrt(uvar) * math.Sqrt(6))
	if math.IsInf(b0, 0) || math.IsNaN(b0) || b0 <= 0 {
		b0 = 1
	}
	lo, hi := b0, b0
	glo, _ := g(lo)
	ghi := glo
	iter := 0
	for glo > 0 {
		lo /= 2
		glo, _ = g(lo)
		iter++
		if iter > 2200 || lo == 0 {
			return WeibullFit{}, fmt.Errorf("weibull fit: cannot bracket the shape (lower end)")
		}
	}
	for ghi < 0 {
		hi *= 2
		ghi, _ = g(hi)
		iter++
		if iter > 2200 || math.IsInf(hi, 0) {
			return WeibullFit{}, fmt.Errorf("weibull fit: cannot bracket the shape (upper end)")
		}
	}
	b := (lo + hi) / 2
	if glo == 0 {
		b = lo
	} else if ghi == 0 {
		b = hi
	} else {
		converged := false
		dxold := hi - lo
		dx := dxold
		f, df := g(b)
		for k := 0; k < 500; k++ {
			iter++
			// Newton step if it stays inside the bracket and shrinks fast
			// enough, else bisection (rtsafe).
			if ((b-hi)*df-f)*((b-lo)*df-f) > 0 || math.Abs(2*f) > math.Abs(dxold*df) {
				dxold = dx
				dx = (hi - lo) / 2
				b = lo + dx
			} else {
				dxold = dx
				dx = f / df
				b -= dx
			}
			if math.Abs(dx) <= 4e-16*math.Abs(b) || f == 0 {
				converged = true
				break
			}
			f, df = g(b)
			if f < 0 {
				lo = b
			} else {
				hi = b
			}
			if hi-lo <= 4e-16*math.Abs(b) {
				converged = true
				break
			}
		}
		if !converged {
			return WeibullFit{}, fmt.Errorf("weibull fit: shape did not converge after %d iterations", iter)
		}
	}
	// α = max x · exp(ln(mean exp(β u))/β), with mean exp(β u) in [1/n, 1].
	var sw float64
	for _, ui := range u {
		sw += math.Exp(b * ui)
	}
	scale := xmax * math.Exp(math.Log(sw/n)/b)
	if math.IsNaN(b) || math.IsInf(b, 0) || math.IsNaN(scale) || math.IsInf(scale, 0) || scale <= 0 {
		return WeibullFit{}, fmt.Errorf("weibull fit: numerical failure (shape %v, scale %v)", b, scale)
	}
	return WeibullFit{Shape: b, Scale: scale, Iterations: iter}, nil
}

// logRatio returns ln(x/m) for 0 < x <= m without taking the logarithm of
// a subnormal number and without losing a difference in the last digit:
// log1p((x-m)/m) when x >= m/2 (the subtraction is exact, Sterbenz 1974),
// else ln(fx/fm) + (ex-em)·ln 2 with x = fx·2^ex, m = fm·2^em, fx and fm
// in [0.5, 1) (math.Frexp, exact also for subnormals).
func logRatio(x, m float64) float64 {
	if x >= m/2 {
		return math.Log1p((x - m) / m)
	}
	fx, ex := math.Frexp(x)
	fm, em := math.Frexp(m)
	return math.Log(fx/fm) + float64(ex-em)*math.Ln2
}
