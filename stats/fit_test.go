package stats

import (
	"encoding/json"
	"errors"
	"math"
	"os"
	"testing"
)

type fitRefSet struct {
	Name              string    `json:"name"`
	X                 []float64 `json:"x"`
	NormMu            float64   `json:"norm_mu"`
	NormSigmaMLE      float64   `json:"norm_sigma_mle"`
	LognormSMLE       float64   `json:"lognorm_s_mle"`
	LognormScale      float64   `json:"lognorm_scale"`
	WeibullFitDefault []float64 `json:"weibull_fit_default"`
	WeibullFitTight   []float64 `json:"weibull_fit_tight"`
	WeibullBrentq     []float64 `json:"weibull_brentq"`
}

type fitRef struct {
	Scipy string      `json:"scipy"`
	Sets  []fitRefSet `json:"sets"`
}

func loadJSON(t testing.TB, path string, v any) {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	if err := json.Unmarshal(b, v); err != nil {
		t.Fatal(err)
	}
}

func relErr(got, want float64) float64 {
	if want == 0 {
		return math.Abs(got)
	}
	return math.Abs(got/want - 1)
}

func checkRel(t *testing.T, what string, got, want, tol float64) {
	t.Helper()
	if e := relErr(got, want); !(e <= tol) {
		t.Errorf("%s: got %.17g want %.17g (rel err %.3g > %.3g)", what, got, want, e, tol)
	}
}

// Reference: Debian python3-scipy (version recorded in the JSON), values made
// by testdata/stats/make_fit_ref.py.
func TestFitsAgainstScipy(t *testing.T) {
	var ref fitRef
	loadJSON(t, "../testdata/stats/fit_ref.json", &ref)
	if len(ref.Sets) < 10 {
		t.Fatalf("only %d reference sets", len(ref.Sets))
	}
	for _, s := range ref.Sets {
		n := float64(len(s.X))
		nf, err := FitNormal(s.X)
		if err != nil {
			t.Errorf("%s: FitNormal: %v", s.Name, err)
		} else {
			// scipy norm.fit gives the MLE sigma (divisor n): rescale to n-1.
			checkRel(t, s.Name+" normal mu (scipy norm.fit)", nf.Mu, s.NormMu, 1e-13)
			checkRel(t, s.Name+" normal sigma (scipy norm.fit * sqrt(n/(n-1)))", nf.Sigma, s.NormSigmaMLE*math.Sqrt(n/(n-1)), 1e-12)
		}
		lf, err := FitLognormal(s.X)
		if err != nil {
			t.Errorf("%s: FitLognormal: %v", s.Name, err)
		} else {
			// scipy lognorm.fit(floc=0): scale = exp(mu), s = MLE sigma of ln x.
			checkRel(t, s.Name+" lognormal exp(mu) (scipy lognorm.fit)", math.Exp(lf.Mu), s.LognormScale, 1e-12)
			// 1e-9: for near_1e6, ln x ≈ 13.8 carries ~1e-15 rounding while
			// sigma is 2.4e-5, so both sides agree to only ~1e-11.
			checkRel(t, s.Name+" lognormal sigma (scipy lognorm.fit * sqrt(n/(n-1)))", lf.Sigma, s.LognormSMLE*math.Sqrt(n/(n-1)), 1e-9)
		}
		wf, err := FitWeibull(s.X)
		if err != nil {
			t.Errorf("%s: FitWeibull: %v", s.Name, err)
			continue
		}
		// scipy.optimize.brentq on the profile likelihood equation, full precision.
		checkRel(t, s.Name+" weibull shape (scipy brentq)", wf.Shape, s.WeibullBrentq[0], 1e-10)
		checkRel(t, s.Name+" weibull scale (scipy brentq)", wf.Scale, s.WeibullBrentq[1], 1e-10)
		// scipy weibull_min.fit(floc=0) with a tight Nelder-Mead: the 1e-7.
		checkRel(t, s.Name+" weibull shape (scipy weibull_min.fit tight)", wf.Shape, s.WeibullFitTight[0], 1e-7)
		checkRel(t, s.Name+" weibull scale (scipy weibull_min.fit tight)", wf.Scale, s.WeibullFitTight[1], 1e-7)
		// scipy weibull_min.fit(floc=0) as shipped stops at its default
		// Nelder-Mead tolerance (xtol=ftol=1e-4): agreement only to ~1e-4.
		checkRel(t, s.Name+" weibull shape (scipy weibull_min.fit default)", wf.Shape, s.WeibullFitDefault[0], 1e-4)
	}
}

// The MLE must satisfy the likelihood equations themselves (Lawless 2003,
// eq. 5.2.8-5.2.9): Σ x^β ln x/Σ x^β - 1/β - mean ln x = 0 and
// α^β = mean x^β. Checked in extended form on hard cases.
func TestFitWeibullLikelihoodEquations(t *testing.T) {
	cases := map[string][]float64{
		"ties":   {10, 10, 10, 10, 10, 10, 10, 10, 10, 10, 10, 11},
		"1e6":    {1e6, 1e6 + 1, 1e6 + 2, 1e6 + 2, 1e6 + 5},
		"1e-3":   {1e-3, 1.1e-3, 0.9e-3, 1.05e-3},
		"tiny":   {1, math.Nextafter(1, 2)},
		"spread": {1e-300, 1e300},
	}
	for name, x := range cases {
		f, err := FitWeibull(x)
		if err != nil {
			t.Errorf("%s: %v", name, err)
			continue
		}
		lmax := math.Inf(-1)
		for _, v := range x {
			lmax = math.Max(lmax, math.Log(v))
		}
		var sw, swl, sl float64
		for _, v := range x {
			u := math.Log(v) - lmax
			w := math.Exp(f.Shape * u)
			sw += w
			swl += w * u
			sl += u
		}
		n := float64(len(x))
		g := swl/sw - 1/f.Shape - sl/n
		if math.Abs(g)*f.Shape > 1e-9 {
			t.Errorf("%s: profile equation residual %g (shape %g)", name, g, f.Shape)
		}
		alpha := math.Exp(lmax + math.Log(sw/n)/f.Shape)
		checkRel(t, name+" scale closed form", f.Scale, alpha, 1e-12)
	}
}

func TestFitErrors(t *testing.T) {
	bad := map[string][]float64{
		"empty": {}, "one": {3}, "equal": {2, 2, 2}, "nan": {1, math.NaN(), 2},
		"inf": {1, math.Inf(1)}, "zero": {0, 1, 2}, "negative": {-1, 1, 2},
	}
	for name, x := range bad {
		if _, err := FitWeibull(x); err == nil {
			t.Errorf("FitWeibull(%s) gave no error", name)
		}
		if _, err := FitLognormal(x); err == nil {
			t.Errorf("FitLognormal(%s) gave no error", name)
		}
	}
	for _, name := range []string{"empty", "one", "equal", "nan", "inf"} {
		if _, err := FitNormal(bad[name]); err == nil {
			t.Errorf("FitNormal(%s) gave no error", name)
		}
	}
	if _, err := FitWeibull([]float64{4, 4}); !errors.Is(err, ErrZeroSpread) {
		t.Errorf("FitWeibull equal values: want ErrZeroSpread, got %v", err)
	}
}

func BenchmarkFitWeibull1000(b *testing.B) {
	x := make([]float64, 1000)
	// Deterministic Weibull(shape 10, scale 100) quantiles at (i+0.5)/n.
	for i := range x {
		p := (float64(i) + 0.5) / float64(len(x))
		x[(i*389)%len(x)] = 100 * math.Pow(-math.Log1p(-p), 0.1)
	}
	b.ResetTimer()
	for b.Loop() {
		if _, err := FitWeibull(x); err != nil {
			b.Fatal(err)
		}
	}
}

// The Weibull maximum-likelihood estimates are scale-equivariant (Lawless
// 2003 section 5.2.2: scaling the data by c scales α by c and leaves β):
// data moved into the subnormal range by an exact power of two must give
// the same shape, which the logarithm of a subnormal (golang/go#56600) and
// the old log-based spread test broke (issue 14).
func TestFitWeibullSubnormalAndAdjacent(t *testing.T) {
	x := []float64{16, 32, 48, 64, 80, 40, 56}
	ref, err := FitWeibull(x)
	if err != nil {
		t.Fatal(err)
	}
	for _, e := range []int{-1070, -1000, -300, 300, 900} {
		y := make([]float64, len(x))
		for i, v := range x {
			y[i] = math.Ldexp(v, e) // exact: 16..80 are multiples of 2^4
		}
		got, err := FitWeibull(y)
		if err != nil {
			t.Fatalf("scale 2^%d: %v", e, err)
		}
		if math.Abs(got.Shape-ref.Shape) > 1e-12*ref.Shape {
			t.Errorf("scale 2^%d: shape %v, want %v", e, got.Shape, ref.Shape)
		}
		// A subnormal scale is only as fine as the smallest subnormal,
		// 2^-1074.
		tol := math.Max(1e-12*ref.Scale, math.Ldexp(1, -1074-e))
		if s := math.Ldexp(got.Scale, -e); math.Abs(s-ref.Scale) > tol {
			t.Errorf("scale 2^%d: scale/2^e %v, want %v", e, s, ref.Scale)
		}
	}
	// Two distinct values, however close, have a spread: the fit exists,
	// with the scale between them and, for adjacent normal doubles
	// (relative spread 2^-52), a very large shape. (5e-324 and the next
	// double differ by a factor of 2.)
	for _, a := range []float64{1.398043286095289e-76, 5e-324, 1000, 1} {
		b := math.Nextafter(a, math.Inf(1))
		w, err := FitWeibull([]float64{a, b})
		if err != nil {
			t.Fatalf("%v and the next double: %v", a, err)
		}
		if !(w.Scale >= a && w.Scale <= b) || !(w.Shape > 1e10 || a == 5e-324) || math.IsInf(w.Shape, 0) {
			t.Errorf("%v and the next double: %+v", a, w)
		}
	}
	if _, err := FitWeibull([]float64{5e-324, 5e-324}); !errors.Is(err, ErrZeroSpread) {
		t.Errorf("equal subnormals: %v, want ErrZeroSpread", err)
	}
}
