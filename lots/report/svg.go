package report

import (
	"bytes"
	"encoding/xml"
	"errors"
	"fmt"
	"io"
	"regexp"
	"strings"
)

// svgElements are the SVG elements a figure may contain. A whitelist,
// because the HTML parser leaves foreign (SVG) content when it meets an
// HTML element name such as p or font, which would let a figure break out
// of its <svg>.
var svgElements = map[string]bool{
	"svg": true, "g": true, "path": true, "text": true, "tspan": true, "rect": true,
	"circle": true, "ellipse": true, "line": true, "polyline": true, "polygon": true,
	"defs": true, "style": true, "clipPath": true, "title": true, "desc": true,
	"marker": true, "use": true, "symbol": true, "linearGradient": true,
	"radialGradient": true, "stop": true, "pattern": true, "mask": true, "image": true,
}

var (
	reID   = regexp.MustCompile(`\bid="([^"]*)"`)
	reURL  = regexp.MustCompile(`url\(#([^)\s]+)\)`)
	reHref = regexp.MustCompile(`href="#([^"]*)"`)
)

// embedSVG checks an SVG document and returns the <svg> element ready to
// be placed inline in HTML: the XML prolog and comments before the root are
// dropped, and every id (with the url(#id) and href="#id" references to
// it) gets prefix so that several figures on one page cannot clash.
//
// The check refuses anything that could run code or reach the network in a
// browser: elements outside a plain-drawing whitelist (script,
// foreignObject, HTML elements), event-handler attributes (on*), links
// other than to a local #id or an inline data:image, url() other than
// url(#id), @import, and DOCTYPE declarations (entities).
func embedSVG(svg []byte, prefix string) ([]byte, error) {
	svg = bytes.ToValidUTF8(svg, []byte("\uFFFD")) // text of user strings may hold invalid bytes
	dec := xml.NewDecoder(bytes.NewReader(svg))
	dec.Strict = true
	start := int64(-1)
	depth := 0
	ids := map[string]bool{}
	var inStyle bool
	for {
		off := dec.InputOffset()
		tok, err := dec.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, fmt.Errorf("figure SVG is not well-formed XML: %w", err)
		}
		switch t := tok.(type) {
		case xml.StartElement:
			name := t.Name.Local
			if depth == 0 {
				if start >= 0 {
					return nil, errors.New("figure SVG has more than one root element")
				}
				if name != "svg" {
					return nil, fmt.Errorf("figure SVG root is <%s>, want <svg>", name)
				}
				start = off
			}
			if !svgElements[name] {
				return nil, fmt.Errorf("figure SVG contains <%s>, which is not allowed in a report", name)
			}
			for _, a := range t.Attr {
				if err := checkAttr(name, a); err != nil {
					return nil, err
				}
				if a.Name.Local == "id" && a.Name.Space == "" {
					ids[a.Value] = true
				}
			}
			inStyle = name == "style"
			depth++
		case xml.EndElement:
			depth--
			inStyle = false
		case xml.CharData:
			if inStyle {
				if err := checkCSS(string(t)); err != nil {
					return nil, err
				}
			}
		case xml.Directive:
			return nil, errors.New("figure SVG contains a DOCTYPE or other directive, which is not allowed")
		case xml.ProcInst:
			if depth > 0 || t.Target != "xml" {
				return nil, fmt.Errorf("figure SVG contains the processing instruction <?%s?>", t.Target)
			}
		}
	}
	if start < 0 {
		return nil, errors.New("figure SVG has no <svg> element")
	}
	out := bytes.TrimSpace(svg[start:])
	if len(ids) == 0 {
		return out, nil
	}
	rename := func(re *regexp.Regexp, b []byte, format string) []byte {
		return re.ReplaceAllFunc(b, func(m []byte) []byte {
			id := string(re.FindSubmatch(m)[1])
			if !ids[id] {
				return m
			}
			return fmt.Appendf(nil, format, prefix+id)
		})
	}
	out = rename(reID, out, `id="%s"`)
	out = rename(reURL, out, `url(#%s)`)
	out = rename(reHref, out, `href="#%s"`)
	return out, nil
}

func checkAttr(elem string, a xml.Attr) error {
	name := strings.ToLower(a.Name.Local)
	v := strings.TrimSpace(strings.ToLower(a.Value))
	switch {
	case strings.HasPrefix(name, "on"):
		return fmt.Errorf("figure SVG <%s> has an event handler attribute %q", elem, a.Name.Local)
	case name == "href" || name == "src":
		if strings.HasPrefix(v, "#") || (elem == "image" && strings.HasPrefix(v, "data:image/")) {
			return nil
		}
		return fmt.Errorf("figure SVG <%s> links to %q; only local #id links are allowed", elem, a.Value)
	case name == "style":
		return checkCSS(v)
	}
	if strings.Contains(v, "url(") {
		return checkCSS(v)
	}
	if strings.Contains(v, "javascript:") {
		return fmt.Errorf("figure SVG <%s> attribute %q holds a script URL", elem, a.Name.Local)
	}
	return nil
}

// checkCSS refuses style text that could load something.
func checkCSS(s string) error {
	l := strings.ToLower(s)
	if strings.Contains(l, "@import") || strings.Contains(l, "expression(") || strings.Contains(l, "javascript:") {
		return errors.New("figure SVG style loads or runs something, which is not allowed")
	}
	for rest := l; ; {
		i := strings.Index(rest, "url(")
		if i < 0 {
			return nil
		}
		rest = strings.TrimLeft(rest[i+4:], " \t\n\"'")
		if !strings.HasPrefix(rest, "#") && !strings.HasPrefix(rest, "data:font/") {
			return errors.New("figure SVG style refers to an external url(), which is not allowed")
		}
	}
}
