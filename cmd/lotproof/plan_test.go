package main

import (
	"encoding/json"
	"math"
	"strings"
	"testing"

	"lotproof/lots/acceptance/sampling"
)

// Plan figures against testdata/acceptance/sampling_ref.json (scipy
// brute-force design for AQL 0.01, RQL 0.06, alpha 0.05, beta 0.10: n = 42,
// k in [1.89756, 1.90529]; attributes n = 110, c = 3).
func TestPlanJSON(t *testing.T) {
	code, out, errs := run(t, "", "plan", "--aql", "1%", "--rql", "0.06", "--format", "json")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var r sampling.Result
	if err := json.Unmarshal([]byte(out), &r); err != nil {
		t.Fatal(err)
	}
	if r.Variables.N != 42 || math.Abs(r.Variables.KMin-1.8975622710155622) > 1e-9 || math.Abs(r.Variables.KMax-1.905285051640105) > 1e-9 {
		t.Errorf("variables %+v", r.Variables)
	}
	if r.Attributes.N != 110 || r.Attributes.C != 3 {
		t.Errorf("attributes %+v", r.Attributes)
	}
	// The OC passes through (AQL, 1 - alpha) exactly, since k holds alpha.
	found := false
	for _, p := range r.OC {
		if p.P == 0.01 {
			found = true
			if math.Abs(float64(p.PaVariables)-0.95) > 1e-9 {
				t.Errorf("Pa(AQL) = %g", float64(p.PaVariables))
			}
		}
	}
	if !found || len(r.Cautions) == 0 {
		t.Error("OC lacks the AQL point or cautions")
	}
}

func TestPlanBadInput(t *testing.T) {
	for _, args := range [][]string{
		{"plan", "--rql", "0.06"},
		{"plan", "--aql", "0.06", "--rql", "0.01"},
		{"plan", "--aql", "150%", "--rql", "0.06"},
		{"plan", "--aql", "0.01", "--rql", "0.06", "--producer-risk", "0.7"},
		{"plan", "--aql", "x", "--rql", "0.06"},
	} {
		code, out, errs := run(t, "", args...)
		if code != exitInput || out != "" || !strings.Contains(errs, "lotproof:") {
			t.Errorf("%v: exit %d, stdout %q, stderr %q", args, code, out, errs)
		}
	}
}
