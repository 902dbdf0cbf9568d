package stats

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"
)

type nonconformingRef struct {
	MVUE []struct {
		N    int
		Q, P float64
	}
	Bound []struct {
		N                      int
		Q, Gamma, Upper, Lower float64
	}
	TQ []struct {
		DF   int
		P, T float64
	}
}

// Reference: testdata/acceptance/nonconforming_ref.json, made by
// make_nonconforming_ref.py with Debian python3-scipy 1.10.1
// (scipy.special.betainc, scipy.stats.nct + brentq, scipy.stats.t.ppf).
func TestNonconformingAgainstScipy(t *testing.T) {
	var ref nonconformingRef
	loadJSON(t, "../testdata/acceptance/nonconforming_ref.json", &ref)
	if len(ref.MVUE) == 0 || len(ref.Bound) == 0 || len(ref.TQ) == 0 {
		t.Fatal("empty reference")
	}
	for _, r := range ref.MVUE {
		got, err := TailFractionMVUE(r.N, r.Q)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(got-r.P) > 1e-13+1e-11*r.P {
			t.Errorf("MVUE n=%d q=%g: got %.16g want %.16g", r.N, r.Q, got, r.P)
		}
	}
	for _, r := range ref.Bound {
		up, err := TailFractionBound(r.N, r.Q, r.Gamma, true)
		if err != nil {
			t.Fatal(err)
		}
		lo, err := TailFractionBound(r.N, r.Q, r.Gamma, false)
		if err != nil {
			t.Fatal(err)
		}
		// Relative 1e-7 (scipy's nct CDF (Boost) is good to about 1e-10
		// relative; brentq xtol 1e-13) or 1e-15 absolute for tiny fractions.
		if math.Abs(up-r.Upper) > 1e-15+1e-7*r.Upper || math.Abs(lo-r.Lower) > 1e-15+1e-7*r.Lower {
			t.Errorf("bound n=%d q=%g g=%g: got [%.12g, %.12g] want [%.12g, %.12g]", r.N, r.Q, r.Gamma, lo, up, r.Lower, r.Upper)
		}
	}
	for _, r := range ref.TQ {
		n := r.DF + 1
		got, err := MeanLowerBound(n, 0, math.Sqrt(float64(n)), r.P)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(-got-r.T) > 1e-11*math.Max(1, math.Abs(r.T)) {
			t.Errorf("t quantile df=%d p=%g: got %.14g want %.14g", r.DF, r.P, -got, r.T)
		}
	}
}

// Unbiasedness by simulation (the defining property, Lieberman and
// Resnikoff 1955): the mean of the estimates over many samples equals the
// true fraction Phi((L - mu)/sigma) within Monte Carlo error.
func TestTailFractionMVUEUnbiased(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	for _, c := range []struct {
		n int
		z float64 // (mu - L)/sigma
	}{{5, 1.2}, {10, 0.5}, {4, 2.0}, {2, 0.3}, {2, -1.0}} {
		const reps = 100000
		sum, sum2 := 0.0, 0.0
		x := make([]float64, c.n)
		for range reps {
			for i := range x {
				x[i] = c.z + rng.NormFloat64() // L = 0, sigma = 1
			}
			m, s := meanSD(x)
			p, err := TailFractionMVUE(c.n, m/s)
			if err != nil {
				t.Fatal(err)
			}
			sum += p
			sum2 += p * p
		}
		mean := sum / reps
		se := math.Sqrt((sum2/reps - mean*mean) / reps)
		want := normalCDF(-c.z)
		if math.Abs(mean-want) > 4*se {
			t.Errorf("n=%d z=%g: mean estimate %.5f, true %.5f, se %.5f", c.n, c.z, mean, want, se)
		}
	}
}

// The upper bound on the fraction equals 1 - p exactly when the margin
// equals the (p, gamma) one-sided tolerance factor; the factor here is
// Natrella (1963, NBS Handbook 91, Table A-7, one-sided, gamma 0.95,
// p 0.90, n 10) k = 2.355 (to its 3 printed decimals).
func TestTailFractionBoundMatchesToleranceFactor(t *testing.T) {
	up, err := TailFractionBound(10, 2.355, 0.95, true)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(up-0.10) > 2e-4 {
		t.Errorf("upper bound at k = 2.355: %g, want 0.10", up)
	}
}

func TestNonconformingErrors(t *testing.T) {
	if _, err := TailFractionMVUE(1, 1); !errors.Is(err, ErrTooFew) {
		t.Error("n = 1 accepted by MVUE")
	}
	if _, err := TailFractionBound(1, 1, 0.9, true); !errors.Is(err, ErrTooFew) {
		t.Error("n = 1 accepted by bound")
	}
	if _, err := TailFractionBound(5, math.Inf(1), 0.9, true); !errors.Is(err, ErrNonFinite) {
		t.Error("infinite margin accepted")
	}
	if _, err := TailFractionBound(5, 1, 1, true); !errors.Is(err, ErrDomain) {
		t.Error("gamma 1 accepted")
	}
	if _, err := MeanLowerBound(1, 1, 1, 0.9); !errors.Is(err, ErrTooFew) {
		t.Error("n = 1 accepted by mean bound")
	}
}

// TestTailFractionMVUEAtTwo: at n = 2 the estimator is the limit a -> 0 of
// the Lieberman-Resnikoff formula, checked against scipy.special.betainc at
// a = 1e-12 and against the Rao-Blackwell value 1/2 [1(xbar - s/sqrt2 < L) +
// 1(xbar + s/sqrt2 < L)] (testdata/acceptance/make_mvue_n2_ref.py), and it
// equals the fraction of the two values below the limit (L = 0).
func TestTailFractionMVUEAtTwo(t *testing.T) {
	var ref struct {
		Rows []struct {
			X1, X2, Q    float64
			BetaincLimit float64 `json:"betainc_limit"`
			RaoBlackwell float64 `json:"rao_blackwell"`
		}
	}
	loadJSON(t, "../testdata/acceptance/mvue_n2_ref.json", &ref)
	if len(ref.Rows) < 5 {
		t.Fatalf("%d rows", len(ref.Rows))
	}
	for _, r := range ref.Rows {
		m, s := meanSD([]float64{r.X1, r.X2})
		got, err := TailFractionMVUE(2, m/s)
		if err != nil {
			t.Fatal(err)
		}
		below := 0.0
		for _, v := range []float64{r.X1, r.X2} {
			if v < 0 {
				below += 0.5
			}
		}
		if got != r.RaoBlackwell || got != below || math.Abs(got-r.BetaincLimit) > 1e-9 {
			t.Errorf("x = %g, %g: MVUE %g, Rao-Blackwell %g, betainc limit %g, fraction below %g", r.X1, r.X2, got, r.RaoBlackwell, r.BetaincLimit, below)
		}
	}
	// A value exactly at the limit is not below it, whatever the rounding
	// of the margin.
	for _, x := range [][]float64{{0, 0.3}, {-0.7, 0}, {0, 1e-9}} {
		m, s := meanSD(x)
		got, _ := TailFractionMVUE(2, m/s)
		want := 0.0
		if x[0] < 0 {
			want = 0.5
		}
		if got != want {
			t.Errorf("x = %v: MVUE %g, want %g", x, got, want)
		}
	}
}
