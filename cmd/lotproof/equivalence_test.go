package main

import (
	"encoding/json"
	"math"
	"strings"
	"testing"

	"lotproof/lots/equivalence"
	"lotproof/stats"
)

// The factors are checked against quadrature and Monte Carlo in
// stats/equivalence_test.go; here the limits M - k*S, the per-lot
// decisions and the exit statuses.
func TestEquivalenceLimitsAndLots(t *testing.T) {
	code, out, errs := run(t, "", "equivalence", "--baseline-mean", "1000", "--baseline-sd", "20", "--n", "5", "--format", "json")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var r equivalence.Result
	if err := json.Unmarshal([]byte(out), &r); err != nil {
		t.Fatal(err)
	}
	f, _ := stats.MeanMinFactors(5, 0.05)
	if len(r.Factors) != 1 || math.Abs(float64(r.Factors[0].MinLimit)-(1000-20*f.KMin)) > 1e-9 || math.Abs(float64(r.Factors[0].MeanLimit)-(1000-20*f.KMean)) > 1e-9 {
		t.Errorf("limits %+v", r.Factors)
	}
	// testdata lots: A (mean 1012.5, min 1001) passes against a baseline of
	// 1010 +- 10 MPa; C (min 925) fails the minimum limit 1010 - 25.3 = 984.7.
	code, out, _ = run(t, "", "equivalence", testLots, "--property", "tensile", "--material", "Alloy T", "--baseline-mean", "1010", "--baseline-sd", "10", "--format", "json")
	if code != exitVerdict {
		t.Fatalf("exit %d", code)
	}
	if err := json.Unmarshal([]byte(out), &r); err != nil {
		t.Fatal(err)
	}
	got := map[string]string{}
	for _, l := range r.Lots {
		got[l.Lot] = l.Verdict
	}
	if got["A"] != "equivalent" || got["C"] != "not equivalent" || got["D"] != "not tested" || got["F"] != "" {
		t.Errorf("verdicts %v", got)
	}
}

func TestEquivalenceBadInput(t *testing.T) {
	for _, args := range [][]string{
		{"equivalence", "--baseline-mean", "1000", "--n", "5"},
		{"equivalence", "--baseline-mean", "1000", "--baseline-sd", "0", "--n", "5"},
		{"equivalence", "--baseline-mean", "1000", "--baseline-sd", "20", "--n", "1"},
		{"equivalence", "--baseline-mean", "1000", "--baseline-sd", "20"},
		{"equivalence", "--baseline-mean", "1000", "--baseline-sd", "20", "--alpha", "0.7", "--n", "5"},
		{"equivalence", testLots, "--property", "tensile", "--unit", "HBW", "--baseline-mean", "1000", "--baseline-sd", "20"},
		{"equivalence", testLots, "--property", "elongation", "--baseline-mean", "1000", "--baseline-sd", "20"},
	} {
		code, out, errs := run(t, "", args...)
		if code != exitInput || out != "" || !strings.Contains(errs, "lotproof:") {
			t.Errorf("%v: exit %d, stdout %q, stderr %q", args, code, out, errs)
		}
	}
}
