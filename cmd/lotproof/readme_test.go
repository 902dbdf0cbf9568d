package main

import (
	"encoding/json"
	"fmt"
	"os"
	"strings"
	"testing"
)

// TestReadmeAgreesWithTheTool: what the README tells a new user holds:
// how to install, the demo's lot count, and help texts that do not point
// into the source tree.
func TestReadmeAgreesWithTheTool(t *testing.T) {
	b, err := os.ReadFile("../../README.md")
	if err != nil {
		t.Fatal(err)
	}
	readme := string(b)
	for _, want := range []string{"go install ./cmd/lotproof", "LOTPROOF_TEST_PG", ".ci/browser-check --install", "lotproof demo --data-dir"} {
		if !strings.Contains(readme, want) {
			t.Errorf("README lacks %q", want)
		}
	}
	code, out, errs := run(t, "", "demo", "--no-report", "--format", "json", "--date", "2026-12-02")
	if code != 0 {
		t.Fatalf("demo: exit %d %s", code, errs)
	}
	var d struct {
		Acceptance struct {
			Lots []json.RawMessage `json:"lots"`
		} `json:"acceptance"`
	}
	if err := json.Unmarshal([]byte(out), &d); err != nil {
		t.Fatal(err)
	}
	if want := fmt.Sprintf("%d lots in all", len(d.Acceptance.Lots)); !strings.Contains(readme, want) {
		t.Errorf("README does not say %q", want)
	}
	for _, cmd := range []string{"reduce", "demo", "accept", "record", "report", "trend", "allowables"} {
		_, help, _ := run(t, "", cmd, "--help")
		if strings.Contains(help, "lots/") || strings.Contains(help, ".md") && !strings.Contains(help, "SCHEMA") {
			t.Errorf("%s --help points into the source tree", cmd)
		}
	}
	_, help, _ := run(t, "", "demo", "--help")
	if !strings.Contains(help, "--data-dir") || !strings.Contains(help, "embedded") {
		t.Errorf("demo --help does not say where its files are")
	}
}
