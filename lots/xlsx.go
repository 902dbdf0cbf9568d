package lots

import (
	"crypto/sha256"
	"fmt"
	"io"
	"os"
	"strings"

	"github.com/xuri/excelize/v2"

	"lotproof/lots/input"
)

type xlsxLocator struct {
	name, sheet string
	row         int // 1-based
}

func (l xlsxLocator) at(field int) string { return l.place(l.pos(field)) }

func (l xlsxLocator) pos(field int) (int, int) { return l.row, field + 1 }

func (l xlsxLocator) place(row, col int) string {
	cell, err := excelize.CoordinatesToCellName(col, row)
	if err != nil {
		cell = fmt.Sprintf("R%dC%d", row, col)
	}
	return fmt.Sprintf("%s:%s!%s", l.name, l.sheet, cell)
}

// ReadXLSX reads a specimen results table from the first sheet of an
// Excel workbook, or from the named sheet. Problems are located as
// file:sheet!cell. Cells are read as stored and parsed as in CSV; a date
// cell in the tested column (a serial day number with a date format, 1900
// or 1904 date system) is read as its date; trailing empty cells of a row
// count as missing values.
func ReadXLSX(name, sheet string) (*Dataset, error) {
	f, size, err := input.OpenFile(name, input.Workbook)
	if err != nil {
		return nil, fromInput(err)
	}
	defer f.Close()
	if err := checkWorkbook(f, size, name); err != nil {
		return nil, err
	}
	sum := sha256.New()
	if _, err := io.Copy(sum, io.NewSectionReader(f, 0, size)); err != nil {
		return nil, Inputf(name, "check that the file can be read", "cannot read the workbook: %v", err)
	}
	// excelize unpacks large worksheets into temporary files: they go to
	// a private folder that is removed when the read ends or the command
	// is interrupted.
	tmp, done, err := input.TempDir("lotproof-xlsx-*")
	if err != nil {
		return nil, fmt.Errorf("%s: cannot make a temporary folder: %w", name, err)
	}
	defer done()
	book, err := excelize.OpenFile(reopenPath(f, name), excelize.Options{UnzipSizeLimit: xlsxMaxTotal, TmpDir: tmp})
	if err != nil {
		return nil, Inputf(name, "save the workbook as .xlsx (Excel 2007 or later) and try again", "cannot read the workbook: %v", err)
	}
	defer book.Close()
	sheets := book.GetSheetList()
	if sheet == "" {
		if len(sheets) == 0 {
			return nil, Inputf(name, "add a sheet with the specimen table", "the workbook has no sheets")
		}
		sheet = sheets[0]
	} else {
		found := false
		for _, s := range sheets {
			if s == sheet {
				found = true
			}
		}
		if !found {
			return nil, Inputf(name, "use --sheet with one of: "+strings.Join(sheets, ", "), "the workbook has no sheet %q", sheet)
		}
	}
	rows, err := book.Rows(sheet)
	if err != nil {
		return nil, Inputf(name+":"+sheet, "", "cannot read sheet %q: %v", sheet, err)
	}
	defer rows.Close()
	t := newTable(name)
	d := &Dataset{Source: name}
	var h *Header
	var dates *xlsxDates // date cells of the tested column
	row := 0
	for rows.Next() {
		row++
		cols, err := rows.Columns(excelize.Options{RawCellValue: true})
		if err != nil {
			return nil, Inputf(fmt.Sprintf("%s:%s!A%d", name, sheet, row), "", "cannot read row %d: %v", row, err)
		}
		loc := xlsxLocator{name: name, sheet: sheet, row: row}
		if h == nil {
			if isBlank(cols) {
				continue
			}
			if !t.parseHeader(cols, loc) {
				return nil, t.problems.err()
			}
			h = t.header
			continue
		}
		if isBlank(cols) {
			continue
		}
		// Excel leaves out trailing empty cells; they are missing values.
		for len(cols) < h.width {
			cols = append(cols, "")
		}
		if h.testedCol >= 0 {
			if dates == nil {
				dates = newXLSXDates(book, sheet, size)
			}
			cols[h.testedCol] = dates.cell(row, h.testedCol+1, cols[h.testedCol])
		}
		s := Specimen{Values: make([]float64, len(h.Properties))}
		if t.parseRow(cols, row, loc, &s) {
			d.Add(s)
		}
	}
	if h == nil {
		return nil, Inputf(fmt.Sprintf("%s:%s!A1", name, sheet), "write a header row such as specimen, lot, tensile [MPa] and one row per specimen", "the sheet is empty")
	}
	t.finishIDs(xlsxLocator{name: name, sheet: sheet})
	if err := t.problems.err(); err != nil {
		return nil, err
	}
	if d.Len() == 0 {
		return nil, Inputf(fmt.Sprintf("%s:%s!A%d", name, sheet, row+1), "add one row per specimen below the header", "the sheet has a header but no specimen rows")
	}
	finish(d, h, sum, size)
	return d, nil
}

func isBlank(cols []string) bool {
	for _, c := range cols {
		if strings.TrimSpace(c) != "" {
			return false
		}
	}
	return true
}

// reopenPath names the open file f so that a second open reaches the same
// file even if name was replaced in the meantime (Linux /proc/self/fd),
// else name.
func reopenPath(f *os.File, name string) string {
	p := fmt.Sprintf("/proc/self/fd/%d", f.Fd())
	if _, err := os.Stat(p); err == nil {
		return p
	}
	return name
}
