package report

import (
	"bytes"
	"errors"
	"fmt"
	"html/template"
	"io"
	"strconv"
)

// The view types below are the document as the template sees it: numbers
// assigned, statuses resolved to symbols and classes, figures checked.

type viewDoc struct {
	*Document
	Sections []viewSection
	Figures  int
	Tables   int
	Statuses []viewStatus // statuses used, for the legend
}

type viewSection struct {
	Num    int
	ID     string
	Title  string
	Intro  string
	Blocks []viewBlock
}

type viewBlock struct {
	Kind      string
	Paragraph string
	List      *List
	KV        *KeyValues
	Table     *viewTable
	Figure    *viewFigure
	Audit     *Audit
}

type viewTable struct {
	*Table
	Num int
}

type viewFigure struct {
	*Figure
	Num int
	SVG template.HTML
}

type viewStatus struct {
	Class, Symbol, Word string
}

var funcs = template.FuncMap{
	"sym":   func(s Status) string { return s.symbol() },
	"cls":   func(s Status) string { return s.class() },
	"word":  func(s Status) string { return s.word() },
	"num":   func(c Column) bool { return c.Numeric },
	"short": shortDigest,
	"bytes": func(n int64) string {
		if n <= 0 {
			return ""
		}
		return strconv.FormatInt(n, 10) + " bytes"
	},
	"ncol": func(t *viewTable, i int) bool { return i < len(t.Columns) && t.Columns[i].Numeric },
}

// shortDigest abbreviates a hex digest for headings; the full value is
// always printed too.
func shortDigest(s string) string {
	if len(s) > 12 {
		return s[:12]
	}
	return s
}

var page = template.Must(template.New("report").Funcs(funcs).Parse(pageTemplate))

// WriteHTML writes the document as one self-contained HTML file. Nothing is
// written when the document cannot be rendered (for example when a figure's
// SVG is refused).
func (d *Document) WriteHTML(w io.Writer) error {
	if d == nil {
		return errors.New("report: nil document")
	}
	v, err := d.view()
	if err != nil {
		return err
	}
	var b bytes.Buffer
	if err := page.Execute(&b, v); err != nil {
		return fmt.Errorf("report: %w", err)
	}
	// The page is declared UTF-8: bytes of user strings that are not valid
	// UTF-8 are shown as U+FFFD rather than passed on.
	_, err = w.Write(bytes.ToValidUTF8(b.Bytes(), []byte("\uFFFD")))
	return err
}

func (d *Document) view() (*viewDoc, error) {
	v := &viewDoc{Document: d}
	used := map[Status]bool{}
	note := func(s Status) {
		if s.class() != "" {
			used[s] = true
		}
	}
	for _, kv := range d.Summary {
		note(kv.Status)
	}
	for si, s := range d.Sections {
		vs := viewSection{Num: si + 1, ID: "sec-" + strconv.Itoa(si+1), Title: s.Title, Intro: s.Intro}
		for bi, b := range s.Blocks {
			var vb viewBlock
			switch b := b.(type) {
			case Paragraph:
				vb = viewBlock{Kind: "p", Paragraph: string(b)}
			case List:
				vb = viewBlock{Kind: "list", List: &b}
			case KeyValues:
				for _, kv := range b.Items {
					note(kv.Status)
				}
				vb = viewBlock{Kind: "kv", KV: &b}
			case *Table:
				if b == nil {
					return nil, fmt.Errorf("report: section %d block %d: nil table", si+1, bi+1)
				}
				for ri, r := range b.Rows {
					if len(r) > len(b.Columns) {
						return nil, fmt.Errorf("report: table %q row %d has %d cells for %d columns", b.Title, ri+1, len(r), len(b.Columns))
					}
					for _, c := range r {
						note(c.Status)
					}
				}
				v.Tables++
				vb = viewBlock{Kind: "table", Table: &viewTable{Table: b, Num: v.Tables}}
			case *Figure:
				if b == nil {
					return nil, fmt.Errorf("report: section %d block %d: nil figure", si+1, bi+1)
				}
				v.Figures++
				svg, err := embedSVG(b.SVG, "f"+strconv.Itoa(v.Figures)+"-")
				if err != nil {
					return nil, fmt.Errorf("report: figure %d (%s): %w", v.Figures, b.Title, err)
				}
				// svg has passed embedSVG's whitelist check, so it is safe
				// to place unescaped.
				vb = viewBlock{Kind: "figure", Figure: &viewFigure{Figure: b, Num: v.Figures, SVG: template.HTML(svg)}}
			case *Audit:
				if b == nil {
					return nil, fmt.Errorf("report: section %d block %d: nil audit trail", si+1, bi+1)
				}
				for _, st := range b.Steps {
					note(st.Status)
				}
				vb = viewBlock{Kind: "audit", Audit: b}
			default:
				return nil, fmt.Errorf("report: section %d block %d: unknown block type %T", si+1, bi+1, b)
			}
			vs.Blocks = append(vs.Blocks, vb)
		}
		v.Sections = append(v.Sections, vs)
	}
	for _, s := range []Status{OK, Fail, Undecided, Warn, Info} {
		if used[s] {
			v.Statuses = append(v.Statuses, viewStatus{Class: s.class(), Symbol: s.symbol(), Word: s.word()})
		}
	}
	return v, nil
}
