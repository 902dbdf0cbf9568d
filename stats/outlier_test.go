package stats

import (
	"math"
	"testing"
)

type distRef struct {
	Scipy      string       `json:"scipy"`
	TIsf       [][5]float64 `json:"t_isf"`
	NormLogCDF [][2]float64 `json:"norm_logcdf"`
	Screens    []struct {
		Name      string       `json:"name"`
		X         []float64    `json:"x"`
		Alpha     float64      `json:"alpha"`
		Iterative bool         `json:"iterative"`
		Flagged   [][3]float64 `json:"flagged"`
	} `json:"screens"`
}

// tUpperQuantile (gonum mathext.InvRegIncBeta start, Newton-polished on
// mathext.RegIncBeta) against the upper alpha/(2n) quantile of t(n-2) for
// n = 3..1e7, alpha = 0.001..0.2 computed with mpmath at 40 digits
// (Debian python3-mpmath; testdata/stats/make_dist_ref.py), and the MNR
// critical value built from it: 1e-12 relative for n <= 10000; for
// n = 3e4..1e7 gonum's RegIncBeta (which defines S(t)) carries a relative
// error growing with df (measured up to ~5e-11; the same log-beta
// cancellation as in the F survival check), asserted at 2e-10. Also against
// scipy.stats.t.isf at 5e-9: scipy 1.10's t.isf is itself only good to
// ~2e-9 there (measured against mpmath), as is unpolished InvRegIncBeta.
func TestTQuantileAndMNRCriticalAgainstMpmath(t *testing.T) {
	var ref distRef
	loadJSON(t, "../testdata/stats/dist_ref.json", &ref)
	worstT, worstC := 0.0, 0.0
	for _, r := range ref.TIsf {
		n, a := int(r[0]), r[1]
		tq := tUpperQuantile(a/(2*float64(n)), float64(n-2))
		c, err := MNRCritical(n, a)
		if err != nil {
			t.Fatal(err)
		}
		worstT = math.Max(worstT, relErr(tq, r[2]))
		worstC = math.Max(worstC, relErr(c, r[3]))
		tol := 1e-12
		if n > 10000 {
			tol = 2e-10
		}
		checkRel(t, "t quantile (mpmath)", tq, r[2], tol)
		checkRel(t, "MNR critical (mpmath)", c, r[3], tol)
		checkRel(t, "t quantile (scipy t.isf)", tq, r[4], 5e-9)
	}
	t.Logf("worst relative error: t quantile %.3g, MNR critical %.3g over %d points", worstT, worstC, len(ref.TIsf))
}

// Grubbs (1969) / ASTM E178 Table 1 critical values for the largest
// normed residual at one-sided levels 5 %, 2.5 %, 1 % — values FROM MEMORY
// (3 decimals). The two-sided test at alpha uses alpha/(2n), which is the
// one-sided alpha/2 column. Tolerance 0.0015 (table rounding plus memory).
func TestMNRCriticalGrubbsTable(t *testing.T) {
	table := map[int][3]float64{ // n: one-sided 0.05, 0.025, 0.01
		3: {1.153, 1.155, 1.155}, 4: {1.463, 1.481, 1.492}, 5: {1.672, 1.715, 1.749},
		6: {1.822, 1.887, 1.944}, 7: {1.938, 2.020, 2.097}, 8: {2.032, 2.126, 2.221},
		9: {2.110, 2.215, 2.323}, 10: {2.176, 2.290, 2.410}, 15: {2.409, 2.549, 2.705},
		20: {2.557, 2.709, 2.884}, 25: {2.663, 2.822, 3.009}, 30: {2.745, 2.908, 3.103},
	}
	for n, row := range table {
		for j, oneSided := range []float64{0.05, 0.025, 0.01} {
			c, err := MNRCritical(n, 2*oneSided)
			if err != nil {
				t.Fatal(err)
			}
			if math.Abs(c-row[j]) > 0.0015 {
				t.Errorf("n=%d one-sided %v: C = %.4f, table %.3f", n, oneSided, c, row[j])
			}
		}
	}
}

// Screening against an independent numpy/scipy implementation of the
// iterative MNR procedure (make_dist_ref.py): 1e-12 on MNR; 5e-9 on C,
// which the reference builds from scipy's t.isf (good to ~2e-9).
func TestScreenOutliersAgainstReference(t *testing.T) {
	var ref distRef
	loadJSON(t, "../testdata/stats/dist_ref.json", &ref)
	for _, s := range ref.Screens {
		got, err := ScreenOutliers(s.X, s.Alpha, s.Iterative)
		if err != nil {
			t.Errorf("%s: %v", s.Name, err)
			continue
		}
		if len(got) != len(s.Flagged) {
			t.Errorf("%s alpha %v iterative %v: flagged %d want %d", s.Name, s.Alpha, s.Iterative, len(got), len(s.Flagged))
			continue
		}
		for i, f := range s.Flagged {
			g := got[i]
			if g.Index != int(f[0]) || g.Value != s.X[g.Index] || !g.Outlier {
				t.Errorf("%s: flagged %+v want index %v", s.Name, g, f[0])
			}
			checkRel(t, s.Name+" MNR", g.MNR, f[1], 1e-12)
			checkRel(t, s.Name+" C", g.Critical, f[2], 5e-9)
		}
	}
	// The caller's slice is never changed.
	x := []float64{1, 2, 3, 2, 1, 2, 50}
	before := append([]float64(nil), x...)
	if _, err := ScreenOutliers(x, 0.05, true); err != nil {
		t.Fatal(err)
	}
	for i := range x {
		if x[i] != before[i] {
			t.Fatal("ScreenOutliers modified its input")
		}
	}
}

func TestMNRErrors(t *testing.T) {
	for name, x := range map[string][]float64{"two": {1, 2}, "equal": {4, 4, 4, 4}, "nan": {1, 2, math.NaN()}, "inf": {1, 2, math.Inf(1)}} {
		if _, err := MaxNormedResidual(x, 0.05); err == nil {
			t.Errorf("MaxNormedResidual(%s): no error", name)
		}
		if _, err := ScreenOutliers(x, 0.05, true); err == nil {
			t.Errorf("ScreenOutliers(%s): no error", name)
		}
	}
	for _, a := range []float64{0, 1, -0.1, math.NaN()} {
		if _, err := MaxNormedResidual([]float64{1, 2, 3, 4}, a); err == nil {
			t.Errorf("alpha %v: no error", a)
		}
	}
	// Iterating down to identical remaining values stops cleanly.
	r, err := ScreenOutliers([]float64{5, 5, 5, 5, 5, 5, 5, 5, 5, 100}, 0.05, true)
	if err != nil || len(r) != 1 || r[0].Index != 9 {
		t.Errorf("constant remainder: %+v %v", r, err)
	}
}

// math.Erfc-based logPhi (with its asymptotic branch below -35) against
// scipy.stats.norm.logcdf for z in [-60, 40]: 1e-13 relative (absolute
// where |ln Φ| < 1e-3, since ln Φ → 0).
func TestLogPhiAgainstScipy(t *testing.T) {
	var ref distRef
	loadJSON(t, "../testdata/stats/dist_ref.json", &ref)
	for _, r := range ref.NormLogCDF {
		got := logPhi(r[0])
		var e float64
		if math.Abs(r[1]) < 1e-3 {
			e = math.Abs(got-r[1]) / 1e-3
		} else {
			e = relErr(got, r[1])
		}
		if e > 1e-13 {
			t.Errorf("logPhi(%v) = %.17g, scipy %.17g (err %.2g)", r[0], got, r[1], e)
		}
	}
}
