package lots

import (
	"math"
	"strconv"
	"strings"

	"github.com/xuri/excelize/v2"
)

// xlsxDates turns date cells of a workbook into ISO 8601 dates. A
// spreadsheet holds a date as a serial day number shown through a date
// number format; the serial counts days from 1900-01-00 (1900 date system,
// with the nonexistent 1900-02-29 as day 60) or from 1904-01-01 (1904 date
// system, day 0), as ECMA-376 Part 1 section 18.17.4 defines them. The
// conversion is excelize.ExcelDateToTime.
type xlsxDates struct {
	book     *excelize.File
	sheet    string
	use1904  bool
	off      bool         // workbook too large to look cell styles up
	isDateID map[int]bool // style id -> has a date number format
}

// xlsxDateStyleMax is the largest workbook (bytes) whose date cells are
// read as dates: a cell's number format is only reachable through
// excelize's in-memory copy of the whole worksheet, which the streaming
// read of larger workbooks avoids. Above it, date cells are refused like
// any other number in the tested column (write the dates as text, or save
// as CSV).
const xlsxDateStyleMax = 16 << 20

func newXLSXDates(book *excelize.File, sheet string, size int64) *xlsxDates {
	x := &xlsxDates{book: book, sheet: sheet, isDateID: map[int]bool{}, off: size > xlsxDateStyleMax}
	if p, err := book.GetWorkbookProps(); err == nil && p.Date1904 != nil {
		x.use1904 = *p.Date1904
	}
	return x
}

// cell returns the ISO date (YYYY-MM-DD) of the cell at row, col (1-based)
// when it holds a serial day number with a date format; otherwise raw,
// unchanged (a number without a date format is not taken for a date: it
// may be 20250201 typed as a number, and the row check refuses it). A time
// of day is dropped.
func (x *xlsxDates) cell(row, col int, raw string) string {
	if x.off {
		return raw
	}
	v, err := strconv.ParseFloat(strings.TrimSpace(raw), 64)
	if err != nil || v < 0 || v > 2958465 || math.IsNaN(v) { // 2958465: 9999-12-31
		return raw
	}
	name, err := excelize.CoordinatesToCellName(col, row)
	if err != nil {
		return raw
	}
	id, err := x.book.GetCellStyle(x.sheet, name)
	if err != nil {
		return raw
	}
	isDate, ok := x.isDateID[id]
	if !ok {
		if st, err := x.book.GetStyle(id); err == nil {
			isDate = isDateFormat(st.NumFmt, st.CustomNumFmt)
		}
		x.isDateID[id] = isDate
	}
	if !isDate {
		return raw
	}
	t, err := excelize.ExcelDateToTime(math.Floor(v), x.use1904)
	if err != nil {
		return raw
	}
	return t.Format("2006-01-02")
}

// isDateFormat reports whether a number format shows a date: the built-in
// date formats of ECMA-376 Part 1 section 18.8.30 (14 to 17, 22; 27 to 36
// and 50 to 58 are the East Asian date formats), or a custom format code
// with a year or day part outside quoted text, escapes and [..] sections.
func isDateFormat(builtin int, custom *string) bool {
	if custom == nil {
		switch {
		case builtin >= 14 && builtin <= 17, builtin == 22, builtin >= 27 && builtin <= 36, builtin >= 50 && builtin <= 58:
			return true
		}
		return false
	}
	code := *custom
	if i := strings.IndexByte(code, ';'); i >= 0 {
		code = code[:i] // the positive section decides
	}
	quoted, bracket := false, false
	for i := 0; i < len(code); i++ {
		c := code[i]
		switch {
		case c == '"':
			quoted = !quoted
		case quoted:
		case c == '\\' || c == '_' || c == '*':
			i++ // the next character is literal (or padding)
		case c == '[':
			bracket = true
		case c == ']':
			bracket = false
		case bracket:
		case c == 'y' || c == 'Y' || c == 'd' || c == 'D' || c == 'e':
			return true
		}
	}
	return false
}
