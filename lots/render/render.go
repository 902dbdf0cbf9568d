package render

import (
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
	"unicode/utf8"
)

// Format is an output format.
type Format string

// The output formats.
const (
	Text Format = "table"
	JSON Format = "json"
	CSV  Format = "csv"
)

// ParseFormat reads table, json or csv.
func ParseFormat(s string) (Format, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "table":
		return Text, nil
	case "json":
		return JSON, nil
	case "csv":
		return CSV, nil
	}
	return "", fmt.Errorf("unknown format %q: expected table, json or csv", s)
}

// Table is a titled grid of text cells with optional notes below it.
type Table struct {
	Title   string
	Columns []string
	Right   []bool // right-align column i (numbers)
	Rows    [][]string
	Notes   []string
}

// NewTable makes a table; a column name starting with ">" is right-aligned
// (the ">" is not shown).
func NewTable(title string, columns ...string) *Table {
	t := &Table{Title: title}
	for _, c := range columns {
		right := strings.HasPrefix(c, ">")
		t.Columns = append(t.Columns, strings.TrimPrefix(c, ">"))
		t.Right = append(t.Right, right)
	}
	return t
}

// Add appends a row; missing cells are left empty.
func (t *Table) Add(cells ...string) {
	row := make([]string, len(t.Columns))
	copy(row, cells)
	t.Rows = append(t.Rows, row)
}

// Note appends a line shown under the table.
func (t *Table) Note(format string, args ...any) {
	t.Notes = append(t.Notes, fmt.Sprintf(format, args...))
}

// WriteText writes the table with aligned columns.
func (t *Table) WriteText(w io.Writer) error {
	width := make([]int, len(t.Columns))
	for i, c := range t.Columns {
		width[i] = utf8.RuneCountInString(c)
	}
	for _, r := range t.Rows {
		for i, c := range r {
			if n := utf8.RuneCountInString(c); n > width[i] {
				width[i] = n
			}
		}
	}
	var b strings.Builder
	if t.Title != "" {
		b.WriteString(t.Title)
		b.WriteByte('\n')
	}
	line := func(cells []string) {
		var l strings.Builder
		for i, c := range cells {
			if i > 0 {
				l.WriteString("  ")
			}
			pad := strings.Repeat(" ", width[i]-utf8.RuneCountInString(c))
			if t.Right[i] {
				l.WriteString(pad + c)
			} else {
				l.WriteString(c + pad)
			}
		}
		b.WriteString(strings.TrimRight(l.String(), " "))
		b.WriteByte('\n')
	}
	line(t.Columns)
	rule := make([]string, len(t.Columns))
	for i := range rule {
		rule[i] = strings.Repeat("-", width[i])
	}
	line(rule)
	for _, r := range t.Rows {
		line(r)
	}
	for _, n := range t.Notes {
		b.WriteString(n)
		b.WriteByte('\n')
	}
	_, err := io.WriteString(w, b.String())
	return err
}

// WriteCSV writes the header and rows as CSV (title and notes are left out).
func (t *Table) WriteCSV(w io.Writer) error {
	cw := csv.NewWriter(w)
	cw.Write(t.Columns)
	for _, r := range t.Rows {
		cw.Write(r)
	}
	cw.Flush()
	return cw.Error()
}

// WriteJSON writes v as indented JSON with a trailing newline. HTML
// characters are not escaped, so names read back verbatim.
func WriteJSON(w io.Writer, v any) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	enc.SetEscapeHTML(false)
	return enc.Encode(v)
}

// Num formats v with the given number of significant digits; NaN is "-".
func Num(v float64, sig int) string {
	if math.IsNaN(v) {
		return "-"
	}
	if math.IsInf(v, 0) {
		if v > 0 {
			return "inf"
		}
		return "-inf"
	}
	if v == 0 {
		return "0"
	}
	mag := int(math.Floor(math.Log10(math.Abs(v))))
	dec := sig - 1 - mag
	if dec < 0 {
		dec = 0
	}
	if dec > 12 {
		return strconv.FormatFloat(v, 'g', sig, 64)
	}
	return strconv.FormatFloat(v, 'f', dec, 64)
}

// Fixed formats v with dec decimals; NaN is "-".
func Fixed(v float64, dec int) string {
	if math.IsNaN(v) {
		return "-"
	}
	return strconv.FormatFloat(v, 'f', dec, 64)
}
