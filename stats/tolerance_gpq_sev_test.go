package stats

import (
	"math"
	"math/rand/v2"
	"sort"
	"testing"
)

// The quantiles of sqrt(ρ) Z + sqrt(1-ρ) e (standard normal plus
// standardized smallest extreme value) the SEV random-effects bound uses,
// against scipy 1.10.1 (quad over gumbel_l and norm, brentq;
// testdata/stats/make_sevnorm_ref.py). At ρ = 0 the closed form against
// scipy's gumbel_l.ppf. Allowed: 2e-5 (Simpson's rule with 64 intervals).
func TestSEVNormalQuantileAgainstScipy(t *testing.T) {
	var ref struct {
		Rows []struct{ Rho, Alpha, Quantile float64 }
	}
	loadJSON(t, "../testdata/stats/sevnorm_ref.json", &ref)
	if len(ref.Rows) < 20 {
		t.Fatalf("%d reference rows", len(ref.Rows))
	}
	for _, r := range ref.Rows {
		got := sevNormalQuantile(r.Alpha, r.Rho)
		if math.Abs(got-r.Quantile) > 2e-5 {
			t.Errorf("rho %g alpha %g: %.8f, scipy %.8f", r.Rho, r.Alpha, got, r.Quantile)
		}
	}
	// ρ = 1: the normal quantile (scipy norm.ppf(0.01) = -2.3263478740408408).
	if got := sevNormalQuantile(0.01, 1); math.Abs(got+2.3263478740408408) > 1e-12 {
		t.Errorf("rho 1: %.15f", got)
	}
}

// With normal errors the bounds are RandomEffectsLowerBound's, from the
// same pivots, at every content at once; with SEV errors (the logarithms of
// Weibull values) the A-basis bound lies below the B-basis bound, below the
// normal-theory one (the SEV's lower tail is longer), and the same seed
// gives the same bound.
func TestRandomEffectsLowerBoundsWithin(t *testing.T) {
	rng := rand.New(rand.NewPCG(21, 22))
	var g [][]float64
	for i := 0; i < 6; i++ {
		l := 0.05 * rng.NormFloat64()
		var lot []float64
		for j := 0; j < 5; j++ {
			lot = append(lot, 4.6+l+math.Log(-math.Log(1-rng.Float64()))/20)
		}
		g = append(g, lot)
	}
	ps := []float64{0.99, 0.90}
	nb, err := RandomEffectsLowerBounds(g, ps, 0.95, WithinNormal, GPQOptions{Seed: 4})
	if err != nil {
		t.Fatal(err)
	}
	for i, p := range ps {
		one, err := RandomEffectsLowerBound(g, p, 0.95, GPQOptions{Seed: 4})
		if err != nil || one.Value != nb[i].Value || one.Factor != nb[i].Factor {
			t.Errorf("p %g: %v %g, RandomEffectsLowerBound %g", p, err, nb[i].Value, one.Value)
		}
	}
	sb, err := RandomEffectsLowerBounds(g, ps, 0.95, WithinSEV, GPQOptions{Seed: 4})
	if err != nil {
		t.Fatal(err)
	}
	again, _ := RandomEffectsLowerBounds(g, ps, 0.95, WithinSEV, GPQOptions{Seed: 4})
	t.Logf("normal: A %.5f B %.5f; SEV: A %.5f (df %.1f) B %.5f", nb[0].Value, nb[1].Value, sb[0].Value, sb[0].Params["withinDF"], sb[1].Value)
	if !(sb[0].Value < sb[1].Value) || !(sb[0].Value < nb[0].Value) || again[0].Value != sb[0].Value || again[1].Value != sb[1].Value {
		t.Errorf("SEV A %g B %g (again %g %g), normal A %g", sb[0].Value, sb[1].Value, again[0].Value, again[1].Value, nb[0].Value)
	}
	// The SEV within-lot degrees of freedom: 2 (N-a)² / Σ (2 (n-1) + 2.4 (n-1)²/n)
	// = 2·24² / (6 (8 + 2.4·16/5)) = 1152/94.08.
	if df := sb[0].Params["withinDF"]; math.Abs(df-1152/94.08) > 1e-12 {
		t.Errorf("within df %.15g, want %.15g", df, 1152/94.08)
	}
	if _, err := RandomEffectsLowerBounds(g, ps, 0.95, "gamma", GPQOptions{}); err == nil {
		t.Error("unknown within-lot distribution accepted")
	}
	if _, err := RandomEffectsLowerBounds(g[:1], ps, 0.95, WithinSEV, GPQOptions{}); err == nil {
		t.Error("one group accepted")
	}
}

// selectKth puts the k-th smallest value in place (against sorting).
func TestSelectKth(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 1))
	for trial := 0; trial < 200; trial++ {
		n := 1 + rng.IntN(60)
		v := make([]float64, n)
		for i := range v {
			v[i] = float64(rng.IntN(10))
		}
		s := append([]float64(nil), v...)
		sort.Float64s(s)
		k := rng.IntN(n)
		SelectKth(v, k)
		if v[k] != s[k] {
			t.Fatalf("n %d k %d: %g, sorted %g", n, k, v[k], s[k])
		}
		for i := range v {
			if (i < k && v[i] > v[k]) || (i > k && v[i] < v[k]) {
				t.Fatalf("n %d k %d: not partitioned at %d", n, k, i)
			}
		}
	}
}
