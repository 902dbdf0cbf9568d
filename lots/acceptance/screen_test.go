package acceptance

import (
	"math/rand/v2"
	"testing"

	"lotproof/stats"
)

// The shortcut never hides a value stats.ScreenOutliers flags: on 20,000
// random samples (n = 3 to 60, some with a planted far value, some scaled
// so that the largest residual sits at the critical value), whenever it
// says "clearly no outlier" the screen flags nothing; and it does skip
// most clean samples.
func TestClearlyNoOutlierNeverHidesOne(t *testing.T) {
	r := rand.New(rand.NewPCG(12, 34))
	m := stats.NewFactors()
	skipped, clean := 0, 0
	for i := 0; i < 20000; i++ {
		n := 3 + r.IntN(58)
		x := make([]float64, n)
		for j := range x {
			x[j] = 1000 + 10*r.NormFloat64()
		}
		switch i % 4 {
		case 1: // a planted far value
			x[r.IntN(n)] += 10 * (2 + 4*r.Float64())
		case 2: // the largest residual at the critical value, give or take
			c, _ := stats.MNRCritical(n, OutlierAlpha)
			mr, err := stats.MaxNormedResidual(x, OutlierAlpha)
			if err != nil {
				t.Fatal(err)
			}
			// Move the extreme value so that its normed residual is
			// about c (not exactly: the mean and SD move with it).
			x[mr.Index] += (c - mr.MNR) * 10 * (1 + 1e-3*r.NormFloat64())
		}
		fl, err := stats.ScreenOutliers(x, OutlierAlpha, true)
		if err != nil {
			t.Fatal(err)
		}
		if len(fl) == 0 {
			clean++
		}
		if clearlyNoOutlier(m, x) {
			skipped++
			if len(fl) > 0 {
				t.Fatalf("sample %d (n = %d): shortcut says no outlier, the screen flags %+v", i, n, fl[0])
			}
		}
	}
	if skipped < clean*9/10 {
		t.Errorf("shortcut taken for %d of %d clean samples", skipped, clean)
	}
}
