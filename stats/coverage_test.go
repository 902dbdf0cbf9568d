package stats

import (
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"
)

// Coverage harness: draw many samples from a population whose true lower
// (1-p) quantile is known, compute the bound for each, and report the
// fraction of bounds at or below the true quantile. For an exact method
// that fraction estimates gamma with binomial standard error
// sqrt(gamma (1-gamma)/samples).

// covCase is one population and bound method.
type covCase struct {
	name    string
	exact   bool // exact method: coverage must be within binomial error of gamma
	p, g    float64
	trueQ   float64                                     // true (1-p) quantile of the population
	draw    func(r *rand.Rand) ([][]float64, []float64) // groups (nil unless lot-structured) and all values
	bound   func(groups [][]float64, x []float64) (float64, error)
	comment string
}

// covResult is the outcome of runCoverage.
type covResult struct {
	name      string
	samples   int
	coverage  float64
	se        float64 // binomial standard error at gamma
	exact     bool
	gamma     float64
	comment   string
	zDeviance float64 // (coverage - gamma)/se
}

func runCoverage(c covCase, samples int, seed uint64) (covResult, error) {
	r := rand.New(rand.NewPCG(seed, 0x5eed))
	hit := 0
	for range samples {
		groups, x := c.draw(r)
		b, err := c.bound(groups, x)
		if err != nil {
			return covResult{}, fmt.Errorf("%s: %w", c.name, err)
		}
		if b <= c.trueQ {
			hit++
		}
	}
	cov := float64(hit) / float64(samples)
	se := math.Sqrt(c.g * (1 - c.g) / float64(samples))
	return covResult{c.name, samples, cov, se, c.exact, c.g, c.comment, (cov - c.g) / se}, nil
}

func covSample(r *rand.Rand, n int, f func() float64) []float64 {
	x := make([]float64, n)
	for i := range x {
		x[i] = f()
	}
	return x
}

// covCases builds the standard set of cases. Factors that depend only on n
// (normal k, Hanson-Koopmans k, Weibull pivot C) are computed once per case;
// the bound formula is then applied per sample exactly as the library does.
func covCases(t testing.TB) []covCase {
	must := func(v float64, err error) float64 {
		if err != nil {
			t.Fatal(err)
		}
		return v
	}
	var cases []covCase
	// Normal, exact (Owen 1968 factor).
	for _, c := range []struct {
		n    int
		p, g float64
	}{{10, 0.90, 0.95}, {30, 0.99, 0.95}, {5, 0.75, 0.80}} {
		k := must(NormalK(c.n, c.p, c.g))
		mu, sd := 100.0, 5.0
		cases = append(cases, covCase{
			name: fmt.Sprintf("normal n=%d p=%g g=%g", c.n, c.p, c.g), exact: true, p: c.p, g: c.g,
			trueQ: mu + sd*normQuantile(1-c.p),
			draw: func(r *rand.Rand) ([][]float64, []float64) {
				return nil, covSample(r, c.n, func() float64 { return mu + sd*r.NormFloat64() })
			},
			bound: func(_ [][]float64, x []float64) (float64, error) { m, s := meanSD(x); return m - k*s, nil },
		})
	}
	// Lognormal, exact (normal method on logs).
	{
		n, p, g := 15, 0.90, 0.95
		k := must(NormalK(n, p, g))
		cases = append(cases, covCase{
			name: "lognormal n=15 p=0.9 g=0.95", exact: true, p: p, g: g,
			trueQ: math.Exp(3 + 0.4*normQuantile(1-p)),
			draw: func(r *rand.Rand) ([][]float64, []float64) {
				return nil, covSample(r, n, func() float64 { return math.Exp(3 + 0.4*r.NormFloat64()) })
			},
			bound: func(_ [][]float64, x []float64) (float64, error) {
				y := make([]float64, len(x))
				for i, v := range x {
					y[i] = math.Log(v)
				}
				m, s := meanSD(y)
				return math.Exp(m - k*s), nil
			},
		})
	}
	// Weibull: exact pivotal (Monte Carlo factor) and handbook approximation.
	for _, c := range []struct {
		n    int
		p, g float64
	}{{15, 0.90, 0.95}, {30, 0.99, 0.95}} {
		f, err := WeibullPivotFactor(c.n, c.p, c.g, WeibullMCOptions{Sims: 20000, Seed: 11})
		if err != nil {
			t.Fatal(err)
		}
		alpha, beta := 300.0, 12.0
		tq := alpha * math.Pow(-math.Log(c.p), 1/beta)
		draw := func(r *rand.Rand) ([][]float64, []float64) {
			return nil, covSample(r, c.n, func() float64 { return alpha * math.Pow(r.ExpFloat64(), 1/beta) })
		}
		cases = append(cases, covCase{
			name: fmt.Sprintf("weibull pivotal n=%d p=%g", c.n, c.p), exact: true, p: c.p, g: c.g, trueQ: tq, draw: draw,
			bound: func(_ [][]float64, x []float64) (float64, error) {
				b, err := WeibullLowerBoundWithFactor(x, c.p, c.g, f)
				return b.Value, err
			},
			comment: "factor from 20,000 simulations",
		})
		cases = append(cases, covCase{
			name: fmt.Sprintf("weibull handbook approx n=%d p=%g", c.n, c.p), p: c.p, g: c.g, trueQ: tq, draw: draw,
			bound: func(_ [][]float64, x []float64) (float64, error) {
				b, err := WeibullApproxLowerBound(x, c.p, c.g)
				return b.Value, err
			},
			comment: "approximation (CMH-17-1G 8.3.4.3.2)",
		})
	}
	// Nonparametric: order statistic (conservative by discreteness) and
	// Hanson-Koopmans (exact for the uniform population, conservative for
	// the normal one).
	{
		n := 29
		cases = append(cases, covCase{
			name: "order statistic n=29 p=0.9 (normal pop.)", p: 0.90, g: 0.95, trueQ: normQuantile(0.10),
			draw:    func(r *rand.Rand) ([][]float64, []float64) { return nil, covSample(r, n, r.NormFloat64) },
			bound:   func(_ [][]float64, x []float64) (float64, error) { return slicesMin(x), nil },
			comment: "achieved confidence 1-0.9^29 = 0.9529",
		})
		for _, pop := range []string{"uniform", "normal", "weibull"} {
			nn := 10
			kHK := must(HansonKoopmansK(nn, nn, 0.90, 0.95))
			tq := 0.10
			gen := func(r *rand.Rand) float64 { return r.Float64() }
			switch pop {
			case "normal":
				tq = 50 + 3*normQuantile(0.10)
				gen = func(r *rand.Rand) float64 { return 50 + 3*r.NormFloat64() }
			case "weibull":
				tq = 300 * math.Pow(-math.Log(0.90), 1/12.0)
				gen = func(r *rand.Rand) float64 { return 300 * math.Pow(r.ExpFloat64(), 1/12.0) }
			}
			cases = append(cases, covCase{
				name: "Hanson-Koopmans n=10 p=0.9 (" + pop + " pop.)", exact: pop == "uniform", p: 0.90, g: 0.95, trueQ: tq,
				draw: func(r *rand.Rand) ([][]float64, []float64) {
					return nil, covSample(r, nn, func() float64 { return gen(r) })
				},
				bound: func(_ [][]float64, x []float64) (float64, error) {
					lo, hi := slicesMin(x), slicesMax(x)
					return hi * math.Pow(lo/hi, kHK), nil
				},
				comment: map[string]string{"uniform": "least favourable case: exact", "normal": "conservative", "weibull": "conservative"}[pop],
			})
		}
	}
	// Lot-structured population: x = mu + L_i + e_ij, L ~ N(0, sb^2),
	// e ~ N(0, sw^2); true quantile of the marginal N(mu, sb^2 + sw^2).
	for _, c := range []struct {
		lots, per int
		sb, sw    float64
	}{{5, 6, 2, 2}, {8, 4, 1, 3}, {5, 6, 4, 1}} {
		mu := 200.0
		tq := mu + math.Sqrt(c.sb*c.sb+c.sw*c.sw)*normQuantile(0.10)
		cases = append(cases, covCase{
			name: fmt.Sprintf("ANOVA %d lots x %d, sb=%g sw=%g", c.lots, c.per, c.sb, c.sw), p: 0.90, g: 0.95, trueQ: tq,
			draw: func(r *rand.Rand) ([][]float64, []float64) {
				gs := make([][]float64, c.lots)
				var all []float64
				for i := range gs {
					li := c.sb * r.NormFloat64()
					gs[i] = covSample(r, c.per, func() float64 { return mu + li + c.sw*r.NormFloat64() })
					all = append(all, gs[i]...)
				}
				return gs, all
			},
			bound: func(gs [][]float64, _ []float64) (float64, error) {
				b, err := ANOVALowerBound(gs, 0.90, 0.95)
				return b.Value, err
			},
			comment: "approximation (Vangel 1992 / CMH-17-1G 8.3.5.2)",
		})
	}
	return cases
}

func slicesMin(x []float64) float64 {
	m := x[0]
	for _, v := range x {
		m = math.Min(m, v)
	}
	return m
}

func slicesMax(x []float64) float64 {
	m := x[0]
	for _, v := range x {
		m = math.Max(m, v)
	}
	return m
}

func covTable(res []covResult) string {
	var sb strings.Builder
	fmt.Fprintf(&sb, "%-46s %8s %9s %7s %8s  %s\n", "case", "samples", "coverage", "gamma", "z", "note")
	for _, r := range res {
		fmt.Fprintf(&sb, "%-46s %8d %9.4f %7.3f %8.2f  %s\n", r.name, r.samples, r.coverage, r.gamma, r.zDeviance, r.comment)
	}
	return sb.String()
}

// TestCoverage: 2,000 samples per case. Exact methods must be within 3.5
// binomial standard errors of gamma (the seeds are fixed, so the test is
// deterministic); approximate and conservative methods must not be liberal
// by more than 3.5 standard errors.
func TestCoverage(t *testing.T) {
	if testing.Short() {
		t.Skip("coverage harness skipped in -short mode")
	}
	var res []covResult
	for i, c := range covCases(t) {
		r, err := runCoverage(c, 2000, uint64(1000+i))
		if err != nil {
			t.Fatal(err)
		}
		res = append(res, r)
		if r.exact && math.Abs(r.zDeviance) > 3.5 {
			t.Errorf("%s: coverage %.4f, exact method should give %.3f (z = %.2f)", r.name, r.coverage, r.gamma, r.zDeviance)
		}
		if !r.exact && r.zDeviance < -3.5 {
			t.Errorf("%s: coverage %.4f is liberal against %.3f (z = %.2f)", r.name, r.coverage, r.gamma, r.zDeviance)
		}
	}
	t.Log("\n" + covTable(res))
}

// BenchmarkCoverage runs 10,000 samples per case and prints the table.
func BenchmarkCoverage(b *testing.B) {
	for b.Loop() {
		var res []covResult
		for i, c := range covCases(b) {
			r, err := runCoverage(c, 10000, uint64(5000+i))
			if err != nil {
				b.Fatal(err)
			}
			res = append(res, r)
		}
		fmt.Print("\n" + covTable(res))
	}
}
