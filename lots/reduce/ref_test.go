package reduce

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"testing"

	"gonum.org/v1/gonum/integrate"
)

// ref holds testdata/reduce/ref.json, made by testdata/reduce/make_ref.py
// with Debian's numpy 1.24.2 and scipy 1.10.1 under /usr/bin/python3.
type ref struct {
	LinFit struct {
		X, Y                 []float64
		Slope, Intercept, R2 float64
		ResidualSD           float64 `json:"residual_sd"`
	} `json:"linfit"`
	Trapezoid struct {
		X, Y []float64
		Area float64
	} `json:"trapezoid"`
	QuadFit struct {
		X, Y  []float64
		XC, W float64
		C     [3]float64
	} `json:"quadfit"`
	NormQ75 float64 `json:"norm_q75"`
}

func loadRef(t *testing.T) ref {
	t.Helper()
	b, err := os.ReadFile(filepath.Join("..", "..", "testdata", "reduce", "ref.json"))
	if err != nil {
		t.Fatal(err)
	}
	var r ref
	if err := json.Unmarshal(b, &r); err != nil {
		t.Fatal(err)
	}
	if r.LinFit.ResidualSD == 0 || len(r.LinFit.X) == 0 {
		t.Fatal("ref.json lacks the linear fit reference")
	}
	return r
}

func rel(t *testing.T, what string, got, want, tol float64) {
	t.Helper()
	if math.IsNaN(got) || math.Abs(got-want) > tol*math.Abs(want) {
		t.Errorf("%s = %.15g, want %.15g (relative tolerance %g)", what, got, want, tol)
	}
}

// TestLinearFitAgainstScipy: fitLine (gonum stat.LinearRegression and
// stat.RSquared) against scipy.stats.linregress.
func TestLinearFitAgainstScipy(t *testing.T) {
	r := loadRef(t)
	var res Result
	res.fitLine(r.LinFit.X, r.LinFit.Y)
	rel(t, "slope", res.Fit.Slope, r.LinFit.Slope, 1e-10)
	rel(t, "intercept", res.Fit.Intercept, r.LinFit.Intercept, 1e-9)
	rel(t, "R^2", res.Fit.R2, r.LinFit.R2, 1e-12)
	rel(t, "residual SD", res.Fit.ResidualSD, r.LinFit.ResidualSD, 1e-9)
}

// TestTrapezoidAgainstScipy: gonum integrate.Trapezoidal on an uneven grid
// against scipy.integrate.trapezoid.
func TestTrapezoidAgainstScipy(t *testing.T) {
	r := loadRef(t)
	rel(t, "area", integrate.Trapezoidal(r.Trapezoid.X, r.Trapezoid.Y), r.Trapezoid.Area, 1e-12)
	rel(t, "toughness", toughness(r.Trapezoid.X, r.Trapezoid.Y), r.Trapezoid.Area, 1e-12)
}

// TestQuadFitAgainstNumpy: the hand-written local parabola against
// numpy.polyfit of degree 2 in the same scaled variable.
func TestQuadFitAgainstNumpy(t *testing.T) {
	r := loadRef(t)
	c, ok := quadFit(r.QuadFit.X, r.QuadFit.Y, r.QuadFit.XC, r.QuadFit.W)
	if !ok {
		t.Fatal("quadFit failed")
	}
	for k := 0; k < 3; k++ {
		rel(t, "coefficient", c[k], r.QuadFit.C[k], 1e-9)
	}
	v, ok := parabolaVertex(r.QuadFit.X, r.QuadFit.Y, r.QuadFit.XC-r.QuadFit.W, r.QuadFit.XC+r.QuadFit.W)
	want := r.QuadFit.XC - r.QuadFit.C[1]/(2*r.QuadFit.C[2])*r.QuadFit.W
	if !ok {
		t.Fatal("no vertex")
	}
	rel(t, "vertex", v, want, 1e-9)
}

// TestNoiseQuantile: the constant in noiseSD is scipy.stats.norm.ppf(0.75),
// and noiseSD recovers the SD of pure normal noise.
func TestNoiseQuantile(t *testing.T) {
	r := loadRef(t)
	rel(t, "quantile", 0.6744897501960817, r.NormQ75, 1e-15)
	y := make([]float64, len(r.LinFit.Y))
	for i := range y {
		y[i] = r.LinFit.Y[i] - 71000*r.LinFit.X[i] + 20 // the N(0, 0.8) noise
	}
	near(t, "noise SD", noiseSD(y), 0.8, 0.15)
}
