package main

import (
	"encoding/json"
	"math"
	"strings"
	"testing"
)

// The command end to end on the demo campaign: JSON carries the keys the
// issue names and the same input, seed and date give identical bytes.
func TestAllowablesCommand(t *testing.T) {
	path := "../../lots/demo/data/campaign.csv"
	code, out, errs := run(t, "", "allowables", path, "--format", "json", "--date", "2026-12-02")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var rep struct {
		SHA256  string           `json:"sha256"`
		Seed    uint64           `json:"seed"`
		Results []map[string]any `json:"results"`
	}
	if err := json.Unmarshal([]byte(out), &rep); err != nil {
		t.Fatal(err)
	}
	if len(rep.SHA256) != 64 || len(rep.Results) != 6 {
		t.Fatalf("sha %q, %d results", rep.SHA256, len(rep.Results))
	}
	for _, k := range []string{"property", "condition", "unit", "n", "lots", "method", "a_basis", "b_basis", "warnings", "steps"} {
		if _, ok := rep.Results[0][k]; !ok {
			t.Errorf("result has no key %q", k)
		}
	}
	_, again, _ := run(t, "", "allowables", path, "--format", "json", "--date", "2026-12-02")
	if again != out {
		t.Error("two runs differ")
	}
	code, out, _ = run(t, "", "allowables", path, "--format", "table", "--property", "proof", "--date", "2026-12-02")
	if code != 0 || !strings.Contains(out, "proof at RT: decisions") || !strings.Contains(out, "seed 1, 2026-12-02") {
		t.Errorf("table output:\n%s", out)
	}
}

func TestAllowablesBadInput(t *testing.T) {
	path := "../../lots/demo/data/campaign.csv"
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"--property", "modulus"}, `property "modulus" is not in the file`},
		{[]string{"--exclude", "QB-Q01-RT-1"}, "1 --exclude but 0 --reason"},
		{[]string{"--exclude", "NOPE", "--reason", "x"}, "excluded specimen(s) not in the file: NOPE"},
		{[]string{"--method", "gamma"}, `unknown method "gamma"`},
		{[]string{"--a-content", "1.5"}, "content and confidence must lie strictly between 0 and 1"},
		{[]string{"--date", "02/12/2026"}, "--date"},
	} {
		code, out, errs := run(t, "", append([]string{"allowables", path}, c.args...)...)
		if code != 2 || out != "" || !strings.Contains(errs, c.want) {
			t.Errorf("%v: exit %d, stdout %d bytes, stderr %q", c.args, code, len(out), errs)
		}
	}
	one := writeFile(t, "one.csv", "specimen,lot,tensile [MPa]\nA,L1,500\n")
	if code, _, errs := run(t, "", "allowables", one); code != 2 || !strings.Contains(errs, "a tolerance bound needs at least 2") {
		t.Errorf("one value: exit %d %s", code, errs)
	}
}

func TestSizeCommand(t *testing.T) {
	code, out, errs := run(t, "", "size", "--design-value", "165", "--safety", "1", "--load", "50", "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d %s", code, errs)
	}
	var res struct {
		Section struct{ Diameter, Area float64 }
	}
	json.Unmarshal([]byte(out), &res)
	// d = sqrt(4 P / (pi sigma)) = sqrt(4 * 50000 / (pi * 165)) mm (closed form).
	if d, want := res.Section.Diameter, math.Sqrt(4*50000/(math.Pi*165)); math.Abs(d-want) > 1e-12*want {
		t.Errorf("diameter %.12f, want %.12f", d, want)
	}
	for _, args := range [][]string{
		{"size", "--design-value", "165", "--safety", "0.5", "--load", "50"},
		{"size", "--safety", "2", "--load", "50"},
		{"size", "--design-value", "165", "--safety", "2", "--load", "50", "--shape", "tube", "--diameter", "5"},
		{"size", "--design-value", "165", "--safety", "2", "--load", "50", "--load-unit", "tonne"},
		{"size", "--design-value", "900", "--safety", "1.5", "--load", "10", "--shape", "rectangle", "--width", "Inf"},
		{"size", "--design-value", "900", "--safety", "1.5", "--shape", "round", "--diameter", "1e200"},
		{"demo", "--report", "-"},
	} {
		if code, out, _ := run(t, "", args...); code != 2 || out != "" {
			t.Errorf("%v: exit %d", args, code)
		}
	}
}

func TestAllowablesExcludeTwice(t *testing.T) {
	code, out, errs := run(t, "", "allowables", "../../lots/demo/data/campaign.csv", "--exclude", "QB-Q01-RT-1", "--reason", "a", "--exclude", "QB-Q01-RT-1", "--reason", "b")
	if code != 2 || out != "" || !strings.Contains(errs, "--exclude QB-Q01-RT-1 is given twice") {
		t.Errorf("exit %d, stderr %q", code, errs)
	}
}
