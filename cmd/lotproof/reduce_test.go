package main

import (
	"bytes"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"lotproof/lots"
	"lotproof/lots/reduce"
)

// reduceSpecs are synthetic Ramberg-Osgood specimens (analytic
// references: the 0.2 % proof strength is Rp by construction).
var reduceSpecs = []reduce.SynthSpec{
	{ID: "T-1", Lot: "TL-1", Heat: "H1", Supplier: "Test Mill", Material: "M", Tested: "2026-01-02", Condition: "RT",
		Diameter: 8, Gauge: 40, E: 71000, Rp: 278, Rm: 318, Uniform: 0.08, Elongation: 0.125, ReductionOfArea: 0.35, Points: 1200, Seed: 1},
	{ID: "T-2", Lot: "TL-1", Heat: "H1", Supplier: "Test Mill", Material: "M", Tested: "2026-01-02", Condition: "RT",
		Diameter: 8, Gauge: 40, E: 71000, Rp: 282, Rm: 322, Uniform: 0.08, Elongation: 0.13, ReductionOfArea: 0.36, Points: 1200, Seed: 2},
}

func rawDir(t *testing.T) string {
	t.Helper()
	dir := t.TempDir()
	for _, sp := range reduceSpecs {
		b, err := reduce.Synthesize(sp)
		if err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(filepath.Join(dir, sp.ID+".rec"), b, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	return dir
}

// TestReduceCSVFeedsSummary: lotproof reduce DIR | lotproof summary -
func TestReduceCSVFeedsSummary(t *testing.T) {
	dir := rawDir(t)
	code, out, errs := run(t, "", "reduce", dir)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	d, err := lots.ReadCSV(strings.NewReader(out), "-")
	if err != nil {
		t.Fatalf("%v\n%s", err, out)
	}
	p := d.Property("proof")
	for i, sp := range reduceSpecs {
		if got := d.Value(i, p); math.Abs(got-sp.Rp) > 0.002*sp.Rp {
			t.Errorf("%s proof %g, want %g", sp.ID, got, sp.Rp)
		}
	}
	code, sum, errs := run(t, out, "summary", "-", "--format", "csv")
	if code != 0 {
		t.Fatalf("summary exit %d: %s", code, errs)
	}
	if !strings.Contains(sum, "TL-1,Test Mill,proof,MPa,2,0,280,") {
		t.Errorf("summary:\n%s", sum)
	}
	// US units.
	code, out, _ = run(t, "", "reduce", dir, "--units", "us")
	if code != 0 || !strings.Contains(out, "modulus [Msi],proof [ksi]") || !strings.Contains(out, "toughness [in-lbf/in^3]") {
		t.Errorf("US output (exit %d):\n%.300s", code, out)
	}
}

// TestReduceJSONAudit: --format json carries the audit per specimen.
func TestReduceJSONAudit(t *testing.T) {
	dir := rawDir(t)
	code, out, errs := run(t, "", "reduce", dir, "--format", "json", "--modulus-range", "40:160")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var got struct {
		Specimens []struct {
			Specimen   string
			Properties map[string]*float64
			Audit      struct {
				ElasticFit struct {
					R2         float64 `json:"r2"`
					PointsUsed int     `json:"points_used"`
					StressFrom float64 `json:"stress_from"`
					StressTo   float64 `json:"stress_to"`
					Automatic  bool
				} `json:"elastic_fit"`
				ToeShiftPercent *float64 `json:"toe_shift_percent"`
			}
			Warnings []string
		}
		Caution string
	}
	if err := json.Unmarshal([]byte(out), &got); err != nil {
		t.Fatal(err)
	}
	if len(got.Specimens) != 2 || got.Caution == "" {
		t.Fatalf("%+v", got)
	}
	s := got.Specimens[0]
	f := s.Audit.ElasticFit
	if f.Automatic || f.StressFrom < 40 || f.StressTo > 160 || f.PointsUsed < 10 || f.R2 < 0.9999 || s.Audit.ToeShiftPercent == nil {
		t.Errorf("audit %+v", s.Audit)
	}
	if s.Properties["upper yield"] != nil || s.Properties["proof"] == nil || math.Abs(*s.Properties["modulus"]-71) > 0.1 {
		t.Errorf("properties %v", s.Properties)
	}
}

// TestReduceWarningsAndPlots: a brittle specimen gets an empty proof
// strength and a warning on stderr; --plot-dir writes one SVG per specimen.
func TestReduceWarningsAndPlots(t *testing.T) {
	var b bytes.Buffer
	b.WriteString("@record\nspecimen: BR-1\nlot: L\ndiameter: 10\ngauge length: 50\nforce unit: kN\nlength unit: mm\n@data\n")
	area := math.Pi * 25
	for i := 0; i <= 200; i++ {
		e := 0.001 * float64(i) / 200
		b.WriteString(strconv.FormatFloat(200000*e*area/1000, 'f', 6, 64) + " " + strconv.FormatFloat(e*50, 'f', 8, 64) + "\n")
	}
	b.WriteString("0.01 0.0502\n@end\n")
	plots := filepath.Join(t.TempDir(), "plots")
	code, out, errs := run(t, b.String(), "reduce", "-", "--plot-dir", plots)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if !strings.Contains(errs, "-:1:1: specimen BR-1: no proof strength: fractured before 0.2 % offset") {
		t.Errorf("stderr: %s", errs)
	}
	lines := strings.Split(strings.TrimSpace(out), "\n")
	if len(lines) != 2 || !strings.HasPrefix(lines[1], "BR-1,L,,,,,,200.00,,") {
		t.Errorf("stdout:\n%s", out)
	}
	svg, err := os.ReadFile(filepath.Join(plots, "BR-1.svg"))
	if err != nil || !bytes.Contains(svg, []byte("<svg")) {
		t.Errorf("plot: %v", err)
	}
}

// TestReduceBadInput: unusable input exits 2 with a located message and
// nothing on stdout.
func TestReduceBadInput(t *testing.T) {
	dir := rawDir(t)
	good, _ := os.ReadFile(filepath.Join(dir, "T-1.rec"))
	bad := writeFile(t, "bad.rec", strings.Replace(string(good), "force unit: kN", "force unit: N", 1))
	for _, c := range []struct {
		stdin string
		args  []string
		want  string
	}{
		{"", []string{"reduce", bad}, "bad.rec:14:1: record \"T-1\": maximum stress"},
		{string(good[:len(good)/2]), []string{"reduce", "-"}, "-:"},
		{"", []string{"reduce", filepath.Join(dir, "missing.rec")}, "missing.rec: cannot open"},
		{"", []string{"reduce", t.TempDir()}, "no .rec files"},
		{"", []string{"reduce", dir, "--modulus-range", "100"}, "--modulus-range"},
		{"", []string{"reduce", dir, "--offset", "-1"}, "--offset"},
		{"", []string{"reduce"}, "one or more record files"},
		{"", []string{"reduce", dir, dir}, "duplicate specimen id"},
	} {
		code, out, errs := run(t, c.stdin, c.args...)
		if code != 2 || out != "" || !strings.Contains(errs, c.want) {
			t.Errorf("%v: exit %d, stdout %q, stderr %q (want %q)", c.args, code, out, errs, c.want)
		}
	}
}

// TestRunReduceTable: the terminal table carries the caution.
func TestRunReduceTable(t *testing.T) {
	var out, errb bytes.Buffer
	o := reduceOptions{Paths: []string{rawDir(t)}, OffsetPercent: 0.2}
	o.Out.Format = "table"
	o.Out.System = "si"
	if err := runReduce(o, streams{Out: &out, Err: &errb}); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(out.String(), "T-2") || !strings.Contains(out.String(), "never replace") {
		t.Errorf("table:\n%s", out.String())
	}
}

// TestReduceGlitchAudit: a force dropout planted in a record is named by
// its line on standard error and in the JSON audit, and left out; the
// audit keeps the highest raw stress beside the tensile strength and
// states how Rm and the elastic window were found.
func TestReduceGlitchAudit(t *testing.T) {
	b, err := reduce.Synthesize(reduceSpecs[0])
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(string(b), "\n")
	const bad = 300
	f := strings.Fields(lines[bad-1])
	lines[bad-1] = "0.00000 " + f[1]
	dir := t.TempDir()
	path := filepath.Join(dir, "g.rec")
	if err := os.WriteFile(path, []byte(strings.Join(lines, "\n")), 0o644); err != nil {
		t.Fatal(err)
	}
	code, _, errs := run(t, "", "reduce", path)
	if code != 0 || !strings.Contains(errs, "force dropout at line 300") {
		t.Fatalf("exit %d, stderr %s", code, errs)
	}
	code, out, errs := run(t, "", "reduce", path, "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var got struct {
		Specimens []struct {
			Properties map[string]float64
			Audit      struct {
				Glitches []struct {
					FirstLine int    `json:"first_line"`
					Kind      string `json:"kind"`
					LeftOut   bool   `json:"left_out"`
				}
				Tensile struct {
					Method     string  `json:"method"`
					HighestRaw float64 `json:"highest_raw"`
				}
				ElasticFit struct {
					Method           string  `json:"method"`
					ToPercentOfProof float64 `json:"to_percent_of_proof"`
				} `json:"elastic_fit"`
			}
		}
	}
	if err := json.Unmarshal([]byte(out), &got); err != nil {
		t.Fatal(err)
	}
	a := got.Specimens[0].Audit
	if len(a.Glitches) != 1 || a.Glitches[0].FirstLine != bad || a.Glitches[0].Kind != "dropout" || !a.Glitches[0].LeftOut {
		t.Errorf("glitches %+v", a.Glitches)
	}
	rm := got.Specimens[0].Properties["tensile"]
	if !(rm <= a.Tensile.HighestRaw) || math.Abs(rm-reduceSpecs[0].Rm) > 0.001*reduceSpecs[0].Rm || !strings.Contains(a.Tensile.Method, "parabola") {
		t.Errorf("tensile %g highest raw %g method %q", rm, a.Tensile.HighestRaw, a.Tensile.Method)
	}
	if !strings.Contains(a.ElasticFit.Method, "straight window") || !(a.ElasticFit.ToPercentOfProof > 20) {
		t.Errorf("elastic fit %+v", a.ElasticFit)
	}
}
