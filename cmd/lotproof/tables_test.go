package main

import (
	"path/filepath"
	"strings"
	"testing"
)

// oneTable checks that a CSV stream is one table: no blank line, every
// record as wide as the header, and the header starts with first.
func oneTable(t *testing.T, what, out, first string) {
	t.Helper()
	if strings.Contains(out, "\n\n") || strings.TrimSpace(out) == "" {
		t.Errorf("%s: not one table:\n%.400s", what, out)
		return
	}
	rows := csvRows(t, out)
	header := strings.SplitN(out, "\n", 2)[0]
	if !strings.HasPrefix(header, first) {
		t.Errorf("%s: header %q, want it to start with %q", what, header, first)
	}
	for _, h := range strings.Split(header, ",") {
		if h == "" {
			t.Errorf("%s: empty column name in %q", what, header)
		}
	}
	for _, r := range rows {
		for k, v := range r {
			if v == "-" {
				t.Errorf("%s: %s written as \"-\" (a missing value is an empty field)", what, k)
			}
		}
	}
}

// TestCSVOneTablePerStream: every command writes one CSV table per stream;
// --table picks another of its tables; an unknown name is a usage error.
func TestCSVOneTablePerStream(t *testing.T) {
	dir := t.TempDir()
	db := filepath.Join(dir, "h.db")
	receipts := "../../lots/demo/data/receipts.csv"
	steel, plate := "../../lots/demo/data/spec-steel-bar.yaml", "../../lots/demo/data/spec-plate.yaml"
	if code, _, errs := run(t, "", "record", receipts, "--spec", steel, "--spec", plate, "--db", db); code != 0 {
		t.Fatalf("record: exit %d: %s", code, errs)
	}
	cases := []struct {
		args  []string
		first string
	}{
		{[]string{"accept", testLots, "--spec", testSpec}, "lot,supplier,material"},
		{[]string{"accept", testLots, "--spec", testSpec, "--table", "lots"}, "lot,supplier,material"},
		{[]string{"accept", testLots, "--spec", testSpec, "--table", "limits"}, "lot,property,side"},
		{[]string{"accept", testLots, "--spec", testSpec, "--table", "outliers"}, "lot,specimen,property"},
		{[]string{"trend", "--db", db}, "supplier,material,property,unit,period"},
		{[]string{"trend", "--db", db, "--table", "signals"}, "rule,supplier"},
		{[]string{"trend", "--db", db, "--table", "limits"}, "supplier,material,property,unit,baseline"},
		{[]string{"plan", "--aql", "0.01", "--rql", "0.1"}, "plan,n"},
		{[]string{"plan", "--aql", "0.01", "--rql", "0.1", "--table", "oc"}, "fraction nonconforming"},
		{[]string{"allowables", "../../lots/demo/data/campaign.csv", "--date", "2026-12-02"}, "property,condition,unit,n"},
		{[]string{"allowables", "../../lots/demo/data/campaign.csv", "--date", "2026-12-02", "--table", "decisions"}, "property,condition,step"},
		{[]string{"equivalence", testLots, "--property", "tensile", "--material", "Alloy T", "--baseline-mean", "1010", "--baseline-sd", "10", "--table", "lots"}, "lot,supplier,n"},
		{[]string{"specimens", "--mean", "1000", "--sd", "20", "--min", "950"}, "n,k,probability,target"},
		{[]string{"demo", "--no-report", "--date", "2026-12-02", "--table", "signals"}, "supplier,property,first flagged"},
	}
	for _, c := range cases {
		code, out, errs := run(t, "", append(c.args, "--format", "csv")...)
		if code == 2 {
			t.Errorf("%v: exit 2: %s", c.args, errs)
			continue
		}
		oneTable(t, strings.Join(c.args, " "), out, c.first)
	}
	for _, args := range [][]string{
		{"accept", testLots, "--spec", testSpec, "--table", "signals"},
		{"trend", "--db", db, "--table", "lots"},
		{"plan", "--aql", "0.01", "--rql", "0.1", "--table", "nope"},
	} {
		code, out, errs := run(t, "", args...)
		if code != 2 || out != "" || !strings.Contains(errs, "unknown table") {
			t.Errorf("%v: exit %d, stdout %q, stderr %q", args, code, out, errs)
		}
	}
	// Text shows every table unless one is named.
	_, txt, _ := run(t, "", "accept", testLots, "--spec", testSpec, "--format", "table")
	_, lim, _ := run(t, "", "accept", testLots, "--spec", testSpec, "--format", "table", "--table", "limits")
	if !strings.Contains(txt, "Lot verdicts") || !strings.Contains(txt, "Limits") || strings.Contains(lim, "Lot verdicts") || !strings.Contains(lim, "Limits") {
		t.Errorf("text tables:\n%.300s\n--\n%.300s", txt, lim)
	}
}

// TestTrendByMaterialOneMaterialColumn: with --by material every table has
// one material column (no repeated header).
func TestTrendByMaterialOneMaterialColumn(t *testing.T) {
	db := filepath.Join(t.TempDir(), "m.db")
	if code, _, errs := run(t, "", "record", testLots, "--db", db); code != 0 {
		t.Fatal(errs)
	}
	for _, tb := range []string{"periods", "signals", "limits"} {
		_, out, _ := run(t, "", "trend", "--db", db, "--by", "material", "--format", "csv", "--table", tb)
		header := strings.SplitN(out, "\n", 2)[0]
		if strings.Count(header, "material") != 1 {
			t.Errorf("%s: header %q", tb, header)
		}
		oneTable(t, tb, out, map[string]string{"periods": "material,property", "signals": "rule,material,property", "limits": "material,property"}[tb])
	}
}
