package stats

import (
	"math"
	"math/rand/v2"
	"testing"
)

// With no within-group spread the random-effects pivot reduces to the
// exact normal tolerance bound on the group means: R_q's (1-γ) quantile is
// ȳ - s_ȳ t'_γ(a-1, z_p √a)/√a, the one-sample bound of Owen (1958) with
// the a group means as the sample (algebra from the pivot definitions in
// Krishnamoorthy and Mathew 2004). NormalLowerBound is itself checked
// against published k tables (tolerance_test.go). Allowed: 4 Monte Carlo
// standard errors.
func TestRandomEffectsReducesToNormalOnMeans(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	for _, a := range []int{3, 5, 10} {
		var groups [][]float64
		var means []float64
		for i := 0; i < a; i++ {
			m := 100 + 5*rng.NormFloat64()
			means = append(means, m)
			groups = append(groups, []float64{m - 1e-9, m, m + 1e-9})
		}
		for _, lv := range [][2]float64{{0.90, 0.95}, {0.99, 0.95}} {
			got, err := RandomEffectsLowerBound(groups, lv[0], lv[1], GPQOptions{Sims: 40000, Seed: 1})
			if err != nil {
				t.Fatal(err)
			}
			want, err := NormalLowerBound(means, lv[0], lv[1])
			if err != nil {
				t.Fatal(err)
			}
			t.Logf("a=%d p=%g: GPQ %.5f (SE %.4f), normal on means %.5f", a, lv[0], got.Value, got.MCStdErr, want.Value)
			if math.Abs(got.Value-want.Value) > 4*got.MCStdErr {
				t.Errorf("a=%d p=%g: GPQ %.5f, normal bound on the means %.5f (MC SE %.4f)", a, lv[0], got.Value, want.Value, got.MCStdErr)
			}
		}
	}
}

// Same seed, same bound; A-basis below B-basis; input errors.
func TestRandomEffectsBasics(t *testing.T) {
	g := [][]float64{{98, 101, 103}, {95, 97, 99, 96}, {104, 102, 106}}
	a1, _ := RandomEffectsLowerBound(g, 0.99, 0.95, GPQOptions{Seed: 3})
	a2, _ := RandomEffectsLowerBound(g, 0.99, 0.95, GPQOptions{Seed: 3})
	b, _ := RandomEffectsLowerBound(g, 0.90, 0.95, GPQOptions{Seed: 3})
	if a1.Value != a2.Value || !(a1.Value < b.Value) || !(b.Value < 95) {
		t.Errorf("A %g %g, B %g", a1.Value, a2.Value, b.Value)
	}
	for _, bad := range [][][]float64{{{1, 2, 3}}, {{1}, {2}}, {{1, 2}, {}}, {{5, 5}, {5, 5}}} {
		if _, err := RandomEffectsLowerBound(bad, 0.9, 0.95, GPQOptions{}); err == nil {
			t.Errorf("%v: no error", bad)
		}
	}
}
