package lots

import (
	"archive/zip"
	"bufio"
	"encoding/binary"
	"fmt"
	"io"
	"path"
	"strings"

	"lotproof/lots/input"
)

// Limits on a results workbook, checked from the zip directory and by one
// pass over the worksheets before the workbook is opened (README, "Limits
// on inputs"). Excel's own limits are 1,048,576 rows, 16,384 columns and
// 32,767 characters a cell (Microsoft, "Excel specifications and limits").
const (
	xlsxMaxDirectory = 4 << 20    // the zip central directory
	xlsxMaxPart      = 64 << 20   // any part other than a worksheet, uncompressed
	xlsxMaxSheet     = 512 << 20  // one worksheet, uncompressed
	xlsxMaxTotal     = 1 << 30    // all parts together, uncompressed
	xlsxMaxRows      = 1 << 20    // rows in a worksheet (Excel's limit)
	xlsxMaxRowCells  = 16384      // cells in a row (Excel's column limit)
	xlsxMaxCells     = 10_000_000 // cells in a worksheet
	xlsxMaxStrings   = 1 << 20    // shared texts (one per row at Excel's row limit)
	xlsxMaxRowBytes  = 4 << 20    // one row of worksheet XML
	xlsxMaxString    = 1 << 20    // one shared string's XML
)

// xlsxFix is what to do with a workbook beyond a limit.
const xlsxFix = "save the results as CSV (read as a stream without these limits), or check that the workbook is the right file"

// checkWorkbook checks the workbook f (size bytes) against the limits
// before any of it is unpacked: the sizes the zip directory declares
// (archive/zip refuses a part that unpacks to more than it declared), then
// the rows, cells and string lengths of every worksheet and of the shared
// strings, by a streaming scan that stops at the first breach.
func checkWorkbook(f io.ReaderAt, size int64, name string) error {
	if err := checkZipDirectory(f, size, name); err != nil {
		return err
	}
	zr, err := zip.NewReader(f, size)
	if err != nil {
		return Inputf(name, "save the workbook as .xlsx (Excel 2007 or later) and try again", "cannot read the workbook: %v", err)
	}
	var total uint64
	for _, zf := range zr.File {
		u := zf.UncompressedSize64
		total += u
		part := strings.ToLower(strings.ReplaceAll(zf.Name, "\\", "/"))
		sheet := strings.HasPrefix(part, "xl/worksheets/") && path.Ext(part) == ".xml"
		limit := uint64(xlsxMaxPart)
		if sheet {
			limit = xlsxMaxSheet
		}
		if u > limit {
			return Inputf(name, xlsxFix, "the workbook part %s unpacks to %d bytes, more than the limit of %s", short(zf.Name), u, input.Size(int64(limit)))
		}
		if total > xlsxMaxTotal {
			return Inputf(name, xlsxFix, "the workbook unpacks to more than the limit of %s", input.Size(xlsxMaxTotal))
		}
	}
	for _, zf := range zr.File {
		part := strings.ToLower(strings.ReplaceAll(zf.Name, "\\", "/"))
		var unit string
		switch {
		case strings.HasPrefix(part, "xl/worksheets/") && path.Ext(part) == ".xml":
			unit = "row"
		case part == "xl/sharedstrings.xml":
			unit = "si"
		default:
			continue
		}
		rc, err := zf.Open()
		if err != nil {
			return Inputf(name, "save the workbook as .xlsx (Excel 2007 or later) and try again", "cannot read the workbook part %s: %v", short(zf.Name), err)
		}
		err = scanPart(rc, unit, name, zf.Name)
		rc.Close()
		if err != nil {
			return err
		}
	}
	return nil
}

// checkZipDirectory reads the end-of-central-directory record (PKWARE
// APPNOTE.TXT 6.3, sections 4.3.14 to 4.3.16) and refuses a directory
// larger than xlsxMaxDirectory before archive/zip reads it into memory.
func checkZipDirectory(f io.ReaderAt, size int64, name string) error {
	const eocdLen, maxComment = 22, 65535
	tail := int64(eocdLen + maxComment)
	if tail > size {
		tail = size
	}
	buf := make([]byte, tail)
	if _, err := f.ReadAt(buf, size-tail); err != nil && err != io.EOF {
		return Inputf(name, "check that the file can be read", "cannot read the workbook: %v", err)
	}
	at := -1
	for i := len(buf) - eocdLen; i >= 0; i-- {
		if binary.LittleEndian.Uint32(buf[i:]) == 0x06054b50 {
			at = i
			break
		}
	}
	if at < 0 {
		return nil // not a zip: the workbook reader says so
	}
	dirSize := uint64(binary.LittleEndian.Uint32(buf[at+12:]))
	if dirSize == 0xFFFFFFFF && at >= 20 && binary.LittleEndian.Uint32(buf[at-20:]) == 0x07064b50 {
		// ZIP64: the locator points at the ZIP64 end record.
		off := int64(binary.LittleEndian.Uint64(buf[at-20+8:]))
		var rec [56]byte
		if off >= 0 && off+56 <= size {
			if _, err := f.ReadAt(rec[:], off); err == nil && binary.LittleEndian.Uint32(rec[:]) == 0x06064b50 {
				dirSize = binary.LittleEndian.Uint64(rec[40:])
			}
		}
	}
	if dirSize > xlsxMaxDirectory {
		return Inputf(name, xlsxFix, "the workbook's zip directory is %d bytes, more than the limit of %s (too many parts)", dirSize, input.Size(xlsxMaxDirectory))
	}
	return nil
}

// scanPart scans one XML part without parsing it: for a worksheet
// (unit "row") it counts rows, cells per row and bytes per row; for the
// shared strings (unit "si") bytes per string. It stops at the first
// breach.
func scanPart(r io.Reader, unit, name, part string) error {
	br := bufio.NewReaderSize(r, 1<<16)
	var (
		pos, start            int64 = 0, -1 // bytes read; where the current unit started
		rows, cells, rowCells int64
		strs                  int64
	)
	maxUnit := int64(xlsxMaxRowBytes)
	if unit == "si" {
		maxUnit = xlsxMaxString
	}
	breach := func(what string, args ...any) error {
		return Inputf(name, xlsxFix, "%s: %s", part, fmt.Sprintf(what, args...))
	}
	checkUnit := func() error {
		if start >= 0 && pos-start > maxUnit {
			if unit == "row" {
				return breach("row %d holds more than %s of XML, more than the limit", rows, input.Size(maxUnit))
			}
			return breach("a shared text holds more than %s of XML, more than the limit (Excel's cell limit is 32,767 characters)", input.Size(maxUnit))
		}
		return nil
	}
	for {
		b, err := br.ReadSlice('<')
		pos += int64(len(b))
		if err == bufio.ErrBufferFull {
			if e := checkUnit(); e != nil {
				return e
			}
			continue
		}
		if err == io.EOF {
			return checkUnit()
		}
		if err != nil {
			return Inputf(name, "save the workbook as .xlsx (Excel 2007 or later) and try again", "cannot read the workbook part %s: %v", short(part), err)
		}
		if e := checkUnit(); e != nil {
			return e
		}
		tag, _ := br.Peek(24)
		switch {
		case unit == "row" && isTag(tag, "row"):
			rows++
			rowCells = 0
			start = pos
			if rows > xlsxMaxRows {
				return breach("more than %d rows, the limit (Excel's own)", xlsxMaxRows)
			}
		case unit == "row" && isTag(tag, "c"):
			rowCells++
			cells++
			if rowCells > xlsxMaxRowCells {
				return breach("row %d has more than %d cells, the limit (Excel's column limit)", rows, xlsxMaxRowCells)
			}
			if cells > xlsxMaxCells {
				return breach("more than %d cells, the limit", xlsxMaxCells)
			}
		case unit == "row" && isTag(tag, "/row"):
			start = -1
		case unit == "si" && isTag(tag, "si"):
			start = pos
			if strs++; strs > xlsxMaxStrings {
				return breach("more than %d shared texts, the limit", xlsxMaxStrings)
			}
		case unit == "si" && isTag(tag, "/si"):
			start = -1
		}
	}
}

// isTag reports whether b (the bytes after '<') is the element n, with
// or without a namespace prefix ("x:row"); n may start with '/' for an
// end tag.
func isTag(b []byte, n string) bool {
	if strings.HasPrefix(n, "/") {
		if len(b) == 0 || b[0] != '/' {
			return false
		}
		b, n = b[1:], n[1:]
	}
	// Skip a prefix: "x:" before the local name.
	for i := 0; i < len(b) && i < 16; i++ {
		c := b[i]
		if c == ':' {
			b = b[i+1:]
			break
		}
		if c == ' ' || c == '>' || c == '/' || c == '\t' || c == '\n' || c == '\r' {
			break
		}
	}
	if len(b) < len(n) || string(b[:len(n)]) != n {
		return false
	}
	if len(b) == len(n) {
		return true
	}
	switch b[len(n)] {
	case ' ', '>', '/', '\t', '\n', '\r':
		return true
	}
	return false
}
