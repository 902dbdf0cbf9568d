package stats

import (
	"math"
	"testing"
)

// TestLotMeanSigmas: the example, lots of 3, 5 and 10 specimens
// with a within-lot SD of 12 (so that the old floor 12/(c4(6) sqrt 6) was
// 5.15) and a moving-range sigma below the within-lot part: each lot mean
// gets sigma_w/sqrt(n), 12/sqrt 3 = 6.928 for the 3-specimen lot (the x-bar
// chart with variable sample size, Montgomery, Introduction to Statistical
// Quality Control, 7th ed., section 6.3.2; values by hand). With equal sizes
// the rule is max(moving-range sigma, sigma_w/sqrt n), the earlier floor.
func TestLotMeanSigmas(t *testing.T) {
	s, between, rms, err := LotMeanSigmas(1, 12, []int{3, 5, 10}, []int{3, 5, 10, 4})
	if err != nil {
		t.Fatal(err)
	}
	for i, want := range []float64{6.928203230275509, 5.366563145999495, 3.794733192202055, 6} {
		if math.Abs(s[i]-want) > 1e-12 {
			t.Errorf("sigma[%d] = %.12g, want %.12g", i, s[i], want)
		}
	}
	if between != 0 || math.Abs(rms-12*math.Sqrt((1.0/3+1.0/5+1.0/10)/3)) > 1e-12 {
		t.Errorf("between %g, rms %g", between, rms)
	}
	if c4, _ := C4(6); math.Abs(12/(c4*math.Sqrt(6))-5.15) > 0.005 || !(s[0] > 5.15) {
		t.Errorf("old floor %.4f, 3-specimen lot now %.4f", 12/(c4*math.Sqrt(6)), s[0])
	}
	// Between-lot part present: sigma_b^2 = 8^2 - 12^2 h.
	h := (1.0/3 + 1.0/5 + 1.0/10) / 3
	s, between, rms, _ = LotMeanSigmas(8, 12, []int{3, 5, 10}, []int{3, 10})
	b2 := 64 - 144*h
	if math.Abs(between-math.Sqrt(b2)) > 1e-12 || math.Abs(rms-8) > 1e-12 ||
		math.Abs(s[0]-math.Sqrt(b2+48)) > 1e-12 || math.Abs(s[1]-math.Sqrt(b2+14.4)) > 1e-12 {
		t.Errorf("sigmas %v, between %g, rms %g", s, between, rms)
	}
	// Equal sizes: max of the two.
	for _, mr := range []float64{2, 5, 9} {
		s, _, rms, _ := LotMeanSigmas(mr, 10, []int{4, 4, 4}, []int{4})
		want := math.Max(mr, 10/2.0)
		if math.Abs(s[0]-want) > 1e-12 || math.Abs(rms-want) > 1e-12 {
			t.Errorf("equal sizes, MR sigma %g: %g %g, want %g", mr, s[0], rms, want)
		}
	}
	if _, _, _, err := LotMeanSigmas(1, 1, nil, []int{3}); err == nil {
		t.Error("no baseline sizes accepted")
	}
	if _, _, _, err := LotMeanSigmas(math.NaN(), 1, []int{3}, []int{3}); err == nil {
		t.Error("NaN sigma accepted")
	}
}
