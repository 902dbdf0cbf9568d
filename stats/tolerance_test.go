package stats

import (
	"encoding/json"
	"errors"
	"math"
	"os"
	"testing"
)

// TestNormalAndLognormalBounds: NIST StRD SiRstv and AtmWtAg values, bounds
// computed with numpy/scipy (testdata/tolerance/gen_simple_bounds.py).
// Normal to 1e-12 relative; lognormal to 1e-12 relative.
func TestNormalAndLognormalBounds(t *testing.T) {
	b, err := os.ReadFile("../testdata/tolerance/simple_bounds.json")
	if err != nil {
		t.Fatal(err)
	}
	var ref struct {
		Cases []struct {
			Name              string
			P, Gamma, K       float64
			Normal, Lognormal float64
			X                 []float64
		}
	}
	if err := json.Unmarshal(b, &ref); err != nil || len(ref.Cases) < 6 {
		t.Fatalf("reference: %v", err)
	}
	for _, c := range ref.Cases {
		nb, err := NormalLowerBound(c.X, c.P, c.Gamma)
		if err != nil {
			t.Fatal(err)
		}
		if tbRel(nb.Value, c.Normal) > 1e-12 || tbRel(nb.Factor, c.K) > 1e-9 {
			t.Errorf("%s p=%g normal: %.15g (k %.12g), scipy %.15g (k %.12g)", c.Name, c.P, nb.Value, nb.Factor, c.Normal, c.K)
		}
		lb, err := LognormalLowerBound(c.X, c.P, c.Gamma)
		if err != nil {
			t.Fatal(err)
		}
		if tbRel(lb.Value, c.Lognormal) > 1e-12 {
			t.Errorf("%s p=%g lognormal: %.15g, scipy %.15g", c.Name, c.P, lb.Value, c.Lognormal)
		}
	}
}

func TestNormalBoundErrors(t *testing.T) {
	if _, err := NormalLowerBound([]float64{1}, 0.9, 0.95); !errors.Is(err, ErrTooFew) {
		t.Errorf("n=1: %v", err)
	}
	if _, err := NormalLowerBound([]float64{2, 2, 2}, 0.9, 0.95); !errors.Is(err, ErrZeroSpread) {
		t.Errorf("zero spread: %v", err)
	}
	if _, err := NormalLowerBound([]float64{1, math.Inf(1)}, 0.9, 0.95); err == nil {
		t.Error("Inf accepted")
	}
	if _, err := LognormalLowerBound([]float64{1, 0, 2}, 0.9, 0.95); err == nil {
		t.Error("zero accepted by lognormal")
	}
	if _, err := NormalLowerBound([]float64{1, 2, 3}, 1.5, 0.95); err == nil {
		t.Error("content 1.5 accepted")
	}
}
