package report

import (
	"bytes"
	"image/png"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"golang.org/x/net/html"
)

// pdfPages counts the page objects of a PDF (/Type /Page, not /Pages).
// Chromium writes page dictionaries uncompressed; the count is checked
// against pdfinfo (poppler-utils) when that is installed.
func pdfPages(pdf []byte) int {
	return len(regexp.MustCompile(`/Type\s*/Page\b`).FindAll(pdf, -1))
}

// TestBrowserRender opens the sample report in headless Chromium through
// .ci/browser-check and checks that it loads without console messages, that
// the DOM holds every figure with its caption, and that the printed PDF has
// one page for the front matter plus one per section (each section starts
// on a new page and fits on one). The PNG and PDF go to a temporary
// directory.
func TestBrowserRender(t *testing.T) {
	if _, err := exec.LookPath("chromium"); err != nil {
		if _, err2 := exec.LookPath("chromium-browser"); err2 != nil {
			t.Skip("chromium is not installed (run .ci/browser-check --install); browser check skipped")
		}
	}
	if testing.Short() {
		t.Skip("browser check skipped in -short mode")
	}
	dir := t.TempDir()
	if keep := os.Getenv("LOTPROOF_BROWSER_OUT"); keep != "" {
		dir = keep
		if err := os.MkdirAll(dir, 0o755); err != nil {
			t.Fatal(err)
		}
	}
	page := filepath.Join(dir, "report.html")
	if err := os.WriteFile(page, renderSample(t), 0o644); err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(dir, "render")
	cmd := exec.Command("bash", filepath.Join("..", "..", ".ci", "browser-check"), page, out)
	var stderr bytes.Buffer
	cmd.Stderr = &stderr
	cmd.Stdout = &stderr
	if err := cmd.Run(); err != nil {
		t.Fatalf("browser-check: %v\n%s", err, stderr.String())
	}

	log, err := os.ReadFile(filepath.Join(out, "console.log"))
	if err != nil {
		t.Fatal(err)
	}
	for _, l := range strings.Split(string(log), "\n") {
		if strings.Contains(l, "CONSOLE") {
			t.Errorf("console message while loading the report: %s", l)
		}
	}

	dom, err := os.ReadFile(filepath.Join(out, "dom.html"))
	if err != nil {
		t.Fatal(err)
	}
	doc, err := html.Parse(bytes.NewReader(dom))
	if err != nil {
		t.Fatal(err)
	}
	var figures, captions, svgs, sections int
	walk(doc, func(n *html.Node) {
		if n.Type != html.ElementNode {
			return
		}
		switch n.Data {
		case "figure":
			figures++
			for c := n.FirstChild; c != nil; c = c.NextSibling {
				if c.Type == html.ElementNode && c.Data == "figcaption" {
					if txt := textOf(c); strings.HasPrefix(txt, "Figure "+strconv.Itoa(figures)+" ") && len(txt) > len("Figure 1 ") {
						captions++
					} else {
						t.Errorf("figure %d caption %q lacks its number or title", figures, txt)
					}
				}
				if c.Type == html.ElementNode && c.Data == "svg" {
					svgs++
				}
			}
		case "section":
			for _, a := range n.Attr {
				if a.Key == "class" && a.Val == "major" {
					sections++
				}
			}
		case "script":
			t.Error("the loaded DOM has a <script> element")
		}
	})
	if figures != 9 || captions != 9 || svgs != 9 {
		t.Errorf("loaded DOM: %d figures, %d titled captions, %d inline SVGs; want 9 each", figures, captions, svgs)
	}
	if sections != sampleSections {
		t.Errorf("loaded DOM: %d sections, want %d", sections, sampleSections)
	}

	pdf, err := os.ReadFile(filepath.Join(out, "page.pdf"))
	if err != nil {
		t.Fatal(err)
	}
	want := 1 + sampleSections
	if got := pdfPages(pdf); got != want {
		t.Errorf("PDF has %d pages, want %d (front matter + one per section)", got, want)
	}
	if _, err := exec.LookPath("pdfinfo"); err == nil {
		info, err := exec.Command("pdfinfo", filepath.Join(out, "page.pdf")).Output()
		if err != nil {
			t.Fatalf("pdfinfo: %v", err)
		}
		if m := regexp.MustCompile(`(?m)^Pages:\s+(\d+)`).FindSubmatch(info); m == nil || string(m[1]) != strconv.Itoa(want) {
			t.Errorf("pdfinfo reports %q pages, want %d", m, want)
		}
	}

	f, err := os.Open(filepath.Join(out, "page.png"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	cfg, err := png.DecodeConfig(f)
	if err != nil {
		t.Fatalf("page.png: %v", err)
	}
	if cfg.Width != 1000 || cfg.Height != 1400 {
		t.Errorf("page.png is %dx%d, want 1000x1400", cfg.Width, cfg.Height)
	}
}
