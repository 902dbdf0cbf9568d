package stats

import (
	"math/rand/v2"
	"sort"
	"testing"
)

// TestSelectK: the selection agrees with sorting (sort.Float64s, the
// standard library's reference) on random data with ties, for every k.
func TestSelectK(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	for _, n := range []int{1, 2, 3, 10, 101, 1000} {
		v := make([]float64, n)
		for i := range v {
			v[i] = float64(rng.IntN(n/2 + 1))
		}
		sorted := append([]float64(nil), v...)
		sort.Float64s(sorted)
		for k := 0; k < n; k++ {
			w := append([]float64(nil), v...)
			if got := SelectKth(w, k); got != sorted[k] {
				t.Fatalf("n %d k %d: %g, want %g", n, k, got, sorted[k])
			}
		}
	}
}
