package campaign

import (
	"fmt"
	"math"
	"math/rand/v2"

	"gonum.org/v1/gonum/stat/distuv"
)

// Distributions a population can follow.
const (
	Normal    = "normal"
	Lognormal = "lognormal"
	Weibull   = "weibull"
)

// Distributions lists the population shapes, in documentation order.
var Distributions = []string{Normal, Lognormal, Weibull}

// Population is the assumed material: the mean of individual values, their
// coefficient of variation (lot-to-lot and within-lot together), the share
// of the variance that lies between lots, and the shape.
//
// The lot effect is additive for the normal population (lot mean normal,
// values normal about it) and multiplicative for the lognormal and Weibull
// populations (a lognormal lot factor): BetweenShare is the share of the
// variance of the values for the normal population and of the variance of
// their logarithms for the other two. This is the one-way random-effects
// model (e.g. Montgomery, Design and Analysis of Experiments, chapter on
// random effects) on the natural or the logarithmic scale.
type Population struct {
	Dist         string  `json:"distribution"`
	Mean         float64 `json:"mean"`
	CV           float64 `json:"cv"`
	BetweenShare float64 `json:"between_share"`
}

// model is a population with its parameters worked out.
type model struct {
	dist   string
	mu     float64 // normal: mean; lognormal: mean of ln x
	sb, sw float64 // between- and within-lot SD (natural scale for normal, log scale for lognormal; sb log scale for Weibull)
	scale  float64 // Weibull scale of the within-lot factor
	shape  float64 // Weibull shape
}

func (p Population) check() error {
	ok := false
	for _, d := range Distributions {
		ok = ok || d == p.Dist
	}
	switch {
	case !ok:
		return fmt.Errorf("unknown distribution %q: expected normal, lognormal or weibull", p.Dist)
	case !(p.Mean > 0) || math.IsInf(p.Mean, 0):
		return fmt.Errorf("the mean must be a positive number (got %g)", p.Mean)
	case !(p.CV > 0 && p.CV <= 0.5):
		return fmt.Errorf("the coefficient of variation must lie above 0 and at most 0.5 (got %g)", p.CV)
	case !(p.BetweenShare >= 0 && p.BetweenShare < 1):
		return fmt.Errorf("the between-lot share of the variance must lie from 0 up to (not including) 1 (got %g)", p.BetweenShare)
	}
	return nil
}

// newModel works the parameters out.
//
//   - normal: SD = CV mean, split into sb² = share SD², sw² = (1-share) SD².
//   - lognormal: ln x has variance σ² = ln(1 + CV²) and mean ln(mean) - σ²/2
//     (the lognormal moments, Johnson, Kotz and Balakrishnan, Continuous
//     Univariate Distributions vol. 1, chapter 14), split as above.
//   - Weibull: x = e^L W with L ~ N(0, sb²) and W Weibull(shape β, scale λ);
//     Var ln x = sb² + π²/(6β²) (the smallest-extreme-value variance), split
//     by the share; the total is solved so that
//     CV² = e^{sb²} Γ(1+2/β)/Γ(1+1/β)² - 1, and λ so that the mean is
//     e^{sb²/2} λ Γ(1+1/β).
func (p Population) newModel() (model, error) {
	if err := p.check(); err != nil {
		return model{}, err
	}
	m := model{dist: p.Dist}
	s := p.BetweenShare
	switch p.Dist {
	case Normal:
		sd := p.CV * p.Mean
		m.mu, m.sb, m.sw = p.Mean, math.Sqrt(s)*sd, math.Sqrt(1-s)*sd
	case Lognormal:
		v := math.Log1p(p.CV * p.CV)
		m.mu, m.sb, m.sw = math.Log(p.Mean)-v/2, math.Sqrt(s*v), math.Sqrt((1-s)*v)
	case Weibull:
		cv := func(v float64) float64 {
			sb2 := s * v
			beta := math.Pi / math.Sqrt(6*(1-s)*v)
			g1, _ := math.Lgamma(1 + 1/beta)
			g2, _ := math.Lgamma(1 + 2/beta)
			return math.Sqrt(math.Exp(sb2+g2-2*g1) - 1)
		}
		lo, hi := 1e-12, 4.0
		for i := 0; i < 200; i++ {
			mid := math.Sqrt(lo * hi)
			if cv(mid) < p.CV {
				lo = mid
			} else {
				hi = mid
			}
		}
		v := math.Sqrt(lo * hi)
		m.sb = math.Sqrt(s * v)
		m.shape = math.Pi / math.Sqrt(6*(1-s)*v)
		m.scale = p.Mean / (math.Exp(m.sb*m.sb/2) * math.Gamma(1+1/m.shape))
	}
	return m, nil
}

// sample draws k lots of n values.
func (m model) sample(rng *rand.Rand, k, n int) [][]float64 {
	out := make([][]float64, k)
	for i := range out {
		lot := make([]float64, n)
		z := rng.NormFloat64()
		for j := range lot {
			switch m.dist {
			case Normal:
				lot[j] = m.mu + m.sb*z + m.sw*rng.NormFloat64()
			case Lognormal:
				lot[j] = math.Exp(m.mu + m.sb*z + m.sw*rng.NormFloat64())
			case Weibull:
				// Inverse transform: W = λ (-ln U)^{1/β}, U uniform on (0, 1].
				u := 1 - rng.Float64()
				lot[j] = math.Exp(m.sb*z) * m.scale * math.Pow(-math.Log(u), 1/m.shape)
			}
		}
		out[i] = lot
	}
	return out
}

// quantile is the population's lower q-quantile (q = 1 - content): the
// value a fraction q of individual values falls below. For the Weibull
// population with a lot effect the distribution function
// F(x) = ∫ φ(z) (1 - exp(-(x e^{-sb z}/λ)^β)) dz is integrated by
// composite Simpson's rule over z in [-10, 10] (2,000 intervals) and solved
// by bisection.
func (m model) quantile(q float64) float64 {
	zq := distuv.UnitNormal.Quantile(q)
	switch m.dist {
	case Normal:
		return m.mu + math.Hypot(m.sb, m.sw)*zq
	case Lognormal:
		return math.Exp(m.mu + math.Hypot(m.sb, m.sw)*zq)
	}
	w := func(x float64) float64 { return m.scale * math.Pow(-math.Log1p(-x), 1/m.shape) } // Weibull quantile
	if m.sb == 0 {
		return w(q)
	}
	cdf := func(x float64) float64 {
		const lim, n = 10.0, 2000
		h := 2 * lim / n
		var sum float64
		for i := 0; i <= n; i++ {
			z := -lim + float64(i)*h
			f := distuv.UnitNormal.Prob(z) * -math.Expm1(-math.Pow(x*math.Exp(-m.sb*z)/m.scale, m.shape))
			switch {
			case i == 0 || i == n:
			case i%2 == 1:
				f *= 4
			default:
				f *= 2
			}
			sum += f
		}
		return sum * h / 3
	}
	// The quantile lies between the within-lot quantile scaled by the lot
	// factor's extreme values.
	lo, hi := w(q)*math.Exp(-10*m.sb), w(q)*math.Exp(10*m.sb)
	for i := 0; i < 100 && hi-lo > 1e-12*hi; i++ {
		mid := (lo + hi) / 2
		if cdf(mid) < q {
			lo = mid
		} else {
			hi = mid
		}
	}
	return (lo + hi) / 2
}
