package main

import (
	"bytes"
	"encoding/json"
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
