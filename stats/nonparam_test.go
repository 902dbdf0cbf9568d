package stats

import (
	"encoding/json"
	"errors"
	"math"
	"os"
	"testing"
)

type tbNonparamRef struct {
	Ranks []struct {
		N        int
		P, Gamma float64
		R        int
		Achieved *float64
	}
	Binom []struct {
		N, R  int
		Q, SF float64
	}
	HK []struct {
		N, R        int
		P, Gamma, K float64
		KClosedForm *float64 `json:"k_closed_form"`
	}
}

func tbLoadNonparam(t *testing.T) tbNonparamRef {
	t.Helper()
	b, err := os.ReadFile("../testdata/tolerance/nonparam.json")
	if err != nil {
		t.Fatal(err)
	}
	var r tbNonparamRef
	if err := json.Unmarshal(b, &r); err != nil {
		t.Fatal(err)
	}
	if len(r.Ranks) < 1000 || len(r.HK) < 50 {
		t.Fatalf("reference file too short")
	}
	return r
}

// TestOrderStatisticMinN: the minimum sample sizes stated in CMH-17-1G
// Vol. 1 section 8.3.4.5.1 (from memory): 29 for B-basis, 299 for A-basis.
func TestOrderStatisticMinN(t *testing.T) {
	if n := OrderStatisticMinN(0.90, 0.95); n != 29 {
		t.Errorf("B-basis minimum n = %d, CMH-17-1G says 29", n)
	}
	if n := OrderStatisticMinN(0.99, 0.95); n != 299 {
		t.Errorf("A-basis minimum n = %d, CMH-17-1G says 299", n)
	}
	for _, c := range []struct {
		n int
		p float64
	}{{28, 0.90}, {298, 0.99}} {
		if _, _, err := OrderStatisticRank(c.n, c.p, 0.95); !errors.Is(err, ErrTooFew) {
			t.Errorf("n=%d p=%g: want ErrTooFew, got %v", c.n, c.p, err)
		}
	}
}

// TestOrderStatisticRankAgainstScipy: ranks from scipy.stats.binom.sf
// (testdata/tolerance/gen_nonparam.py) for n = 2..399, 500, 1000, 5000 at
// four (p, gamma) pairs; achieved confidence to 1e-12.
func TestOrderStatisticRankAgainstScipy(t *testing.T) {
	ref := tbLoadNonparam(t)
	for _, c := range ref.Ranks {
		r, ach, err := OrderStatisticRank(c.N, c.P, c.Gamma)
		if c.R == 0 {
			if !errors.Is(err, ErrTooFew) {
				t.Errorf("n=%d p=%g g=%g: scipy finds no rank, got r=%d err=%v", c.N, c.P, c.Gamma, r, err)
			}
			continue
		}
		if err != nil || r != c.R {
			t.Errorf("n=%d p=%g g=%g: r=%d (%v), scipy %d", c.N, c.P, c.Gamma, r, err, c.R)
			continue
		}
		if math.Abs(ach-*c.Achieved) > 1e-12 {
			t.Errorf("n=%d: achieved %.15g, scipy %.15g", c.N, ach, *c.Achieved)
		}
	}
	for _, c := range ref.Binom {
		if got := BinomialUpperTail(c.N, c.R, c.Q); tbRel(got, c.SF) > 1e-12 {
			t.Errorf("P(Bin(%d,%g) >= %d) = %.15g, scipy %.15g", c.N, c.Q, c.R, got, c.SF)
		}
	}
}

// TestHansonKoopmansPublished: CMH-17-1G Vol. 1 Table 8.5.14 (B-basis, r = n)
// and Table 8.5.15 (A-basis) Hanson-Koopmans factors, quoted from memory.
// Only entries whose memory is firm are listed. The A-basis n = 2 entry is
// remembered as 80.0038; the closed form for n = r = 2 gives 80.003716, so
// that entry is checked to 1e-4.
func TestHansonKoopmansPublished(t *testing.T) {
	cases := []struct {
		n       int
		p, k    float64
		tol     float64
		comment string
	}{
		{2, 0.90, 35.177, 0.0005, "Table 8.5.14"}, {3, 0.90, 7.859, 0.0005, "Table 8.5.14"}, {4, 0.90, 4.505, 0.0005, "Table 8.5.14"},
		{2, 0.99, 80.0038, 1e-4, "Table 8.5.15"}, {3, 0.99, 16.9122, 5e-5, "Table 8.5.15"}, {4, 0.99, 9.49579, 5e-6, "Table 8.5.15"},
		{5, 0.99, 6.89049, 5e-6, "Table 8.5.15"}, {6, 0.99, 5.57681, 5e-6, "Table 8.5.15"}, {7, 0.99, 4.78352, 5e-6, "Table 8.5.15"},
		{8, 0.99, 4.25011, 5e-6, "Table 8.5.15"},
	}
	for _, c := range cases {
		k, err := HansonKoopmansK(c.n, c.n, c.p, 0.95)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(k-c.k) > c.tol+1e-12 {
			t.Errorf("CMH-17-1G %s n=%d: k = %.6f, table %.6f", c.comment, c.n, k, c.k)
		}
	}
}

// TestHansonKoopmansAgainstMpmath: k solved in mpmath (25 digits) from the
// same defining integral, and for r = 2 from a closed form of it
// (testdata/tolerance/gen_nonparam.py). 1e-9 relative.
func TestHansonKoopmansAgainstMpmath(t *testing.T) {
	ref := tbLoadNonparam(t)
	for _, c := range ref.HK {
		k, err := HansonKoopmansK(c.N, c.R, c.P, c.Gamma)
		if err != nil {
			t.Fatal(err)
		}
		if tbRel(k, c.K) > 1e-9 {
			t.Errorf("HK k(n=%d, r=%d, p=%g, g=%g) = %.12g, mpmath %.12g", c.N, c.R, c.P, c.Gamma, k, c.K)
		}
		if c.KClosedForm != nil && tbRel(k, *c.KClosedForm) > 1e-9 {
			t.Errorf("HK k(n=%d, r=2) = %.12g, closed form %.12g", c.N, k, *c.KClosedForm)
		}
	}
}

func TestNonparametricLowerBound(t *testing.T) {
	// 29 values: B-basis uses the smallest (rank 1, CMH-17-1G 8.3.4.5.1).
	x := make([]float64, 29)
	for i := range x {
		x[i] = 100 + float64((i*7)%29)
	}
	b, err := NonparametricLowerBound(x, 0.90, 0.95, NonparametricOptions{})
	if err != nil || b.Method != "order-statistic" || b.Value != 100 {
		t.Errorf("n=29 B-basis: %+v %v", b, err)
	}
	// 10 values: Hanson-Koopmans with the handbook's r = 6 (Table 8.5.14),
	// B = x_(6) (x_(1)/x_(6))^k; sorted, x_(1) = 50 and x_(6) = 55.
	y := []float64{52, 50, 55, 51, 58, 54, 53, 57, 56, 59}
	b, err = NonparametricLowerBound(y, 0.90, 0.95, NonparametricOptions{})
	if err != nil || b.Method != "hanson-koopmans" {
		t.Fatalf("n=10: %+v %v", b, err)
	}
	k, _ := HansonKoopmansK(10, 6, 0.90, 0.95)
	if want := 55 * math.Pow(50.0/55, k); math.Abs(b.Value-want) > 1e-12*want {
		t.Errorf("HK bound %.12g, want %.12g", b.Value, want)
	}
	// Errors: too few, non-positive for HK, non-finite, bad rank.
	if _, err := NonparametricLowerBound([]float64{5}, 0.9, 0.95, NonparametricOptions{}); !errors.Is(err, ErrTooFew) {
		t.Errorf("n=1: %v", err)
	}
	if _, err := NonparametricLowerBound([]float64{-1, 2, 3}, 0.9, 0.95, NonparametricOptions{}); err == nil {
		t.Error("negative data accepted for Hanson-Koopmans")
	}
	if _, err := NonparametricLowerBound([]float64{1, math.NaN(), 3}, 0.9, 0.95, NonparametricOptions{}); err == nil {
		t.Error("NaN accepted")
	}
	if _, err := NonparametricLowerBound(y, 0.9, 0.95, NonparametricOptions{HKRank: 1}); err == nil {
		t.Error("rank 1 accepted for Hanson-Koopmans")
	}
}

// CMH-17-1G Vol. 1 Table 8.5.14, B-basis Hanson-Koopmans (from memory):
// for n = 2..28 the order statistic r and the factor k to three decimals.
// The ranks are those HansonKoopmansRank uses; the factors are computed.
func TestHansonKoopmansBTable(t *testing.T) {
	table := [][3]float64{{2, 2, 35.177}, {3, 3, 7.859}, {4, 4, 4.505}, {5, 4, 4.101}, {6, 5, 3.064}, {7, 5, 2.858},
		{8, 6, 2.382}, {9, 6, 2.253}, {10, 6, 2.137}, {11, 7, 1.897}, {12, 7, 1.814}, {13, 7, 1.738}, {14, 8, 1.599},
		{15, 8, 1.540}, {16, 8, 1.485}, {17, 8, 1.434}, {18, 9, 1.354}, {19, 9, 1.311}, {20, 10, 1.253}, {21, 10, 1.218},
		{22, 10, 1.184}, {23, 11, 1.143}, {24, 11, 1.114}, {25, 11, 1.087}, {26, 11, 1.060}, {27, 11, 1.035}, {28, 12, 1.010}}
	for _, row := range table {
		n, r := int(row[0]), int(row[1])
		if got := HansonKoopmansRank(n, 0.90, 0.95); got != r {
			t.Errorf("n=%d: rank %d, table %d", n, got, r)
		}
		k, err := HansonKoopmansK(n, r, 0.90, 0.95)
		if err != nil || math.Abs(k-row[2]) > 0.0006 {
			t.Errorf("n=%d r=%d: k %.4f, table %.3f (%v)", n, r, k, row[2], err)
		}
	}
	if HansonKoopmansRank(10, 0.99, 0.95) != 10 || HansonKoopmansRank(40, 0.90, 0.95) != 40 {
		t.Error("ranks outside the B-basis table must be n")
	}
}
