package acceptance

import (
	"bytes"
	"encoding/json"
	"errors"
	"math"
	"math/rand/v2"
	"os"
	"strings"
	"testing"

	"lotproof/lots"
	"lotproof/lots/scale"
	"lotproof/spec"
	"lotproof/stats"
)

func load(t *testing.T, data string, specText ...string) (*lots.Dataset, []*spec.Spec) {
	t.Helper()
	d, err := lots.ReadFile(data, lots.ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	var ss []*spec.Spec
	for i, s := range specText {
		sp, err := spec.Parse("s"+string(rune('0'+i))+".yaml", []byte(s))
		if err != nil {
			t.Fatal(err)
		}
		ss = append(ss, sp)
	}
	return d, ss
}

func testSpec(t *testing.T) string {
	b, err := os.ReadFile("../../testdata/acceptance/spec-test.yaml")
	if err != nil {
		t.Fatal(err)
	}
	return string(b)
}

func find(t *testing.T, r *Result, lot string) LotResult {
	for _, l := range r.Lots {
		if l.Lot == lot {
			return l
		}
	}
	t.Fatalf("lot %s missing", lot)
	return LotResult{}
}

// Figures checked against testdata/acceptance/lots_ref.json, computed
// independently by make_lots_ref.py with Debian python3-scipy 1.10.1
// (numpy mean/std, scipy.stats.nct.ppf for k, Newton-refined t quantile,
// scipy.special.betainc for the Lieberman-Resnikoff estimator,
// scipy.stats.nct.cdf + brentq for the upper bound on the fraction).
func TestJudgeFiguresAgainstScipy(t *testing.T) {
	d, ss := load(t, "../../testdata/acceptance/lots.csv", testSpec(t))
	r, err := Judge(d, ss, lots.ByLot)
	if err != nil {
		t.Fatal(err)
	}
	var ref struct {
		Lots []struct {
			Lot, Property, Side                                                     string
			N                                                                       int
			Mean, SD, MeanBound, K, ToleranceBound, FractionEstimate, FractionUpper float64
		}
	}
	b, err := os.ReadFile("../../testdata/acceptance/lots_ref.json")
	if err != nil {
		t.Fatal(err)
	}
	// The JSON keys are snake_case; decode through a map-free rename.
	b = []byte(strings.NewReplacer(`"mean_bound"`, `"MeanBound"`, `"tolerance_bound"`, `"ToleranceBound"`, `"fraction_estimate"`, `"FractionEstimate"`, `"fraction_upper"`, `"FractionUpper"`).Replace(string(b)))
	if err := json.Unmarshal(b, &ref); err != nil {
		t.Fatal(err)
	}
	if len(ref.Lots) != 9 {
		t.Fatalf("reference has %d rows", len(ref.Lots))
	}
	for _, w := range ref.Lots {
		l := find(t, r, w.Lot)
		var got *PropertyResult
		for i := range l.Properties {
			if l.Properties[i].Property == w.Property && l.Properties[i].Side == w.Side {
				got = &l.Properties[i]
			}
		}
		if got == nil {
			t.Fatalf("%s %s %s missing", w.Lot, w.Property, w.Side)
		}
		chk := func(what string, g lots.Float, want, tol float64) {
			if math.Abs(float64(g)-want) > tol*math.Max(1, math.Abs(want)) {
				t.Errorf("%s %s %s %s: got %.12g want %.12g", w.Lot, w.Property, w.Side, what, float64(g), want)
			}
		}
		if got.N != w.N {
			t.Errorf("n %d want %d", got.N, w.N)
		}
		chk("mean", got.Mean, w.Mean, 1e-13)
		chk("sd", got.SD, w.SD, 1e-12)
		chk("mean bound", got.MeanBound, w.MeanBound, 1e-11)
		chk("k", got.K, w.K, 1e-9) // scipy nct.ppf (Boost) is good to about 1e-10
		chk("tolerance bound", got.ToleranceBound, w.ToleranceBound, 1e-9)
		chk("fraction estimate", got.FractionEstimate, w.FractionEstimate, 1e-12)
		chk("fraction upper", got.FractionUpper, w.FractionUpper, 1e-8)
	}
}

func TestJudgeVerdicts(t *testing.T) {
	d, ss := load(t, "../../testdata/acceptance/lots.csv", testSpec(t))
	r, err := Judge(d, ss, lots.ByLot)
	if err != nil {
		t.Fatal(err)
	}
	want := map[string]string{"A": Conforming, "B": Undecided, "C": Nonconforming, "D": Undecided, "E": Undecided, "F": NotJudged}
	for lot, v := range want {
		if got := find(t, r, lot).Verdict; got != v {
			t.Errorf("lot %s: %s, want %s (%v)", lot, got, v, find(t, r, lot).Reasons)
		}
	}
	if r.Counts != (Counts{Conforming: 1, Nonconforming: 1, Undecided: 3, NotJudged: 1}) {
		t.Errorf("counts %+v", r.Counts)
	}
	// Lot B, hardness max: the upper tolerance bound exceeds 331 HBW; the
	// specimens needed are the smallest m with k(m) <= (U - mean)/SD
	// (checked against stats.NormalK at m-1 and m).
	b := find(t, r, "B")
	for _, p := range b.Properties {
		if p.Property == "hardness" && p.Side == "max" {
			if p.Verdict != Undecided || p.NeededN <= 5 {
				t.Fatalf("B hardness max: %+v", p)
			}
			q := (331 - float64(p.Mean)) / float64(p.SD)
			k1, _ := stats.NormalK(p.NeededN-1, 0.9, 0.95)
			k2, _ := stats.NormalK(p.NeededN, 0.9, 0.95)
			if !(k1 > q && k2 <= q) {
				t.Errorf("needed n %d: k(n-1)=%g k(n)=%g q=%g", p.NeededN, k1, k2, q)
			}
		}
		if p.Property == "tensile" && p.NeededN != -1 {
			// mean 958.6, SD 15.9: margin 1.80 SD > z_0.90 = 1.28, so reachable
			if q := (float64(p.Mean) - 930) / float64(p.SD); q > 1.2816 && p.NeededN <= 5 {
				t.Errorf("B tensile needed %d (q %g)", p.NeededN, q)
			}
		}
	}
	c := find(t, r, "C")
	if !strings.Contains(strings.Join(c.Properties[0].Reasons, " "), "C-2") {
		t.Errorf("C reasons do not name the failing specimen: %v", c.Properties[0].Reasons)
	}
	if !strings.Contains(strings.Join(c.Reasons, " "), "10 specimens") {
		t.Errorf("C reasons do not state the retest allowance: %v", c.Reasons)
	}
	dl := find(t, r, "D")
	if !math.IsNaN(float64(dl.Properties[0].ToleranceBound)) || !strings.Contains(dl.Properties[0].Reasons[0], "one specimen") {
		t.Errorf("one-specimen lot: %+v", dl.Properties[0])
	}
	e := find(t, r, "E")
	if !strings.Contains(strings.Join(e.Properties[0].Reasons, " "), "zero spread") {
		t.Errorf("zero-variance lot: %+v", e.Properties[0])
	}
	if f := find(t, r, "F"); !strings.Contains(f.Reasons[0], "Alloy Q") {
		t.Errorf("not judged reason: %v", f.Reasons)
	}
}

// Not reachable: a margin at or below z_p (k decreases to z_p = 1.2816 for
// p = 0.90 as n grows; Owen 1968).
func TestNeededSpecimens(t *testing.T) {
	if n, _ := NeededSpecimens(1.28, 0.9, 0.95, 5); n != -1 {
		t.Errorf("q below z_p: %d", n)
	}
	// k(n=10, 0.90, 0.95) = 2.355 (Natrella 1963, NBS Handbook 91, Table A-7):
	// a margin of 2.36 is reached at 10 specimens, not at 9 (k(9) = 2.454,
	// same table; scipy.stats.nct gives 2.4538 and 2.3546).
	if n, err := NeededSpecimens(2.36, 0.9, 0.95, 5); err != nil || n != 10 {
		t.Errorf("q = 2.36: %d %v", n, err)
	}
}

func TestJudgeBadInput(t *testing.T) {
	d, _ := load(t, "../../testdata/acceptance/lots.csv")
	base := testSpec(t)
	cases := []struct{ name, spec, what, where string }{
		{"missing property", strings.Replace(base, "  tensile:", "  elongation:\n    unit: \"%\"\n    min: 10\n  tensile:", 1), "no such column", "s0.yaml:6:3"},
		{"hardness scale", strings.Replace(base, "unit: HBW", "unit: HRC", 1), "cannot be compared", "s0.yaml:9:3"},
		{"strain against stress", strings.Replace(base, "unit: MPa\n    min: 930", "unit: \"%\"\n    min: 12", 1), "cannot be compared", "s0.yaml:6:3"},
	}
	for _, c := range cases {
		sp, err := spec.Parse("s0.yaml", []byte(c.spec))
		if err != nil {
			t.Fatal(c.name, err)
		}
		_, err = Judge(d, []*spec.Spec{sp}, lots.ByLot)
		var ie *lots.InputError
		if !errors.As(err, &ie) || !strings.Contains(ie.Problems[0].What, c.what) || ie.Problems[0].Where != c.where {
			t.Errorf("%s: %v", c.name, err)
		}
	}
}

// A lot whose values are all equal and all below the minimum is
// nonconforming even when the specification does not reject on individual
// values: the lower confidence bound on the fraction below the limit
// decreases in the margin q = (mean - L)/SD (Owen 1968) and at q = -1
// already exceeds 1 - content (scipy.stats.nct: 0.383 at n = 3, gamma 0.95,
// testdata/acceptance/nonconforming_ref.json), so at zero spread (q -> -inf)
// it does too. Equal values above the minimum stay undecided.
func TestJudgeZeroSpreadBelowMinimum(t *testing.T) {
	csv := "specimen,lot,heat,supplier,material,tested,condition,tensile [MPa]\n" +
		"Z-1,Z,HZ,Test Supplier,Alloy T,2025-01-14,RT,900\nZ-2,Z,HZ,Test Supplier,Alloy T,2025-01-14,RT,900\nZ-3,Z,HZ,Test Supplier,Alloy T,2025-01-14,RT,900\n" +
		"Y-1,Y,HY,Test Supplier,Alloy T,2025-01-14,RT,950\nY-2,Y,HY,Test Supplier,Alloy T,2025-01-14,RT,950\nY-3,Y,HY,Test Supplier,Alloy T,2025-01-14,RT,950\n"
	path := t.TempDir() + "/zero.csv"
	if err := os.WriteFile(path, []byte(csv), 0o644); err != nil {
		t.Fatal(err)
	}
	sp := "specification: TEST-Z\nrevision: A\nmaterial: Alloy T\nproperties:\n  tensile:\n    unit: MPa\n    min: 930\n" +
		"acceptance:\n  content: 0.90\n  confidence: 0.95\n  min_specimens: 3\n  individual_reject: false\n"
	d, ss := load(t, path, sp)
	r, err := Judge(d, ss, lots.ByLot)
	if err != nil {
		t.Fatal(err)
	}
	lo, err := stats.TailFractionBound(3, -1, 0.95, false)
	if err != nil || math.Abs(lo-0.38344818788610824) > 1e-9 {
		t.Fatalf("lower bound at q = -1: %v %v (scipy 0.383448)", lo, err)
	}
	z := find(t, r, "Z")
	p := z.Properties[0]
	if z.Verdict != Nonconforming || p.Verdict != Nonconforming || float64(p.FractionEstimate) != 1 || p.Beyond != 3 {
		t.Errorf("all equal below the minimum: lot %s, property %+v", z.Verdict, p)
	}
	if !strings.Contains(strings.Join(p.Reasons, " "), "zero spread") || !strings.Contains(strings.Join(p.Reasons, " "), "below the minimum") {
		t.Errorf("reasons: %v", p.Reasons)
	}
	if y := find(t, r, "Y"); y.Verdict != Undecided || len(y.Properties[0].Reasons) == 0 {
		t.Errorf("all equal above the minimum: %s %v", y.Verdict, y.Properties[0].Reasons)
	}
}

// scaleLots is 100 invented lots of 10 specimens (interleaved) and the
// three-minimum specification of the scale benchmarks.
func scaleLots(t *testing.T) (*lots.Dataset, *spec.Spec) {
	t.Helper()
	var buf bytes.Buffer
	if _, err := scale.Write(&buf, scale.Options{Specimens: 1000, Lots: 100, Interleave: 3}); err != nil {
		t.Fatal(err)
	}
	d, err := lots.ReadCSV(&buf, "scale.csv")
	if err != nil {
		t.Fatal(err)
	}
	s, err := spec.ReadFile("../../testdata/bench/spec-three.yaml")
	if err != nil {
		t.Fatal(err)
	}
	return d, s
}

// Judging on several workers gives the same result, lot for lot and in the
// same order, as on one; on 100 invented lots with three limits each.
func TestJudgeParallelSameAsOneWorker(t *testing.T) {
	d, s := scaleLots(t)
	defer func(w int) { workers = w }(workers)
	var outs [][]byte
	for _, w := range []int{1, 4} {
		workers = w
		r, err := Judge(d, []*spec.Spec{s}, lots.ByLot)
		if err != nil {
			t.Fatal(err)
		}
		if len(r.Lots) != 100 || r.Counts.Conforming == 0 || r.Counts.Nonconforming == 0 || r.Counts.Undecided == 0 {
			t.Fatalf("%d lots, counts %+v: want 100 lots of every verdict", len(r.Lots), r.Counts)
		}
		b, err := json.Marshal(r)
		if err != nil {
			t.Fatal(err)
		}
		outs = append(outs, b)
	}
	if !bytes.Equal(outs[0], outs[1]) {
		t.Error("4 workers judged differently from 1")
	}
}

// Deliver hands every lot over in the order added, the same results Finish
// keeps without it (100 invented lots, 1 and 4 workers, so that batches
// finish out of order), with the same counts; an error from the delivery
// function is what Finish returns, and nothing is handed over after it.
func TestJudgingDeliverSameAsKept(t *testing.T) {
	d, s := scaleLots(t)
	groups, err := d.Group(lots.ByLot, nil)
	if err != nil {
		t.Fatal(err)
	}
	kept, err := Judge(d, []*spec.Spec{s}, lots.ByLot)
	if err != nil {
		t.Fatal(err)
	}
	want, _ := json.Marshal(kept.Lots)
	defer func(w int) { workers = w }(workers)
	for _, w := range []int{1, 4} {
		workers = w
		for _, failAt := range []int{-1, 37} {
			j, err := Start(d, []*spec.Spec{s}, lots.ByLot)
			if err != nil {
				t.Fatal(err)
			}
			var got []LotResult
			stop := errors.New("stop")
			j.Deliver(func(l *LotResult) error {
				if len(got) == failAt {
					return stop
				}
				got = append(got, *l)
				return nil
			})
			for i, g := range groups {
				j.Add(d.Lot(g, i))
			}
			r, err := j.Finish(d)
			if failAt >= 0 {
				if err != stop || len(got) != failAt {
					t.Errorf("%d workers: delivery error at lot %d: Finish gave %v after %d lots", w, failAt, err, len(got))
				}
				continue
			}
			if err != nil {
				t.Fatal(err)
			}
			b, _ := json.Marshal(got)
			if !bytes.Equal(b, want) || r.Lots != nil || r.Counts != kept.Counts {
				t.Errorf("%d workers: delivered lots or counts differ from the kept result (%d lots, counts %+v, want %+v)", w, len(got), r.Counts, kept.Counts)
			}
		}
	}
}

// TestNeededSpecimensMatchesBisection: the search that starts from the
// normal approximation gives the same answer as a plain bisection over
// the whole range (the smallest m with k(m) <= q, k exact and decreasing
// in m, Owen 1968), over margins from just above z_p to 6, three levels
// and starting sizes 2 to 60.
func TestNeededSpecimensMatchesBisection(t *testing.T) {
	f := stats.NewFactors()
	r := rand.New(rand.NewPCG(3, 4))
	for i := 0; i < 300; i++ {
		p := []float64{0.90, 0.95, 0.99}[i%3]
		g := []float64{0.90, 0.95, 0.99}[(i/3)%3]
		zp := -math.Sqrt2 * math.Erfcinv(2*p)
		q := zp + 0.01 + (6-zp)*r.Float64()*r.Float64()
		n0 := 2 + r.IntN(59)
		got, err := neededSpecimens(q, p, g, n0, f.NormalKNear) // as judgeSide searches
		if err != nil {
			t.Fatal(err)
		}
		// Reference: bisection between n0 (or 2) and MaxPlannedSpecimens,
		// with the exact factor.
		lo, hi := max(n0, 2), MaxPlannedSpecimens
		want := 0
		if k, _ := f.NormalK(lo, p, g); k <= q {
			want = lo
		} else if k, _ := f.NormalK(hi, p, g); k > q {
			want = MaxPlannedSpecimens + 1
		} else {
			for hi-lo > 1 {
				mid := (lo + hi) / 2
				if k, _ := f.NormalK(mid, p, g); k <= q {
					hi = mid
				} else {
					lo = mid
				}
			}
			want = hi
		}
		if got != want {
			t.Fatalf("q %g p %g gamma %g n0 %d: %d specimens, bisection says %d", q, p, g, n0, got, want)
		}
	}
}
