package main

import (
	"bytes"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
)

// The demo report, rendered headless in Debian's Chromium by
// .ci/browser-check (installed by .ci/run): it loads without console
// messages, every figure has a numbered, titled caption, and the PDF has a
// page for the front matter and at least one per major section (each
// starts a new page). Skipped when chromium is absent.
func TestDemoReportInBrowser(t *testing.T) {
	if _, err := exec.LookPath("chromium"); err != nil {
		t.Skip("chromium is not installed (run .ci/browser-check --install); browser check skipped")
	}
	if testing.Short() {
		t.Skip("browser check skipped in -short mode")
	}
	dir := t.TempDir()
	page := filepath.Join(dir, "demo.html")
	if code, _, errs := run(t, "", "demo", "--format", "json", "--date", "2026-12-02", "--report", page); code != 0 {
		t.Fatalf("demo: exit %d: %s", code, errs)
	}
	out := filepath.Join(dir, "render")
	cmd := exec.Command("bash", filepath.Join("..", "..", ".ci", "browser-check"), page, out)
	var msg bytes.Buffer
	cmd.Stdout, cmd.Stderr = &msg, &msg
	if err := cmd.Run(); err != nil {
		t.Fatalf("browser-check: %v\n%s", err, msg.String())
	}
	log, err := os.ReadFile(filepath.Join(out, "console.log"))
	if err != nil {
		t.Fatal(err)
	}
	if strings.Contains(string(log), "CONSOLE") {
		t.Errorf("console messages while loading the demo report:\n%s", log)
	}
	dom, err := os.ReadFile(filepath.Join(out, "dom.html"))
	if err != nil {
		t.Fatal(err)
	}
	figures := regexp.MustCompile(`<figure[ >]`).FindAll(dom, -1)
	captions := regexp.MustCompile(`<figcaption[^>]*>\s*(?:<[^>]+>\s*)*Figure \d+\b[^<]*\S`).FindAll(dom, -1)
	svgs := regexp.MustCompile(`<svg[ >]`).FindAll(dom, -1)
	if len(figures) < 20 || len(captions) != len(figures) || len(svgs) < len(figures) {
		t.Errorf("loaded DOM: %d figures, %d numbered captions, %d SVGs", len(figures), len(captions), len(svgs))
	}
	sections := len(regexp.MustCompile(`class="major"`).FindAll(dom, -1))
	info, err := exec.Command("pdfinfo", filepath.Join(out, "page.pdf")).Output()
	if err != nil {
		t.Fatalf("pdfinfo: %v", err)
	}
	m := regexp.MustCompile(`(?m)^Pages:\s+(\d+)`).FindSubmatch(info)
	if m == nil {
		t.Fatalf("pdfinfo gave no page count:\n%s", info)
	}
	pages := 0
	for _, c := range m[1] {
		pages = 10*pages + int(c-'0')
	}
	if sections < 5 || pages < 1+sections {
		t.Errorf("PDF has %d pages for %d major sections; want at least %d", pages, sections, 1+sections)
	}
	if st, err := os.Stat(filepath.Join(out, "page.png")); err != nil || st.Size() < 10000 {
		t.Errorf("no screenshot rendered: %v", err)
	}
	t.Logf("demo report: %d figures, %d sections, %d PDF pages", len(figures), sections, pages)
}
