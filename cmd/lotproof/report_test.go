package main

import (
	"bytes"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"lotproof/lots"
	"lotproof/lots/acceptance"
	"lotproof/lots/demo"
	"lotproof/lots/reduce"
	"lotproof/lots/units"
)

const reportHostile = `<script>alert(1)</script> "q" & ]]>`

// reportData writes a results file of four lots (one below the minimum,
// one named with markup) and a specification; invented numbers for the
// command's plumbing, not a reference for any figure.
func reportData(t *testing.T) (data, specFile string) {
	t.Helper()
	var b strings.Builder
	b.WriteString("specimen,lot,heat,supplier,material,tested,condition,tensile [MPa]\n")
	base := map[int]float64{0: 1010, 1: 1004, 2: 940, 3: 1016}
	for l := range 4 {
		lot := fmt.Sprintf("L%d", l+1)
		supplier := "Supplier A"
		if l == 1 {
			lot, supplier = "L2 "+reportHostile, reportHostile
		}
		for i := range 5 {
			v := base[l] + float64((i*7)%5)*4 - 8
			fmt.Fprintf(&b, "S%d-%d,%s,H%d,%s,Bar X,2025-%02d-10,RT,%.1f\n", l+1, i+1, csvQuote(lot), l, csvQuote(supplier), 1+3*l, v)
		}
	}
	dir := t.TempDir()
	data = filepath.Join(dir, "lots.csv")
	specFile = filepath.Join(dir, "spec.yaml")
	if err := os.WriteFile(data, []byte(b.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	sp := "specification: RPT-1\nrevision: A\nmaterial: Bar X\nproperties:\n  tensile:\n    unit: MPa\n    min: 930\nacceptance:\n  content: 0.90\n  confidence: 0.90\n  min_specimens: 5\n  individual_reject: true\n"
	if err := os.WriteFile(specFile, []byte(sp), 0o644); err != nil {
		t.Fatal(err)
	}
	return data, specFile
}

// csvQuote quotes a CSV field (RFC 4180: enclosed in quotes, quotes doubled).
func csvQuote(s string) string { return `"` + strings.ReplaceAll(s, `"`, `""`) + `"` }

func TestReportToStdout(t *testing.T) {
	data, sp := reportData(t)
	code, out, errs := run(t, "", "report", data, "--spec", sp, "--date", "2026-12-02")
	if code != exitVerdict {
		t.Fatalf("exit %d, want 1 (lot L3 is below the minimum): %s", code, errs)
	}
	if !strings.HasPrefix(out, "<!DOCTYPE html>") || !strings.HasSuffix(strings.TrimSpace(out), "</html>") {
		t.Fatalf("stdout is not a whole HTML page: %.80q", out)
	}
	if strings.Contains(out, "<script") {
		t.Error("a lot or supplier name reached the page unescaped")
	}
	for _, want := range []string{"Lot acceptance", "L3", "&lt;script&gt;alert(1)&lt;/script&gt;", "2026-12-02", "RPT-1 rev A",
		"never replace, the governing specification", "Distribution of tensile, Bar X", "Appendix: figures behind every verdict"} {
		if !strings.Contains(out, want) {
			t.Errorf("report lacks %q", want)
		}
	}
	if !strings.Contains(errs, "nonconforming") {
		t.Errorf("stderr lacks the verdict message: %q", errs)
	}
	// Same input, same date: the same bytes.
	_, again, _ := run(t, "", "report", data, "--spec", sp, "--date", "2026-12-02")
	if again != out {
		t.Error("two runs on the same input differ")
	}
}

func TestReportToFileWithTrend(t *testing.T) {
	data, sp := reportData(t)
	dir := t.TempDir()
	db := filepath.Join(dir, "history.db")
	if code, _, errs := run(t, "", "record", data, "--spec", sp, "--db", db); code != 0 {
		t.Fatalf("record: exit %d: %s", code, errs)
	}
	raw, err := reduce.Synthesize(reduce.SynthSpec{ID: "R-1", Lot: "L1", Diameter: 10, Gauge: 50, E: 205000, Rp: 880, Rm: 1010,
		Uniform: 0.07, Elongation: 0.15, ReductionOfArea: 0.5, Points: 400, Seed: 3})
	if err != nil {
		t.Fatal(err)
	}
	rec := filepath.Join(dir, "R-1.rec")
	if err := os.WriteFile(rec, raw, 0o644); err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(dir, "r.html")
	code, stdout, errs := run(t, "", "report", data, "--spec", sp, "--db", db, "--out", out, "--date", "2026-12-02", "--units", "us",
		"--records", rec)
	if code != exitVerdict {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if stdout != "" {
		t.Errorf("stdout not empty with --out: %.80q", stdout)
	}
	b, err := os.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	page := string(b)
	for _, want := range []string{"Supplier trend", "ksi", "wrote " + out, "Tensile records", "Stress-strain curve of R-1"} {
		if !strings.Contains(page+errs, want) {
			t.Errorf("report or stderr lacks %q", want)
		}
	}
	left, _ := filepath.Glob(filepath.Join(dir, ".lotproof-report-*"))
	if len(left) != 0 {
		t.Errorf("temporary files left: %v", left)
	}
}

func TestReportBadInput(t *testing.T) {
	data, sp := reportData(t)
	for name, args := range map[string][]string{
		"no spec":      {"report", data},
		"missing data": {"report", filepath.Join(t.TempDir(), "none.csv"), "--spec", sp},
		"bad date":     {"report", data, "--spec", sp, "--date", "2 Dec"},
		"bad out dir":  {"report", data, "--spec", sp, "--out", filepath.Join(t.TempDir(), "no", "such", "dir", "r.html")},
		"two stdins":   {"report", "-", "--spec", sp, "--campaign", "-"},
		"bad units":    {"report", data, "--spec", sp, "--units", "imperial"},
		"no data":      {"report", "--spec", sp},
	} {
		code, out, errs := run(t, "", args...)
		if code != exitInput {
			t.Errorf("%s: exit %d, want 2 (%s)", name, code, errs)
		}
		if out != "" {
			t.Errorf("%s: wrote %d bytes to stdout", name, len(out))
		}
	}
}

// BenchmarkReportDemo measures making the report of the demo receipts
// (320 specimens, 64 lots, two specifications) once the lots are judged:
// figures, document and HTML. Judging is left out (see lots/acceptance).
func BenchmarkReportDemo(b *testing.B) {
	d, err := demo.Dataset("receipts.csv")
	if err != nil {
		b.Fatal(err)
	}
	specs, err := readSpecs([]string{"../../lots/demo/data/spec-steel-bar.yaml", "../../lots/demo/data/spec-plate.yaml"})
	if err != nil {
		b.Fatal(err)
	}
	acc, err := acceptance.Judge(d, specs, lots.ByLot)
	if err != nil {
		b.Fatal(err)
	}
	var size int
	for b.Loop() {
		doc, err := reportDocument(reportInputs{Date: "2026-12-02", Data: d, By: lots.ByLot, Specs: specs, Acceptance: acc, System: units.SI})
		if err != nil {
			b.Fatal(err)
		}
		var page bytes.Buffer
		if err := doc.WriteHTML(&page); err != nil {
			b.Fatal(err)
		}
		size = page.Len()
	}
	b.ReportMetric(float64(size), "bytes/report")
}
