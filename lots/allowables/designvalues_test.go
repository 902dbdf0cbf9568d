package allowables

import (
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"lotproof/lots"
	"lotproof/lots/units"
)

// DesignValues, the procedure the campaign planner repeats, gives the same
// design values and method as Analyze on the same data: normal and
// Weibull-like campaigns with and without lot effects, one lot, small lots.
func TestDesignValuesMatchesAnalyze(t *testing.T) {
	u, _ := units.Parse("MPa")
	rng := rand.New(rand.NewPCG(3, 4))
	seen := map[string]bool{}
	for trial := 0; trial < 60; trial++ {
		k, m := 1+trial%6, 2+trial%7
		lotSD := []float64{0, 3, 10}[trial%3]
		var vals [][]float64
		d := &lots.Dataset{Source: "sim", Properties: []lots.Property{{Name: "s", Unit: u}}}
		for i := 0; i < k; i++ {
			mu := 100 + lotSD*rng.NormFloat64()
			var lot []float64
			for j := 0; j < m; j++ {
				v := mu + 5*rng.NormFloat64()
				if trial%2 == 1 {
					v = mu * math.Pow(-math.Log(1-rng.Float64()), 1.0/15)
				}
				lot = append(lot, v)
				d.Add(lots.Specimen{ID: fmt.Sprint(i, "-", j), Lot: fmt.Sprint("L", i), Values: []float64{v}})
			}
			vals = append(vals, lot)
		}
		opt := DefaultOptions()
		got, gerr := DesignValues(vals, opt)
		rep, aerr := Analyze(d, opt, "x")
		if (gerr != nil) != (aerr != nil) {
			t.Fatalf("trial %d: errors differ: %v / %v", trial, gerr, aerr)
		}
		if aerr != nil {
			continue
		}
		r := rep.Results[0]
		same := func(a, b float64) bool { return a == b || (math.IsNaN(a) && math.IsNaN(b)) }
		if got.Method != r.Method || !same(got.A, float64(r.ABasis)) || !same(got.B, float64(r.BBasis)) || !strings.HasPrefix(r.B.Note, "by "+got.Used) {
			t.Errorf("trial %d (%dx%d): DesignValues %s (%s) %g %g, Analyze %s (%s) %g %g", trial, k, m, got.Method, got.Used, got.A, got.B, r.Method, r.B.Note, float64(r.ABasis), float64(r.BBasis))
		}
		seen[got.Used] = true
	}
	if len(seen) < 3 {
		t.Errorf("only methods %v were exercised", seen)
	}
	t.Logf("methods exercised: %v", seen)
}

// The lot-aware method (the default) gives, per level, the lowest of the
// handbook procedure's bound, the random-effects bound of normal lots and
// the random-effects bound on the logarithms with Weibull values within
// lots (2 or more lots; each also available as a forced method, computed
// from the same pivots), so A stays below B. Normal and Weibull lots.
func TestLotAwareIsTheLowestBound(t *testing.T) {
	rng := rand.New(rand.NewPCG(8, 9))
	for trial := 0; trial < 30; trial++ {
		k, m := 2+trial%5, 3+trial%4
		var vals [][]float64
		for i := 0; i < k; i++ {
			mu := 100 + float64(trial%3)*3*rng.NormFloat64()
			var lot []float64
			for j := 0; j < m; j++ {
				v := mu + 5*rng.NormFloat64()
				if trial%2 == 1 {
					v = mu * math.Pow(-math.Log(1-rng.Float64()), 1.0/15)
				}
				lot = append(lot, v)
			}
			vals = append(vals, lot)
		}
		opt := DefaultOptions()
		la, err := DesignValues(vals, opt)
		if err != nil {
			continue
		}
		want := [2]float64{math.Inf(1), math.Inf(1)}
		used := ""
		for _, m := range []string{Handbook, RandomEffects, RandomEffectsWeibull} {
			opt.Method = m
			opt.Sims = 10000
			if m != Handbook {
				opt.Sims = LotAwareSims(10000) // the pivots the lot-aware bounds draw
			}
			o, err := DesignValues(vals, opt)
			if err != nil {
				t.Fatal(err)
			}
			if o.A < want[0] {
				want[0] = o.A
			}
			if o.B < want[1] {
				want[1], used = o.B, o.Used
			}
		}
		if la.A != want[0] || la.B != want[1] || la.Used != used || la.Method != LotAware || !(la.A <= la.B) {
			t.Errorf("trial %d: lot-aware A %g B %g by %s; lowest %g %g by %s", trial, la.A, la.B, la.Used, want[0], want[1], used)
		}
	}
}
