package lots

import (
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/xuri/excelize/v2"
)

// dateBook writes a workbook whose tested column holds serial day numbers
// with the given number format (builtin id, or custom code when not "").
func dateBook(t *testing.T, use1904 bool, serials []float64, builtin int, custom string) string {
	t.Helper()
	f := excelize.NewFile()
	if use1904 {
		yes := true
		if err := f.SetWorkbookProps(&excelize.WorkbookPropsOptions{Date1904: &yes}); err != nil {
			t.Fatal(err)
		}
	}
	st := &excelize.Style{NumFmt: builtin}
	if custom != "" {
		st = &excelize.Style{CustomNumFmt: &custom}
	}
	style, err := f.NewStyle(st)
	if err != nil {
		t.Fatal(err)
	}
	f.SetSheetRow("Sheet1", "A1", &[]any{"specimen", "lot", "tested", "tensile [MPa]"})
	for i, s := range serials {
		r := i + 2
		f.SetSheetRow("Sheet1", "A"+itoa(r), &[]any{"S" + itoa(r), "L1"})
		f.SetCellValue("Sheet1", "C"+itoa(r), s)
		if builtin != 0 || custom != "" {
			f.SetCellStyle("Sheet1", "C"+itoa(r), "C"+itoa(r), style)
		}
		f.SetCellValue("Sheet1", "D"+itoa(r), 1000.5)
	}
	p := filepath.Join(t.TempDir(), "dates.xlsx")
	if err := f.SaveAs(p); err != nil {
		t.Fatal(err)
	}
	return p
}

func itoa(i int) string { return strconv.Itoa(i) }

// TestXLSXDateCells: date cells are read as dates in both date systems.
// Reference serials from the definitions of the two systems (ECMA-376 Part
// 1 section 18.17.4.1; Microsoft's "Date systems in Excel"): 1900 system,
// day 1 = 1900-01-01, day 60 = the nonexistent 1900-02-29, day 61 =
// 1900-03-01; 1904 system, day 0 = 1904-01-01, and a date's 1904 serial is
// its 1900 serial minus 1462. 45689 = 2025-02-01 (1900 system) was computed
// as the days from 1899-12-30, the system's day 0 for serials after 60.
func TestXLSXDateCells(t *testing.T) {
	cases := []struct {
		name    string
		use1904 bool
		serials []float64
		builtin int
		custom  string
		want    []string
	}{
		{"1900 m/d/yyyy", false, []float64{45689, 1, 61, 45689.75}, 14, "", []string{"2025-02-01", "1900-01-01", "1900-03-01", "2025-02-01"}},
		{"1900 custom", false, []float64{45689, 46022}, 0, "yyyy-mm-dd", []string{"2025-02-01", "2025-12-31"}},
		{"1900 d-mmm-yy", false, []float64{45689}, 15, "", []string{"2025-02-01"}},
		{"1904", true, []float64{44227, 0, 44227 + 333}, 14, "", []string{"2025-02-01", "1904-01-01", "2025-12-31"}},
		{"1904 custom", true, []float64{44227}, 0, `dd"."mm"."yyyy`, []string{"2025-02-01"}},
	}
	for _, c := range cases {
		d, err := ReadFile(dateBook(t, c.use1904, c.serials, c.builtin, c.custom), ReadOptions{})
		if err != nil {
			t.Errorf("%s: %v", c.name, err)
			continue
		}
		for i, w := range c.want {
			if got := d.Specimen(i).Tested; got != w {
				t.Errorf("%s: serial %g read as %q, want %q", c.name, c.serials[i], got, w)
			}
		}
	}
	// A plain number (no date format) is not taken for a date.
	_, err := ReadFile(dateBook(t, false, []float64{45689}, 0, ""), ReadOptions{})
	if err == nil || !strings.Contains(err.Error(), "!C2: tested date") {
		t.Errorf("unformatted number: %v", err)
	}
	// Nor a number shown with a time-only or plain number format.
	for _, id := range []int{2, 20, 46} {
		if _, err := ReadFile(dateBook(t, false, []float64{45689}, id, ""), ReadOptions{}); err == nil {
			t.Errorf("format %d: a number read as a date", id)
		}
	}
}

func TestIsDateFormat(t *testing.T) {
	for code, want := range map[string]bool{
		"yyyy-mm-dd": true, "d/m/yy": true, "[$-409]mmmm d, yyyy": true, "dd.mm.yyyy hh:mm": true,
		"0.00": false, "h:mm:ss": false, `"day "0`: false, "[h]:mm": false, `0\d`: false, "#,##0": false, "[Red]0.0": false,
	} {
		c := code
		if got := isDateFormat(0, &c); got != want {
			t.Errorf("%q: %v, want %v", code, got, want)
		}
	}
}

// TestXLSXDatesLargeWorkbook: above xlsxDateStyleMax the cell styles are
// not looked up (that would load the whole worksheet), so a date cell stays
// a number and the row check refuses it.
func TestXLSXDatesLargeWorkbook(t *testing.T) {
	p := dateBook(t, false, []float64{45689}, 14, "")
	book, err := excelize.OpenFile(p)
	if err != nil {
		t.Fatal(err)
	}
	defer book.Close()
	if got := newXLSXDates(book, "Sheet1", 1<<20).cell(2, 3, "45689"); got != "2025-02-01" {
		t.Errorf("small workbook: %q", got)
	}
	if got := newXLSXDates(book, "Sheet1", xlsxDateStyleMax+1).cell(2, 3, "45689"); got != "45689" {
		t.Errorf("large workbook: %q", got)
	}
}
