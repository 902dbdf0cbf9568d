package main

import (
	"bytes"
	"encoding/json"
	"io"
	"math"
	"os"
	"strings"
	"testing"

	"lotproof/lots/allowables/factors"
	"lotproof/lots/render"
	"lotproof/stats"
)

// TestFactorsJSON checks the rows against outside references:
// normal k against scipy.stats.nct.ppf values in
// testdata/tolerance/normal_k.json and Natrella 1963 Table A-7 (from memory,
// 3 decimals); Hanson-Koopmans k(2) = 35.177 (CMH-17-1G Table 8.5.14, from
// memory); order-statistic minimum n 29 / 299 (CMH-17-1G 8.3.4.5.1); the
// Weibull factor against an independent simulation (n = 30) and the
// handbook closed form by hand (n = 299).
func TestFactorsJSON(t *testing.T) {
	code, out, errs := run(t, "", "factors", "--n", "2,10,28-30,298-299", "--method", "normal,weibull-approx,nonparametric", "--format", "json")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var raw struct {
		Rows     []map[string]any `json:"rows"`
		Cautions []string         `json:"cautions"`
	}
	if err := json.Unmarshal([]byte(out), &raw); err != nil {
		t.Fatal(err)
	}
	if len(raw.Cautions) == 0 {
		t.Error("no cautions")
	}
	for _, r := range raw.Rows {
		for _, k := range []string{"n", "content", "confidence", "method", "factor"} {
			if _, ok := r[k]; !ok {
				t.Fatalf("row %v lacks %q", r, k)
			}
		}
	}
	var res factors.Result
	if err := json.Unmarshal([]byte(out), &res); err != nil {
		t.Fatal(err)
	}
	get := func(method string, n int, p float64) (factors.Row, bool) {
		for _, r := range res.Rows {
			if r.Method == method && r.N == n && r.Content == p && r.Confidence == 0.95 {
				return r, true
			}
		}
		return factors.Row{}, false
	}
	// scipy reference rows.
	b, err := os.ReadFile("../../testdata/tolerance/normal_k.json")
	if err != nil {
		t.Fatal(err)
	}
	var ref struct {
		K []struct {
			N        int
			P, Gamma float64
			Scipy    *float64
		}
	}
	if err := json.Unmarshal(b, &ref); err != nil {
		t.Fatal(err)
	}
	checked := 0
	for _, c := range ref.K {
		if c.Scipy == nil || c.Gamma != 0.95 {
			continue
		}
		if r, ok := get("normal", c.N, c.P); ok {
			checked++
			if math.Abs(r.Factor-*c.Scipy) > 1e-9**c.Scipy {
				t.Errorf("normal k(%d, %g) = %.12g, scipy %.12g", c.N, c.P, r.Factor, *c.Scipy)
			}
		}
	}
	if checked < 6 {
		t.Errorf("only %d normal rows matched the scipy reference", checked)
	}
	if r, _ := get("normal", 2, 0.90); math.Abs(r.Factor-20.581) > 0.0005 {
		t.Errorf("normal k(2, 0.90) = %g, Natrella 20.581", r.Factor)
	}
	if r, _ := get("hanson-koopmans", 2, 0.90); math.Abs(r.Factor-35.177) > 0.0005 || r.Rank != 2 {
		t.Errorf("HK k(2) = %+v, CMH-17-1G 35.177", r)
	}
	if _, ok := get("hanson-koopmans", 28, 0.90); !ok {
		t.Error("n = 28 B-basis should use Hanson-Koopmans")
	}
	if r, ok := get("order-statistic", 29, 0.90); !ok || r.Factor != 1 || r.Rank != 1 {
		t.Errorf("n = 29 B-basis: %+v", r)
	}
	if _, ok := get("hanson-koopmans", 298, 0.99); !ok {
		t.Error("n = 298 A-basis should use Hanson-Koopmans")
	}
	if r, ok := get("order-statistic", 299, 0.99); !ok || r.Rank != 1 {
		t.Errorf("n = 299 A-basis: %+v", r)
	}
	// Up to n = 100 the Weibull factor is the exact one the allowables
	// procedure applies (built-in table, with its standard error): at
	// n = 30 within 4 combined standard errors of the independent numpy
	// simulation 5.05277 +- 0.04115 (testdata/tolerance/weibull_factor.json).
	if r, _ := get("weibull-approx", 30, 0.90); r.MCStdErr == nil || math.Abs(r.Factor-5.05277) > 4*math.Hypot(*r.MCStdErr, 0.04115) {
		t.Errorf("V_B(30) = %+v, independent simulation 5.05277", r)
	}
	// Above n = 100 the handbook closed form, by hand from its formula:
	// 3.803 + exp(1.79 - 0.516 ln 299 + 5.1/298) = 4.12464.
	if r, _ := get("weibull-approx", 299, 0.90); r.MCStdErr != nil || math.Abs(r.Factor-4.12464) > 1e-4 {
		t.Errorf("V_B(299) = %+v, hand value 4.12464", r)
	}
}

// TestFactorsDeterministicMC: same seed, byte-identical output.
func TestFactorsDeterministicMC(t *testing.T) {
	args := []string{"factors", "--n", "5,12", "--content", "90%", "--method", "weibull-mc", "--sims", "1000", "--seed", "9", "--format", "csv"}
	c1, o1, _ := run(t, "", args...)
	c2, o2, _ := run(t, "", args...)
	if c1 != exitOK || c2 != exitOK || o1 != o2 || len(strings.Split(strings.TrimSpace(o1), "\n")) != 3 {
		t.Errorf("exit %d, outputs differ or wrong length:\n%s\n%s", c1, o1, o2)
	}
	if !strings.HasPrefix(o1, "n,content,confidence,method,factor") {
		t.Errorf("CSV header: %q", strings.SplitN(o1, "\n", 2)[0])
	}
}

func TestFactorsTable(t *testing.T) {
	code, out, _ := run(t, "", "factors", "--n", "10", "--format", "table")
	if code != exitOK || !strings.Contains(out, "One-sided lower tolerance factors") || !strings.Contains(out, "never replaces") {
		t.Errorf("exit %d:\n%s", code, out)
	}
}

func TestFactorsBadInput(t *testing.T) {
	for _, args := range [][]string{
		{"factors", "--n", "1"},
		{"factors", "--n", "5-3"},
		{"factors", "--n", "x"},
		{"factors", "--n", "2-200000"},
		{"factors", "--content", "1.5"},
		{"factors", "--confidence", "0"},
		{"factors", "--method", "gamma"},
		{"factors", "--method", "weibull-mc", "--sims", "10"},
		{"factors", "--method", "weibull-mc", "--n", "2-2000"},
		{"factors", "extra"},
	} {
		code, out, errs := run(t, "", args...)
		if code != exitInput || out != "" || !strings.Contains(errs, "lotproof:") {
			t.Errorf("%v: exit %d, stdout %q, stderr %q", args, code, out, errs)
		}
	}
}

// TestFactorsFailedFits: weibull-mc rows carry the number of failed
// simulated fits (0 from a real run; a stand-in factor with one failure,
// as a 1,000,000-simulation run can produce, is reported in every format
// and is not an error).
func TestFactorsFailedFits(t *testing.T) {
	code, out, errs := run(t, "", "factors", "--n", "5", "--content", "90%", "--method", "weibull-mc", "--sims", "1000", "--format", "json")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var res factors.Result
	if err := json.Unmarshal([]byte(out), &res); err != nil {
		t.Fatal(err)
	}
	if len(res.Rows) != 1 || res.Rows[0].FailedFits == nil || *res.Rows[0].FailedFits != 0 {
		t.Fatalf("rows %+v: want failed_fits 0", res.Rows)
	}
	stub := func(n int, p, g float64, opt stats.WeibullMCOptions) (stats.WeibullFactor, error) {
		return stats.WeibullFactor{V: 5.03, C: 0.9, StdErrV: 0.002, Sims: opt.Sims, Seed: opt.Seed, Failures: 1}, nil
	}
	for _, f := range []render.Format{render.JSON, render.CSV, render.Text} {
		o := factorsOptions{N: "30", Content: "0.90", Confidence: "0.95", Methods: "weibull-mc", Sims: 1000000, Seed: 1, pivot: stub}
		o.Out.Format = f
		var b bytes.Buffer
		if err := runFactors(o, streams{Out: &b, Err: io.Discard}); err != nil {
			t.Fatalf("format %v: %v", f, err)
		}
		s := b.String()
		switch f {
		case render.JSON:
			if !strings.Contains(s, `"failed_fits": 1`) || !strings.Contains(s, "1 of 1000000 simulated fits failed") {
				t.Errorf("JSON lacks the failure count:\n%s", s)
			}
		case render.CSV:
			lines := strings.Split(strings.TrimSpace(s), "\n")
			if !strings.HasSuffix(lines[0], "failed fits") || !strings.HasSuffix(lines[1], ",1") {
				t.Errorf("CSV lacks the failure count:\n%s", s)
			}
		default:
			if !strings.Contains(s, "failed fits") || !strings.Contains(s, "1 of 1000000 simulated fits failed") {
				t.Errorf("table lacks the failure count:\n%s", s)
			}
		}
	}
}
