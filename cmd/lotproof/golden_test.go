package main

import (
	"crypto/sha256"
	"flag"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// update rewrites the golden files: go test ./cmd/lotproof -run TestGolden -update
var update = flag.Bool("update", false, "rewrite the golden command outputs under testdata/golden")

const (
	goldenDemo   = "../../lots/demo/data/"
	demoReceipts = goldenDemo + "receipts.csv"
	demoCampaign = goldenDemo + "campaign.csv"
	demoSteel    = goldenDemo + "spec-steel-bar.yaml"
	demoPlate    = goldenDemo + "spec-plate.yaml"
)

type goldenCase struct {
	name string
	args []string
}

// goldenCases: commands over the embedded demo data and the test data,
// in every format. None of them writes a date, path or clock time that
// changes between runs (dates are fixed with --date).
func goldenCases(db, page string) []goldenCase {
	var cs []goldenCase
	add := func(name string, args ...string) {
		for _, f := range []string{"table", "json", "csv"} {
			cs = append(cs, goldenCase{name + "." + f, append(append([]string{}, args...), "--format", f)})
		}
	}
	add("summary-receipts", "summary", demoReceipts)
	add("summary-heat", "summary", demoReceipts, "--group-by", "heat", "--units", "us")
	add("accept-receipts", "accept", demoReceipts, "--spec", demoSteel, "--spec", demoPlate)
	add("accept-testlots", "accept", testLots, "--spec", testSpec)
	add("allowables-campaign", "allowables", demoCampaign, "--date", "2026-12-02")
	add("equivalence-limits", "equivalence", "--baseline-mean", "1000", "--baseline-sd", "20", "--n", "5")
	add("equivalence-testlots", "equivalence", testLots, "--property", "tensile", "--material", "Alloy T", "--baseline-mean", "1010", "--baseline-sd", "10")
	add("equivalence-receipts", "equivalence", demoReceipts, "--property", "tensile", "--material", "QT bar OH-S42", "--baseline-mean", "990", "--baseline-sd", "12", "--unit", "MPa")
	add("equivalence-ksi", "equivalence", demoReceipts, "--property", "proof", "--all-materials", "--baseline-mean", "130", "--baseline-sd", "2", "--unit", "ksi")
	add("factors", "factors", "--n", "2-12")
	add("specimens-given", "specimens", "--mean", "100", "--sd", "4", "--min", "90", "--unit", "ksi", "--confidence", "0.95", "--target", "0.8", "--max-n", "40")
	add("specimens-spec", "specimens", "--spec", testSpec, "--property", "hardness", testLots)
	add("specimens-demo", "specimens", "--spec", demoSteel, "--property", "tensile", demoReceipts)
	add("plan", "plan", "--aql", "0.01", "--rql", "0.08")
	add("size", "size", "--design-value", "165", "--safety", "1.5", "--load", "50")
	add("reduce-demo", "reduce", goldenDemo+"raw/LF-2604-2-1.rec", goldenDemo+"raw/LF-2604-3-4.rec")
	add("reduce-demo-us", "reduce", goldenDemo+"raw/LF-2604-2-2.rec", "--units", "us", "--modulus-range", "5:25")
	add("trend-demo", "trend", "--db", db)
	add("demo", "demo", "--no-report", "--date", "2026-12-02")
	cs = append(cs, goldenCase{"demo-report.json", []string{"demo", "--date", "2026-12-02", "--report", page, "--format", "json"}})
	add("trend-material", "trend", "--db", db, "--by", "material", "--property", "tensile", "--every", "month")
	// Refusals: exit status 2 and the message.
	bad := func(name string, args ...string) { cs = append(cs, goldenCase{name, args}) }
	bad("bad-equivalence-materials", "equivalence", demoReceipts, "--property", "tensile", "--baseline-mean", "990", "--baseline-sd", "12")
	bad("bad-equivalence-unit", "equivalence", demoReceipts, "--property", "tensile", "--all-materials", "--baseline-mean", "990", "--baseline-sd", "12", "--unit", "%")
	bad("bad-equivalence-property", "equivalence", demoReceipts, "--property", "strength", "--baseline-mean", "990", "--baseline-sd", "12")
	bad("bad-equivalence-nodata", "equivalence", "--property", "tensile", "--baseline-mean", "990", "--baseline-sd", "12")
	bad("bad-equivalence-material", "equivalence", demoReceipts, "--property", "tensile", "--material", "brass", "--baseline-mean", "990", "--baseline-sd", "12")
	bad("bad-equivalence-table", "equivalence", "--n", "4", "--baseline-mean", "990", "--baseline-sd", "12", "--table", "lots")
	bad("bad-specimens-property", "specimens", "--spec", testSpec, "--property", "elongation", testLots)
	bad("bad-specimens-target", "specimens", "--mean", "990", "--sd", "10", "--min", "930", "--target", "1")
	bad("bad-specimens-sd", "specimens", "--mean", "990", "--sd", "-1", "--min", "930")
	bad("bad-reduce-offset", "reduce", goldenDemo+"raw/LF-2604-2-1.rec", "--offset", "-1")
	bad("bad-reduce-twice", "reduce", goldenDemo+"raw/LF-2604-2-1.rec", goldenDemo+"raw/LF-2604-2-1.rec")
	bad("bad-demo-date", "demo", "--no-report", "--date", "2026-13-40")
	return cs
}

// TestGolden runs commands in process and compares their output (exit
// status, stdout and stderr) byte for byte with the files recorded under
// testdata/golden. It guards moving work between cmd and the lots
// packages: no command may change what it writes.
func TestGolden(t *testing.T) {
	tmp := t.TempDir()
	db := filepath.Join(tmp, "golden.db")
	page := filepath.Join(tmp, "report.html")
	if code, _, errs := run(t, "", "record", demoReceipts, "--db", db, "--spec", demoSteel, "--spec", demoPlate, "--format", "json"); code != 0 {
		t.Fatalf("record: exit %d: %s", code, errs)
	}
	seen := map[string]bool{}
	for _, c := range goldenCases(db, page) {
		if seen[c.name] {
			t.Fatalf("golden case %s twice", c.name)
		}
		seen[c.name] = true
		code, out, errs := run(t, "", c.args...)
		got := fmt.Sprintf("exit %d\n--- stdout\n%s--- stderr\n%s", code, out, errs)
		if strings.Contains(strings.Join(c.args, " "), page) {
			// The report itself is 2 MB: its SHA-256 stands for it.
			b, err := os.ReadFile(page)
			if err != nil {
				t.Fatal(err)
			}
			got += fmt.Sprintf("--- report sha256\n%x\n", sha256.Sum256(b))
		}
		got = strings.ReplaceAll(strings.ReplaceAll(got, page, "REPORT"), db, "DB")
		path := filepath.Join("testdata", "golden", c.name)
		if *update {
			if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
				t.Fatal(err)
			}
			if err := os.WriteFile(path, []byte(got), 0o644); err != nil {
				t.Fatal(err)
			}
			continue
		}
		want, err := os.ReadFile(path)
		if err != nil {
			t.Fatalf("%s: %v (run with -update to record)", c.name, err)
		}
		if got != string(want) {
			t.Errorf("%s (%s): output differs from %s\n%s", c.name, strings.Join(c.args, " "), path, firstDiff(string(want), got))
		}
	}
}

// firstDiff shows the first line where two outputs differ.
func firstDiff(want, got string) string {
	w, g := strings.Split(want, "\n"), strings.Split(got, "\n")
	for i := 0; i < len(w) || i < len(g); i++ {
		var a, b string
		if i < len(w) {
			a = w[i]
		}
		if i < len(g) {
			b = g[i]
		}
		if a != b {
			return fmt.Sprintf("line %d:\n want %q\n  got %q", i+1, a, b)
		}
	}
	return "same lines"
}
