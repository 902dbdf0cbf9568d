package campaign

import (
	"encoding/json"
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"

	"lotproof/lots/allowables"
	"lotproof/stats"
)

func config(plans []Plan, pop Population, runs int) Config {
	return Config{Plans: plans, Population: pop, Procedure: allowables.DefaultOptions(), Runs: runs, Seed: 7, CostSpecimen: 1}
}

// The populations have the mean, CV and percentiles asked for: checked
// against gonum's distributions (normal, lognormal, Weibull without a lot
// effect) and, for the Weibull population with a lot effect, against a
// large sample of it (200,000 values; binomial standard error of the
// fraction below the 10th percentile 0.00067).
func TestPopulationModel(t *testing.T) {
	for _, c := range []struct {
		pop Population
	}{
		{Population{Normal, 100, 0.05, 0}}, {Population{Normal, 100, 0.05, 0.5}},
		{Population{Lognormal, 100, 0.08, 0}}, {Population{Lognormal, 100, 0.08, 0.8}},
		{Population{Weibull, 100, 0.0712, 0}}, {Population{Weibull, 100, 0.05, 0.5}}, {Population{Weibull, 100, 0.10, 0.8}},
	} {
		m, err := c.pop.newModel()
		if err != nil {
			t.Fatal(err)
		}
		// Outside references for the percentiles.
		for _, q := range []float64{0.01, 0.10} {
			got := m.quantile(q)
			var want float64
			switch {
			case c.pop.Dist == Normal:
				want = distuv.Normal{Mu: 100, Sigma: 5}.Quantile(q)
			case c.pop.Dist == Lognormal:
				want = distuv.LogNormal{Mu: m.mu, Sigma: math.Hypot(m.sb, m.sw)}.Quantile(q)
			case m.sb == 0:
				want = distuv.Weibull{K: m.shape, Lambda: m.scale}.Quantile(q)
			default:
				want = math.NaN() // checked by sampling below
			}
			if !math.IsNaN(want) && math.Abs(got-want) > 1e-9*want {
				t.Errorf("%+v: quantile %g = %.10g, want %.10g", c.pop, q, got, want)
			}
		}
		// Sampling: the mean and CV (200,000 values), and the fraction
		// below the 10th percentile.
		rng := rand.New(rand.NewPCG(1, 2))
		var xs []float64
		for len(xs) < 200000 {
			for _, lot := range m.sample(rng, 100, 20) {
				xs = append(xs, lot...)
			}
		}
		f, _ := stats.FitNormal(xs)
		if math.Abs(f.Mu/100-1) > 0.003 || math.Abs(f.Sigma/f.Mu/c.pop.CV-1) > 0.03 {
			t.Errorf("%+v: sample mean %.4g, CV %.4g", c.pop, f.Mu, f.Sigma/f.Mu)
		}
		q := m.quantile(0.10)
		below := 0
		for _, x := range xs {
			if x <= q {
				below++
			}
		}
		// Lot effects make values within a lot dependent (a design effect
		// of at most 20, the values per lot): allow 5 standard errors of
		// 200,000/20 independent values.
		if fr := float64(below) / float64(len(xs)); math.Abs(fr-0.10) > 5*math.Sqrt(0.09*20/float64(len(xs))) {
			t.Errorf("%+v: fraction below the 10th percentile %.4f", c.pop, fr)
		}
	}
}

// The same seed gives the same answer whatever the number of workers.
func TestDeterministicAcrossWorkers(t *testing.T) {
	c := config([]Plan{{3, 6}, {5, 4}}, Population{Weibull, 100, 0.06, 0.3}, 40)
	var out []string
	for _, w := range []int{1, 2, 5} {
		c.Workers = w
		r, err := Run(c)
		if err != nil {
			t.Fatal(err)
		}
		b, _ := json.Marshal(r)
		out = append(out, string(b))
	}
	if out[0] != out[1] || out[0] != out[2] {
		t.Errorf("results differ with the number of workers:\n%s\n%s", out[0], out[1])
	}
}

// With the normal method forced on a normal population without a lot
// effect, the design value is the exact one-sided normal tolerance bound
// x̄ - k s (k from the noncentral t, Owen 1958; Odeh and Owen 1980), whose
// coverage is the confidence, 0.95, by construction. Its ratio to the
// true percentile μ + z σ has
//
//   - the exact mean (μ - k σ c4(n)) / (μ + z σ), with c4(n) =
//     sqrt(2/(n-1)) Γ(n/2)/Γ((n-1)/2), E s = c4 σ, and
//   - approximately the median (μ - k σ m_n) / (μ + z σ), with m_n =
//     sqrt(χ²_{0.5}(n-1)/(n-1)) the median of s/σ (the chi distribution;
//     x̄ is symmetric and independent of s, so the median of the difference
//     is close to this; the gap is of order k σ (E s - median s)/√n).
//
// The chi-square median comes from gonum's distuv.ChiSquared, the gamma
// function from the Go standard library.
func TestForcedNormalMatchesTheory(t *testing.T) {
	const runs = 4000
	pop := Population{Normal, 100, 0.05, 0}
	c := config([]Plan{{5, 6}, {3, 4}}, pop, runs)
	c.Procedure.Method = allowables.Normal
	r, err := Run(c)
	if err != nil {
		t.Fatal(err)
	}
	m, _ := pop.newModel()
	for _, p := range r.Plans {
		n := p.N
		for _, lv := range []struct {
			name   string
			l      allowables.Level
			cover  float64
			median float64
		}{{"A", c.Procedure.A, float64(p.CoverageA), float64(p.MedianARatio)}, {"B", c.Procedure.B, float64(p.CoverageB), float64(p.MedianBRatio)}} {
			se := math.Sqrt(0.95 * 0.05 / runs)
			if math.Abs(lv.cover-0.95) > 3*se {
				t.Errorf("%dx%d %s: coverage %.4f, theory 0.95 (3 SE %.4f)", p.Lots, p.Specimens, lv.name, lv.cover, 3*se)
			}
			k, err := stats.NormalK(n, lv.l.Content, lv.l.Confidence)
			if err != nil {
				t.Fatal(err)
			}
			z := distuv.UnitNormal.Quantile(1 - lv.l.Content)
			q := m.mu + z*m.sw
			mn := math.Sqrt(distuv.ChiSquared{K: float64(n - 1)}.Quantile(0.5) / float64(n-1))
			want := (m.mu - k*m.sw*mn) / q
			// Sampling SD of the ratio: sqrt(1/n + k²/(2(n-1))) σ/q;
			// the median's standard error is about 1.25 SD/√runs; allow 4
			// of them plus the approximation gap k σ (c4 - m_n)/√n / q.
			sd := math.Sqrt(1/float64(n)+k*k/(2*float64(n-1))) * m.sw / q
			lg1, _ := math.Lgamma(float64(n) / 2)
			lg2, _ := math.Lgamma(float64(n-1) / 2)
			c4 := math.Sqrt(2/float64(n-1)) * math.Exp(lg1-lg2)
			tol := 4*1.25*sd/math.Sqrt(runs) + k*m.sw*(c4-mn)/math.Sqrt(float64(n))/q
			t.Logf("%dx%d %s: coverage %.4f, median ratio %.5f, approximation %.5f (tolerance %.5f)", p.Lots, p.Specimens, lv.name, lv.cover, lv.median, want, tol)
			if math.Abs(lv.median-want) > tol {
				t.Errorf("%dx%d %s: median ratio %.5f, approximation %.5f, tolerance %.5f", p.Lots, p.Specimens, lv.name, lv.median, want, tol)
			}
		}
	}
}

// The named random-effects method (the generalized pivotal bound for
// normal lots) keeps its confidence where the handbook procedure is known
// to fall short: 5 lots of 6 with the between-lot SD equal to the within-lot
// SD (README coverage table). 400 campaigns: allowed 0.95 - 3 SE.
func TestRandomEffectsMethodCoverage(t *testing.T) {
	if testing.Short() {
		t.Skip("coverage simulation skipped with -short")
	}
	const runs = 400
	c := config([]Plan{{5, 6}}, gridPopulation(Normal, 1), runs)
	c.Procedure.Method = allowables.RandomEffects
	r, err := Run(c)
	if err != nil {
		t.Fatal(err)
	}
	p := r.Plans[0]
	se := math.Sqrt(0.95 * 0.05 / runs)
	t.Logf("5x6 SD ratio 1, random-effects: A %.3f B %.3f, median B ratio %.3f, methods %v", float64(p.CoverageA), float64(p.CoverageB), float64(p.MedianBRatio), p.Methods)
	if float64(p.CoverageA) < 0.95-3*se || float64(p.CoverageB) < 0.95-3*se || p.Methods[allowables.RandomEffects] != runs {
		t.Errorf("coverage A %.3f B %.3f (floor %.3f), methods %v", float64(p.CoverageA), float64(p.CoverageB), 0.95-3*se, p.Methods)
	}
}

// The cheapest plan is the lowest-cost one reaching the target; none when
// no plan does.
func TestCheapest(t *testing.T) {
	r := &Result{TargetRatio: 0.95, TargetBasis: "b", Plans: []PlanResult{
		{Lots: 10, Specimens: 6, N: 60, Cost: 60, MedianBRatio: 0.97},
		{Lots: 5, Specimens: 6, N: 30, Cost: 30, MedianBRatio: 0.955},
		{Lots: 3, Specimens: 6, N: 18, Cost: 18, MedianBRatio: 0.94},
	}}
	if p := cheapest(r); p == nil || p.Lots != 5 {
		t.Errorf("cheapest %v, want 5 x 6", p)
	}
	r.TargetRatio = 0.99
	if p := cheapest(r); p != nil {
		t.Errorf("cheapest %v, want none", p)
	}
	if q := Quantile([]float64{1, 2, 3, 4}, 0.1); math.Abs(q-1.3) > 1e-12 { // type 7: 1 + 0.3 (2 - 1)
		t.Errorf("quantile %g", q)
	}
}
