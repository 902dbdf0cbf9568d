package main

import (
	"encoding/json"
	"math"
	"os"
	"strings"
	"testing"

	"lotproof/lots/acceptance/specimens"
)

// Probabilities against testdata/acceptance/specimens_ref.json (scipy
// nct; n = 8, p = 0.90, gamma = 0.95, margin 2.5 SD), the exact values
// themselves being checked in stats; here the command's plumbing.
func TestSpecimensFlags(t *testing.T) {
	var ref struct {
		Rows []struct {
			N                         int
			P, Gamma, Margin, K, Prob float64
		}
	}
	b, err := os.ReadFile("../../testdata/acceptance/specimens_ref.json")
	if err != nil {
		t.Fatal(err)
	}
	if err := json.Unmarshal(b, &ref); err != nil {
		t.Fatal(err)
	}
	want := map[int]float64{}
	for _, r := range ref.Rows {
		if r.P == 0.9 && r.Gamma == 0.95 && r.Margin == 2.5 {
			want[r.N] = r.Prob
		}
	}
	// 100 ksi +- 4 ksi against a 90 ksi minimum: margin 2.5 SD.
	code, out, errs := run(t, "", "specimens", "--mean", "100", "--sd", "4", "--min", "90", "--unit", "ksi", "--confidence", "0.95", "--target", "0.8", "--max-n", "40", "--format", "json")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var r specimens.Result
	if err := json.Unmarshal([]byte(out), &r); err != nil {
		t.Fatal(err)
	}
	if math.Abs(r.Margin-2.5) > 1e-12 || len(want) != 7 {
		t.Fatalf("margin %g, %d reference rows", r.Margin, len(want))
	}
	prev := 0.0
	for _, row := range r.Rows {
		if w, ok := want[row.N]; ok && math.Abs(float64(row.Prob)-w) > 1e-7 {
			t.Errorf("n=%d: %g want %g", row.N, float64(row.Prob), w)
		}
		if row.N == r.SmallestN && (float64(row.Prob) < 0.8 || prev >= 0.8) {
			t.Errorf("smallest n %d is not the first reaching 0.8", r.SmallestN)
		}
		prev = float64(row.Prob)
	}
	if r.SmallestN < 2 {
		t.Errorf("smallest n %d", r.SmallestN)
	}
}

func TestSpecimensNotReachableAndSpec(t *testing.T) {
	// Margin 1.0 SD < z_0.90 = 1.2816: never reachable.
	code, out, _ := run(t, "", "specimens", "--mean", "940", "--sd", "10", "--min", "930", "--format", "json")
	var r specimens.Result
	if code != exitOK || json.Unmarshal([]byte(out), &r) != nil || r.SmallestN != -1 {
		t.Fatalf("exit %d smallest %d", code, r.SmallestN)
	}
	code, out, errs := run(t, "", "specimens", "--spec", testSpec, "--property", "hardness", testLots, "--format", "json")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if err := json.Unmarshal([]byte(out), &r); err != nil {
		t.Fatal(err)
	}
	// Lots A..E of Alloy T, hardness: the maximum 331 HBW is nearer the mean.
	if r.Side != "max" || r.MinN != 5 || r.Confidence != 0.95 || r.Rows[0].N != 5 {
		t.Errorf("%+v", r)
	}
}

func TestSpecimensBadInput(t *testing.T) {
	for _, args := range [][]string{
		{"specimens", "--mean", "990", "--min", "930"},
		{"specimens", "--mean", "990", "--sd", "-1", "--min", "930"},
		{"specimens", "--mean", "990", "--sd", "10", "--min", "930", "--max", "1100"},
		{"specimens", "--mean", "990", "--sd", "10", "--min", "930", "--target", "1"},
		{"specimens", "--mean", "990", "--sd", "10", "--min", "930", "--unit", "furlong"},
		{"specimens", "--spec", testSpec, "--property", "elongation", testLots},
	} {
		code, out, errs := run(t, "", args...)
		if code != exitInput || out != "" || !strings.Contains(errs, "lotproof:") {
			t.Errorf("%v: exit %d, stdout %q, stderr %q", args, code, out, errs)
		}
	}
}
