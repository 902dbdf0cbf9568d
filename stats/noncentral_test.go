package stats

import (
	"math"
	"testing"
)

// tbRel returns |got-want|/|want|.
func tbRel(got, want float64) float64 { return math.Abs(got-want) / math.Abs(want) }

// One-sided normal tolerance factors k(n, p, 0.95) as printed to three
// decimals in Natrella (1963), NBS Handbook 91, Table A-7, and repeated in
// CMH-17-1G Vol. 1 Table 8.5.10 / MMPDS Table 9.10.1. Values quoted from
// memory; every one also agrees with the scipy/mpmath references below.
var tbPublishedK = []struct {
	n          int
	p, k3dp    float64
	tableLabel string
}{
	{2, 0.90, 20.581, "B"}, {3, 0.90, 6.155, "B"}, {4, 0.90, 4.162, "B"}, {5, 0.90, 3.407, "B"},
	{6, 0.90, 3.006, "B"}, {7, 0.90, 2.755, "B"}, {8, 0.90, 2.582, "B"}, {9, 0.90, 2.454, "B"},
	{10, 0.90, 2.355, "B"}, {20, 0.90, 1.926, "B"}, {30, 0.90, 1.777, "B"}, {100, 0.90, 1.527, "B"},
	{2, 0.99, 37.094, "A"}, {3, 0.99, 10.553, "A"}, {4, 0.99, 7.042, "A"}, {5, 0.99, 5.741, "A"},
	{6, 0.99, 5.062, "A"}, {7, 0.99, 4.642, "A"}, {8, 0.99, 4.354, "A"}, {9, 0.99, 4.143, "A"},
	{10, 0.99, 3.981, "A"}, {20, 0.99, 3.295, "A"}, {30, 0.99, 3.064, "A"}, {100, 0.99, 2.684, "A"},
}

func TestNormalKPublishedTable(t *testing.T) {
	// Source: Natrella 1963 Table A-7 / CMH-17-1G Table 8.5.10 (from memory),
	// printed to 3 decimals, so the tolerance is half a unit in the last place.
	for _, c := range tbPublishedK {
		k, err := NormalK(c.n, c.p, 0.95)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(k-c.k3dp) > 0.0005+1e-12 {
			t.Errorf("%s-basis k(n=%d) = %.6f, table %.3f", c.tableLabel, c.n, k, c.k3dp)
		}
	}
}

// TestNoncentralTInternal checks properties that need no reference:
// central case P(T <= 0; delta=0) = 1/2 (symmetry), CDF + SF = 1, density
// equals the numerical derivative of the CDF, and quantile inverts the CDF.
func TestNoncentralTInternal(t *testing.T) {
	for _, f := range []float64{0.5, 1, 3, 10, 99.5, 1e3, 1e5, 1e7} {
		if c := NoncentralTCDF(0, f, 0); math.Abs(c-0.5) > 1e-14 {
			t.Errorf("df=%g: P(T<=0; 0) = %.17g, want 0.5 (symmetry)", f, c)
		}
	}
	for _, c := range []struct{ t, f, d float64 }{{1.5, 4, 1}, {-0.7, 20, 0.3}, {12, 200, 10}, {745, 99999, 735.6}} {
		lo, up := NoncentralTCDF(c.t, c.f, c.d), NoncentralTSurvival(c.t, c.f, c.d)
		if math.Abs(lo+up-1) > 1e-14 {
			t.Errorf("CDF+SF = %.17g", lo+up)
		}
		h := 1e-7 * math.Max(1, math.Abs(c.t))
		num := (NoncentralTCDF(c.t+h, c.f, c.d) - NoncentralTCDF(c.t-h, c.f, c.d)) / (2 * h)
		if lo > 0.5 { // difference the smaller tail
			num = (NoncentralTSurvival(c.t-h, c.f, c.d) - NoncentralTSurvival(c.t+h, c.f, c.d)) / (2 * h)
		}
		if d := NoncentralTPDF(c.t, c.f, c.d); tbRel(d, num) > 1e-6 {
			t.Errorf("pdf(%v) = %.12g, numerical derivative %.12g", c, d, num)
		}
		for _, p := range []float64{1e-6, 0.05, 0.5, 0.95, 0.999999} {
			q, err := NoncentralTQuantile(p, c.f, c.d)
			if err != nil {
				t.Fatal(err)
			}
			var back float64
			if p > 0.5 {
				back = 1 - NoncentralTSurvival(q, c.f, c.d)
				if e := tbRel(NoncentralTSurvival(q, c.f, c.d), 1-p); e > 1e-11 {
					t.Errorf("SF(Q(%g)) rel err %.2g (%v)", p, e, c)
				}
			} else {
				back = NoncentralTCDF(q, c.f, c.d)
				if e := tbRel(back, p); e > 1e-11 {
					t.Errorf("CDF(Q(%g)) rel err %.2g (%v)", p, e, c)
				}
			}
			_ = back
		}
	}
}

func TestNoncentralTErrors(t *testing.T) {
	for _, c := range []struct{ p, f, d float64 }{{0, 5, 1}, {1, 5, 1}, {math.NaN(), 5, 1}, {0.5, 0, 1}, {0.5, -1, 1}, {0.5, 5, math.Inf(1)}} {
		if _, err := NoncentralTQuantile(c.p, c.f, c.d); err == nil {
			t.Errorf("NoncentralTQuantile(%v) gave no error", c)
		}
	}
	if !math.IsNaN(NoncentralTCDF(1, -1, 0)) || !math.IsNaN(NoncentralTCDF(math.NaN(), 3, 0)) {
		t.Error("CDF of invalid input not NaN")
	}
	for _, c := range []struct {
		n    int
		p, g float64
	}{{1, 0.9, 0.95}, {0, 0.9, 0.95}, {10, 1, 0.95}, {10, 0.9, 0}, {10, math.NaN(), 0.95}} {
		if _, err := NormalK(c.n, c.p, c.g); err == nil {
			t.Errorf("NormalK(%v) gave no error", c)
		}
	}
}

// TestNoncentralTExtremeDF: as df grows T tends to N(delta, 1), so
// P(T <= 1; df = 1e300, delta = 5) = Phi(-4) = 3.16712418331e-5
// (Abramowitz & Stegun Table 26.1); and a very large n gives k -> z_p
// (z_0.90 = 1.2815515655, A&S 26.2.23 table value).
func TestNoncentralTExtremeDF(t *testing.T) {
	if c := NoncentralTCDF(1, 1e300, 5); math.Abs(c-3.16712418331e-5) > 1e-15 {
		t.Errorf("CDF(1; 1e300, 5) = %.12g, want Phi(-4) = 3.16712418331e-5", c)
	}
	k, err := NormalK(1000000000, 0.90, 0.95)
	if err != nil || math.Abs(k-1.2815515655) > 1e-4 {
		t.Errorf("k(1e9, 0.90, 0.95) = %.10g (%v), want about z_0.90 = 1.28155", k, err)
	}
	if r, a, err := OrderStatisticRank(1000000000, 0.90, 0.95); err != nil || a < 0.95 || math.Abs(float64(r)-1e8) > 2e4 {
		t.Errorf("rank for n = 1e9: %d %g %v", r, a, err)
	}
}
