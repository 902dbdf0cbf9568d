package allowables

import (
	"math"
	"strings"
	"testing"
)

// stepOf returns the first audit step whose name starts with prefix.
func stepOf(r Result, prefix string) (Step, bool) {
	for _, s := range r.Steps {
		if strings.HasPrefix(s.Step, prefix) {
			return s, true
		}
	}
	return Step{}, false
}

// TestSmallSampleDistributionChoice: with fewer than 8 values the normal
// and lognormal Anderson-Darling rules give no OSL (stats.ADNormalMinN;
// their level there, by the numpy simulation in
// testdata/stats/make_ad_small_ref.py, is far below nominal), so the audit
// says "not enough values for a goodness-of-fit test" instead of a perfect
// OSL 1.0000; the Weibull rule keeps its level and is still tested. When
// the Weibull model is rejected too, no untested model is assumed: the
// distribution-free Hanson-Koopmans bound is used, with a warning.
func TestSmallSampleDistributionChoice(t *testing.T) {
	rep, err := Analyze(dataset([]float64{500, 510, 495}, func(int) string { return "L1" }), DefaultOptions(), "2026-12-02")
	if err != nil {
		t.Fatal(err)
	}
	r := rep.Results[0]
	for _, m := range []string{"normal", "lognormal"} {
		s, ok := stepOf(r, "goodness of fit: "+m)
		if !ok || s.Decision != "not enough values for a goodness-of-fit test" || !strings.Contains(s.Reason, "at least 8 values") {
			t.Errorf("%s step: %+v", m, s)
		}
	}
	if s, ok := stepOf(r, "goodness of fit: weibull"); !ok || s.Decision != "fits: chosen" {
		t.Errorf("Weibull step: %+v", s)
	}
	if r.AutoMethod != Weibull || r.Method != LotAware || !(float64(r.ABasis) < float64(r.BBasis)) {
		t.Errorf("method %s, A %v, B %v", r.Method, r.ABasis, r.BBasis)
	}
	// Four equal-ish values and one far above: the Weibull (long lower
	// tail) model is rejected, normal and lognormal cannot be tested.
	rep, err = Analyze(dataset([]float64{100, 100.5, 101, 100.2, 160}, func(int) string { return "L1" }), DefaultOptions(), "2026-12-02")
	if err != nil {
		t.Fatal(err)
	}
	r = rep.Results[0]
	if s, ok := stepOf(r, "goodness of fit: weibull"); !ok || s.Decision != "rejected" {
		t.Fatalf("Weibull step: %+v", s)
	}
	s, ok := stepOf(r, "distribution choice")
	if !ok || r.AutoMethod != HansonKoop || !strings.Contains(s.Decision, "could be tested") {
		t.Errorf("method %s, step %+v", r.Method, s)
	}
	if !strings.Contains(strings.Join(r.Warnings, " "), "cannot be checked is not assumed") {
		t.Errorf("warnings: %v", r.Warnings)
	}
}

// TestOutlierWarningCountsValues: a value flagged both within its lot and
// over all data is one value in the warning. The flags themselves follow
// the maximum normed residual test of CMH-17-1G 8.3.3 (critical values
// checked against scipy in stats/outlier_test.go); here 150 lies 1.788 SD
// from the mean of its lot of 5 (critical value 1.715 at alpha 0.05) and
// 2.843 SD from the mean of all 10 values (critical 2.290; both by
// scipy.stats.t.isf, computed for this comment). The MNR values recorded
// are checked against these.
func TestOutlierWarningCountsValues(t *testing.T) {
	vals := []float64{100, 101, 99, 100.5, 150, 100, 101, 99, 100.2, 100.8}
	rep, err := Analyze(dataset(vals, func(i int) string { return []string{"L1", "L2"}[i/5] }), DefaultOptions(), "2026-12-02")
	if err != nil {
		t.Fatal(err)
	}
	r := rep.Results[0]
	within := map[string]int{}
	for _, o := range r.Outliers {
		within[o.Within]++
		if o.Specimen != "4" {
			t.Errorf("flagged %+v", o)
		}
		want := map[string][2]float64{"lot L1": {1.7878720022855585, 1.7150373121065823}, "all data": {2.8430748419086416, 2.2899540844796067}}[o.Within]
		if math.Abs(float64(o.MNR)-want[0]) > 1e-9 || math.Abs(float64(o.Critical)-want[1]) > 1e-6 {
			t.Errorf("%s: MNR %v critical %v, scipy %v", o.Within, o.MNR, o.Critical, want)
		}
	}
	if within["lot L1"] != 1 || within["all data"] != 1 {
		t.Fatalf("flags %v", within)
	}
	found := false
	for _, w := range r.Warnings {
		if strings.Contains(w, "flagged as outliers") {
			found = true
			if !strings.HasPrefix(w, "1 value(s) flagged") {
				t.Errorf("warning counts the value twice: %q", w)
			}
		}
	}
	if !found {
		t.Errorf("no outlier warning: %v", r.Warnings)
	}
}

// TestNegativeBasisWarnings: a negative B-basis value gets the same warning
// as a negative A-basis value. Ten values 1..10 (mean 5.5, SD 3.028) with
// the normal method: B = 5.5 - 2.355 x 3.028 < 0 with k(10; 0.90, 0.95) =
// 2.355 (Natrella 1963, NBS Handbook 91, Table A-7; from memory, checked
// against scipy in stats).
func TestNegativeBasisWarnings(t *testing.T) {
	opt := DefaultOptions()
	opt.Method = Normal
	rep, err := Analyze(dataset([]float64{1, 5, 9, 2, 8, 3, 7, 4, 6, 10}, func(int) string { return "L1" }), opt, "2026-12-02")
	if err != nil {
		t.Fatal(err)
	}
	r := rep.Results[0]
	if b := float64(r.BBasis); math.Abs(b-(5.5-2.355*3.0276503540974917)) > 0.01 || b >= 0 {
		t.Fatalf("B-basis %v", b)
	}
	w := strings.Join(r.Warnings, "\n")
	for _, l := range []string{"A", "B"} {
		if !strings.Contains(w, "the "+l+"-basis value is not positive") {
			t.Errorf("no %s-basis warning: %s", l, w)
		}
	}
}

// TestLotComparisonPValueText: the k-sample Anderson-Darling step states
// the p-value once, whether interpolated ("p 0.1234") or outside the
// range tabulated by Scholz and Stephens (1987, Table 1) ("p-value below
// 0.001 ..."), never "p p-value".
func TestLotComparisonPValueText(t *testing.T) {
	var far []float64
	for i := range 20 {
		far = append(far, float64(100*(1+i/10)+i%10))
	}
	for _, c := range []struct {
		vals []float64
		want string
	}{
		{far, "p-value below 0.001"},
		{[]float64{100, 101, 102, 103, 104, 200, 201, 202, 203, 204}, ", p 0."},
		{[]float64{100, 103, 101, 104, 102, 101.5, 103.5, 100.5, 102.5, 104.5}, "p-value above 0.25"},
	} {
		half := len(c.vals) / 2
		rep, err := Analyze(dataset(c.vals, func(i int) string { return []string{"L1", "L2"}[i/half] }), DefaultOptions(), "2026-12-02")
		if err != nil {
			t.Fatal(err)
		}
		if s, ok := stepOf(rep.Results[0], "lot comparison (k-sample"); !ok || strings.Contains(s.Reason, "p p-value") || !strings.Contains(s.Reason, c.want) {
			t.Errorf("want %q: step %+v", c.want, s)
		}
	}
}
