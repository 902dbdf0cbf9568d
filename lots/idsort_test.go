package lots

import (
	"math/rand/v2"
	"slices"
	"testing"
)

// TestRadixSortMatchesSort: the radix sort orders like slices.Sort (the
// reference), on random hashes, on values that share their high or low
// bytes (passes skipped), and on 0, 1 and 2 values.
func TestRadixSortMatchesSort(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	gens := map[string]func() uint64{
		"random":       rng.Uint64,
		"low bytes":    func() uint64 { return rng.Uint64() & 0xffff },
		"high bytes":   func() uint64 { return rng.Uint64() &^ 0xffffffffffff },
		"few values":   func() uint64 { return uint64(rng.IntN(3)) << 40 },
		"all the same": func() uint64 { return 7 },
	}
	for name, gen := range gens {
		for _, n := range []int{0, 1, 2, 3, 1000, 70000} {
			a := make([]uint64, n)
			for i := range a {
				a[i] = gen()
			}
			want := slices.Clone(a)
			slices.Sort(want)
			radixSort(a, make([]uint64, n))
			if !slices.Equal(a, want) {
				t.Errorf("%s, %d values: not sorted as slices.Sort sorts", name, n)
			}
		}
	}
}

// TestIDRunsFindRepeats: the sorted-run check finds a repeat exactly when
// a map of the hashes (the reference) does: none, one within a run, one
// across runs (written to files and merged), one in the last, partial run
// against an earlier run, with one run or many.
func TestIDRunsFindRepeats(t *testing.T) {
	defer func(n int) { idRunLen = n }(idRunLen)
	idRunLen = 1000
	rng := rand.New(rand.NewPCG(7, 8))
	for _, n := range []int{0, 1, 999, 1000, 1001, 5500} {
		base := make([]uint64, n)
		for i := range base {
			base[i] = rng.Uint64()
		}
		cases := map[string][]uint64{"none": base}
		if n >= 2 {
			for name, at := range map[string][2]int{"first and last": {0, n - 1}, "neighbours": {n / 2, n/2 + 1}, "first two": {0, 1}} {
				c := slices.Clone(base)
				c[at[1]] = c[at[0]]
				cases[name] = c
			}
		}
		for name, hs := range cases {
			seen := map[uint64]bool{}
			want := false
			for _, h := range hs {
				want = want || seen[h]
				seen[h] = true
			}
			var r idRuns
			for _, h := range hs {
				r.add(h)
			}
			got, err := r.finish()
			if err != nil {
				t.Fatal(err)
			}
			if got != want {
				t.Errorf("%d ids, repeat %s: found %v, want %v", n, name, got, want)
			}
		}
	}
}
