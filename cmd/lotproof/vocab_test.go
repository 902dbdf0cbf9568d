package main

import (
	"encoding/json"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
)

// TestOneVocabulary: one name per thing across commands (DEVELOPERS.md,
// "Names"): weibull-exact and --simulations in factors as in allowables,
// mc_std_error, sha256, the group key named after the grouping, null for
// options not given, and plain words in table headers.
func TestOneVocabulary(t *testing.T) {
	code, out, errs := run(t, "", "factors", "--n", "5", "--content", "90%", "--method", "weibull-exact", "--simulations", "1000", "--seed", "9", "--format", "json")
	if code != 0 || !strings.Contains(out, `"method": "weibull-exact"`) || !strings.Contains(out, `"mc_std_error":`) || strings.Contains(out, "weibull-mc") {
		t.Errorf("factors: exit %d %s\n%s", code, errs, out)
	}
	// The old names still work and give the same numbers.
	_, old, _ := run(t, "", "factors", "--n", "5", "--content", "90%", "--method", "weibull-mc", "--sims", "1000", "--seed", "9", "--format", "json")
	if old != out {
		t.Errorf("old names give different output:\n%s", old)
	}

	code, out, _ = run(t, "", "summary", testLots, "--group-by", "heat", "--format", "json")
	var heat []map[string]any
	if err := json.Unmarshal([]byte(out), &heat); code != 0 || err != nil || len(heat) == 0 || heat[0]["heat"] != "HA" || heat[0]["lot"] != nil {
		t.Errorf("summary by heat: %v %.200s", err, out)
	}
	if !strings.HasPrefix(out, "[\n  {\n    \"heat\": \"HA\",\n    \"supplier\"") {
		t.Errorf("summary by heat not indented as the other outputs:\n%.100s", out)
	}

	db := filepath.Join(t.TempDir(), "v.db")
	_, out, _ = run(t, "", "record", testLots, "--db", db, "--format", "json")
	if !strings.Contains(out, `"sha256": "`) || strings.Contains(out, `"digest"`) {
		t.Errorf("record JSON:\n%s", out)
	}
	_, out, _ = run(t, "", "trend", "--db", db, "--format", "json")
	for _, k := range []string{"since", "until", "baseline"} {
		if !strings.Contains(out, `"`+k+`": null,`) {
			t.Errorf("trend %s not null", k)
		}
	}
	_, out, _ = run(t, "", "trend", "--db", db, "--format", "json", "--since", "2025-01-01")
	if !strings.Contains(out, `"since": "2025-01-01",`) {
		t.Errorf("trend since not given back")
	}

	// Table headers: words, not identifiers.
	for _, args := range [][]string{
		{"trend", "--db", db, "--table", "periods"}, {"trend", "--db", db, "--table", "limits"}, {"trend", "--db", db, "--table", "signals"},
		{"equivalence", "--baseline-mean", "1000", "--baseline-sd", "20", "--n", "5"},
		{"accept", testLots, "--spec", testSpec, "--table", "limits"},
		{"factors", "--n", "5"}, {"summary", testLots}, {"plan", "--aql", "0.01", "--rql", "0.1", "--table", "oc"},
	} {
		_, out, _ := run(t, "", append(args, "--format", "csv")...)
		header := strings.SplitN(out, "\n", 2)[0]
		if strings.Contains(header, "_") || header == "" {
			t.Errorf("%v: header %q", args, header)
		}
	}
}

// TestAuditTextInWords: the audit trail and warnings a user reads carry
// sources by name and section but no program identifiers (grandMean,
// pANOVA, A2akN) and no "from memory" (that belongs in DEVELOPERS.md);
// parameter keys in JSON are snake_case.
func TestAuditTextInWords(t *testing.T) {
	ident := regexp.MustCompile(`\b[a-z]+[A-Z][A-Za-z0-9]*\b|\bA2akN\b|\bMS[BW]\b`)
	for _, method := range []string{"auto", "anova", "lognormal", "weibull", "weibull-exact", "nonparametric", "hanson-koopmans"} {
		code, out, errs := run(t, "", "allowables", "../../lots/demo/data/campaign.csv", "--method", method, "--simulations", "2000", "--format", "json", "--date", "2026-12-02")
		if code != 0 {
			t.Fatalf("%s: exit %d: %s", method, code, errs)
		}
		var rep struct {
			Cautions []string `json:"cautions"`
			Results  []struct {
				Warnings   []string           `json:"warnings"`
				Parameters map[string]float64 `json:"parameters"`
				Steps      []struct {
					Reason, Decision string
				} `json:"steps"`
			} `json:"results"`
		}
		if err := json.Unmarshal([]byte(out), &rep); err != nil {
			t.Fatal(err)
		}
		texts := append([]string{}, rep.Cautions...)
		for _, r := range rep.Results {
			texts = append(texts, r.Warnings...)
			for _, s := range r.Steps {
				texts = append(texts, s.Reason, s.Decision)
			}
			for k := range r.Parameters {
				if k != strings.ToLower(k) {
					t.Errorf("%s: parameter key %q is not snake_case", method, k)
				}
			}
		}
		for _, s := range texts {
			if strings.Contains(s, "from memory") || ident.MatchString(s) {
				t.Errorf("%s: %q", method, s)
			}
		}
	}
}

// TestOneNumberRule: a quantity prints the same way in every command's
// table (render.Given, Stat, Spread, Factor, Fraction, PPM): the same lot
// mean in summary and accept; a limit as given (930, not 930.0); tiny
// fractions as "<0.000001", not in exponent form.
func TestOneNumberRule(t *testing.T) {
	field := func(out, lot, prop string, col int) string {
		for _, line := range strings.Split(out, "\n") {
			f := strings.Fields(line)
			if len(f) > col && f[0] == lot && f[1] == prop {
				return f[col]
			}
		}
		return ""
	}
	_, sum, _ := run(t, "", "summary", testLots, "--format", "table")
	_, acc, _ := run(t, "", "accept", testLots, "--spec", testSpec, "--format", "table", "--table", "limits")
	// summary: lot supplier(2 words) property unit n missing mean ...
	sumMean := field(strings.ReplaceAll(sum, "Test Supplier", "Test_Supplier"), "B", "Test_Supplier", 6)
	accMean := field(acc, "B", "tensile", 6)
	if sumMean == "" || sumMean != accMean || sumMean != "958.6" {
		t.Errorf("lot B tensile mean: summary %q, accept %q, want 958.6 in both (mean of 955, 981, 940, 968, 949)", sumMean, accMean)
	}
	if got := field(acc, "B", "tensile", 4); got != "930" {
		t.Errorf("limit shown as %q, want 930", got)
	}
	if regexp.MustCompile(`\de-\d`).MatchString(acc) || !strings.Contains(acc, "<0.000001") {
		t.Errorf("fractions in exponent form or without the floor:\n%s", acc)
	}
}
