package stats

import (
	"encoding/json"
	"math"
	"os"
	"strings"
	"testing"
)

// TestANOVALowerBoundAgainstReference: NIST StRD SiRstv and AtmWtAg data
// (whole, unbalanced subsets, and a subset with MSB < MSW), bound computed
// independently in numpy/scipy by testdata/tolerance/gen_anova.py following
// CMH-17-1G Vol. 1 section 8.3.5.2. Factor to 1e-9 relative (1e-8 for AtmWtAg), bound to 1e-12.
func TestANOVALowerBoundAgainstReference(t *testing.T) {
	b, err := os.ReadFile("../testdata/tolerance/anova_bound.json")
	if err != nil {
		t.Fatal(err)
	}
	var ref struct {
		Cases []struct {
			Name, Method  string
			P, Gamma      float64
			Value, Factor float64
			MSB, MSW      float64
			Groups        [][]float64
		}
	}
	if err := json.Unmarshal(b, &ref); err != nil {
		t.Fatal(err)
	}
	if len(ref.Cases) < 15 {
		t.Fatalf("only %d cases", len(ref.Cases))
	}
	pooled := 0
	for _, c := range ref.Cases {
		got, err := ANOVALowerBound(c.Groups, c.P, c.Gamma)
		if err != nil {
			t.Fatalf("%s: %v", c.Name, err)
		}
		if got.Method != c.Method {
			t.Errorf("%s p=%g: method %s, reference %s", c.Name, c.P, got.Method, c.Method)
			continue
		}
		// AtmWtAg (NIST "average difficulty") loses about 8 digits in MSW
		// to cancellation in either program, so its factor gets 1e-8.
		ftol := 1e-9
		if strings.HasPrefix(c.Name, "AtmWtAg") {
			ftol = 1e-8
		}
		if tbRel(got.Factor, c.Factor) > ftol || tbRel(got.Value, c.Value) > 1e-12 {
			t.Errorf("%s p=%g: bound %.15g factor %.12g, reference %.15g %.12g", c.Name, c.P, got.Value, got.Factor, c.Value, c.Factor)
		}
		if c.Method == "anova-pooled" {
			pooled++
			if !strings.Contains(got.Notes[0], "pooled") {
				t.Errorf("%s: pooled case lacks its note: %v", c.Name, got.Notes)
			}
		}
	}
	if pooled == 0 {
		t.Error("reference has no MSB <= MSW case")
	}
}

// TestANOVALowerBoundLimits: the factor T equals k0 when u = MSB/MSW = 1
// (w = 1/sqrt(n')), a property of the CMH-17-1G 8.3.5.2 formula, and errors.
func TestANOVALowerBoundLimits(t *testing.T) {
	if _, err := ANOVALowerBound([][]float64{{1, 2, 3}}, 0.9, 0.95); err == nil {
		t.Error("one group accepted")
	}
	if _, err := ANOVALowerBound([][]float64{{1, 2}, {3, math.NaN()}}, 0.9, 0.95); err == nil {
		t.Error("NaN accepted")
	}
	if _, err := ANOVALowerBound([][]float64{{1}, {3}}, 0.9, 0.95); err == nil {
		t.Error("no replicates accepted")
	}
	// Two groups of 3 with MSB just above MSW: T between k0 and k1, near k0.
	g := [][]float64{{10, 11, 12}, {10.6, 11.6, 12.6}}
	b, err := ANOVALowerBound(g, 0.9, 0.95)
	if err != nil {
		t.Fatal(err)
	}
	k0, _ := NormalK(6, 0.9, 0.95)
	k1, _ := NormalK(2, 0.9, 0.95)
	if b.Method == "anova" && !(b.Factor >= k0 && b.Factor <= k1) {
		t.Errorf("T = %g not within [k0, k1] = [%g, %g]", b.Factor, k0, k1)
	}
}
