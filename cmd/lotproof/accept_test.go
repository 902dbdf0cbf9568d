package main

import (
	"bytes"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/xuri/excelize/v2"

	"lotproof/lots/render"
	"lotproof/lots/units"
)

const (
	testLots = "../../testdata/acceptance/lots.csv"
	testSpec = "../../testdata/acceptance/spec-test.yaml"
)

// The figures themselves are checked against scipy in
// lots/acceptance/acceptance_test.go; these tests check the command:
// exit statuses, JSON shape, cautions, bad input and xlsx input.
func TestAcceptJSONAndExitStatus(t *testing.T) {
	code, out, errs := run(t, "", "accept", testLots, "--spec", testSpec, "--format", "json")
	if code != exitVerdict {
		t.Fatalf("exit %d, want 1 (lots B, C nonconforming/undecided): %s", code, errs)
	}
	var r struct {
		Lots []struct {
			Lot, Verdict string
			Properties   []struct {
				Property, Side, Verdict string
				Reasons                 []string
				ToleranceBound          *float64 `json:"tolerance_bound"`
			}
			Cautions []string
		}
		Cautions []string
	}
	if err := json.Unmarshal([]byte(out), &r); err != nil {
		t.Fatal(err)
	}
	got := map[string]string{}
	for _, l := range r.Lots {
		got[l.Lot] = l.Verdict
		if len(l.Cautions) == 0 || !strings.Contains(l.Cautions[0], "inspector's decision") {
			t.Errorf("lot %s has no caution", l.Lot)
		}
	}
	want := map[string]string{"A": "conforming", "B": "undecided", "C": "nonconforming", "D": "undecided", "E": "undecided", "F": "not judged"}
	for k, v := range want {
		if got[k] != v {
			t.Errorf("lot %s: %q want %q", k, got[k], v)
		}
	}
	if r.Lots[3].Lot != "D" || r.Lots[3].Properties[0].ToleranceBound != nil {
		t.Errorf("one-specimen lot should have a null tolerance bound: %+v", r.Lots[3])
	}
	var raw struct{ Lots []map[string]json.RawMessage }
	if err := json.Unmarshal([]byte(out), &raw); err != nil {
		t.Fatal(err)
	}
	for _, l := range raw.Lots {
		if o := string(l["outliers"]); !strings.HasPrefix(o, "[") || !strings.HasPrefix(string(l["properties"]), "[") {
			t.Errorf("lot %s: outliers %s, properties not a list", l["lot"], o)
		}
	}
	if !strings.Contains(errs, "1 of 6 lots conforming") {
		t.Errorf("stderr %q", errs)
	}
}

func TestAcceptConformingExitsZero(t *testing.T) {
	// Lot A alone conforms.
	b, err := os.ReadFile(testLots)
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(string(b), "\n")
	var keep []string
	for i, l := range lines {
		if i == 0 || strings.HasPrefix(l, "A-") {
			keep = append(keep, l)
		}
	}
	p := writeFile(t, "a.csv", strings.Join(keep, "\n")+"\n")
	code, out, errs := run(t, "", "accept", p, "--spec", testSpec, "--format", "table")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if !strings.Contains(out, "Caution: A verdict is statistical support") || !strings.Contains(out, "conforming") {
		t.Errorf("table output:\n%s", out)
	}
}

func TestAcceptXLSXMatchesCSV(t *testing.T) {
	b, err := os.ReadFile(testLots)
	if err != nil {
		t.Fatal(err)
	}
	f := excelize.NewFile()
	for r, line := range strings.Split(strings.TrimSpace(string(b)), "\n") {
		for c, cell := range strings.Split(line, ",") {
			name, _ := excelize.CoordinatesToCellName(c+1, r+1)
			if r > 0 && c >= 7 {
				v, _ := json.Number(cell).Float64()
				f.SetCellValue("Sheet1", name, v)
			} else {
				f.SetCellValue("Sheet1", name, cell)
			}
		}
	}
	p := filepath.Join(t.TempDir(), "lots.xlsx")
	if err := f.SaveAs(p); err != nil {
		t.Fatal(err)
	}
	strip := func(s string) string { // drop source name and digest lines
		var out []string
		for _, l := range strings.Split(s, "\n") {
			if !strings.Contains(l, "sha256") && !strings.Contains(l, `"source"`) {
				out = append(out, l)
			}
		}
		return strings.Join(out, "\n")
	}
	_, a, _ := run(t, "", "accept", testLots, "--spec", testSpec, "--format", "json")
	code, x, errs := run(t, "", "accept", p, "--spec", testSpec, "--format", "json")
	if code != exitVerdict || strip(a) != strip(x) {
		t.Fatalf("xlsx result differs (exit %d, %s)", code, errs)
	}
}

func TestAcceptBadInput(t *testing.T) {
	bad := writeFile(t, "bad.yaml", "specification: X\nrevision: A\nmaterial: Alloy T\nproperties:\n  tensile:\n    unit: MPa\n    min: 930\n    typo: 1\nacceptance:\n  content: 0.9\n  confidence: 0.9\n  min_specimens: 5\n")
	hrc := writeFile(t, "hrc.yaml", "specification: X\nrevision: A\nmaterial: Alloy T\nproperties:\n  hardness:\n    unit: HRC\n    min: 30\nacceptance:\n  content: 0.9\n  confidence: 0.9\n  min_specimens: 5\n")
	for _, c := range []struct {
		args []string
		msg  string
	}{
		{[]string{"accept", testLots}, "--spec"},
		{[]string{"accept", testLots, "--spec", bad}, "bad.yaml:8:5: unknown key \"typo\""},
		{[]string{"accept", testLots, "--spec", hrc}, "hrc.yaml:5:3"},
		{[]string{"accept", testLots, "--spec", testSpec, "--group-by", "batch"}, "unknown grouping"},
	} {
		code, out, errs := run(t, "", c.args...)
		if code != exitInput || out != "" || !strings.Contains(errs, c.msg) {
			t.Errorf("%v: exit %d, stdout %q, stderr %q", c.args, code, out, errs)
		}
	}
}

// runAccept is usable without cobra.
func TestRunAcceptDirect(t *testing.T) {
	var out, errb bytes.Buffer
	err := runAccept(acceptOptions{Data: testLots, Specs: []string{testSpec}, Table: tableOption{Name: "limits"}, Out: output{Format: render.CSV, System: units.US}}, streams{Out: &out, Err: &errb})
	if exitStatus(err) != exitVerdict {
		t.Fatalf("%v", err)
	}
	// 930 MPa = 134.885096... ksi (NIST SP 811 psi definition), in full.
	if !strings.Contains(out.String(), "A,tensile,min,ksi,134.8850960890946,6,") {
		t.Errorf("csv output:\n%s", out.String())
	}
}

// TestAcceptReasonsDecisiveFirst: the lot table says first why a lot did
// not conform (the failing individual value, too few specimens), and the
// retest allowance once under the table instead of in every row.
func TestAcceptReasonsDecisiveFirst(t *testing.T) {
	_, c, _ := run(t, "", "accept", testLots, "--spec", testSpec, "--format", "csv", "--table", "lots")
	rows := csvRows(t, c)
	why := map[string]string{}
	for _, r := range rows {
		why[r["lot"]] = r["reasons"]
		if strings.Contains(r["reasons"], "retest") {
			t.Errorf("lot %s repeats the retest rule: %s", r["lot"], r["reasons"])
		}
	}
	if !strings.HasPrefix(why["C"], "tensile (min): 1 value(s) below the minimum 930 MPa: C-2 925 MPa") {
		t.Errorf("C: %s", why["C"])
	}
	if !strings.HasPrefix(why["D"], "1 specimen, fewer than the 5 required; ") || !strings.HasPrefix(why["E"], "3 specimens, fewer than the 5 required; ") {
		t.Errorf("D: %s\nE: %s", why["D"], why["E"])
	}
	if strings.Count(why["E"], "zero spread") != 1 {
		t.Errorf("E repeats its reason per limit: %s", why["E"])
	}
	_, txt, _ := run(t, "", "accept", testLots, "--spec", testSpec, "--format", "table", "--table", "lots")
	if strings.Count(txt, "retest") != 1 || !strings.Contains(txt, "Retest: TEST-1 rev A allows 1 retest(s) on 2 times the specimens") {
		t.Errorf("retest rule not stated once:\n%s", txt)
	}
	// JSON keeps every reason.
	_, j, _ := run(t, "", "accept", testLots, "--spec", testSpec, "--format", "json")
	if !strings.Contains(j, "allows 1 retest(s) on 2 times the specimens (10 specimens)") {
		t.Error("JSON lost the retest reason")
	}
}
