package stats

import (
	"encoding/json"
	"math"
	"math/rand/v2"
	"os"
	"runtime"
	"strconv"
	"testing"
)

// TestNormalKTableMatchesNormalK: the table route (interpolated over
// decades of sizes above 100, normalkpanel.go) agrees with NormalK (the
// route checked against mpmath and scipy in noncentral_ref_test.go) to
// 1e-12 relative (measured: 2.7e-15), for every n from 2 to 3,000 and every 37th n up to
// 100,000, at the A- and B-basis levels and at unusual levels; the values
// do not depend on the number of goroutines.
func TestNormalKTableMatchesNormalK(t *testing.T) {
	var ns []int
	for n := 2; n <= 3000; n++ {
		ns = append(ns, n)
	}
	for n := 3001; n <= 100000; n += 37 {
		ns = append(ns, n)
	}
	ns = append(ns, 100000)
	levels := [][2]float64{{0.99, 0.95}, {0.90, 0.95}, {0.5, 0.95}, {0.999, 0.999}, {0.9, 0.75}, {0.999, 0.5001}, {0.95, 0.05}}
	if testing.Short() {
		levels = levels[:2]
	}
	for _, pg := range levels {
		p, g := pg[0], pg[1]
		ks, err := NormalKTable(ns, p, g)
		if err != nil {
			t.Fatal(err)
		}
		worst := 0.0
		stride := 1
		if !(p == 0.99 && g == 0.95) {
			stride = 7 // keep the test short: NormalK is the slow side
		}
		for i := 0; i < len(ns); i += stride {
			want, err := NormalK(ns[i], p, g)
			if err != nil {
				t.Fatal(err)
			}
			e := math.Abs(ks[i]-want) / want
			worst = math.Max(worst, e)
			if e > 1e-12 {
				t.Errorf("p=%g gamma=%g n=%d: table %.17g, NormalK %.17g (rel %.2g)", p, g, ns[i], ks[i], want, e)
			}
		}
		// The fast route must actually be taken (n > 100), not NormalK.
		out := make([]float64, len(ns)-99)
		fast, err := normalKRun(ns[99:], p, g, out)
		if err != nil || fast < len(out)*99/100 {
			t.Errorf("p=%g gamma=%g: fast route for %d of %d sizes (%v)", p, g, fast, len(out), err)
		}
		t.Logf("p=%g gamma=%g: worst relative difference %.2g; fast route %d of %d", p, g, worst, fast, len(out))
		// The decades of sizes above 100 are interpolated (both checks
		// of normalkpanel.go pass), not left to the per-size route.
		for j := range 3 {
			if _, ok := buildKPanel(j, p, g); !ok {
				t.Errorf("p=%g gamma=%g: sizes %d and up not interpolated", p, g, kPanelBase*int(math.Pow(10, float64(j))))
			}
		}
	}
	// Same values on one goroutine.
	prev := runtime.GOMAXPROCS(1)
	one, err := NormalKTable(ns[:5000], 0.99, 0.95)
	runtime.GOMAXPROCS(prev)
	if err != nil {
		t.Fatal(err)
	}
	all, _ := NormalKTable(ns[:5000], 0.99, 0.95)
	for i := range one {
		if math.Float64bits(one[i]) != math.Float64bits(all[i]) {
			t.Fatalf("n=%d: one goroutine %v, all %v", ns[i], one[i], all[i])
		}
	}
}

// TestNormalKTableAgainstReferences: the table route against scipy on the
// dense grid (every n to 200 and every 997th to 100,000, computed as one
// table; gen_normal_k_dense.py) and against mpmath at its points
// (gen_normal_k.py, each with its two predecessors so that the warm start is
// exercised), at NormalK's tolerance of 1e-9 relative.
func TestNormalKTableAgainstReferences(t *testing.T) {
	b, err := os.ReadFile("../testdata/tolerance/normal_k_dense.json")
	if err != nil {
		t.Fatal(err)
	}
	var dense struct {
		N []int
		K map[string][]*float64
	}
	if err := json.Unmarshal(b, &dense); err != nil {
		t.Fatal(err)
	}
	count := 0
	for ps, ref := range dense.K {
		p, _ := strconv.ParseFloat(ps, 64)
		ks, err := NormalKTable(dense.N, p, 0.95)
		if err != nil {
			t.Fatal(err)
		}
		for i, r := range ref {
			if r == nil {
				continue
			}
			count++
			if e := tbRel(ks[i], *r); e > 1e-9 {
				t.Errorf("table k(n=%d, p=%g) = %.15g, scipy %.15g", dense.N[i], p, ks[i], *r)
			}
		}
	}
	if count < 580 {
		t.Fatalf("only %d dense rows", count)
	}
	for _, c := range tbLoadNormalK(t).K {
		if c.Mpmath == nil {
			continue
		}
		ns := []int{c.N}
		if c.N >= 4 {
			ns = []int{c.N - 2, c.N - 1, c.N}
		}
		ks, err := NormalKTable(ns, c.P, c.Gamma)
		if err != nil {
			t.Fatal(err)
		}
		if e := tbRel(ks[len(ks)-1], *c.Mpmath); e > 1e-9 {
			t.Errorf("table k(n=%d, p=%g, gamma=%g) = %.15g, mpmath %.15g", c.N, c.P, c.Gamma, ks[len(ks)-1], *c.Mpmath)
		}
	}
}

func TestNormalKTableErrors(t *testing.T) {
	if _, err := NormalKTable([]int{5, 1}, 0.9, 0.95); err == nil {
		t.Error("n = 1 accepted")
	}
	if _, err := NormalKTable([]int{5}, 1, 0.95); err == nil {
		t.Error("p = 1 accepted")
	}
	if ks, err := NormalKTable(nil, 0.9, 0.95); err != nil || len(ks) != 0 {
		t.Errorf("empty: %v %v", ks, err)
	}
}

// Factors.NormalKNear (the interpolated factor the specimens-needed search
// uses) agrees with NormalK to 1e-13 relative at 400 random sizes from 2
// to 150,000 and four levels, and is NormalK itself up to 100.
func TestNormalKNearMatchesNormalK(t *testing.T) {
	f := NewFactors()
	r := rand.New(rand.NewPCG(5, 6))
	worst := 0.0
	for i := range 400 {
		p := []float64{0.90, 0.99, 0.95, 0.75}[i%4]
		g := []float64{0.95, 0.95, 0.90, 0.99}[i%4]
		n := 2 + int(math.Exp(r.Float64()*math.Log(150000)))
		got, err := f.NormalKNear(n, p, g)
		if err != nil {
			t.Fatal(err)
		}
		want, err := NormalK(n, p, g)
		if err != nil {
			t.Fatal(err)
		}
		e := math.Abs(got-want) / want
		if n <= 100 && got != want || e > 1e-13 {
			t.Errorf("n=%d p=%g gamma=%g: %.17g, NormalK %.17g", n, p, g, got, want)
		}
		worst = math.Max(worst, e)
	}
	t.Logf("worst relative difference %.2g", worst)
}
