package main

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/gonum/stat"
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

// cellOf is the cell of a text table's row under the column named col
// (cells and headers are separated by two or more spaces; a cell belongs to
// the header it overlaps, so right- and left-aligned columns both work).
func cellOf(table, col string, row func(cells map[string]string) bool) string {
	tok := regexp.MustCompile(`\S+( \S+)*`)
	var head [][]int
	var names []string
	for _, line := range strings.Split(table, "\n") {
		spans := tok.FindAllStringIndex(line, -1)
		if head == nil {
			if slices.ContainsFunc(spans, func(s []int) bool { return line[s[0]:s[1]] == col }) && len(spans) > 3 {
				head = spans
				for _, s := range spans {
					names = append(names, line[s[0]:s[1]])
				}
			}
			continue
		}
		cells := map[string]string{}
		for _, s := range spans {
			for i, h := range head {
				if s[0] < h[1] && h[0] < s[1] {
					cells[names[i]] = line[s[0]:s[1]]
				}
			}
		}
		if row(cells) {
			return cells[col]
		}
	}
	return ""
}

// TestOneNumberRuleDemo: on the demo data (tensile in MPa to 0.1 MPa), one
// lot's mean and SD print the same in summary, accept, trend (a period
// holding only that lot) and the HTML report, at the data's resolution:
// the mean with one decimal more than the values, the SD with one decimal
// more or 3 significant digits. The expected text is the mean computed here
// from the file, rounded to two decimals (common practice, ASTM E29).
func TestOneNumberRuleDemo(t *testing.T) {
	dir := t.TempDir()
	if code, _, errs := run(t, "", "demo", "--data-dir", filepath.Join(dir, "d")); code != 0 {
		t.Fatalf("demo --data-dir: %s", errs)
	}
	raw, err := os.ReadFile(filepath.Join(dir, "d", "receipts.csv"))
	if err != nil {
		t.Fatal(err)
	}
	rows, err := csv.NewReader(bytes.NewReader(raw)).ReadAll()
	if err != nil || len(rows) < 2 {
		t.Fatal(err)
	}
	lotCol, tensCol := slices.Index(rows[0], "lot"), slices.Index(rows[0], "tensile [MPa]")
	byLot := map[string][]float64{}
	var order []string
	for _, r := range rows[1:] {
		v, err := strconv.ParseFloat(r[tensCol], 64)
		if err != nil {
			t.Fatal(err)
		}
		if i := strings.IndexByte(r[tensCol], '.'); i < 0 || len(r[tensCol])-i-1 != 1 {
			t.Fatalf("demo tensile %q is not given to 0.1 MPa; the test assumes it", r[tensCol])
		}
		if byLot[r[lotCol]] == nil {
			order = append(order, r[lotCol])
		}
		byLot[r[lotCol]] = append(byLot[r[lotCol]], v)
	}
	// A lot whose mean is above 1000 MPa and SD above 10 MPa: there the
	// resolution rule (two decimals) differs from 5 and 3 significant digits.
	var lot string
	for _, l := range order {
		if m, s := stat.MeanStdDev(byLot[l], nil); m > 1000 && s > 10 {
			lot = l
			break
		}
	}
	if lot == "" {
		t.Fatal("no demo lot with a tensile mean above 1000 MPa and SD above 10 MPa")
	}
	vals := byLot[lot]
	var one bytes.Buffer
	w := csv.NewWriter(&one)
	w.Write(rows[0])
	for _, r := range rows[1:] {
		if r[lotCol] == lot {
			w.Write(r)
		}
	}
	w.Flush()
	file := filepath.Join(dir, "one.csv")
	if err := os.WriteFile(file, one.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	mean, sd := stat.MeanStdDev(vals, nil)
	wantMean, wantSD := strconv.FormatFloat(mean, 'f', 2, 64), strconv.FormatFloat(sd, 'f', 2, 64)
	if sd < 1 || sd >= 100 {
		t.Fatalf("SD %g: the test assumes 2 decimals are both one more than the data's and 3 significant digits", sd)
	}
	specs := []string{"--spec", filepath.Join(dir, "d", "spec-steel-bar.yaml"), "--spec", filepath.Join(dir, "d", "spec-plate.yaml")}
	tensile := func(c map[string]string) bool { return c["property"] == "tensile" }
	db := filepath.Join(dir, "h.db")

	_, sum, _ := run(t, "", "summary", file, "--format", "table")
	_, acc, _ := run(t, "", append([]string{"accept", file, "--format", "table", "--table", "limits"}, specs...)...)
	if code, _, errs := run(t, "", "record", file, "--db", db, "--format", "json"); code != 0 {
		t.Fatalf("record: %s", errs)
	}
	_, tr, _ := run(t, "", "trend", "--db", db, "--format", "table", "--table", "periods")
	html := filepath.Join(dir, "r.html")
	if code, _, errs := run(t, "", append([]string{"report", file, "--db", db, "--out", html}, specs...)...); code != 0 {
		t.Fatalf("report: %s", errs)
	}
	page, err := os.ReadFile(html)
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct{ cmd, out, mean, sd string }{
		{"summary", sum, "mean", "sd"}, {"accept", acc, "mean", "sd"}, {"trend", tr, "mean", "sd"},
	} {
		if m, s := cellOf(c.out, c.mean, tensile), cellOf(c.out, c.sd, tensile); m != wantMean || s != wantSD {
			t.Errorf("%s: lot %s tensile mean %q, SD %q; want %s and %s\n%s", c.cmd, lot, m, s, wantMean, wantSD, c.out)
		}
	}
	for _, want := range []string{">" + wantMean + "</td>", ">" + wantSD + "</td>"} {
		if n := strings.Count(string(page), want); n < 2 { // limit table and trend table
			t.Errorf("report: %q in %d table cells, want at least 2 (acceptance and trend)", want, n)
		}
	}
	// The demo's own report (receipts merged with plate values reduced
	// from raw records, which have no finite resolution) prints the lot
	// the same way: the resolution is per material and property.
	demoHTML := filepath.Join(dir, "demo.html")
	if code, _, errs := run(t, "", "demo", "--report", demoHTML, "--format", "json"); code != 0 {
		t.Fatalf("demo --report: %s", errs)
	}
	if page, err = os.ReadFile(demoHTML); err != nil {
		t.Fatal(err)
	}
	row := regexp.MustCompile(`>` + regexp.QuoteMeta(lot) + `</td><td[^>]*>tensile</td>(<td[^>]*>[^<]*</td>){2}<td[^>]*>([^<]*)</td><td[^>]*>([^<]*)</td>`).FindStringSubmatch(string(page))
	if row == nil || row[2] != wantMean || row[3] != wantSD {
		t.Errorf("demo report: lot %s tensile row %q, want mean %s and SD %s", lot, row, wantMean, wantSD)
	}
	// A limit prints at the data's resolution.
	if got := cellOf(acc, "limit", tensile); !regexp.MustCompile(`^\d+\.\d$`).MatchString(got) {
		t.Errorf("tensile limit %q, want one decimal as the data", got)
	}
	// In US units the converted values have no finite resolution: the
	// significant-digit rules (6 for a given value).
	_, us, _ := run(t, "", "summary", file, "--format", "table", "--units", "us")
	if got := cellOf(us, "min", tensile); len(strings.ReplaceAll(got, ".", "")) != 6 {
		t.Errorf("US tensile minimum %q, want 6 significant digits", got)
	}
}
