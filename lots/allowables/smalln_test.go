package allowables

import (
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
	if r.Method != Weibull || !(float64(r.ABasis) < float64(r.BBasis)) {
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
	if !ok || r.Method != HansonKoop || !strings.Contains(s.Decision, "could be tested") {
		t.Errorf("method %s, step %+v", r.Method, s)
	}
	if !strings.Contains(strings.Join(r.Warnings, " "), "cannot be checked is not assumed") {
		t.Errorf("warnings: %v", r.Warnings)
	}
}
