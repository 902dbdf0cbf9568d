package trend

import (
	"math"
	"strings"
	"testing"

	"lotproof/stats"
)

// TestMethodTextD2: the method text gives the d2 the code uses: 2/√π, the
// exact mean range of two standard normal values (printed as 1.128 in
// Montgomery, Introduction to Statistical Quality Control, 7th ed.,
// Appendix VI), which the quadrature of stats.D2 reproduces.
func TestMethodTextD2(t *testing.T) {
	m := methods(Options{Lambda: DefaultLambda, L: DefaultL, Alpha: DefaultAlpha, Confidence: DefaultConfidence})
	if !strings.Contains(m[0], "d2 = 2/√π ≈ 1.128") {
		t.Errorf("method text: %s", m[0])
	}
	d2, err := stats.D2(2)
	if err != nil || math.Abs(d2-2/math.Sqrt(math.Pi)) > 1e-12 || math.Abs(d2-1.128) > 0.0005 {
		t.Errorf("d2(2) = %v (%v), want 2/√π = %v (Montgomery 1.128)", d2, err, 2/math.Sqrt(math.Pi))
	}
	lim, mr, err := stats.IndividualsLimits([]float64{10, 12, 11, 15})
	if err != nil || math.Abs(lim.Sigma-mr*math.Sqrt(math.Pi)/2) > 1e-12 {
		t.Errorf("sigma %v from MRbar %v", lim.Sigma, mr)
	}
}
