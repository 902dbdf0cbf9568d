package main

import (
	"bytes"
	"encoding/json"
	"math"
	"strings"
	"testing"

	"lotproof/lots"
)

// TestVersionFormats: version honours --format; without it, one line.
func TestVersionFormats(t *testing.T) {
	code, out, _ := run(t, "", "version")
	if code != 0 || !strings.HasPrefix(out, "lotproof "+lots.Version+" (") || strings.Count(out, "\n") != 1 {
		t.Errorf("plain: exit %d %q", code, out)
	}
	code, out, _ = run(t, "", "version", "--format", "json")
	var v struct{ Tool, Version, Go, Platform string }
	if err := json.Unmarshal([]byte(out), &v); code != 0 || err != nil || v.Tool != "lotproof" || v.Version != lots.Version || v.Go == "" || v.Platform == "" {
		t.Errorf("json: exit %d %v %q", code, err, out)
	}
	code, out, _ = run(t, "", "version", "--format", "csv")
	if rows := csvRows(t, out); code != 0 || len(rows) != 1 || rows[0]["version"] != lots.Version {
		t.Errorf("csv: exit %d %q", code, out)
	}
}

// TestCompletionUnknownShell: an unknown shell is a usage error (exit 2),
// not help with exit 0; a known one writes a script.
func TestCompletionUnknownShell(t *testing.T) {
	for _, args := range [][]string{{"completion", "tcsh"}, {"completion"}} {
		code, out, errs := run(t, "", args...)
		if code != exitInput || out != "" || !strings.Contains(errs, "bash") {
			t.Errorf("%v: exit %d, stdout %q, stderr %q", args, code, out, errs)
		}
	}
	code, out, _ := run(t, "", "completion", "bash")
	if code != 0 || !strings.Contains(out, "lotproof") || len(out) < 1000 {
		t.Errorf("bash: exit %d, %d bytes", code, len(out))
	}
}

// TestReportRefusesFormatAndTerminal: report writes HTML only, and not onto
// a terminal.
func TestReportRefusesFormatAndTerminal(t *testing.T) {
	data, sp := reportData(t)
	for _, f := range []string{"json", "csv", "table"} {
		code, out, errs := run(t, "", "report", data, "--spec", sp, "--format", f)
		if code != exitInput || out != "" || !strings.Contains(errs, "HTML") {
			t.Errorf("--format %s: exit %d, %d bytes, %s", f, code, len(out), errs)
		}
	}
	var out, errb bytes.Buffer
	code := execute([]string{"report", data, "--spec", sp}, streams{In: strings.NewReader(""), Out: &out, Err: &errb, OutTerminal: true})
	if code != exitInput || out.Len() != 0 || !strings.Contains(errb.String(), "--out") {
		t.Errorf("terminal: exit %d, %d bytes, %s", code, out.Len(), errb.String())
	}
}

// TestSizeUSLoadInKip: with --units us the load is in kip unless
// --load-unit says otherwise. 90 ksi on a 0.75 in round bar (area
// pi 0.75^2/4 = 0.441786 in^2) carries 39.761 kip (closed form).
func TestSizeUSLoadInKip(t *testing.T) {
	code, out, errs := run(t, "", "size", "--design-value", "135", "--stress-unit", "ksi", "--safety", "1.5", "--diameter", "0.75", "--units", "us", "--format", "json")
	var r struct {
		Load     float64 `json:"load"`
		LoadUnit string  `json:"load_unit"`
	}
	if err := json.Unmarshal([]byte(out), &r); code != 0 || err != nil || r.LoadUnit != "kip" || math.Abs(r.Load-90*math.Pi*0.75*0.75/4) > 1e-9 {
		t.Errorf("exit %d %v %s %s", code, err, out, errs)
	}
	_, out, _ = run(t, "", "size", "--design-value", "135", "--stress-unit", "ksi", "--safety", "1.5", "--diameter", "0.75", "--units", "us", "--load-unit", "lbf", "--format", "json")
	if err := json.Unmarshal([]byte(out), &r); err != nil || r.LoadUnit != "lbf" || math.Abs(r.Load-90e3*math.Pi*0.75*0.75/4) > 1e-6 {
		t.Errorf("lbf: %s", out)
	}
}

// TestEquivalenceRefusesMixedMaterials: one baseline is one material.
func TestEquivalenceRefusesMixedMaterials(t *testing.T) {
	receipts := "../../lots/demo/data/receipts.csv"
	args := []string{"equivalence", receipts, "--property", "tensile", "--baseline-mean", "1000", "--baseline-sd", "20", "--format", "csv", "--table", "lots"}
	code, out, errs := run(t, "", args...)
	if code != exitInput || out != "" || !strings.Contains(errs, `"QT bar OH-S42"`) || !strings.Contains(errs, "--material") {
		t.Errorf("mixed: exit %d %q %s", code, out, errs)
	}
	code, out, _ = run(t, "", append(args, "--all-materials")...)
	if code == exitInput || len(csvRows(t, out)) < 60 {
		t.Errorf("--all-materials: exit %d, %d bytes", code, len(out))
	}
	code, out, _ = run(t, "", append(args, "--material", "Plate OH-A61")...)
	if code == exitInput || strings.Contains(out, "QT bar") || len(csvRows(t, out)) == 0 {
		t.Errorf("--material: exit %d\n%.300s", code, out)
	}
}
