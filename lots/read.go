package lots

import (
	"bytes"
	"crypto/sha256"
	"encoding/csv"
	"encoding/hex"
	"errors"
	"fmt"
	"hash"
	"io"
	"math"
	"os"
	"path/filepath"
	"sort"
	"strconv"
	"strings"

	"lotproof/lots/input"
	"lotproof/lots/units"
)

// Header describes the columns of a specimen results table.
type Header struct {
	Properties []Property
	idCol      int
	lotCol     int
	heatCol    int
	suppCol    int
	matCol     int
	testedCol  int
	condCol    int
	propCols   []int // column of each property
	width      int
}

// The identity columns, by their heading.
var identityColumns = []string{"specimen", "lot", "heat", "supplier", "material", "tested", "condition"}

// locator names the place of a field in the input, for error messages.
type locator interface {
	at(field int) string           // "file:line:column" or "file:sheet!cell"
	pos(field int) (line, col int) // the numbers behind it
	place(line, col int) string    // at, from the numbers
}

// table turns rows of strings into validated specimens. It is shared by the
// CSV and xlsx readers so both check the same things with the same words.
type table struct {
	name     string
	header   *Header
	problems problems
	seen     idIndex  // hashes of the specimen ids seen, with their lines
	ids      *idQueue // when set, ids are checked on another goroutine instead of in seen
	rows     int
	// The row being parsed is printable ASCII; it holds no space
	// (recordReader.split). False for a row from elsewhere (checked and
	// trimmed).
	printable, spaceless bool
}

func newTable(name string) *table {
	return &table{name: name}
}

// parseHeader reads the heading row. It returns false when the header is
// unusable (no rows can be read against it).
func (t *table) parseHeader(fields []string, loc locator) bool {
	h := &Header{idCol: -1, lotCol: -1, heatCol: -1, suppCol: -1, matCol: -1, testedCol: -1, condCol: -1, width: len(fields)}
	names := map[string]int{}
	ok := t.checkText(fields, loc) // control, invalid and direction characters (text.go)
	for i, raw := range fields {
		f := strings.TrimSpace(raw)
		if i == 0 {
			f = strings.TrimPrefix(f, "\uFEFF")
		}
		if f == "" {
			t.problems.add(loc.at(i), fmt.Sprintf("column %d has no heading", i+1), "give every column a heading, or delete the empty column")
			ok = false
			continue
		}
		name, unit, hasUnit := splitHeading(f)
		key := strings.ToLower(name)
		if prev, dup := names[key]; dup {
			t.problems.add(loc.at(i), fmt.Sprintf("column %s appears twice (first as column %d)", short(name), prev+1), "keep one of the two columns")
			ok = false
			continue
		}
		names[key] = i
		if col := identityIndex(key); col >= 0 && !hasUnit {
			switch col {
			case 0:
				h.idCol = i
			case 1:
				h.lotCol = i
			case 2:
				h.heatCol = i
			case 3:
				h.suppCol = i
			case 4:
				h.matCol = i
			case 5:
				h.testedCol = i
			case 6:
				h.condCol = i
			}
			continue
		}
		if !hasUnit || unit == "" {
			t.problems.add(loc.at(i), fmt.Sprintf("property column %s has no unit", short(name)),
				fmt.Sprintf("write the unit in square brackets, e.g. %s, or %s for a plain number", short(name+" [MPa]"), short(name+" [1]")))
			ok = false
			continue
		}
		u, err := units.Parse(unit)
		if err != nil {
			t.problems.add(loc.at(i), fmt.Sprintf("column %s has unknown unit %s", short(name), short(unit)),
				"use one of: "+strings.Join(units.Symbols(), ", "))
			ok = false
			continue
		}
		h.Properties = append(h.Properties, Property{Name: strings.Clone(name), Unit: u})
		h.propCols = append(h.propCols, i)
	}
	if h.idCol < 0 {
		t.problems.add(loc.at(0), "required column \"specimen\" is missing", "add a column headed specimen with a unique id for every row")
		ok = false
	}
	if h.lotCol < 0 {
		t.problems.add(loc.at(0), "required column \"lot\" is missing", "add a column headed lot naming each specimen's lot")
		ok = false
	}
	if ok && len(h.Properties) == 0 {
		t.problems.add(loc.at(0), "no property columns", "add at least one property column with its unit, e.g. \"tensile [MPa]\"")
		ok = false
	}
	t.header = h
	return ok
}

// splitHeading splits "tensile [MPa]" into ("tensile", "MPa", true).
func splitHeading(f string) (name, unit string, hasUnit bool) {
	if strings.HasSuffix(f, "]") {
		if i := strings.LastIndexByte(f, '['); i >= 0 {
			return strings.TrimSpace(f[:i]), strings.TrimSpace(f[i+1 : len(f)-1]), true
		}
	}
	return f, "", false
}

func identityIndex(key string) int {
	for i, c := range identityColumns {
		if c == key {
			return i
		}
	}
	return -1
}

// parseRow validates one data row into s (whose Values slice is reused).
// It returns false when the row has a problem.
func (t *table) parseRow(fields []string, line int, loc locator, s *Specimen) bool {
	h := t.header
	t.rows++
	if len(fields) != h.width {
		last := len(fields) - 1
		if last < 0 {
			last = 0
		}
		t.problems.add(loc.at(last), fmt.Sprintf("row has %d fields, the header has %d", len(fields), h.width),
			"give every row as many fields as the header (an empty field is a missing value)")
		return false
	}
	// Control, invalid and direction characters (text.go): none in a
	// line of printable ASCII; nothing to trim in a line without a space
	// (see recordReader.split).
	ok := t.printable || t.checkText(fields, loc)
	get := func(col int) string {
		if col < 0 {
			return ""
		}
		return t.trim(fields[col])
	}
	s.ID = get(h.idCol)
	s.Lot = get(h.lotCol)
	s.Heat = get(h.heatCol)
	s.Supplier = get(h.suppCol)
	s.Material = get(h.matCol)
	s.Tested = get(h.testedCol)
	s.Condition = get(h.condCol)
	s.Line = line
	if s.ID == "" {
		t.problems.add(loc.at(h.idCol), "specimen id is empty", "give every specimen a unique id")
		ok = false
	} else if t.ids != nil {
		t.ids.add(fnv64(s.ID)) // checked on another core (see idQueue)
	} else {
		l, c := loc.pos(h.idCol)
		if first := t.seen.seen(fnv64(s.ID), l, c); first > 0 {
			t.problems.add(loc.at(h.idCol), fmt.Sprintf("duplicate specimen id %s (first on line %d)", short(s.ID), first),
				"specimen ids must be unique; rename or remove one of them")
			ok = false
		}
	}
	if s.Lot == "" {
		t.problems.add(loc.at(h.lotCol), "lot is empty", "name the lot of every specimen")
		ok = false
	}
	if s.Tested != "" {
		if !isDate(s.Tested) {
			t.problems.add(loc.at(h.testedCol), fmt.Sprintf("tested date %s is not an ISO 8601 date", short(s.Tested)), "write dates as YYYY-MM-DD, e.g. 2026-03-31")
			ok = false
		}
	}
	for i, col := range h.propCols {
		p := h.Properties[i]
		raw := t.trim(fields[col])
		if raw == "" {
			s.Values[i] = math.NaN()
			continue
		}
		v, quick := quickDecimal(raw)
		var err error
		if !quick {
			v, err = strconv.ParseFloat(raw, 64)
			if err == nil && notDecimal(raw) {
				// Go also reads hexadecimal floats and digit separators; a
				// results file holds plain decimal numbers.
				err = strconv.ErrSyntax
			}
		}
		if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
			what := fmt.Sprintf("%s: %s is not a number", p.Name, short(raw))
			if err == nil || errors.Is(err, strconv.ErrRange) {
				what = fmt.Sprintf("%s: %s is not a finite number", p.Name, short(raw))
			}
			t.problems.add(loc.at(col), what, "write a decimal number such as 1034.5, or leave the cell empty for a missing value")
			ok = false
			continue
		}
		v = p.Unit.ToInternal(v)
		if msg := units.CheckValue(p.Unit.Quantity, v); msg != "" {
			t.problems.add(loc.at(col), fmt.Sprintf("%s: %s is impossible (%s)", p.Name, raw, msg), "check the value and its unit")
			ok = false
			continue
		}
		s.Values[i] = v
	}
	return ok
}

// trim is strings.TrimSpace for a field of the row being parsed: nothing
// to do in a row without a space; in a row of printable ASCII the only
// white space is the space, so a field that neither starts nor ends with
// one is left as it is.
func (t *table) trim(f string) string {
	switch {
	case t.spaceless:
		return f
	case t.printable && (f == "" || (f[0] != ' ' && f[len(f)-1] != ' ')):
		return f
	}
	return strings.TrimSpace(f)
}

// finishIDs completes the duplicate-id check (repeats across spilled runs
// of a very large input).
func (t *table) finishIDs(loc locator) {
	type late struct{ line, col, first int }
	var found []late
	err := t.seen.finish(func(line, col, first int) {
		found = append(found, late{line, col, first})
	})
	// The merge meets them in hash order; report them in file order.
	sort.Slice(found, func(i, j int) bool { return found[i].line < found[j].line })
	for _, f := range found {
		t.problems.add(loc.place(f.line, f.col), fmt.Sprintf("duplicate specimen id (the same id as on line %d)", f.first),
			"specimen ids must be unique; rename or remove one of them")
	}
	if err != nil {
		t.problems.add(t.name, "cannot complete the duplicate-id check: "+err.Error(), "make room in the temporary folder ($TMPDIR) and try again")
	}
}

// ScanCSV reads a specimen results CSV from r as a stream, calling fn with
// every valid specimen in file order; the specimen, its strings and its
// Values are reused after fn returns, so fn copies what it keeps
// (strings.Clone for the strings). Memory use does not
// grow with the file except for the duplicate-id index (about 16 bytes per
// specimen, see idIndex). When any row is bad, ScanCSV still reads to
// the end to report every problem (up to MaxProblems) and returns an
// *InputError: a caller that wrote anything from fn must discard it.
func ScanCSV(r io.Reader, name string, fn func(*Header, *Specimen) error) (*Header, error) {
	return scanCSV(r, name, fn, false)
}

// errDuplicate stops a scan that checks ids on another core when it meets
// a repeated id: the caller reads the input again with ScanCSV, which
// reports it with its place among the other problems.
var errDuplicate = errors.New("a specimen id is repeated")

// scanCSV is ScanCSV; with asyncIDs the duplicate-id check runs on another
// goroutine, and a repeated id ends the scan with errDuplicate.
func scanCSV(r io.Reader, name string, fn func(*Header, *Specimen) error, asyncIDs bool) (*Header, error) {
	t := newTable(name)
	defer t.seen.close()
	if asyncIDs {
		t.ids = newIDQueue()
		defer t.ids.stop()
	}
	rr := newRecordReader(r, name)
	// A UTF-8 byte order mark is not part of the first heading.
	if b, err := rr.br.Peek(3); err == nil && bytes.Equal(b, []byte("\xEF\xBB\xBF")) {
		rr.br.Discard(3)
	}
	fields, err := rr.Read()
	if err == io.EOF {
		return nil, Inputf(name+":1:1", "write a header row such as \"specimen,lot,tensile [MPa]\" and one row per specimen", "the file is empty")
	}
	if err != nil {
		return nil, csvError(name, err)
	}
	if !t.parseHeader(fields, rr) {
		return nil, t.problems.err()
	}
	h := t.header
	s := Specimen{Values: make([]float64, len(h.Properties))}
	for {
		fields, err = rr.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			var pe *csv.ParseError
			if !errors.As(err, &pe) {
				return nil, fmt.Errorf("%s: %w", name, err)
			}
			t.problems.add(csvWhere(name, err), csvWhat(err), "fix the quoting: a field with a comma, quote or line break is enclosed in double quotes, and a quote inside it is doubled")
			break // the rest of the file cannot be trusted to line up
		}
		if len(fields) == 1 && strings.TrimSpace(fields[0]) == "" && h.width > 1 {
			continue // a blank line
		}
		t.printable, t.spaceless = rr.printable, !rr.spaced
		if !t.parseRow(fields, rr.line, rr, &s) || t.problems.any() {
			if t.ids != nil && t.ids.dup.Load() {
				return nil, errDuplicate
			}
			continue
		}
		if t.ids != nil && t.ids.dup.Load() {
			return nil, errDuplicate
		}
		if fn != nil {
			if err := fn(h, &s); err != nil {
				return nil, err
			}
		}
	}
	if t.ids != nil && t.ids.stop() {
		return nil, errDuplicate
	}
	t.finishIDs(rr)
	if t.rows == 0 && !t.problems.any() {
		return nil, Inputf(fmt.Sprintf("%s:%d:1", name, rr.next), "add one row per specimen below the header", "the file has a header but no specimen rows")
	}
	return h, t.problems.err()
}

func csvWhere(name string, err error) string {
	var pe *csv.ParseError
	if errors.As(err, &pe) {
		return fmt.Sprintf("%s:%d:%d", name, pe.Line, pe.Column)
	}
	return name
}

func csvWhat(err error) string {
	var pe *csv.ParseError
	if errors.As(err, &pe) {
		return "cannot read the CSV: " + pe.Err.Error()
	}
	return "cannot read the CSV: " + err.Error()
}

func csvError(name string, err error) error {
	var pe *csv.ParseError
	if errors.As(err, &pe) {
		return Inputf(csvWhere(name, err), "fix the quoting: a field with a comma, quote or line break is enclosed in double quotes", "%s", csvWhat(err))
	}
	return fmt.Errorf("%s: %w", name, err)
}

// ReadCSV reads a whole specimen results CSV into a Dataset, with the
// SHA-256 of the bytes read.
func ReadCSV(r io.Reader, name string) (*Dataset, error) {
	sum := sha256.New()
	cnt := &countingReader{r: io.TeeReader(r, sum)}
	d := &Dataset{Source: name}
	h, err := ScanCSV(cnt, name, func(h *Header, s *Specimen) error {
		d.Add(*s)
		return nil
	})
	if err != nil {
		return nil, err
	}
	io.Copy(io.Discard, cnt) // digest covers the whole input
	finish(d, h, sum, cnt.n)
	return d, nil
}

func finish(d *Dataset, h *Header, sum hash.Hash, n int64) {
	d.Properties = h.Properties
	d.Digest = hex.EncodeToString(sum.Sum(nil))
	d.Bytes = n
	if d.Len() == 0 {
		d.np = len(h.Properties)
	}
	d.CountMissing()
}

// withProgress reports the bytes read from r to progress, when set.
func withProgress(r io.Reader, progress func(int64)) io.Reader {
	if progress == nil {
		return r
	}
	return &countingReader{r: r, progress: progress}
}

type countingReader struct {
	r        io.Reader
	n        int64
	progress func(int64)
}

func (c *countingReader) Read(p []byte) (int, error) {
	n, err := c.r.Read(p)
	c.n += int64(n)
	if c.progress != nil {
		c.progress(c.n)
	}
	return n, err
}

// ReadOptions select how a results file is read.
type ReadOptions struct {
	// Progress, when set, is called with the number of bytes read so far
	// (a progress display).
	Progress func(bytes int64)
	Sheet    string    // xlsx: the sheet to read (default: the first)
	Stdin    io.Reader // what "-" reads (default os.Stdin)
}

// ReadFile reads a specimen results file by name: "-" is standard input
// (CSV), a name ending in .xlsx is an Excel workbook, anything else CSV.
func ReadFile(name string, opt ReadOptions) (*Dataset, error) {
	if name == "-" {
		in := opt.Stdin
		if in == nil {
			in = os.Stdin
		}
		return ReadCSV(withProgress(in, opt.Progress), "-")
	}
	if strings.EqualFold(filepath.Ext(name), ".xlsx") {
		return ReadXLSX(name, opt.Sheet)
	}
	f, err := OpenInput(name, input.Results, nil)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	return ReadCSV(withProgress(f, opt.Progress), name)
}

// isDate reports whether s is a valid calendar date written YYYY-MM-DD
// (ISO 8601 calendar date, extended format), years 1000 to 9999.
func isDate(s string) bool {
	if len(s) != 10 || s[4] != '-' || s[7] != '-' {
		return false
	}
	num := func(a, b int) int {
		v := 0
		for _, c := range []byte(s[a:b]) {
			if c < '0' || c > '9' {
				return -1
			}
			v = 10*v + int(c-'0')
		}
		return v
	}
	y, m, d := num(0, 4), num(5, 7), num(8, 10)
	if y < 1000 || m < 1 || m > 12 || d < 1 {
		return false
	}
	days := [13]int{0, 31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31}[m]
	if m == 2 && (y%4 == 0 && y%100 != 0 || y%400 == 0) {
		days = 29
	}
	return d <= days
}

// fnv64 is the 64-bit FNV-1a hash of s (Fowler, Noll and Vo; IETF draft
// "The FNV Non-Cryptographic Hash Algorithm"). A fixed hash keeps the
// duplicate-id check the same from run to run.
func fnv64(s string) uint64 {
	h := uint64(14695981039346656037)
	for i := 0; i < len(s); i++ {
		h ^= uint64(s[i])
		h *= 1099511628211
	}
	return h
}

// short quotes at most 40 characters of a value for a message.
func short(v string) string {
	if r := []rune(v); len(r) > 40 {
		return fmt.Sprintf("%q...", string(r[:40]))
	}
	return fmt.Sprintf("%q", v)
}

// notDecimal reports whether a number Go's parser accepted is written in a
// form a results file never uses: hexadecimal (0x...) or with digit
// separators (_).
func notDecimal(s string) bool {
	for i := 0; i < len(s); i++ {
		if c := s[i]; c == 'x' || c == 'X' || c == '_' {
			return true
		}
	}
	return false
}
