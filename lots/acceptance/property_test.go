package acceptance

import (
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"strings"
	"testing"

	"lotproof/lots"
)

// TestVerdictsSmallLots: over random small lots (1 to 10 specimens, some
// with equal values, some far from the limits) and random specifications
// (minimum, maximum or both; individual rejection on or off; 2 to 6
// specimens required), every lot and every property gets one of the
// documented verdicts with at least one reason, and the verdicts agree
// with their figures: a conforming property has a tolerance bound on the
// right side of its limit, n at least the required number and no value
// beyond the limit when individual values reject; the fraction estimate
// lies in [0, 1] (Lieberman and Resnikoff 1955) and the confidence bounds
// on the fraction are ordered within [0, 1] (Owen 1968).
func TestVerdictsSmallLots(t *testing.T) {
	rng := rand.New(rand.NewPCG(16, 7))
	documented := map[string]bool{Conforming: true, Nonconforming: true, Undecided: true, NotJudged: true}
	seen := map[string]int{}
	for rep := range 20 {
		var b strings.Builder
		b.WriteString("specimen,lot,heat,supplier,material,tested,condition,tensile [MPa]\n")
		for l := range 12 {
			n := 1 + rng.IntN(10)
			mu := 900 + 80*rng.Float64()
			sd := []float64{0, 2, 15, 40}[rng.IntN(4)]
			for i := range n {
				fmt.Fprintf(&b, "S%d-%d,L%d,H%d,Sup,Alloy T,2025-01-14,RT,%.1f\n", l, i, l, l, mu+sd*rng.NormFloat64())
			}
		}
		path := fmt.Sprintf("%s/r%d.csv", t.TempDir(), rep)
		if err := os.WriteFile(path, []byte(b.String()), 0o644); err != nil {
			t.Fatal(err)
		}
		limits := []string{"    min: 930\n", "    max: 960\n", "    min: 910\n    max: 990\n"}[rep%3]
		sp := fmt.Sprintf("specification: P-%d\nrevision: A\nmaterial: Alloy T\nproperties:\n  tensile:\n    unit: MPa\n%sacceptance:\n  content: %g\n  confidence: %g\n  min_specimens: %d\n  individual_reject: %v\n",
			rep, limits, []float64{0.90, 0.99}[rep%2], []float64{0.90, 0.95}[rep/2%2], 2+rep%5, rep%4 < 2)
		d, ss := load(t, path, sp)
		r, err := Judge(d, ss, lots.ByLot)
		if err != nil {
			t.Fatal(err)
		}
		for _, l := range r.Lots {
			seen[l.Verdict]++
			if !documented[l.Verdict] || len(l.Reasons) == 0 || l.Reasons[0] == "" {
				t.Errorf("lot %s: verdict %q, reasons %v", l.Lot, l.Verdict, l.Reasons)
			}
			for _, p := range l.Properties {
				what := fmt.Sprintf("spec %d lot %s %s (%s): n %d", rep, l.Lot, p.Property, p.Side, p.N)
				if p.Verdict == NotJudged || !documented[p.Verdict] || len(p.Reasons) == 0 {
					t.Errorf("%s: verdict %q, reasons %v", what, p.Verdict, p.Reasons)
				}
				lim, tb := float64(p.Limit), float64(p.ToleranceBound)
				if p.Verdict == Conforming {
					beyond := tb < lim
					if p.Side == "max" {
						beyond = tb > lim
					}
					if math.IsNaN(tb) || beyond || p.N < ss[0].Acceptance.MinSpecimens || (ss[0].Acceptance.IndividualReject && p.Beyond > 0) {
						t.Errorf("%s: conforming with bound %g, limit %g, %d beyond", what, tb, lim, p.Beyond)
					}
				}
				if p.Beyond > 0 && ss[0].Acceptance.IndividualReject && p.Verdict != Nonconforming {
					t.Errorf("%s: %d values beyond the limit but %s", what, p.Beyond, p.Verdict)
				}
				if p.Beyond == p.N && p.N >= 2 && p.Verdict != Nonconforming {
					t.Errorf("%s: every value beyond the limit but %s (%v)", what, p.Verdict, p.Reasons)
				}
				f, lo, up := float64(p.FractionEstimate), float64(p.FractionLower), float64(p.FractionUpper)
				if !math.IsNaN(f) && (f < 0 || f > 1) {
					t.Errorf("%s: fraction estimate %g", what, f)
				}
				// (The unbiased estimate may lie outside the confidence
				// interval: it is 0 once the margin exceeds (n-1)/sqrt(n).)
				if !math.IsNaN(lo) && !(0 <= lo && lo <= up && up <= 1) {
					t.Errorf("%s: fraction bounds [%g, %g]", what, lo, up)
				}
			}
		}
	}
	for _, v := range []string{Conforming, Nonconforming, Undecided} {
		if seen[v] == 0 {
			t.Errorf("no %s lot among the random cases (%v)", v, seen)
		}
	}
	t.Logf("verdicts %v", seen)
}
