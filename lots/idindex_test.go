package lots

import (
	"bufio"
	"encoding/binary"
	"io"
	"math/rand/v2"
	"slices"
	"testing"
)

// A spilled run holds every entry of the table once, in increasing key
// order (the merge of the runs relies on it): for random hashes, and for
// hashes made to share a few home slots (long clusters, some wrapping
// around the end of the table).
func TestIDIndexSpillSorted(t *testing.T) {
	// The inverse of fibonacci modulo 2^64 (Newton's iteration for the
	// inverse of an odd number: each step doubles the correct bits).
	inv := uint64(fibonacci)
	for range 6 {
		inv *= 2 - fibonacci*inv
	}
	if inv*fibonacci != 1 {
		t.Fatal("no inverse")
	}
	r := rand.New(rand.NewPCG(8, 9))
	cases := map[string][]uint64{}
	var random, crowded []uint64
	for range 5000 {
		random = append(random, r.Uint64()|1)
	}
	for i := range 3000 {
		// Keys in four narrow bands, one at the very top (its cluster
		// wraps past the end of the table).
		band := []uint64{0, 1 << 62, 3 << 62, ^uint64(0) - 1<<50}[i%4]
		crowded = append(crowded, (band+r.Uint64()>>14)*inv)
	}
	cases["random"], cases["crowded"] = random, crowded
	for name, hs := range cases {
		x := idIndex{memCap: 1 << 20}
		for i, h := range hs {
			x.seen(h, i+2, 1)
		}
		if err := x.spill(); err != nil {
			t.Fatal(err)
		}
		br := bufio.NewReader(x.runs[0])
		var keys []uint64
		var b [16]byte
		for {
			if _, err := io.ReadFull(br, b[:]); err != nil {
				break
			}
			keys = append(keys, binary.LittleEndian.Uint64(b[:]))
		}
		x.close()
		want := make([]uint64, 0, len(hs))
		for _, h := range hs {
			want = append(want, h*fibonacci)
		}
		slices.Sort(want)
		want = slices.Compact(want)
		if !slices.Equal(keys, want) {
			t.Errorf("%s: run of %d keys is not the %d keys in order (sorted: %v)", name, len(keys), len(want), slices.IsSorted(keys))
		}
	}
}
