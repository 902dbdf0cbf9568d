package report

import (
	"encoding/json"
	"math"
	"os"
	"testing"
)

// plotRef is testdata/report/plot_ref.json, made by make_plot_ref.py with
// Debian's python3-scipy 1.10.1 under /usr/bin/python3.
type plotRef struct {
	Densities []struct {
		Dist   string
		P1, P2 float64
		X, PDF []float64
	}
	Quantiles []struct {
		N          int
		Normal     []float64
		Weibull    []float64
		MedianRank []float64 `json:"median_rank"`
	}
}

func loadPlotRef(t *testing.T) plotRef {
	t.Helper()
	b, err := os.ReadFile("../../testdata/report/plot_ref.json")
	if err != nil {
		t.Fatal(err)
	}
	var r plotRef
	if err := json.Unmarshal(b, &r); err != nil {
		t.Fatal(err)
	}
	return r
}

// relClose compares with a relative tolerance, and an absolute one for
// values that underflow to tiny numbers.
func relClose(got, want, rel, abs float64) bool {
	return math.Abs(got-want) <= rel*math.Abs(want)+abs
}

// TestDensitiesAgainstScipy: the densities drawn on the histogram against
// scipy.stats norm.pdf, lognorm.pdf and weibull_min.pdf over the whole
// drawn range (to 9 sigma for the normal, 8 sigma of ln x for the
// lognormal, 0.001 to 1.6 scale for the Weibull). Achieved: relative error
// below 1e-9 everywhere (the assertion); values below 1e-300 compared
// absolutely.
func TestDensitiesAgainstScipy(t *testing.T) {
	ref := loadPlotRef(t)
	if len(ref.Densities) != 11 {
		t.Fatalf("%d density sets in the reference, want 11", len(ref.Densities))
	}
	worst := 0.0
	for _, d := range ref.Densities {
		var f func(float64) float64
		switch d.Dist {
		case "normal":
			f = NormalFit{Mu: d.P1, Sigma: d.P2}.pdf
		case "lognormal":
			f = LognormalFit{Mu: d.P1, Sigma: d.P2}.pdf
		case "weibull":
			f = WeibullFit{Shape: d.P1, Scale: d.P2}.pdf
		default:
			t.Fatalf("unknown distribution %q", d.Dist)
		}
		for i, x := range d.X {
			got, want := f(x), d.PDF[i]
			if !relClose(got, want, 1e-9, 1e-300) {
				t.Errorf("%s(%g, %g) pdf(%g) = %g, scipy %g", d.Dist, d.P1, d.P2, x, got, want)
			}
			if want > 1e-300 {
				worst = math.Max(worst, math.Abs(got-want)/want)
			}
		}
	}
	t.Logf("worst relative density error against scipy: %.2g", worst)
}

// TestPlottingPositionsAgainstScipy: the normal and Weibull plot ordinates
// of Benard's median ranks against scipy.stats.norm.ppf and
// log(-log1p(-p)), and Benard's approximation against the exact median
// ranks beta.ppf(0.5, i, n-i+1) (Benard's approximation is known to be
// within about 0.005 of them in probability, Abernethy, The New Weibull
// Handbook, sec. 2.6, from memory; asserted: 0.005).
func TestPlottingPositionsAgainstScipy(t *testing.T) {
	ref := loadPlotRef(t)
	for _, q := range ref.Quantiles {
		for i := range q.N {
			p := BenardRank(i+1, q.N)
			if got := normalScore(p); !relClose(got, q.Normal[i], 1e-12, 1e-14) {
				t.Errorf("n=%d i=%d: normal score %.17g, scipy %.17g", q.N, i+1, got, q.Normal[i])
			}
			if got := weibullScore(p); !relClose(got, q.Weibull[i], 1e-13, 1e-15) {
				t.Errorf("n=%d i=%d: Weibull score %.17g, reference %.17g", q.N, i+1, got, q.Weibull[i])
			}
			if math.Abs(p-q.MedianRank[i]) > 0.005 {
				t.Errorf("n=%d i=%d: Benard rank %.5f, exact median rank %.5f", q.N, i+1, p, q.MedianRank[i])
			}
		}
	}
}
