package reduce

import (
	"bufio"
	"bytes"
	"fmt"
	"io"
	"math"
	"sort"
	"strconv"
	"strings"
	"time"
	"unsafe"

	"lotproof/lots"
)

// Record is one parsed raw tensile record. Forces are in N, lengths in mm,
// areas in mm^2 and strains are fractions, whatever units the file used.
type Record struct {
	Source string // file name
	Line   int    // line of the @record marker

	ID, Lot, Heat, Supplier, Material, Tested, Condition string

	Shape      string  // round, rectangular or area
	Area       float64 // original cross-section S0 [mm^2]
	Gauge      float64 // original gauge length L0 [mm]
	ExtGauge   float64 // extensometer gauge length Le [mm] (Le = L0 when not given)
	FinalGauge float64 // final gauge length Lu [mm], NaN when not given
	FinalArea  float64 // minimum final cross-section Su [mm^2], NaN when not given
	Crosshead  bool    // the extension is crosshead travel, not an extensometer

	ForceUnit      string // as written
	LengthUnit     string // as written
	ForceUnitLine  int    // line of the force unit (for messages)
	LengthUnitLine int    // line of the length unit

	pts points // the data points in file order (see Len, Point, Add)
}

// Where returns "file:line:1" for a line of the record's file.
func (r *Record) Where(line int) string { return fmt.Sprintf("%s:%d:1", r.Source, line) }

var forceUnits = map[string]float64{
	"n": 1, "kn": 1e3, "lbf": 4.4482216152605, "kip": 4448.2216152605, // NIST SP 811 appendix B
}

var lengthUnits = map[string]float64{"mm": 1, "in": 25.4}

type metaKey struct {
	line, col int
	val       string
}

// MaxPoints is the most data points one record may hold (10,000,000: a
// 1 kHz logger over almost three hours). A record with more is refused
// where the limit is passed, so memory stays bounded; the points are held
// as float32 (see points).
const MaxPoints = 10_000_000

// maxValue bounds a force [N] or strain held as float32 (whose largest
// value is 3.4e38); nothing near it comes from a tensile test.
const maxValue = 1e30

// maxLine is the longest line read (bytes); a longer line is refused.
const maxLine = 64 << 10

// Parse reads every record in r, a file in the raw record format (see
// FORMAT.md), streaming: only the current line and the points read so far
// are held. name is used in messages. Every problem found is reported as
// a located *lots.InputError (up to lots.MaxProblems of them).
func Parse(r io.Reader, name string) ([]*Record, error) {
	var (
		probs   []lots.Problem
		more    int
		recs    []*Record
		cur     *Record
		meta    map[string]metaKey
		inData  bool
		columns []string
		strainU float64
		lineNo  int
		skip    bool
		capped  bool
	)
	add := func(line, col int, what, fix string) {
		if len(probs) >= lots.MaxProblems {
			more++
			return
		}
		probs = append(probs, lots.Problem{Where: fmt.Sprintf("%s:%d:%d", name, line, col), What: what, Fix: fix})
	}
	finish := func(endLine int) {
		if cur == nil {
			return
		}
		if !inData {
			add(endLine, 1, fmt.Sprintf("record started on line %d has no @data section", cur.Line),
				"write the metadata, then a line \"@data\", the data rows and \"@end\"")
		} else if cur.Len() < 3 && !skip {
			add(endLine, 1, fmt.Sprintf("record %q has %d data rows", cur.ID, cur.Len()),
				"a record needs the whole test: at least the elastic part, the maximum force and the fracture")
		}
		recs = append(recs, cur)
		cur = nil
	}
	br := bufio.NewReaderSize(r, maxLine)
	var fields [][]byte
	var cols []int
	var fscale, lscale, egauge float64
	for {
		rawB, err := br.ReadSlice('\n')
		if err == bufio.ErrBufferFull {
			lineNo++
			add(lineNo, 1, fmt.Sprintf("line longer than %d bytes", maxLine), "write one data point or metadata key per line")
			for err == bufio.ErrBufferFull {
				_, err = br.ReadSlice('\n')
			}
			if err != nil && err != io.EOF {
				add(lineNo, 1, fmt.Sprintf("cannot read: %v", err), "check that the file can be read")
			}
			if err != nil {
				break
			}
			continue
		}
		if err != nil && err != io.EOF {
			add(lineNo+1, 1, fmt.Sprintf("cannot read: %v", err), "check that the file can be read")
			break
		}
		if len(rawB) == 0 && err == io.EOF {
			break
		}
		rawB = bytes.TrimSuffix(bytes.TrimSuffix(rawB, []byte("\n")), []byte("\r"))
		lineNo++
		if lineNo == 1 {
			rawB = bytes.TrimPrefix(rawB, []byte("\uFEFF"))
		}
		if inData && columns != nil && len(rawB) > 0 && rawB[0] != '@' && rawB[0] != '#' {
			// The fast path for data rows.
			fields, cols = splitFields(rawB, fields[:0], cols[:0])
			if len(fields) > 0 && fields[0][0] != '#' && fields[0][0] != '@' {
				if capped {
					// already reported
				} else if len(fields) != len(columns) {
					c := 1
					if len(cols) > 0 {
						c = cols[len(cols)-1]
					}
					add(lineNo, c, fmt.Sprintf("data row has %d values, the columns are %s", len(fields), strings.Join(columns, ", ")),
						"give every row one number per column; a short last row usually means the file was cut off")
				} else {
					var f, x float64
					bad := false
					for i, fb := range fields {
						v, perr := parseNumber(fb)
						if perr != "" {
							add(lineNo, cols[i], fmt.Sprintf("%s %q %s", columns[i], clip(string(fb)), perr), "write decimal numbers such as 12.345 (point as decimal separator, no digit separators)")
							bad = true
							continue
						}
						switch columns[i] {
						case "force":
							f = v * fscale
						case "extension":
							x = v * lscale / egauge
						case "strain":
							x = v * strainU
						}
					}
					if !bad && (math.Abs(f) > maxValue || math.Abs(x) > maxValue) {
						add(lineNo, 1, fmt.Sprintf("data row holds a force of %.4g N or a strain of %.4g, beyond any tensile test", f, x),
							"check the columns, the force unit and the length unit")
						bad = true
					}
					if !bad {
						if cur.Len() >= MaxPoints {
							add(lineNo, 1, fmt.Sprintf("record %q has more than %d data points", cur.ID, MaxPoints),
								"record at a lower sampling rate or average consecutive points before reducing")
							capped = true
						} else {
							cur.pts.add(f, x, lineNo)
						}
					}
				}
				if err == io.EOF {
					break
				}
				continue
			}
		}
		raw := string(rawB)
		text := strings.TrimSpace(raw)
		indent := len(raw) - len(strings.TrimLeft(raw, " \t")) + 1
		if text == "" || strings.HasPrefix(text, "#") {
			if err == io.EOF {
				break
			}
			continue
		}
		switch strings.ToLower(text) {
		case "@record":
			if cur != nil {
				add(lineNo, indent, fmt.Sprintf("@record before the @end of the record started on line %d", cur.Line),
					"close every record with a line \"@end\"")
				finish(lineNo)
			}
			cur = &Record{Source: name, Line: lineNo, FinalGauge: math.NaN(), FinalArea: math.NaN()}
			meta = map[string]metaKey{}
			inData, skip, capped = false, false, false
			columns = nil
		case "@data":
			if cur == nil {
				add(lineNo, indent, "@data outside a record", "start each record with a line \"@record\"")
				break
			}
			if inData {
				add(lineNo, indent, "second @data in one record", "end the record with \"@end\" before starting another")
				break
			}
			var ok bool
			fscale, lscale, egauge, strainU, columns, ok = cur.applyMeta(meta, lineNo, add)
			skip = !ok
			if !ok {
				// The data cannot be read without its units; skip to @end.
				columns = nil
			}
			inData = true
		case "@end":
			if cur == nil {
				add(lineNo, indent, "@end outside a record", "start each record with a line \"@record\"")
				break
			}
			finish(lineNo)
			columns = nil
			inData = false
		default:
			switch {
			case cur == nil:
				add(lineNo, indent, fmt.Sprintf("unexpected line %q outside a record", clip(text)),
					"start each record with a line \"@record\" (lines starting with # are comments)")
			case !inData:
				k, v, ok := strings.Cut(text, ":")
				if !ok {
					add(lineNo, indent, fmt.Sprintf("metadata line %q has no colon", clip(text)), "write metadata as \"key: value\", e.g. \"gauge length: 40\"")
					break
				}
				key := strings.ToLower(strings.Join(strings.Fields(k), " "))
				if prev, dup := meta[key]; dup {
					add(lineNo, indent, fmt.Sprintf("%q given twice (first on line %d)", key, prev.line), "give each metadata key once per record")
					break
				}
				col := strings.Index(raw, ":") + 2 + len(v) - len(strings.TrimLeft(v, " \t"))
				meta[key] = metaKey{lineNo, col, strings.TrimSpace(v)}
			default:
				// A data row of a record whose metadata was unusable
				// (columns == nil): skipped, the metadata problem is
				// reported.
			}
		}
		if err == io.EOF {
			break
		}
	}
	if cur != nil {
		add(lineNo, 1, fmt.Sprintf("record %q (started on line %d) ends without @end: the file looks truncated", cur.ID, cur.Line),
			"check that the whole file was copied; every record ends with a line \"@end\"")
		cur = nil
	}
	if len(recs) == 0 && len(probs) == 0 {
		add(1, 1, "no records in the file", "start each record with a line \"@record\" (see FORMAT.md)")
	}
	if len(probs) > 0 {
		return nil, &lots.InputError{Problems: probs, More: more}
	}
	return recs, nil
}

// ParseBytes is Parse over bytes in memory.
func ParseBytes(data []byte, name string) ([]*Record, error) {
	return Parse(bytes.NewReader(data), name)
}

// parseNumber reads a plain decimal number (optionally with an exponent).
// Go's parser also reads hexadecimal floats (0x1p3), digit separators
// (1_000), infinities and NaN; a record holds plain decimal numbers, as
// the results CSV does, so those are refused: the second result says why.
func parseNumber(b []byte) (float64, string) {
	for _, c := range b {
		if c == 'x' || c == 'X' || c == '_' {
			return 0, "is not a plain decimal number (hexadecimal and digit separators are not read)"
		}
	}
	v, err := strconv.ParseFloat(unsafe.String(unsafe.SliceData(b), len(b)), 64)
	if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, "is not a finite number"
	}
	return v, ""
}

func clip(s string) string {
	if len(s) > 40 {
		return s[:40] + "..."
	}
	return s
}

// splitFields splits a data row on blanks, tabs, commas or semicolons and
// returns the fields with their 1-based byte columns, appended to f and c.
func splitFields(line []byte, f [][]byte, c []int) ([][]byte, []int) {
	start := -1
	for i := 0; i <= len(line); i++ {
		sep := i == len(line)
		if !sep {
			switch line[i] {
			case ' ', '\t', ',', ';', '\r':
				sep = true
			}
		}
		if sep {
			if start >= 0 {
				f = append(f, line[start:i])
				c = append(c, start+1)
				start = -1
			}
		} else if start < 0 {
			start = i
		}
	}
	return f, c
}

// applyMeta checks the metadata block and fills the record. It returns the
// factors that turn the data columns into N and strain.
func (r *Record) applyMeta(meta map[string]metaKey, dataLine int, add func(line, col int, what, fix string)) (fscale, lscale, egauge, strainU float64, columns []string, ok bool) {
	ok = true
	known := map[string]bool{}
	get := func(k string) (metaKey, bool) {
		known[k] = true
		m, has := meta[k]
		return m, has
	}
	str := func(k string) string { m, _ := get(k); return m.val }
	bad := func(m metaKey, what, fix string) { add(m.line, m.col, what, fix); ok = false }
	r.ID, r.Lot = str("specimen"), str("lot")
	r.Heat, r.Supplier, r.Material = str("heat"), str("supplier"), str("material")
	r.Tested, r.Condition = str("tested"), str("condition")
	if r.ID == "" {
		add(dataLine, 1, fmt.Sprintf("record started on line %d has no specimen id", r.Line), "add a line \"specimen: ID\" to the metadata")
		ok = false
	}
	if r.Lot == "" {
		add(dataLine, 1, fmt.Sprintf("record %q has no lot", r.ID), "add a line \"lot: LOT\" to the metadata")
		ok = false
	}
	if m, has := get("tested"); has && m.val != "" {
		if _, err := time.Parse("2006-01-02", m.val); err != nil {
			bad(m, fmt.Sprintf("tested date %q is not an ISO 8601 date", m.val), "write dates as YYYY-MM-DD")
		}
	}
	// Units.
	lscale = math.NaN()
	if m, has := get("length unit"); !has {
		add(dataLine, 1, fmt.Sprintf("record %q has no length unit", r.ID), "add \"length unit: mm\" or \"length unit: in\"")
		ok = false
	} else if v, found := lengthUnits[strings.ToLower(m.val)]; !found {
		bad(m, fmt.Sprintf("unknown length unit %q (expected mm or in)", m.val), "write \"length unit: mm\" or \"length unit: in\"")
	} else {
		lscale = v
		r.LengthUnit, r.LengthUnitLine = m.val, m.line
	}
	// Columns.
	colm, has := get("columns")
	if !has {
		colm = metaKey{dataLine, 1, "force extension"}
	}
	columns = append(columns, strings.FieldsFunc(strings.ToLower(colm.val), func(r rune) bool { return r == ' ' || r == ',' || r == '\t' || r == ';' })...)
	nf, nx := 0, 0
	for _, c := range columns {
		switch c {
		case "force":
			nf++
		case "extension", "strain":
			nx++
		case "time":
		default:
			bad(colm, fmt.Sprintf("unknown column %q", c), "columns are force and extension or strain, optionally time, e.g. \"columns: force extension\"")
		}
	}
	if nf != 1 || nx != 1 {
		bad(colm, fmt.Sprintf("columns %q: need exactly one force column and one extension or strain column", colm.val), "write e.g. \"columns: force extension\" or \"columns: time force strain\"")
	}
	fscale = math.NaN()
	if m, has := get("force unit"); !has {
		add(dataLine, 1, fmt.Sprintf("record %q has no force unit", r.ID), "add \"force unit: N\" (or kN, lbf, kip)")
		ok = false
	} else if v, found := forceUnits[strings.ToLower(m.val)]; !found {
		bad(m, fmt.Sprintf("unknown force unit %q (expected N, kN, lbf or kip)", m.val), "write one of N, kN, lbf, kip")
	} else {
		fscale = v
		r.ForceUnit, r.ForceUnitLine = m.val, m.line
	}
	strainU = 1
	if m, has := get("strain unit"); has {
		switch strings.ToLower(m.val) {
		case "mm/mm", "in/in", "1":
		case "%":
			strainU = 0.01
		default:
			bad(m, fmt.Sprintf("unknown strain unit %q", m.val), "write \"strain unit: mm/mm\" or \"strain unit: %\"")
		}
	}
	num := func(k string, required bool) float64 {
		m, has := get(k)
		if !has {
			if required {
				add(dataLine, 1, fmt.Sprintf("record %q has no %s", r.ID, k), fmt.Sprintf("add \"%s: VALUE\" (in the length unit)", k))
				ok = false
			}
			return math.NaN()
		}
		v, perr := parseNumber([]byte(m.val))
		if perr != "" || !(v > 0) {
			if perr == "" {
				perr = "is not a positive number"
			}
			bad(m, fmt.Sprintf("%s %q %s", k, m.val, perr), "write a positive decimal number in the length unit")
			return math.NaN()
		}
		return v * lscale
	}
	r.Gauge = num("gauge length", true)
	r.ExtGauge = num("extensometer gauge length", false)
	if math.IsNaN(r.ExtGauge) {
		r.ExtGauge = r.Gauge
	}
	egauge = r.ExtGauge
	r.FinalGauge = num("final gauge length", false)
	d, w, t, a := num("diameter", false), num("width", false), num("thickness", false), num("area", false)
	shape := metaKey{dataLine, 1, ""}
	if m, has := get("shape"); has {
		shape = m
	}
	switch strings.ToLower(shape.val) {
	case "":
		switch {
		case !math.IsNaN(d):
			shape.val = "round"
		case !math.IsNaN(w) || !math.IsNaN(t):
			shape.val = "rectangular"
		case !math.IsNaN(a):
			shape.val = "area"
		}
	}
	r.Shape = strings.ToLower(shape.val)
	switch r.Shape {
	case "round":
		if math.IsNaN(d) {
			bad(shape, "round specimen without a diameter", "add \"diameter: VALUE\"")
		}
		r.Area = math.Pi * d * d / 4
	case "rectangular":
		if math.IsNaN(w) || math.IsNaN(t) {
			bad(shape, "rectangular specimen needs width and thickness", "add \"width: VALUE\" and \"thickness: VALUE\"")
		}
		r.Area = w * t
	case "area":
		if math.IsNaN(a) {
			bad(shape, "no original area given", "add \"area: VALUE\" (in the length unit squared)")
		}
		r.Area = a * lscale // num scaled once; area needs the unit squared
	case "":
		add(dataLine, 1, fmt.Sprintf("record %q gives no cross-section", r.ID), "give \"diameter\" (round), \"width\" and \"thickness\" (rectangular) or \"area\"")
		ok = false
	default:
		bad(shape, fmt.Sprintf("unknown shape %q", shape.val), "write round, rectangular or area")
	}
	if fd := num("final diameter", false); !math.IsNaN(fd) {
		r.FinalArea = math.Pi * fd * fd / 4
	}
	if fa := num("final area", false); !math.IsNaN(fa) {
		if !math.IsNaN(r.FinalArea) {
			m, _ := get("final area")
			bad(m, "both final diameter and final area given", "give one of them")
		}
		r.FinalArea = fa * lscale
	}
	switch m, _ := get("extension"); strings.ToLower(m.val) {
	case "", "extensometer":
	case "crosshead":
		r.Crosshead = true
	default:
		bad(m, fmt.Sprintf("unknown extension source %q", m.val), "write \"extension: extensometer\" or \"extension: crosshead\"")
	}
	keys := make([]string, 0, len(meta))
	for k := range meta {
		if !known[k] {
			keys = append(keys, k)
		}
	}
	sort.Slice(keys, func(i, j int) bool { return meta[keys[i]].line < meta[keys[j]].line })
	for _, k := range keys {
		add(meta[k].line, 1, fmt.Sprintf("unknown metadata key %q", k), "see FORMAT.md for the keys; comments start with #")
		ok = false
	}
	return
}
