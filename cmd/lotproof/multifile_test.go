package main

import (
	"encoding/csv"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// splitColumns writes two files from one results file: the identity
// columns with the first k properties, and the identity columns (specimen,
// lot only) with the rest.
func splitColumns(t *testing.T, path string, k int) (a, b string) {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	recs, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	const ident = 7 // specimen .. condition
	var ra, rb [][]string
	for _, r := range recs {
		ra = append(ra, append(append([]string{}, r[:ident]...), r[ident:ident+k]...))
		rb = append(rb, append([]string{r[0], r[1]}, r[ident+k:]...))
	}
	dir := t.TempDir()
	a, b = filepath.Join(dir, "first.csv"), filepath.Join(dir, "second.csv")
	for _, x := range []struct {
		name string
		recs [][]string
	}{{a, ra}, {b, rb}} {
		var sb strings.Builder
		w := csv.NewWriter(&sb)
		w.WriteAll(x.recs)
		if err := os.WriteFile(x.name, []byte(sb.String()), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	return a, b
}

// TestSeveralResultsFiles: summary, accept, allowables, record and report
// take several results files and combine them by specimen id; the result
// is the one-file result; a value given differently in two files is
// located in both.
func TestSeveralResultsFiles(t *testing.T) {
	campaign := "../../lots/demo/data/campaign.csv"
	a, b := splitColumns(t, campaign, 1) // tensile | proof, elongation

	results := func(args ...string) string {
		t.Helper()
		code, out, errs := run(t, "", append(args, "--format", "json", "--date", "2026-12-02")...)
		if code == exitInput {
			t.Fatalf("%v: exit 2: %s", args, errs)
		}
		var v struct {
			Results json.RawMessage `json:"results"`
		}
		if err := json.Unmarshal([]byte(out), &v); err != nil {
			t.Fatal(err)
		}
		return string(v.Results)
	}
	if one, two := results("allowables", campaign), results("allowables", a, b); one != two || len(one) < 100 {
		t.Errorf("allowables from two files differ from one file:\n%.300s\n%.300s", one, two)
	}

	sum := func(args ...string) string {
		t.Helper()
		code, out, errs := run(t, "", append(append([]string{"summary"}, args...), "--format", "csv")...)
		if code != 0 {
			t.Fatalf("summary %v: exit %d: %s", args, code, errs)
		}
		return out
	}
	if one, two := sum(campaign), sum(a, b); one != two {
		t.Errorf("summary from two files differs:\n%s\n%s", one, two)
	}

	// accept: the same lots and verdicts (source and digest name both files).
	sa, sb := splitColumns(t, testLots, 1)
	_, one, _ := run(t, "", "accept", testLots, "--spec", testSpec, "--format", "csv", "--table", "limits")
	code, two, errs := run(t, "", "accept", sa, sb, "--spec", testSpec, "--format", "csv", "--table", "limits")
	if code == exitInput || one != two {
		t.Errorf("accept from two files (exit %d, %s):\n%s\nwant\n%s", code, errs, two, one)
	}
	_, j, _ := run(t, "", "accept", sa, sb, "--spec", testSpec, "--format", "json")
	if !strings.Contains(j, `"source": "`+sa+" + "+sb+`"`) {
		t.Errorf("accept JSON does not name both files:\n%.300s", j)
	}

	// record: the two halves one after the other (the second adds
	// properties to stored specimens), then both at once in a fresh
	// database: the same history.
	db1, db2 := filepath.Join(t.TempDir(), "a.db"), filepath.Join(t.TempDir(), "b.db")
	for _, args := range [][]string{{"record", a, "--db", db1}, {"record", b, "--db", db1}, {"record", a, b, "--db", db2}} {
		if code, _, errs := run(t, "", append(args, "--format", "json")...); code != 0 {
			t.Fatalf("%v: exit %d: %s", args, code, errs)
		}
	}
	tr := func(db string) string {
		_, out, _ := run(t, "", "trend", "--db", db, "--format", "csv", "--by", "material")
		return out
	}
	if x, y := tr(db1), tr(db2); x != y || !strings.Contains(x, "elongation") || !strings.Contains(x, "tensile") {
		t.Errorf("trend after two records differs from one combined record:\n%s\n%s", x, y)
	}
	// The second half again, recorded on its own: added values counted.
	db3 := filepath.Join(t.TempDir(), "d.db")
	run(t, "", "record", a, "--db", db3)
	_, out, _ := run(t, "", "record", b, "--db", db3, "--format", "json")
	var rr struct {
		New      int `json:"specimens_new"`
		Same     int `json:"specimens_same"`
		Extended int `json:"specimens_extended"`
		Added    int `json:"values_added"`
	}
	if err := json.Unmarshal([]byte(out), &rr); err != nil || rr.New != 0 || rr.Same == 0 || rr.Extended != rr.Same || rr.Added < rr.Same {
		t.Errorf("second half recorded: %+v (%v)\n%s", rr, err, out)
	}

	// report with two files.
	html := filepath.Join(t.TempDir(), "r.html")
	if code, _, errs := run(t, "", "report", sa, sb, "--spec", testSpec, "--out", html, "--date", "2026-12-02"); code == exitInput {
		t.Fatalf("report: exit 2: %s", errs)
	}
	if h, err := os.ReadFile(html); err != nil || !strings.Contains(string(h), "hardness") || !strings.Contains(string(h), "tensile") {
		t.Errorf("report from two files: %v", err)
	}

	// A changed value: located in both files, nothing written.
	bad := filepath.Join(t.TempDir(), "bad.csv")
	os.WriteFile(bad, []byte("specimen,lot,tensile [MPa]\nQB-Q01-RT-2,QB-Q01,306.8\n"), 0o644)
	code, out, errs = run(t, "", "summary", a, b, bad, "--format", "csv")
	if code != exitInput || out != "" || !strings.Contains(errs, bad+`:2: specimen "QB-Q01-RT-2": tensile is 306.8 MPa here but 306.7 MPa at `+a+":3") {
		t.Errorf("conflict between files: exit %d, %q\n%s", code, out, errs)
	}
	code, _, errs = run(t, "", "record", bad, "--db", db3)
	if code != exitInput || !strings.Contains(errs, bad+`:2: specimen "QB-Q01-RT-2": tensile is 306.7 MPa in the database (specimen first recorded from `+a+`) but 306.8 MPa in the file`) {
		t.Errorf("conflict with the database: exit %d\n%s", code, errs)
	}
	if code, _, errs := run(t, "", "summary", "-", "-"); code != exitInput || !strings.Contains(errs, "only once") {
		t.Errorf("stdin twice: exit %d %s", code, errs)
	}
}

// TestReducePipeWithHardness: the README's pipe on the demo's own files,
// written out by demo --data-dir: the records lack hardness, which the
// plate specification names; the hardness file is combined by specimen id.
func TestReducePipeWithHardness(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "demo-data")
	if code, out, errs := run(t, "", "demo", "--data-dir", dir); code != 0 || !strings.Contains(out, "wrote 15 demo files") {
		t.Fatalf("demo --data-dir: exit %d %s %s", code, out, errs)
	}
	if code, _, errs := run(t, "", "demo", "--data-dir", dir); code != exitInput || !strings.Contains(errs, "exists") {
		t.Errorf("existing folder: exit %d %s", code, errs)
	}
	code, red, errs := run(t, "", "reduce", filepath.Join(dir, "raw"))
	if code != 0 {
		t.Fatalf("reduce: %s", errs)
	}
	plate := filepath.Join(dir, "spec-plate.yaml")
	code, _, errs = run(t, red, "accept", "-", "--spec", plate)
	if code != exitInput || !strings.Contains(errs, `names property "hardness"`) || !strings.Contains(errs, "further results file") {
		t.Errorf("without hardness: exit %d %s", code, errs)
	}
	code, out, errs := run(t, red, "accept", "-", filepath.Join(dir, "raw-hardness.csv"), "--spec", plate, "--format", "csv")
	rows := csvRows(t, out)
	if code != 0 || len(rows) != 2 || rows[0]["verdict"] != "conforming" || rows[1]["verdict"] != "conforming" {
		t.Errorf("with hardness: exit %d %s\n%s", code, errs, out)
	}
	code, out, _ = run(t, "", "reduce", "--record-format")
	if code != 0 || !strings.Contains(out, "@record") || !strings.Contains(out, "force unit") {
		t.Errorf("--record-format: exit %d %.100s", code, out)
	}
}
