package lots

import (
	"bufio"
	"bytes"
	"encoding/binary"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math/bits"
	"unsafe"
)

// recordReader reads CSV records (RFC 4180, as encoding/csv reads them)
// with their positions. Lines without a double quote, by far the most
// common, are split on commas directly (one string allocation a record);
// a record with quotes, which may span lines, is handed to encoding/csv so
// that quoting follows the standard library exactly.
type recordReader struct {
	br     *bufio.Reader
	name   string
	next   int // number of the next line to read (1-based)
	line   int // line on which the current record starts
	fields []string
	lines  []int // line of each field
	cols   []int // 1-based byte column of each field
	// printable: the current record is one line of printable ASCII (no
	// field needs a text check); spaced: it may hold a space (a field may
	// need trimming).
	printable, spaced bool
	pending           []byte
}

// maxQuoted caps how much a quoted record may span, so that a stray quote
// cannot make the reader hold the rest of a large file.
const maxQuoted = 1 << 20

func newRecordReader(r io.Reader, name string) *recordReader {
	return &recordReader{br: bufio.NewReaderSize(r, 1<<16), name: name, next: 1}
}

// maxLine caps a physical line, so that a file without line ends (or with
// old Mac line ends, a bare carriage return) cannot make the reader hold
// all of it.
const maxLine = 1 << 20

// readLine returns the next physical line without its line end, or io.EOF.
func (rr *recordReader) readLine() ([]byte, error) {
	line, err := rr.br.ReadSlice('\n')
	if err == bufio.ErrBufferFull {
		rr.pending = append(rr.pending[:0], line...)
		for err == bufio.ErrBufferFull {
			if len(rr.pending) > maxLine {
				fix := "each specimen goes on its own line"
				if bytes.IndexByte(rr.pending, '\r') >= 0 {
					fix = "the file seems to end its lines with a bare carriage return (old Mac style); save it with LF or CRLF line ends"
				}
				return nil, &csv.ParseError{StartLine: rr.next, Line: rr.next, Column: 1,
					Err: fmt.Errorf("line longer than %d bytes; %s", maxLine, fix)}
			}
			line, err = rr.br.ReadSlice('\n')
			rr.pending = append(rr.pending, line...)
		}
		line = rr.pending
	}
	if err != nil && err != io.EOF {
		return nil, err
	}
	if len(line) == 0 && err == io.EOF {
		return nil, io.EOF
	}
	rr.next++
	return line, nil
}

func trimEOL(b []byte) []byte {
	b = bytes.TrimSuffix(b, []byte("\n"))
	return bytes.TrimSuffix(b, []byte("\r"))
}

// Read returns the next record, valid until the next call (see split).
// Errors are *csv.ParseError with absolute line numbers.
func (rr *recordReader) Read() ([]string, error) {
	for {
		start := rr.next
		raw, err := rr.readLine()
		if err != nil {
			return nil, err
		}
		line := trimEOL(raw)
		if len(line) == 0 {
			continue // encoding/csv skips empty lines too
		}
		if bytes.IndexByte(line, '"') < 0 {
			rr.split(line, start)
			return rr.fields, nil
		}
		// A quoted record: gather lines until the quotes balance.
		chunk := append([]byte(nil), raw...)
		for bytes.Count(chunk, []byte{'"'})%2 == 1 {
			if len(chunk) > maxQuoted {
				return nil, &csv.ParseError{StartLine: start, Line: start, Column: 1,
					Err: fmt.Errorf("a quoted field opened here is not closed within %d bytes", maxQuoted)}
			}
			more, err := rr.readLine()
			if err == io.EOF {
				break
			}
			if err != nil {
				return nil, err
			}
			chunk = append(chunk, more...)
		}
		return rr.quoted(chunk, start)
	}
}

// split splits an unquoted line on commas. The fields share the reader's
// buffer (no copy): they are valid until the next Read, and a caller that
// keeps one copies it (strings.Clone).
//
// The line is read eight bytes at a time. Commas are found with the exact
// zero-byte test of Anderson, "Bit Twiddling Hacks" (Stanford), on the
// word XOR ','; the same pass notes whether every byte is printable ASCII
// (see plainASCII), which tells the caller that no field needs a text
// check (printable), and whether there is a space (spaced), without which
// no field needs trimming.
func (rr *recordReader) split(line []byte, lineNo int) {
	const ones, highs, lows = 0x0101010101010101, 0x8080808080808080, 0x7f7f7f7f7f7f7f7f
	s := unsafe.String(unsafe.SliceData(line), len(line))
	rr.line, rr.lines = lineNo, rr.lines[:0] // every field on lineNo (see pos)
	rr.fields, rr.cols = rr.fields[:0], rr.cols[:0]
	from := 0
	var odd, spc uint64 // high bits: a byte that is not printable ASCII; a space
	i := 0
	for ; i+8 <= len(s); i += 8 {
		v := binary.LittleEndian.Uint64(line[i:])
		sp, del := v^(' '*ones), v^(0x7f*ones)
		odd |= v&highs | (v-0x20*ones)&^v&highs | (del-ones)&^del&highs
		spc |= (sp - ones) &^ sp & highs
		x := v ^ (',' * ones)
		commas := ^((x&lows + lows) | x | lows) // 0x80 exactly at each comma
		for commas != 0 {
			at := i + bits.TrailingZeros64(commas)/8
			rr.fields = append(rr.fields, s[from:at])
			rr.cols = append(rr.cols, from+1)
			from = at + 1
			commas &= commas - 1
		}
	}
	for ; i < len(s); i++ {
		c := s[i]
		if c-0x20 >= 0x5f {
			odd = highs
		}
		if c == ' ' {
			spc = highs
		}
		if c == ',' {
			rr.fields = append(rr.fields, s[from:i])
			rr.cols = append(rr.cols, from+1)
			from = i + 1
		}
	}
	rr.fields = append(rr.fields, s[from:])
	rr.cols = append(rr.cols, from+1)
	rr.printable, rr.spaced = odd == 0, spc != 0
}

// quoted parses one quoted record with encoding/csv.
func (rr *recordReader) quoted(chunk []byte, lineNo int) ([]string, error) {
	cr := csv.NewReader(bytes.NewReader(chunk))
	cr.FieldsPerRecord = -1
	rec, err := cr.Read()
	if err != nil {
		var pe *csv.ParseError
		if errors.As(err, &pe) {
			pe.StartLine += lineNo - 1
			pe.Line += lineNo - 1
			return nil, pe
		}
		return nil, err
	}
	rr.line, rr.printable, rr.spaced = lineNo, false, true
	rr.fields, rr.lines, rr.cols = rr.fields[:0], rr.lines[:0], rr.cols[:0]
	for i, f := range rec {
		l, c := cr.FieldPos(i)
		rr.fields = append(rr.fields, f)
		rr.lines = append(rr.lines, l+lineNo-1)
		rr.cols = append(rr.cols, c)
	}
	return rr.fields, nil
}

// at locates field i of the current record as file:line:column.
func (rr *recordReader) at(i int) string { return rr.place(rr.pos(i)) }

func (rr *recordReader) pos(i int) (int, int) {
	if i >= len(rr.cols) {
		return rr.line, 1
	}
	if i >= len(rr.lines) { // an unquoted record: one line
		return rr.line, rr.cols[i]
	}
	return rr.lines[i], rr.cols[i]
}

func (rr *recordReader) place(line, col int) string {
	return fmt.Sprintf("%s:%d:%d", rr.name, line, col)
}
