package report

import (
	"bytes"
	"encoding/xml"
	"os"
	"strings"
	"testing"

	"golang.org/x/net/html"
)

func renderSample(t *testing.T) []byte {
	t.Helper()
	d, err := sampleDocument()
	if err != nil {
		t.Fatal(err)
	}
	var b bytes.Buffer
	if err := d.WriteHTML(&b); err != nil {
		t.Fatal(err)
	}
	if out := os.Getenv("LOTPROOF_REPORT_SAMPLE"); out != "" {
		if err := os.WriteFile(out, b.Bytes(), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	return b.Bytes()
}

// dumpIfAsked writes a rendered page to $LOTPROOF_REPORT_DIR (when set)
// for looking at it in a browser.
func dumpIfAsked(t *testing.T, name string, b []byte) {
	t.Helper()
	if dir := os.Getenv("LOTPROOF_REPORT_DIR"); dir != "" {
		if err := os.WriteFile(dir+"/"+name, b, 0o644); err != nil {
			t.Fatal(err)
		}
	}
}

// walk calls f for every node of the tree.
func walk(n *html.Node, f func(*html.Node)) {
	f(n)
	for c := n.FirstChild; c != nil; c = c.NextSibling {
		walk(c, f)
	}
}

func textOf(n *html.Node) string {
	var b strings.Builder
	walk(n, func(m *html.Node) {
		if m.Type == html.TextNode {
			b.WriteString(m.Data)
		}
	})
	return b.String()
}

// TestHostileStringsStayText parses the report the way a browser does (the
// HTML5 parsing algorithm of golang.org/x/net/html) and checks that the
// hostile strings planted in every field end up as text, never as markup:
// no <script> element and no <p> element born from them, no element or
// attribute outside what the template writes, and the string readable
// verbatim in titles, tables, captions and SVG text.
func TestHostileStringsStayText(t *testing.T) {
	out := renderSample(t)
	doc, err := html.Parse(bytes.NewReader(out))
	if err != nil {
		t.Fatal(err)
	}
	var scripts, svgs, figures, figcaptions int
	var svgTexts []string
	walk(doc, func(n *html.Node) {
		if n.Type != html.ElementNode {
			return
		}
		switch n.Data {
		case "script", "iframe", "object", "embed", "foreignObject", "foreignobject":
			scripts++
		case "svg":
			svgs++
		case "figure":
			figures++
		case "figcaption":
			figcaptions++
		case "text":
			svgTexts = append(svgTexts, textOf(n))
		}
		for _, a := range n.Attr {
			if strings.HasPrefix(a.Key, "on") {
				t.Errorf("element <%s> has event attribute %s", n.Data, a.Key)
			}
			if (a.Key == "href" || a.Key == "src") && !strings.HasPrefix(a.Val, "#") {
				t.Errorf("element <%s> links outside the page: %s=%q", n.Data, a.Key, a.Val)
			}
		}
		// A <p> inside an <svg> would mean the hostile "</svg><p>" broke out.
		if n.Data == "p" {
			for p := n.Parent; p != nil; p = p.Parent {
				if p.Type == html.ElementNode && p.Data == "svg" {
					t.Errorf("a <p> element was parsed inside an <svg>")
				}
			}
		}
	})
	if scripts != 0 {
		t.Errorf("%d script-like elements in the parsed report", scripts)
	}
	if figures != 9 || figcaptions != 9 || svgs != 9 {
		t.Errorf("figures=%d figcaptions=%d svgs=%d, want 9 each", figures, figcaptions, svgs)
	}
	all := textOf(doc)
	if n := strings.Count(all, hostile); n < 20 {
		t.Errorf("hostile string found verbatim %d times in the text, want at least 20 (every field)", n)
	}
	// gonum writes plot text with html.EscapeString: the title, tick labels
	// and legend entries must read back as the original string.
	inSVG := 0
	for _, s := range svgTexts {
		if strings.Contains(s, hostile) {
			inSVG++
		}
	}
	if inSVG < 4 {
		t.Errorf("hostile string found verbatim in %d SVG <text> elements, want at least 4 (titles, legends)", inSVG)
	}
	// Category tick labels are cut to maxTickLabel characters: the cut
	// hostile label must still be text.
	cut := string([]rune(hostile)[:maxTickLabel-1]) + "…"
	cuts := 0
	for _, s := range svgTexts {
		if s == cut {
			cuts++
		}
	}
	if cuts < 3 {
		t.Errorf("cut hostile tick label %q found in %d SVG <text> elements, want 3 (dot plot, two control charts)", cut, cuts)
	}
	if bytes.Contains(out, []byte("<script")) {
		t.Error("raw output contains <script")
	}
	if !bytes.Contains(out, []byte("&lt;script&gt;alert(1)&lt;/script&gt;")) {
		t.Error("escaped hostile string not found in output")
	}
}

// TestDeterministic: the same document gives the same bytes.
func TestDeterministic(t *testing.T) {
	a, b := renderSample(t), renderSample(t)
	if !bytes.Equal(a, b) {
		t.Fatal("two renderings of the same document differ")
	}
}

// TestNumbering checks section, table and figure numbers, the input digest
// and the cautions in the output.
func TestNumbering(t *testing.T) {
	out := string(renderSample(t))
	for _, want := range []string{
		`<span class="label">Figure 1</span>`, `<span class="label">Figure 9</span>`,
		`<span class="label">Table 1</span>`, `<span class="num">6</span>`,
		"SHA-256 9f86d081884c7d659a2feaa0c55ad015a3bf4f1b2b0b822cd15d6c15b0f00a08",
		"never replace, the governing specification", "lotproof 0.1.0", "@media print",
		`<meta charset="utf-8">`, "default-src 'none'",
	} {
		if !strings.Contains(out, want) {
			t.Errorf("output lacks %q", want)
		}
	}
	if strings.Contains(out, "Figure 10") {
		t.Error("more than 9 figures numbered")
	}
	// Every status is spelled with a symbol, so that it prints in black and white.
	for _, sym := range []string{"✓", "✗", "?", "!"} {
		if !strings.Contains(out, `<span class="mark" title="`) || !strings.Contains(out, sym) {
			t.Errorf("status symbol %q missing", sym)
		}
	}
}

// TestFigureIDsNamespaced: ids of embedded SVGs get the figure's prefix, and
// references follow them.
func TestFigureIDsNamespaced(t *testing.T) {
	out := string(renderSample(t))
	if !strings.Contains(out, `id="f9-plotarea"`) || !strings.Contains(out, `url(#f9-plotarea)`) {
		t.Error("external SVG ids not namespaced as f9-")
	}
	if strings.Contains(out, `id="plotarea"`) || strings.Contains(out, "<?xml") {
		t.Error("un-namespaced id or XML prolog left in the page")
	}
	// Every id in the page is unique.
	doc, err := html.Parse(strings.NewReader(out))
	if err != nil {
		t.Fatal(err)
	}
	seen := map[string]bool{}
	walk(doc, func(n *html.Node) {
		for _, a := range n.Attr {
			if a.Key == "id" {
				if seen[a.Val] {
					t.Errorf("duplicate id %q", a.Val)
				}
				seen[a.Val] = true
			}
		}
	})
}

func TestEmbedSVGRefuses(t *testing.T) {
	bad := map[string]string{
		"script":        `<svg xmlns="http://www.w3.org/2000/svg"><script>alert(1)</script></svg>`,
		"onload":        `<svg xmlns="http://www.w3.org/2000/svg" onload="alert(1)"></svg>`,
		"foreignObject": `<svg xmlns="http://www.w3.org/2000/svg"><foreignObject><p>x</p></foreignObject></svg>`,
		"html element":  `<svg xmlns="http://www.w3.org/2000/svg"><p>x</p></svg>`,
		"external href": `<svg xmlns="http://www.w3.org/2000/svg"><image href="http://example.invalid/a.png"/></svg>`,
		"xlink href":    `<svg xmlns="http://www.w3.org/2000/svg" xmlns:xlink="http://www.w3.org/1999/xlink"><use xlink:href="other.svg#a"/></svg>`,
		"css import":    `<svg xmlns="http://www.w3.org/2000/svg"><style>@import "x.css";</style></svg>`,
		"css url":       `<svg xmlns="http://www.w3.org/2000/svg"><rect style="fill:url(http://x.invalid/p)"/></svg>`,
		"doctype":       `<!DOCTYPE svg [<!ENTITY x "y">]><svg xmlns="http://www.w3.org/2000/svg"></svg>`,
		"not svg":       `<html></html>`,
		"broken":        `<svg xmlns="http://www.w3.org/2000/svg"><g></svg>`,
		"empty":         ``,
	}
	for name, s := range bad {
		if _, err := embedSVG([]byte(s), "x-"); err == nil {
			t.Errorf("%s: accepted %q", name, s)
		}
	}
	d := &Document{Title: "t", Sections: []Section{{Title: "s", Blocks: []Block{&Figure{Title: "f", SVG: []byte(bad["script"])}}}}}
	var b bytes.Buffer
	if err := d.WriteHTML(&b); err == nil || b.Len() != 0 {
		t.Errorf("WriteHTML with a refused figure: err=%v, wrote %d bytes", err, b.Len())
	}
}

// TestPlotsAreWellFormedSVG checks every plot function's output with an XML
// parser and that it is deterministic.
func TestPlotsAreWellFormedSVG(t *testing.T) {
	d, err := sampleDocument()
	if err != nil {
		t.Fatal(err)
	}
	d2, _ := sampleDocument()
	n := 0
	for si, s := range d.Sections {
		for bi, b := range s.Blocks {
			f, ok := b.(*Figure)
			if !ok {
				continue
			}
			n++
			dec := xml.NewDecoder(bytes.NewReader(f.SVG))
			for {
				_, err := dec.Token()
				if err != nil {
					if err.Error() != "EOF" {
						t.Errorf("figure %q: %v", f.Title, err)
					}
					break
				}
			}
			if !bytes.Equal(f.SVG, d2.Sections[si].Blocks[bi].(*Figure).SVG) {
				t.Errorf("figure %q: SVG differs between two runs", f.Title)
			}
		}
	}
	if n != 9 {
		t.Errorf("%d figures, want 9", n)
	}
}
