package main

import (
	"encoding/csv"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// The planner end to end, at a reduced number of runs: JSON with the keys
// the issue names, one CSV table, a text table with the cautions, the same
// bytes for the same seed whatever the number of workers.
func TestCampaignCommand(t *testing.T) {
	args := []string{"campaign", "--lots", "3,5", "--specimens", "6", "--cv", "5%", "--runs", "60", "--target-ratio", "0.9"}
	code, out, errs := run(t, "", append(args, "--format", "json")...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var res struct {
		Plans    []map[string]any `json:"plans"`
		Cheapest map[string]int   `json:"cheapest_plan"`
		Cautions []string         `json:"cautions"`
	}
	if err := json.Unmarshal([]byte(out), &res); err != nil {
		t.Fatal(err)
	}
	if len(res.Plans) != 2 || len(res.Cautions) == 0 {
		t.Fatalf("%d plans, %d cautions", len(res.Plans), len(res.Cautions))
	}
	for _, k := range []string{"lots", "specimens", "coverage_a", "coverage_b", "median_a_ratio", "median_b_ratio", "p10_b_ratio", "methods", "cost"} {
		if _, ok := res.Plans[0][k]; !ok {
			t.Errorf("plan has no key %q", k)
		}
	}
	if res.Plans[0]["cost"].(float64) != 18 || res.Plans[1]["lots"].(float64) != 5 {
		t.Errorf("plans %v", res.Plans)
	}
	// The cheapest plan reaching a median B ratio of 0.9 is 3 x 6 (its
	// median is near 0.94 at CV 5%).
	if res.Cheapest["lots"] != 3 || res.Cheapest["specimens"] != 6 {
		t.Errorf("cheapest %v", res.Cheapest)
	}
	_, again, _ := run(t, "", append(args, "--format", "json", "--workers", "1")...)
	if again != out {
		t.Error("one worker and all cores give different output")
	}
	code, out, _ = run(t, "", append(args, "--format", "csv")...)
	rows, err := csv.NewReader(strings.NewReader(out)).ReadAll()
	if code != 0 || err != nil || len(rows) != 3 || rows[0][0] != "lots" || rows[0][5] != "A coverage" {
		t.Errorf("csv (exit %d, %v):\n%s", code, err, out)
	}
	fig := t.TempDir() + "/plan.svg"
	code, out, _ = run(t, "", append(args, "--format", "table", "--figure", fig)...)
	if svg, err := os.ReadFile(fig); err != nil || !strings.Contains(string(svg), "<svg") || !strings.Contains(string(svg), "5x6") {
		t.Errorf("figure: %v", err)
	}
	if code != 0 || !strings.Contains(out, "never replace") || !strings.Contains(out, "Cheapest plan") {
		t.Errorf("table:\n%s", out)
	}
}

func TestCampaignBadInput(t *testing.T) {
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"--lots", "3", "--specimens", "6"}, "--cv is required"},
		{[]string{"--lots", "3", "--cv", "5%"}, "give both --lots and --specimens"},
		{[]string{"--cv", "5%"}, "no plan given"},
		{[]string{"--plan", "5by6", "--cv", "5%"}, "LOTSxSPECIMENS"},
		{[]string{"--plan", "0x6", "--cv", "5%"}, "number of lots"},
		{[]string{"--plan", "5x6", "--cv", "150%"}, "--cv"},
		{[]string{"--plan", "5x6", "--cv", "5%", "--between-share", "1"}, "--between-share"},
		{[]string{"--plan", "5x6", "--cv", "5%", "--dist", "gamma"}, "unknown distribution"},
		{[]string{"--plan", "5x6", "--cv", "5%", "--method", "magic"}, "unknown method"},
		{[]string{"--plan", "5x6", "--cv", "5%", "--runs", "3"}, "simulated campaigns"},
		{[]string{"--plan", "5x6", "--cv", "5%", "--cost-lot", "-1"}, "costs"},
		{[]string{"--lots", "x", "--specimens", "6", "--cv", "5%"}, "--lots"},
	} {
		code, out, errs := run(t, "", append([]string{"campaign"}, c.args...)...)
		if code != 2 || out != "" || !strings.Contains(errs, c.want) {
			t.Errorf("%v: exit %d, stdout %d bytes, stderr %q", c.args, code, len(out), errs)
		}
	}
}

// TestCampaignReport: --report writes one self-contained HTML file with
// the table of plans (a row per plan, in the order given), the figure of
// the design value ratio against plan, and the cautions.
func TestCampaignReport(t *testing.T) {
	name := filepath.Join(t.TempDir(), "plan.html")
	code, _, errs := run(t, "", "campaign", "--lots", "3,5", "--specimens", "6", "--cv", "5%", "--runs", "60", "--report", name)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	b, err := os.ReadFile(name)
	if err != nil {
		t.Fatal(err)
	}
	h := string(b)
	for _, want := range []string{"Candidate plans", "Design value against plan", "<svg", "licensed engineering judgement", "Coverage: the share of campaigns"} {
		if !strings.Contains(h, want) {
			t.Errorf("the report lacks %q", want)
		}
	}
	if i, j := strings.Index(h, `">3</td>`), strings.Index(h, `">5</td>`); i < 0 || j < 0 || i > j {
		t.Errorf("plan rows missing or out of order (3 lots at %d, 5 lots at %d)", i, j)
	}
	if strings.Contains(h, "<script") || strings.Contains(h, `src="http`) || strings.Contains(h, `href="http`) {
		t.Error("the report is not self-contained")
	}
}
