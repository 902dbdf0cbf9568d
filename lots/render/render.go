package render

import (
	"bufio"
	"bytes"
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
// Rows hold the text shown to people (numbers rounded for reading); Exact
// holds, for the cells added as numbers, the full-precision form written to
// CSV (shortest text that reads back to the same float64; empty when the
// value is missing).
type Table struct {
	Name    string // the table's name for --table (e.g. "lots"); "" for a command's only table
	Hidden  bool   // left out of the text output unless asked for by name (e.g. an empty list)
	Title   string
	Columns []string
	Right   []bool // right-align column i (numbers)
	Rows    [][]string
	Exact   [][]string // per row: nil, or the machine form of every cell
	Notes   []string
	// CSVOnly: the rows are only written as CSV (WriteCSV, WriteCSVRows),
	// so Add leaves the text of number cells for people empty.
	CSVOnly bool
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

// Number is a table cell holding a number: people read it rounded, CSV
// carries it in full.
type Number struct {
	V     float64
	Digit int     // significant digits (Sig) or decimals (Fixed) shown to people
	Fixed bool    // Digit counts decimals, not significant digits
	Trim  bool    // drop trailing zeros after the decimal point
	Floor float64 // positive values below Floor show as "<Floor" (0: none)
}

// N is a number shown with sig significant digits and written in full to CSV.
func N(v float64, sig int) Number { return Number{V: v, Digit: sig} }

// F is a number shown with dec decimals and written in full to CSV.
func F(v float64, dec int) Number { return Number{V: v, Digit: dec, Fixed: true} }

// Text is the number as people read it ("-" when missing).
func (n Number) Text() string {
	if s, ok := floorText(n.V, n.Floor); ok {
		return s
	}
	var s string
	if n.Fixed {
		s = Fixed(n.V, n.Digit)
	} else {
		s = Num(n.V, n.Digit)
	}
	if n.Trim {
		s = trimZeros(s)
	}
	return s
}

// Exact is the shortest text that reads back (strconv.ParseFloat) to exactly
// the same float64; a missing value (NaN) is the empty string.
func Exact(v float64) string {
	if math.IsNaN(v) {
		return ""
	}
	return strconv.FormatFloat(v, 'g', -1, 64)
}

// Label is a cell that reads differently for people and for scripts: the
// text table shows Text, CSV writes Key (a stable code).
type Label struct {
	Text, Key string
}

// Add appends a row; missing cells are left empty. A cell is a string, an
// int, a Number or a Label.
func (t *Table) Add(cells ...any) {
	row := make([]string, len(t.Columns))
	var exact []string
	for i, c := range cells {
		if i >= len(row) {
			panic(fmt.Sprintf("render: %d cells for %d columns", len(cells), len(row)))
		}
		switch v := c.(type) {
		case string:
			row[i] = v
		case int:
			row[i] = strconv.Itoa(v)
		case Number:
			if !t.CSVOnly {
				row[i] = v.Text()
			}
			if exact == nil {
				exact = make([]string, len(row))
			}
			exact[i] = Exact(v.V)
		case Label:
			row[i] = v.Text
			if exact == nil {
				exact = make([]string, len(row))
			}
			exact[i] = v.Key
		default:
			panic(fmt.Sprintf("render: cell of type %T", c))
		}
	}
	if exact != nil {
		for i, c := range cells {
			switch c.(type) {
			case Number, Label:
			default:
				exact[i] = row[i]
			}
		}
	}
	t.Rows = append(t.Rows, row)
	t.Exact = append(t.Exact, exact)
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

// WriteCSV writes the header and rows as CSV (title and notes are left
// out). Numbers are written in full (see Exact), a missing number as an
// empty field.
func (t *Table) WriteCSV(w io.Writer) error {
	cw := csv.NewWriter(w)
	cw.Write(t.Columns)
	t.writeCSVRows(cw)
	cw.Flush()
	return cw.Error()
}

// WriteCSVRows writes the rows added since the last call (as WriteCSV
// does, without the header) and drops them from the table, for a table
// whose rows are written as they come.
func (t *Table) WriteCSVRows(cw *csv.Writer) error {
	t.writeCSVRows(cw)
	t.Rows, t.Exact = t.Rows[:0], t.Exact[:0]
	return cw.Error()
}

func (t *Table) writeCSVRows(cw *csv.Writer) {
	for i, r := range t.Rows {
		if i < len(t.Exact) && t.Exact[i] != nil {
			r = t.Exact[i]
		}
		cw.Write(r)
	}
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

// String is Text, so a Number can be printed in a sentence.
func (n Number) String() string { return n.Text() }

// DropColumn removes column i (for example a column that repeats another
// one in some layouts).
func (t *Table) DropColumn(i int) {
	if i < 0 || i >= len(t.Columns) {
		return
	}
	cut := func(s []string) []string { return append(s[:i:i], s[i+1:]...) }
	t.Columns = cut(t.Columns)
	t.Right = append(t.Right[:i:i], t.Right[i+1:]...)
	for r := range t.Rows {
		t.Rows[r] = cut(t.Rows[r])
		if r < len(t.Exact) && t.Exact[r] != nil {
			t.Exact[r] = cut(t.Exact[r])
		}
	}
}

// WriteJSONArray writes what WriteJSON writes for a list of n elements
// (item(i) the i-th; n = 0 writes an empty list, []), one element at a
// time, so that the whole text is never in memory.
// WriteJSONArrayItems writes what WriteJSONArray writes, with the n
// elements already encoded by a JSONItems from NewJSONArrayItems (flushed):
// items writes them to its argument.
func WriteJSONArrayItems(w io.Writer, n int, items func(io.Writer) error) error {
	if n == 0 {
		_, err := io.WriteString(w, "[]\n")
		return err
	}
	bw := bufio.NewWriterSize(w, 1<<16)
	bw.WriteString("[\n")
	if err := items(bw); err != nil {
		return err
	}
	bw.WriteString("\n]\n")
	return bw.Flush()
}

func WriteJSONArray(w io.Writer, n int, item func(i int) any) error {
	if n == 0 {
		_, err := io.WriteString(w, "[]\n")
		return err
	}
	bw := bufio.NewWriterSize(w, 1<<16)
	bw.WriteString("[\n")
	if err := writeJSONItems(bw, "  ", n, item); err != nil {
		return err
	}
	bw.WriteString("]\n")
	return bw.Flush()
}

// writeJSONItems writes the n elements of a list, each indented by prefix
// and followed by a comma but the last, one per line.
func writeJSONItems(bw *bufio.Writer, prefix string, n int, item func(i int) any) error {
	items := newJSONItems(bw, prefix)
	for i := range n {
		if err := items.Add(item(i)); err != nil {
			return err
		}
	}
	return items.end()
}

// JSONItems encodes the elements of a long top-level list one at a time,
// in the form WriteJSONList gives them, so that a command can write each
// element as soon as it has it and keep none; WriteJSONListItems then puts
// them in their place.
type JSONItems struct {
	bw     *bufio.Writer
	prefix string
	ib     bytes.Buffer
	enc    *json.Encoder
	n      int
}

// NewJSONItems encodes the elements of a list that is a top-level member
// (WriteJSONListItems) into w, buffered: call Flush.
func NewJSONItems(w io.Writer) *JSONItems { return newJSONItems(bufio.NewWriterSize(w, 1<<16), "    ") }

// NewJSONArrayItems encodes the elements of a top-level array
// (WriteJSONArrayItems) into w, buffered: call Flush.
func NewJSONArrayItems(w io.Writer) *JSONItems {
	return newJSONItems(bufio.NewWriterSize(w, 1<<16), "  ")
}

func newJSONItems(bw *bufio.Writer, prefix string) *JSONItems {
	j := &JSONItems{bw: bw, prefix: prefix}
	j.enc = json.NewEncoder(&j.ib)
	j.enc.SetIndent(prefix, "  ")
	j.enc.SetEscapeHTML(false)
	return j
}

// Add encodes one element. Elements are separated by a comma and a new
// line; the last one's line is ended by end.
func (j *JSONItems) Add(v any) error {
	j.ib.Reset()
	if err := j.enc.Encode(v); err != nil {
		return err
	}
	if j.n > 0 {
		j.bw.WriteString(",\n")
	}
	j.bw.WriteString(j.prefix)
	j.bw.Write(bytes.TrimSuffix(j.ib.Bytes(), []byte("\n")))
	j.n++
	return nil
}

// Len is the number of elements added.
func (j *JSONItems) Len() int { return j.n }

// Flush writes what is buffered.
func (j *JSONItems) Flush() error { return j.bw.Flush() }

// end ends the last element's line.
func (j *JSONItems) end() error {
	if j.n > 0 {
		j.bw.WriteString("\n")
	}
	return nil
}

// WriteJSONList writes what WriteJSON writes for a value whose member key
// (at the top level) is a long list, without building the whole text in
// memory: head is the value with that list set to nil (so that it encodes
// as null; or to a placeholder list, when nil would leave it out), and item(i) returns the list's i-th of n elements, each encoded
// on its own in the same indented form. The bytes are those of WriteJSON
// on the whole value (TestWriteJSONListSameAsWriteJSON).
func WriteJSONList(w io.Writer, head any, key string, n int, item func(i int) any) error {
	return writeJSONList(w, head, key, n, func(bw *bufio.Writer) error { return writeJSONItems(bw, "    ", n, item) })
}

// WriteJSONListItems is WriteJSONList with the n elements already encoded
// by a JSONItems (flushed): items writes them to its argument.
func WriteJSONListItems(w io.Writer, head any, key string, n int, items func(io.Writer) error) error {
	return writeJSONList(w, head, key, n, func(bw *bufio.Writer) error {
		if err := items(bw); err != nil {
			return err
		}
		_, err := bw.WriteString("\n")
		return err
	})
}

func writeJSONList(w io.Writer, head any, key string, n int, items func(bw *bufio.Writer) error) error {
	var hb bytes.Buffer
	if err := WriteJSON(&hb, head); err != nil {
		return err
	}
	kb, err := json.Marshal(key)
	if err != nil {
		return err
	}
	// The member is null, or a placeholder list (where omitempty would
	// leave an empty one out): indented output closes a top-level list
	// with a line of two spaces and "]", and nothing inside it can.
	hj := hb.Bytes()
	var before, tail []byte
	null := append(append([]byte("\n  "), kb...), ": null"...)
	list := append(append([]byte("\n  "), kb...), ": [\n"...)
	if at := bytes.Index(hj, null); at >= 0 && !bytes.Contains(hj[at+len(null):], null) {
		before, tail = hj[:at+len(null)-len("null")], hj[at+len(null):]
	} else if at := bytes.Index(hj, list); at >= 0 && !bytes.Contains(hj[at+len(list):], list) {
		end := bytes.Index(hj[at:], []byte("\n  ]"))
		before, tail = hj[:at+len(list)-len("[\n")], hj[at+end+len("\n  ]"):]
	} else {
		return fmt.Errorf("render: the member %s is not a single top-level null or list", key)
	}
	bw := bufio.NewWriterSize(w, 1<<16)
	bw.Write(before)
	if n == 0 { // an empty (not nil) list
		bw.WriteString("[]")
		bw.Write(tail)
		return bw.Flush()
	}
	bw.WriteString("[\n")
	if err := items(bw); err != nil {
		return err
	}
	bw.WriteString("  ]")
	bw.Write(tail)
	return bw.Flush()
}
