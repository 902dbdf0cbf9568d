package stats

import (
	"math"
	"math/rand/v2"
	"testing"
)

// Reference: testdata/acceptance/specimens_ref.json from
// make_specimens_ref.py (Debian python3-scipy 1.10.1, scipy.stats.nct).
func TestToleranceBoundPassProbAgainstScipy(t *testing.T) {
	var ref struct {
		Rows []struct {
			N                         int
			P, Gamma, Margin, K, Prob float64
		}
	}
	loadJSON(t, "../testdata/acceptance/specimens_ref.json", &ref)
	if len(ref.Rows) != 105 {
		t.Fatalf("%d rows", len(ref.Rows))
	}
	for _, r := range ref.Rows {
		got, err := ToleranceBoundPassProb(r.N, r.P, r.Gamma, r.Margin)
		if err != nil {
			t.Fatal(err)
		}
		// scipy's nct.ppf (k) is good to about 1e-9 relative; the
		// probability inherits that through the density at k.
		tail := math.Min(r.Prob, 1-r.Prob)
		if math.Abs(got-r.Prob) > 1e-7*tail+1e-12 {
			t.Errorf("n=%d p=%g g=%g m=%g: got %.12g want %.12g", r.N, r.P, r.Gamma, r.Margin, got, r.Prob)
		}
	}
	// At margin z_p the probability is 1 - gamma for every n (definition of k).
	for _, n := range []int{3, 10, 50} {
		got, _ := ToleranceBoundPassProb(n, 0.9, 0.95, normalQuantile(0.9))
		if math.Abs(got-0.05) > 1e-9 {
			t.Errorf("n=%d: %g at margin z_p", n, got)
		}
	}
}

// Checked by simulation: draw n values with the mean margin SDs above
// L = 0 and count xbar - k s >= 0.
func TestToleranceBoundPassProbBySimulation(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 13))
	const n, margin, reps = 8, 2.2, 40000
	k, err := NormalK(n, 0.9, 0.9)
	if err != nil {
		t.Fatal(err)
	}
	x := make([]float64, n)
	pass := 0
	for range reps {
		for i := range x {
			x[i] = margin + rng.NormFloat64()
		}
		m, s := meanSD(x)
		if m-k*s >= 0 {
			pass++
		}
	}
	got := float64(pass) / reps
	want, _ := ToleranceBoundPassProb(n, 0.9, 0.9, margin)
	if se := math.Sqrt(want * (1 - want) / reps); math.Abs(got-want) > 4*se {
		t.Errorf("simulated %g, exact %g (se %g)", got, want, se)
	}
}
