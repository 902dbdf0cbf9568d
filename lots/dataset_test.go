package lots

import (
	"bytes"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"reflect"
	"runtime"
	"strconv"
	"testing"

	"lotproof/lots/scale"
)

// plainSpecimens are specimens with repeating identities, missing values
// and ids of varied length, enough to fill more than two column blocks.
func plainSpecimens(n int) []Specimen {
	rng := rand.New(rand.NewPCG(3, 4))
	out := make([]Specimen, n)
	for i := range out {
		lot := i / 7
		if i%11 == 0 {
			lot = rng.IntN(lot + 1) // a lot that comes back later
		}
		v := []float64{rng.NormFloat64(), rng.NormFloat64(), rng.NormFloat64()}
		if i%13 == 0 {
			v[i%3] = math.NaN()
		}
		out[i] = Specimen{ID: fmt.Sprintf("S%0*d", 1+i%9, i), Lot: fmt.Sprint("L", lot), Heat: fmt.Sprint("H", lot/3),
			Supplier: fmt.Sprint("sup", lot%4), Material: "bar", Tested: fmt.Sprintf("2026-01-%02d", 1+lot%28),
			Condition: []string{"", "RT", "hot"}[lot%3], Values: v, Line: i + 2}
	}
	return out
}

func sameSpecimen(t *testing.T, what string, got, want Specimen) {
	t.Helper()
	gv, wv := got.Values, want.Values
	got.Values, want.Values = nil, nil
	if !reflect.DeepEqual(got, want) {
		t.Fatalf("%s: got %+v, want %+v", what, got, want)
	}
	for j := range wv {
		if !(gv[j] == wv[j] || math.IsNaN(gv[j]) && math.IsNaN(wv[j])) {
			t.Fatalf("%s: value %d is %v, want %v", what, j, gv[j], wv[j])
		}
	}
}

// TestDatasetColumns: the column store gives back every specimen as added,
// across block boundaries, after Set and Truncate, and its Missing,
// Conditions and Group agree with the same done plainly over a slice.
func TestDatasetColumns(t *testing.T) {
	const n = 2<<blockBits + 5
	want := plainSpecimens(n)
	props := []Property{{Name: "a"}, {Name: "b"}, {Name: "c"}}
	d := NewDataset("x.csv", props, want...)
	if d.Len() != n {
		t.Fatalf("Len %d, want %d", d.Len(), n)
	}
	missing := make([]int, 3)
	for i, s := range want {
		sameSpecimen(t, fmt.Sprint("specimen ", i), d.Specimen(i), s)
		if d.ID(i) != s.ID || d.Value(i, 1) != s.Values[1] && !math.IsNaN(s.Values[1]) {
			t.Fatalf("specimen %d: ID or Value differs", i)
		}
		for j, v := range s.Values {
			if math.IsNaN(v) {
				missing[j]++
			}
		}
	}
	if !reflect.DeepEqual(d.Missing, missing) {
		t.Errorf("Missing %v, want %v", d.Missing, missing)
	}
	if got := d.Conditions(); !reflect.DeepEqual(got, []string{"", "RT", "hot"}) {
		t.Errorf("Conditions %q", got)
	}

	// Group, plainly: by lot in order of first appearance.
	for _, by := range []GroupBy{ByLot, ByHeat} {
		keep := InCondition("RT")
		got, err := d.Group(by, keep)
		if err != nil {
			t.Fatal(err)
		}
		index := map[string]int{}
		var plain []Group
		for i := range want {
			s := &want[i]
			if !keep(s) {
				continue
			}
			key := s.Lot
			if by == ByHeat {
				key = s.Heat
			}
			g, ok := index[key]
			if !ok {
				g = len(plain)
				index[key] = g
				plain = append(plain, Group{Key: key, Supplier: s.Supplier, Material: s.Material})
			}
			if plain[g].Supplier != s.Supplier || plain[g].Material != s.Material {
				plain[g].Mixed = true
			}
			plain[g].Specimens = append(plain[g].Specimens, i)
		}
		if !reflect.DeepEqual(got, plain) {
			t.Errorf("Group by %s differs from the plain grouping (%d and %d groups)", by, len(got), len(plain))
		}
	}

	// Values share the store; Set replaces a specimen, with a new
	// identity and a longer id.
	d.Specimen(5).Values[0] = 42
	if d.Value(5, 0) != 42 {
		t.Error("writing to Specimen(i).Values did not reach the dataset")
	}
	s := want[1<<blockBits]
	s.ID, s.Lot, s.Line, s.Values = s.ID+"-retest", "L-new", 9, []float64{1, 2, 3}
	d.Set(1<<blockBits, s)
	sameSpecimen(t, "after Set", d.Specimen(1<<blockBits), s)
	sameSpecimen(t, "its neighbour", d.Specimen(1<<blockBits+1), want[1<<blockBits+1])
	want[1<<blockBits] = s

	for _, k := range []int{1<<blockBits + 1, 1 << blockBits, 3, 0} {
		d.Truncate(k)
		if d.Len() != k {
			t.Fatalf("Truncate(%d): Len %d", k, d.Len())
		}
		i := 0
		for range d.All() {
			i++
		}
		if i != k {
			t.Fatalf("Truncate(%d): All gave %d", k, i)
		}
		if k > 0 {
			sameSpecimen(t, fmt.Sprint("last after Truncate ", k), d.Specimen(k-1), want[k-1])
		}
	}
	d.Add(want[7]) // grows again after truncating to nothing
	sameSpecimen(t, "added after Truncate(0)", d.Specimen(0), want[7])
}

// BenchmarkDatasetBytes reads a generated, invented year of receipts
// (1,000,000 specimens in 20,000 lots, three properties; set
// LOTPROOF_SCALE_SPECIMENS for another size) into a Dataset and reports
// the heap it keeps per specimen: what allowables holds (issue 12 asks
// for the bytes per specimen to be stated).
//
//	go test ./lots -run XXX -bench DatasetBytes -benchtime 1x
func BenchmarkDatasetBytes(b *testing.B) {
	n := 1_000_000
	if v, err := strconv.Atoi(os.Getenv("LOTPROOF_SCALE_SPECIMENS")); err == nil && v > 0 {
		n = v
	}
	var buf bytes.Buffer
	if _, err := scale.Write(&buf, scale.Options{Specimens: n, Lots: max(1, n/50)}); err != nil {
		b.Fatal(err)
	}
	b.SetBytes(int64(buf.Len()))
	var kept uint64
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		var before, after runtime.MemStats
		runtime.GC()
		runtime.ReadMemStats(&before)
		d, err := ReadCSV(bytes.NewReader(buf.Bytes()), "receipts.csv")
		if err != nil {
			b.Fatal(err)
		}
		runtime.GC()
		runtime.ReadMemStats(&after)
		kept = after.HeapAlloc - before.HeapAlloc
		runtime.KeepAlive(d)
	}
	b.ReportMetric(float64(kept)/float64(n), "bytes/specimen")
}
