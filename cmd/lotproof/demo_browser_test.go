package main

import (
	"bytes"
	stdhtml "html"
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
	needChromium(t)
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
	// Printed, every table keeps all its columns: on Chromium's default
	// paper (Letter) and on A4, the narrower, every word of every table
	// cell is in the PDF's text.
	tablesPrinted(t, "Letter", dom, filepath.Join(out, "page.pdf"))
	a4 := filepath.Join(dir, "demo-a4.html")
	html, err := os.ReadFile(page)
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(a4, bytes.Replace(html, []byte("</head>"), []byte("<style>@page{size:A4}</style></head>"), 1), 0o644); err != nil {
		t.Fatal(err)
	}
	outA4 := filepath.Join(dir, "render-a4")
	cmd = exec.Command("bash", filepath.Join("..", "..", ".ci", "browser-check"), a4, outA4)
	msg.Reset()
	cmd.Stdout, cmd.Stderr = &msg, &msg
	if err := cmd.Run(); err != nil {
		t.Fatalf("browser-check A4: %v\n%s", err, msg.String())
	}
	tablesPrinted(t, "A4", dom, filepath.Join(outA4, "page.pdf"))
}

// tablesPrinted checks that every word of the tables in the loaded DOM is
// in the printed PDF's text (pdftotext) as often: a column cut off at the
// page edge, or a word cut in two, is missing there.
func tablesPrinted(t *testing.T, paper string, dom []byte, pdf string) {
	t.Helper()
	txt, err := exec.Command("pdftotext", pdf, "-").Output()
	if err != nil {
		t.Fatalf("pdftotext: %v", err)
	}
	word := regexp.MustCompile(`[A-Za-z]{3,}`)
	count := func(b []byte) map[string]int {
		m := map[string]int{}
		for _, w := range word.FindAll(b, -1) {
			m[string(w)]++
		}
		return m
	}
	tag := regexp.MustCompile(`<[^>]+>`)
	var cells []byte
	for _, tb := range regexp.MustCompile(`(?s)<table[^>]*>.*?</table>`).FindAll(dom, -1) {
		tb = regexp.MustCompile(`(?s)<caption.*?</caption>`).ReplaceAll(tb, nil)
		cells = append(cells, tag.ReplaceAll(tb, []byte(" "))...)
	}
	inTables, inPDF := count([]byte(stdhtml.UnescapeString(string(cells)))), count(txt)
	missing := 0
	for w, n := range inTables {
		if inPDF[w] < n {
			missing++
			if missing <= 10 {
				t.Errorf("%s: %q is %d times in the tables but %d times in the PDF", paper, w, n, inPDF[w])
			}
		}
	}
	if len(inTables) < 50 {
		t.Errorf("%s: only %d distinct words in the tables: the check found no tables", paper, len(inTables))
	}
}

// needChromium skips a browser check when chromium is absent or in -short
// mode.
func needChromium(t *testing.T) {
	t.Helper()
	if _, err := exec.LookPath("chromium"); err != nil {
		t.Skip("chromium is not installed (run .ci/browser-check --install); browser check skipped")
	}
	if testing.Short() {
		t.Skip("browser check skipped in -short mode")
	}
}
